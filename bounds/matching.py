"""Maximum-weight matching of an exponent matrix, symbolically and exactly.

Why: the GDoF of a MIMO channel with generic gains |h_ij|^2 = SNR^(a_ij) -- log det(I + H H^*) divided by
log SNR as SNR grows -- is the largest total weight of a matching in the matrix (max(0, a_ij)); a missing
link weighs nothing (common practice in GDoF converses, from memory; checked against scipy and mpmath in
tests/test_bounds_matching.py).  The cut-set generator needs it as an exact piecewise-linear function of
the exponent parameters, so the symbolic version returns max over matchings of sums of (a_ij)^+.

Because every weight is nonnegative a largest matching can always be completed to size min(m, n), so only
matchings of that size are enumerated.  Rows or columns without any link are dropped first.
"""

from __future__ import annotations

from fractions import Fraction
from itertools import permutations
from typing import Sequence

from verifier.expr import Expr, add, as_fraction, const, lift, max_, pos

Matrix = Sequence[Sequence[object]]  # entries: Expr, number, or None for "no link"


def _shape(matrix: Matrix) -> tuple[int, int]:
    rows = len(matrix)
    cols = len(matrix[0]) if rows else 0
    for i, row in enumerate(matrix):
        if len(row) != cols:
            raise ValueError(f"matrix row {i} has {len(row)} entries, expected {cols}")
    return rows, cols


def _trim(matrix: Matrix) -> list[list[object]]:
    """Drop the rows and columns in which no entry is a link."""
    rows, cols = _shape(matrix)
    keep_r = [i for i in range(rows) if any(matrix[i][j] is not None for j in range(cols))]
    keep_c = [j for j in range(cols) if any(matrix[i][j] is not None for i in range(rows))]
    return [[matrix[i][j] for j in keep_c] for i in keep_r]


def _matchings(rows: int, cols: int):
    """Every matching of size min(rows, cols) as a tuple of (row, col) pairs."""
    if rows <= cols:
        for chosen in permutations(range(cols), rows):
            yield tuple(zip(range(rows), chosen))
    else:
        for chosen in permutations(range(rows), cols):
            yield tuple(zip(chosen, range(cols)))


def matching_gdof(matrix: Matrix) -> Expr:
    """max over matchings of sum (a_ij)^+ as a canonical Expr; 0 for a matrix without links.

    Intended for the small matrices of cuts (up to about 6 x 6; the enumeration is factorial).
    """
    m = _trim(matrix)
    if not m:
        return const(0)
    weights = [[None if e is None else pos(lift(e)) for e in row] for row in m]
    sums = []
    for pairs in _matchings(len(m), len(m[0])):
        sums.append(add(*(weights[i][j] for i, j in pairs if weights[i][j] is not None)))
    return max_(*sums)


def matching_value(matrix: Matrix) -> Fraction:
    """Exact maximum-weight matching of the numeric matrix (max(0, a_ij)), None meaning no link.

    Dynamic programming over the set of used columns: exact in Fractions and fast enough for the
    sizes that occur (it handles 12 columns in well under a second).
    """
    m = _trim(matrix)
    if not m:
        return Fraction(0)
    if len(m[0]) > len(m):  # keep the bitmask on the shorter side
        m = [list(col) for col in zip(*m)]
    weights = [[Fraction(0) if e is None else max(Fraction(0), as_fraction(e)) for e in row] for row in m]
    best: dict[int, Fraction] = {0: Fraction(0)}
    for row in weights:
        nxt = dict(best)  # the row may stay unmatched
        for used, value in best.items():
            for j, w in enumerate(row):
                if not used >> j & 1:
                    key = used | (1 << j)
                    cand = value + w
                    if cand > nxt.get(key, Fraction(-1)):
                        nxt[key] = cand
        best = nxt
    return max(best.values())
