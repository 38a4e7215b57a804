"""Maximum-weight matching of an exponent matrix, symbolically and exactly.

Why: the GDoF of a MIMO channel with generic gains |h_ij|^2 = SNR^(a_ij) -- log det(I + H H^*) divided by
log SNR as SNR grows -- is the largest total weight of a matching in the matrix (max(0, a_ij)); a missing
link weighs nothing (common practice in GDoF converses, from memory; checked against scipy and mpmath in
tests/test_bounds_matching.py).  The cut-set generator needs it as an exact piecewise-linear function of
the exponent parameters, so the symbolic version returns max over matchings of sums of (a_ij)^+.

Because every weight is nonnegative, every matching lies inside a maximal one (no link can be added)
that weighs at least as much, so only the maximal matchings of the links are enumerated: one for a
diagonal matrix, n!/(n-m)! for a complete m x n one (m <= n).  Rows or columns without a link are
dropped first.  The symbolic form is inherently a max over matchings, so its size is checked
(MAX_MATCHINGS).
"""

from __future__ import annotations

from fractions import Fraction
from typing import Sequence

from verifier.core.errors import InputError
from verifier.expressions.expr import Expr, add, as_fraction, const, lift, max_, pos

Matrix = Sequence[Sequence[object]]  # entries: Expr, number, or None for "no link"

# Largest number of maximal matchings one symbolic matching may take (8! = 40320, a complete 8 x 8
# exponent matrix): the result is a max over them, each a sum of (a_ij)^+, so beyond this the
# expression alone is too large for any later stage (about two seconds to build at the limit).
MAX_MATCHINGS = 40320


class MatchingLimit(InputError):
    """More maximal matchings than the limit; `limit` is the limit that was exceeded."""

    def __init__(self, message: str, limit: int):
        super().__init__(message)
        self.limit = limit


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


def maximal_matchings(matrix: Matrix, limit: int = MAX_MATCHINGS) -> list[tuple[tuple[int, int], ...]]:
    """Every maximal matching of the links (entries not None) of the trimmed matrix, as (row, col)
    pairs; MatchingLimit once there are more than `limit`.

    Depth-first over the rows: a row takes a free linked column or stays unmatched; an unmatched row
    requires every column it links to be taken by a later row (else a link could be added), and a
    branch is cut as soon as that has become impossible."""
    m = _trim(matrix)
    if not m:
        return []
    rows, cols = len(m), len(m[0])
    adj = [[j for j in range(cols) if m[i][j] is not None] for i in range(rows)]
    last = [max(i for i in range(rows) if m[i][j] is not None) for j in range(cols)]
    rowmask = [sum(1 << j for j in adj[i]) for i in range(rows)]
    closed = [sum(1 << j for j in range(cols) if last[j] <= i) for i in range(rows)]  # no later row

    def possible(i: int, used: int, required: int) -> bool:
        """Can the rows after i still take every required free column (one column per row)?"""
        missing = required & ~used
        return not missing or (not missing & closed[i] and bin(missing).count("1") <= rows - 1 - i)

    def moves(i: int, used: int, required: int):
        for j in adj[i]:
            if not used >> j & 1 and possible(i, used | 1 << j, required):
                yield (i, j), used | 1 << j, required
        if possible(i, used, required | rowmask[i]):
            yield None, used, required | rowmask[i]

    # an explicit stack (one generator per row), so that a matrix with many rows cannot overflow
    # Python's recursion limit; a leaf is reached only when every unmatched row's columns are taken
    out: list[tuple[tuple[int, int], ...]] = []
    pairs: list[tuple[int, int]] = []
    stack, pushed = [moves(0, 0, 0)], []
    while stack:
        step = next(stack[-1], None)
        if step is None:
            stack.pop()
            if pushed and pushed.pop():
                pairs.pop()
            continue
        pair, used, required = step
        if pair is not None:
            pairs.append(pair)
        if len(stack) == rows:
            out.append(tuple(pairs))
            if len(out) > limit:
                raise MatchingLimit(f"a cut's {rows} x {cols} exponent matrix has more than {limit} "
                                    f"maximal matchings (limit {limit}); the max over them is too "
                                    "large a formula", limit)
            if pair is not None:
                pairs.pop()
            continue
        stack.append(moves(len(stack), used, required))
        pushed.append(pair is not None)
    return out


def matching_gdof(matrix: Matrix, limit: int = MAX_MATCHINGS) -> Expr:
    """max over maximal matchings of sum (a_ij)^+ as a canonical Expr; 0 for a matrix without links.

    MatchingLimit (an InputError) beyond `limit` maximal matchings (a complete matrix larger than
    8 x 8 by default; sparse ones, like the cuts of relay chains, have few)."""
    return matching_gdof_counted(matrix, limit)[0]


def matching_gdof_counted(matrix: Matrix, limit: int = MAX_MATCHINGS) -> tuple[Expr, int]:
    """matching_gdof and the number of maximal matchings it took (for callers with a total limit)."""
    m = _trim(matrix)
    if not m:
        return const(0), 0
    weights = [[None if e is None else pos(lift(e)) for e in row] for row in m]
    found = maximal_matchings(m, limit)
    return max_(*(add(*(weights[i][j] for i, j in pairs)) for pairs in found)), len(found)


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
