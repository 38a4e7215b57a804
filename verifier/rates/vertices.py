"""Basic solutions of an H-form region as piecewise-linear functions of the exponents.

Why: "an H-form lies inside the corners' region" has no quantifier-free linear statement (membership in
a convex hull with moving corners is bilinear), but its vertices do: every vertex of
{A d <= b(theta)} solves A_S d = b_S(theta) for some set S of K rows with A_S invertible, and S does
not depend on theta, so the candidate vertices are x_S(theta) = A_S^{-1} b_S(theta), ordinary PL
expressions.  A polytope lies in a convex set when its vertices do.
"""

from __future__ import annotations

from fractions import Fraction
from itertools import combinations
from math import comb

from verifier.core.budget import TooLarge
from verifier.expressions.expr import Expr, add, scale

from verifier.rates.region import HRegion, RateInequality

MAX_BASES = 5000   # row subsets tried (comb(rows, K)); more is a region far beyond a paper's theorem


def _inverse(matrix: list[list[Fraction]]) -> list[list[Fraction]] | None:
    """Exact inverse by Gauss-Jordan elimination, or None when singular."""
    n = len(matrix)
    work = [row[:] + [Fraction(int(i == j)) for j in range(n)] for i, row in enumerate(matrix)]
    for col in range(n):
        pivot = next((r for r in range(col, n) if work[r][col] != 0), None)
        if pivot is None:
            return None
        work[col], work[pivot] = work[pivot], work[col]
        lead = work[col][col]
        work[col] = [v / lead for v in work[col]]
        for r in range(n):
            if r != col and work[r][col] != 0:
                f = work[r][col]
                work[r] = [a - f * b for a, b in zip(work[r], work[col])]
    return [row[n:] for row in work]


def basic_solutions(region: HRegion) -> list[tuple[tuple[RateInequality, ...], tuple[Expr, ...]]]:
    """(the K tight rows, x_S(theta) in the region's rate order) for every invertible row subset."""
    rows = region.constraints()
    k = len(region.rates)
    count = comb(len(rows), k)
    if count > MAX_BASES:
        raise TooLarge("vertices of an H-form", count, MAX_BASES)
    out = []
    for subset in combinations(rows, k):
        inverse = _inverse([[q.coeff(r) for r in region.rates] for q in subset])
        if inverse is None:
            continue
        x = tuple(add(*(scale(m, q.bound) for m, q in zip(inverse[i], subset) if m)) for i in range(k))
        out.append((subset, x))
    return out
