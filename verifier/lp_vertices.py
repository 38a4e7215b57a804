"""Vertices, extreme rays and lines of a polyhedron, and exact volumes of polytopes.

Why: a regime is easiest to read from its corners ("the triangle with vertices (1,1), (2,1), (2,2)"),
an unbounded cell needs its rays, and the share of a region where a claim fails is a volume ratio.
Method: the double description method (Motzkin et al. 1953; Fukuda and Prodon 1996) on the
homogenised cone {(x, s) : a_i.x + b_i s >= 0, s >= 0}, one constraint at a time with the
combinatorial adjacency test, in exact Fractions.  Strict atoms are read as their closure.
Volumes: a pulling triangulation (each facet not containing a chosen vertex is coned from it),
then |det| / n! per simplex.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from fractions import Fraction
from typing import Sequence

from .lp import ZERO, rows_of
from .region import Atom


@dataclass(frozen=True)
class Generators:
    """closure = conv(vertices) + cone(rays) + span(lines); each item a dict name -> Fraction."""

    vertices: tuple[dict, ...]
    rays: tuple[dict, ...]
    lines: tuple[dict, ...]

    @property
    def bounded(self) -> bool:
        return not self.rays and not self.lines


def _dot(h, v) -> Fraction:
    return sum((a * b for a, b in zip(h, v) if a and b), ZERO)


def _primitive(v):
    """Scale a direction to coprime integers (keeps numbers small through the iterations)."""
    den = 1
    for x in v:
        den = den * x.denominator // math.gcd(den, x.denominator)
    ints = [int(x * den) for x in v]
    g = 0
    for x in ints:
        g = math.gcd(g, x)
    return tuple(Fraction(x // g) for x in ints) if g else tuple(Fraction(x) for x in ints)


def _add_constraint(h, idx, rays, lines):
    vals = [_dot(h, l) for l in lines]
    k = next((i for i, v in enumerate(vals) if v != 0), None)
    if k is not None:
        l, hl = lines[k], vals[k]
        if hl < 0:
            l, hl = tuple(-x for x in l), -hl
        new_lines = [_primitive([a - vals[i] / vals[k] * b for a, b in zip(lines[i], lines[k])])
                     for i in range(len(lines)) if i != k]
        new_rays = []
        for r, z in rays:
            c = _dot(h, r) / hl
            new_rays.append((_primitive([a - c * b for a, b in zip(r, l)]), z | {idx}))
        new_rays.append((_primitive(l), frozenset(range(idx))))
        return new_rays, new_lines
    vals = [_dot(h, r) for r, _ in rays]
    pos = [i for i, v in enumerate(vals) if v > 0]
    neg = [i for i, v in enumerate(vals) if v < 0]
    out = [rays[i] for i in pos] + [(rays[i][0], rays[i][1] | {idx}) for i, v in enumerate(vals) if v == 0]
    for i in pos:
        for j in neg:
            common = rays[i][1] & rays[j][1]
            if any(common <= z for m, (_, z) in enumerate(rays) if m != i and m != j):
                continue
            p, q = rays[i][0], rays[j][0]
            v = [vals[i] * b - vals[j] * a for a, b in zip(p, q)]
            out.append((_primitive(v), common | {idx}))
    return out, lines


def generators(atoms: Sequence[Atom], names: Sequence[str]) -> Generators | None:
    """Vertices, rays and lines of the closure of `atoms`, or None when the closure is empty."""
    n = len(names)
    rows = rows_of([a.form for a in atoms], names)
    cons = [tuple([ZERO] * n + [Fraction(1)])] + [tuple(a) + (b,) for a, b in rows]
    lines = [tuple(Fraction(int(i == j)) for j in range(n + 1)) for i in range(n + 1)]
    rays: list = []
    for idx, h in enumerate(cons):
        if any(h):
            rays, lines = _add_constraint(h, idx, rays, lines)
    verts = [r for r, _ in rays if r[-1] > 0]
    if not verts:
        return None
    as_dict = lambda v: dict(zip(names, v))  # noqa: E731
    vertices = sorted((tuple(x / v[-1] for x in v[:-1]) for v in verts))
    dirs = sorted(r[:-1] for r, _ in rays if r[-1] == 0)
    return Generators(tuple(map(as_dict, vertices)), tuple(map(as_dict, dirs)),
                      tuple(as_dict(l[:-1]) for l in lines))


# ---------------------------------------------------------------------------------------------
# volumes
# ---------------------------------------------------------------------------------------------

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
    tight = [frozenset(i for i, v in enumerate(verts) if _dot(a, v) + b == 0) for a, b in rows]
    total = ZERO
    for simplex in _triangulate(frozenset(range(len(verts))), n, verts, tight):
        base = verts[simplex[0]]
        total += abs(_det([[a - b for a, b in zip(verts[i], base)] for i in simplex[1:]]))
    return total / math.factorial(n)
