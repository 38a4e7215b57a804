"""Explicit linear schemes on the GF(2) deterministic two-user IC: achievability checked by ranks.

Why: an outer region is only half a capacity result.  At small integer exponents the corner points of
the Bresler-Tse region can be exhibited by a concrete scheme on the shift-matrix model over GF(2)
(Avestimehr-Diggavi-Tse): each transmitter sends its fresh bits along GF(2) precoding vectors -- plain
levels first, then any vectors (a repetition across levels is sometimes needed) -- possibly over T channel
uses (a symbol extension, for half-integer corners), and receiver j recovers its bits by linear algebra
iff its desired columns have full rank and meet the interference space only in 0:

    rank [H_jj V_j | H_ij V_i] - rank (H_ij V_i) = number of desired bits.

Ranks come from python-flint.  Indices are transmitter-first as in bounds.interference.
"""

from __future__ import annotations

from fractions import Fraction
from math import comb
from itertools import combinations, product
from typing import Mapping, Sequence

import flint

from verifier.core.errors import InputError
from verifier.expressions.expr import evaluate

from .projection import Inequality


def vertices_2d(rows: Sequence[Inequality], point: Mapping[str, object] | None = None,
                x: str = "d1", y: str = "d2") -> list[tuple[Fraction, Fraction]]:
    """Exact vertices of {x, y >= 0 and rows} at `point`, sorted (pairwise line intersections)."""
    tightest: dict[tuple[Fraction, Fraction], Fraction] = {(Fraction(-1), Fraction(0)): Fraction(0),
                                                           (Fraction(0), Fraction(-1)): Fraction(0)}
    for r in rows:
        a, b, c = r.coeff(x), r.coeff(y), evaluate(r.rhs, point or {})
        scale = max(abs(a), abs(b))
        if scale == 0:
            if c < 0:
                return []  # an infeasible condition 0 <= c
            continue
        key = (a / scale, b / scale)
        tightest[key] = min(c / scale, tightest.get(key, c / scale))
    lines = [(a, b, c) for (a, b), c in tightest.items()]
    found = set()
    for (a1, b1, c1), (a2, b2, c2) in combinations(lines, 2):
        det = a1 * b2 - a2 * b1
        if det == 0:
            continue
        vx, vy = (c1 * b2 - c2 * b1) / det, (a1 * c2 - a2 * c1) / det
        if all(a * vx + b * vy <= c for a, b, c in lines):
            found.add((vx, vy))
    return sorted(found)


def _shift_block(n: int, q: int, t: int) -> list[list[int]]:
    """T uses of S^(q-n): block diagonal, qT x qT."""
    size = q * t
    return [[1 if r // q == c // q and (r % q) - (c % q) == q - n else 0 for c in range(size)] for r in range(size)]


def _mat(rows: list[list[int]]) -> flint.nmod_mat:
    return flint.nmod_mat(len(rows), len(rows[0]), [v for row in rows for v in row], 2)


def _apply(block: list[list[int]], vectors: Sequence[Sequence[int]]) -> list[list[int]]:
    """Columns block @ v for each precoding vector v, over GF(2), laid out as rows of a matrix."""
    return [[sum(row[c] * v[c] for c in range(len(v))) % 2 for v in vectors] for row in block]


def _rank(cols: list[list[int]]) -> int:
    if not cols or not cols[0]:
        return 0
    return int(_mat(cols).rank())


def _unit(size: int, level: int) -> tuple[int, ...]:
    return tuple(int(i == level) for i in range(size))


class ShiftIC:
    """The GF(2) deterministic IC with levels n_ij from transmitter i to receiver j, over t channel uses."""

    def __init__(self, n11: int, n12: int, n21: int, n22: int, t: int = 1):
        levels = {(1, 1): n11, (1, 2): n12, (2, 1): n21, (2, 2): n22}
        if any(not isinstance(v, int) or v < 0 for v in levels.values()):
            raise InputError(f"levels must be nonnegative integers, got {levels}")
        self.q = max(1, *levels.values())
        self.t = t
        self.size = self.q * t
        self.h = {pair: _shift_block(n, self.q, t) for pair, n in levels.items()}

    def decodable(self, v1: Sequence[Sequence[int]], v2: Sequence[Sequence[int]]) -> bool:
        """Both receivers recover their bits when transmitter i sends sum_k b_k v_i[k] (v: precoding vectors)."""
        for j, other, mine, theirs in ((1, 2, v1, v2), (2, 1, v2, v1)):
            desired = _apply(self.h[(j, j)], mine)
            interference = _apply(self.h[(other, j)], theirs)
            both = [d + i for d, i in zip(desired, interference)]
            if _rank(both) - _rank(interference) != len(mine):
                return False
        return True

    def find_level_scheme(self, k1: int, k2: int):
        """Level sets (0 = most significant) carrying k1 and k2 fresh bits, decodable by both, or None."""
        for levels1 in combinations(range(self.size), k1):
            for levels2 in combinations(range(self.size), k2):
                v1 = [_unit(self.size, c) for c in levels1]
                v2 = [_unit(self.size, c) for c in levels2]
                if self.decodable(v1, v2):
                    return v1, v2
        return None

    def find_linear_scheme(self, k1: int, k2: int, budget: int = 1 << 14):
        """Any precoders (GF(2) vectors) carrying k1 and k2 bits; exhaustive when within `budget`."""
        found = self.find_level_scheme(k1, k2)
        nonzero = (1 << self.size) - 1
        if found is not None or comb(nonzero, k1) * comb(nonzero, k2) > budget:
            return found
        vectors = list(product((0, 1), repeat=self.size))
        for v1 in combinations(vectors[1:], k1):
            for v2 in combinations(vectors[1:], k2):
                if self.decodable(v1, v2):
                    return list(v1), list(v2)
        return None


def achieve(n11: int, n12: int, n21: int, n22: int, d1, d2, max_uses: int = 2):
    """(uses, precoders of user 1, of user 2) of a linear scheme achieving (d1, d2) bits per use, or None.

    Tries t = 1..max_uses channel uses; on each, level selection first, then (when small enough) every
    set of GF(2) precoding vectors.  None means no such scheme was found, not that none exists.
    """
    d1, d2 = Fraction(d1), Fraction(d2)
    for t in range(1, max_uses + 1):
        k1, k2 = d1 * t, d2 * t
        if k1.denominator != 1 or k2.denominator != 1:
            continue
        channel = ShiftIC(n11, n12, n21, n22, t)
        found = channel.find_linear_scheme(int(k1), int(k2))
        if found is None and t == 2:
            found = _time_shared(channel, (n11, n12, n21, n22), int(k1), int(k2))
        if found is not None:
            return (t, *found)
    return None


def _time_shared(channel: ShiftIC, levels, k1: int, k2: int):
    """Two uses carrying one-use schemes (a1, a2) and (k1 - a1, k2 - a2), checked again on both uses."""
    single = ShiftIC(*levels, 1)
    q = single.size
    for a1 in range(k1 + 1):
        for a2 in range(k2 + 1):
            first = single.find_linear_scheme(a1, a2)
            second = single.find_linear_scheme(k1 - a1, k2 - a2) if first is not None else None
            if second is None:
                continue
            v1 = [tuple(v) + (0,) * q for v in first[0]] + [(0,) * q + tuple(v) for v in second[0]]
            v2 = [tuple(v) + (0,) * q for v in first[1]] + [(0,) * q + tuple(v) for v in second[1]]
            if channel.decodable(v1, v2):
                return v1, v2
    return None
