"""Vertices, extreme rays and lines of a polyhedron, and exact volumes of polytopes.

Why: a regime is easiest to read from its corners ("the triangle with vertices (1,1), (2,1), (2,2)"),
an unbounded cell needs its rays, and regime splitting asks "is d >= 0 on this cell" thousands of
times, which a sign check per generator answers without LP.
Method: the double description method (Motzkin et al. 1953; Fukuda and Prodon 1996) on the
homogenised cone {(x, s) : a_i.x + b_i s >= 0, s >= 0}, one constraint at a time with the
combinatorial adjacency test, in exact integers.  Strict atoms are read as their closure.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache
from fractions import Fraction
from typing import Sequence

from verifier.expressions.expr import Affine
from verifier.expressions.region import Atom
from verifier.geometry.lp import ZERO, rows_of


@dataclass(frozen=True)
class Generators:
    """closure = conv(vertices) + cone(rays) + span(lines); each item a dict name -> Fraction."""

    vertices: tuple[dict, ...]
    rays: tuple[dict, ...]
    lines: tuple[dict, ...]

    @property
    def bounded(self) -> bool:
        return not self.rays and not self.lines


def _dot(h, v):
    return sum(a * b for a, b in zip(h, v) if a and b)


def _primitive(v) -> tuple[int, ...]:
    """Scale an integer direction to coprime integers (keeps numbers small through the iterations)."""
    g = 0
    for x in v:
        g = math.gcd(g, x)
    return tuple(x // g for x in v) if g > 1 else tuple(v)


def _integer(form_vec, const) -> tuple[int, ...]:
    """A constraint (coefficients, constant) as a primitive integer vector with the same sign."""
    vals = list(form_vec) + [const]
    den = 1
    for x in vals:
        q = x.denominator
        if den % q:
            den = den * q // math.gcd(den, q)
    return _primitive([x.numerator * (den // x.denominator) for x in vals])


def _add_constraint(h, idx, rays, lines):
    vals = [_dot(h, l) for l in lines]
    k = next((i for i, v in enumerate(vals) if v != 0), None)
    if k is not None:
        l, hl = lines[k], vals[k]
        if hl < 0:
            l, hl = tuple(-x for x in l), -hl
        new_lines = [_primitive([hl * a - _dot(h, lines[i]) * b for a, b in zip(lines[i], l)])
                     for i in range(len(lines)) if i != k]
        new_rays = [(_primitive([hl * a - _dot(h, r) * b for a, b in zip(r, l)]), z | {idx}) for r, z in rays]
        new_rays.append((l, frozenset(range(idx))))
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
            out.append((_primitive([vals[i] * b - vals[j] * a for a, b in zip(p, q)]), common | {idx}))
    return out, lines


@lru_cache(maxsize=1 << 16)
def _vector(form: Affine, names: tuple[str, ...]) -> tuple[int, ...]:
    """A form as a primitive integer vector; memoised, since the same cut and bound forms are asked
    about on every cell (forms are immutable and hashable)."""
    return _integer(rows_of([form], names)[0][0], form.const)


@dataclass(frozen=True)
class Cone:
    """The homogenised cone {(x, s): a_i.x + b_i s >= 0, s >= 0} of a polyhedron's closure, kept
    as integer generators with their zero sets, so that one more constraint is one DD step.

    Why: during regime splitting every cell is its parent plus one cut; updating the generators is
    cheaper than an LP per question, and "is d >= 0 on the cell" becomes a sign check per generator."""

    names: tuple[str, ...]
    rays: tuple = ()
    lines: tuple = ()
    count: int = 0

    @staticmethod
    def of(atoms: Sequence[Atom], names: Sequence[str]) -> "Cone":
        n = len(names)
        cone = Cone(tuple(names), (), tuple(tuple(int(i == j) for j in range(n + 1)) for i in range(n + 1)), 0)
        cone = cone._add(tuple([0] * n + [1]))
        for a in atoms:
            cone = cone.add(a.form)
        return cone

    def _add(self, h) -> "Cone":
        if not any(h):
            return Cone(self.names, self.rays, self.lines, self.count + 1)
        rays, lines = _add_constraint(h, self.count, list(self.rays), list(self.lines))
        return Cone(self.names, tuple(rays), tuple(lines), self.count + 1)

    def add(self, form: Affine) -> "Cone":
        """The cone of the polyhedron cut by form >= 0."""
        return self._add(_vector(form, self.names))

    @property
    def empty(self) -> bool:
        return not any(r[-1] > 0 for r, _ in self.rays)

    def vector(self, form: Affine) -> tuple[int, ...]:
        """The form as a primitive integer vector (coefficients in `names` order, then constant)."""
        return _vector(form, self.names)

    def nonneg(self, form: Affine) -> bool:
        """Is form >= 0 on the whole closure?  (Exact: a sign check per generator.)"""
        h = self.vector(form)
        return all(_dot(h, r) >= 0 for r, _ in self.rays) and all(_dot(h, l) == 0 for l in self.lines)

    def interior_point(self) -> dict:
        """A relative-interior point: the mean of the vertices plus the sum of the rays."""
        n = len(self.names)
        verts = [r for r, _ in self.rays if r[-1] > 0]
        point = [sum((Fraction(v[k], v[-1]) for v in verts), ZERO) / len(verts) for k in range(n)]
        for r, _ in self.rays:
            if r[-1] == 0:
                point = [p + x for p, x in zip(point, r)]
        return dict(zip(self.names, point))

    def generators(self) -> Generators | None:
        names = self.names
        verts = [r for r, _ in self.rays if r[-1] > 0]
        if not verts:
            return None
        as_dict = lambda v: dict(zip(names, v))  # noqa: E731
        vertices = sorted(tuple(Fraction(x, v[-1]) for x in v[:-1]) for v in verts)
        dirs = sorted(tuple(Fraction(x) for x in r[:-1]) for r, _ in self.rays if r[-1] == 0)
        return Generators(tuple(map(as_dict, vertices)), tuple(map(as_dict, dirs)),
                          tuple(as_dict(tuple(Fraction(x) for x in l[:-1])) for l in self.lines))


def _int_rank(vectors) -> int:
    """Rank of integer vectors (fraction-free elimination)."""
    rows = [list(v) for v in vectors]
    rank = 0
    cols = len(rows[0]) if rows else 0
    for c in range(cols):
        k = next((i for i in range(rank, len(rows)) if rows[i][c] != 0), None)
        if k is None:
            continue
        rows[rank], rows[k] = rows[k], rows[rank]
        p = rows[rank]
        for i in range(rank + 1, len(rows)):
            if rows[i][c]:
                f = rows[i][c]
                rows[i] = [p[c] * x - f * y for x, y in zip(rows[i], p)]
        rank += 1
    return rank


def facet_atoms(atoms: Sequence[Atom], cone: Cone) -> tuple[Atom, ...]:
    """The irredundant atoms of a polyhedron whose cone was built from exactly these atoms (in order,
    after s >= 0), read off the generators without LP:
    - an atom tight on every generator is an implicit equality: kept (it carries the affine hull);
    - an atom whose tight generators (with the lines) include a vertex and span one dimension less
      than the cone is facet-defining: kept once per facet, the strict version preferred;
    - any other strict atom matters only if the face where it vanishes has a vertex that no kept
      strict atom already removes."""
    rays = [r for r, _ in cone.rays]
    full = _int_rank(rays + list(cone.lines))
    tight = [frozenset(k for k, (_, z) in enumerate(cone.rays) if i + 1 in z) for i in range(len(atoms))]
    everywhere = frozenset(range(len(rays)))
    kept: dict = {}
    equalities = []
    for i, atom in enumerate(atoms):
        t = tight[i]
        if not atom.form.coeffs:
            continue  # a true constant (the polyhedron is not empty)
        if t == everywhere:
            equalities.append(atom)
        elif any(rays[k][-1] > 0 for k in t) and \
                _int_rank([rays[k] for k in t] + list(cone.lines)) == full - 1:
            if t not in kept or (atom.strict and not kept[t].strict):
                kept[t] = atom
    out = list(dict.fromkeys(equalities)) + list(kept.values())
    for i, atom in enumerate(atoms):
        t = tight[i]
        if not atom.strict or not atom.form.coeffs or atom in out or not any(rays[k][-1] > 0 for k in t):
            continue
        if not any(s.strict and tight[atoms.index(s)] >= t for s in out):
            out.append(atom)
    return tuple(sorted(out, key=atoms.index))


def generators(atoms: Sequence[Atom], names: Sequence[str]) -> Generators | None:
    """Vertices, rays and lines of the closure of `atoms`, or None when the closure is empty."""
    return Cone.of(atoms, names).generators()
