"""Exact volumes of polytopes, for the share of a region where a claim fails.

Method: a pulling triangulation (each facet not containing a chosen vertex is coned from it,
recursively), then |det| / n! per simplex, all in Fractions; no sampling.
"""

from __future__ import annotations

import math
from fractions import Fraction
from typing import Sequence

from verifier.expressions.region import Atom
from verifier.geometry.lp import ZERO, rows_of
from verifier.geometry.vertices import generators



def _rank(vectors) -> int:
    rows = [list(v) for v in vectors]
    rank, cols = 0, len(rows[0]) if rows else 0
    for c in range(cols):
        k = next((i for i in range(rank, len(rows)) if rows[i][c] != 0), None)
        if k is None:
            continue
        rows[rank], rows[k] = rows[k], rows[rank]
        for i in range(rank + 1, len(rows)):
            if rows[i][c]:
                f = rows[i][c] / rows[rank][c]
                rows[i] = [a - f * b for a, b in zip(rows[i], rows[rank])]
        rank += 1
    return rank


def _affine_dim(points) -> int:
    if not points:
        return -1
    base = points[0]
    return _rank([[a - b for a, b in zip(p, base)] for p in points[1:]]) if len(points) > 1 else 0


def _triangulate(face: frozenset, dim: int, verts, tight) -> list[tuple[int, ...]]:
    if dim == 0:
        return [tuple(face)]
    apex = min(face)
    facets = set()
    for t in tight:
        sub = face & t
        if apex not in sub and len(sub) >= dim and _affine_dim([verts[i] for i in sub]) == dim - 1:
            facets.add(frozenset(sub))
    out = []
    for g in sorted(facets, key=sorted):
        out += [(apex,) + s for s in _triangulate(g, dim - 1, verts, tight)]
    return out


def _det(m) -> Fraction:
    m = [list(r) for r in m]
    n, det = len(m), Fraction(1)
    for c in range(n):
        k = next((i for i in range(c, n) if m[i][c] != 0), None)
        if k is None:
            return ZERO
        if k != c:
            m[c], m[k] = m[k], m[c]
            det = -det
        det *= m[c][c]
        for i in range(c + 1, n):
            if m[i][c]:
                f = m[i][c] / m[c][c]
                m[i] = [a - f * b for a, b in zip(m[i], m[c])]
    return det


def volume(atoms: Sequence[Atom], names: Sequence[str]) -> Fraction | None:
    """Exact n-dimensional volume of the closure; 0 when lower-dimensional; None when unbounded."""
    gens = generators(atoms, names)
    if gens is None:
        return ZERO
    if not gens.bounded:
        return None
    verts = [tuple(v[n] for n in names) for v in gens.vertices]
    n = len(names)
    if n == 0:
        return Fraction(1)
    if _affine_dim(verts) < n:
        return ZERO
    rows = rows_of([a.form for a in atoms], names)
    tight = [frozenset(i for i, v in enumerate(verts) if sum(x * y for x, y in zip(a, v)) + b == 0) for a, b in rows]
    total = ZERO
    for simplex in _triangulate(frozenset(range(len(verts))), n, verts, tight):
        base = verts[simplex[0]]
        total += abs(_det([[a - b for a, b in zip(verts[i], base)] for i in simplex[1:]]))
    return total / math.factorial(n)
