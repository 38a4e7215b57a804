"""Thresholds: the hyperplanes where one regime hands over to another, and 1-D slice breakpoints.

Why: papers state regimes by their boundaries ("for alpha <= 1/2 ...", "when gamma = 2 alpha");
these are the facets shared by two regimes.  Candidates are found by hashing each polytope's
normalised facet hyperplanes, so only pieces with a facet on the same hyperplane are ever compared;
a cheap exact box test (computed once per piece and hyperplane) rejects most of those pairs, and
shared vertices spanning the facet accept most of the rest, before any LP.  Two convex pieces A, B of different regimes are
adjacent through h = 0 when h is among the irredundant constraints of both and the closures meet in a
set of dimension dim(A) - 1 lying in h = 0 (an exact shape computation, not a picture).
A slice fixes all parameters but one to rationals and lists, per compared expression, the exact
points where its slope changes (the kinks a plot would show).
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from math import gcd
from typing import Mapping, Sequence

from verifier.expressions.expr import Affine, Expr, affine, common_denominator, substitute
from verifier.expressions.region import Atom, Region, atom_text
from verifier.geometry.lp import feasible, substitute_affine
from verifier.geometry.shape import shape
from verifier.regimes.decompose import Cell, decompose, normalise


@dataclass(frozen=True)
class Threshold:
    """The hyperplane `form = 0` (normalised: first coefficient +1), as text like 'alpha = gamma/2',
    with the pairs of regime indices (i < j) it separates."""

    form: Affine
    text: str
    between: tuple[tuple[int, int], ...]


def equation_text(form: Affine) -> str:
    return atom_text(form, "==").replace(" == ", " = ")


def _integer_vertices(p, names, cache: dict):
    """(L, vertices as integer tuples L * v): once per polytope, so that every plane and pair test
    afterwards is integer arithmetic."""
    got = cache.get(id(p))
    if got is None:
        scale = common_denominator(v[n] for v in p.vertices for n in names)
        got = (scale, [tuple(int(v[n] * scale) for n in names) for v in p.vertices])
        cache[id(p)] = got
    return got


def _facet_box(p, h: Affine, names, cache: dict, plane_scale: int):
    """(bounding box, vertex set) of the closure's vertices on h = 0, as integers scaled by
    `plane_scale`; box None: unbounded polytope, box unknown; box (): no vertex on h, so a bounded
    polytope has no facet there.  Computed once per polytope and hyperplane."""
    scale, verts = _integer_vertices(p, names, cache)
    m = common_denominator([c for _, c in h.coeffs] + [h.const])
    w = [int(h.coeff(n) * m) for n in names]
    c = int(h.const * m) * scale
    up = plane_scale // scale
    on = frozenset(tuple(x * up for x in v) for v in verts if sum(a * x for a, x in zip(w, v)) + c == 0)
    if not p.bounded:
        return None, on
    if not on:
        return (), on
    return tuple((min(v[k] for v in on), max(v[k] for v in on)) for k in range(len(names))), on


def _apart(box_a, box_b) -> bool:
    """Quick exact rejection: bounded facets on the same hyperplane whose boxes do not meet."""
    if box_a is None or box_b is None:
        return False
    if box_a == () or box_b == ():
        return True
    return any(max(lo_a, lo_b) > min(hi_a, hi_b) for (lo_a, hi_a), (lo_b, hi_b) in zip(box_a, box_b))


def _affine_rank(points) -> int:
    """Dimension of the affine hull of the points (exact Gaussian elimination)."""
    points = list(points)
    if not points:
        return -1
    rows = [[Fraction(x - y) for x, y in zip(p, points[0])] for p in points[1:]]
    rank, col, width = 0, 0, len(points[0])
    while rank < len(rows) and col < width:
        pivot = next((r for r in range(rank, len(rows)) if rows[r][col] != 0), None)
        if pivot is None:
            col += 1
            continue
        rows[rank], rows[pivot] = rows[pivot], rows[rank]
        for r in range(rank + 1, len(rows)):
            if rows[r][col] != 0:
                k = rows[r][col] / rows[rank][col]
                rows[r] = [x - k * y for x, y in zip(rows[r], rows[rank])]
        rank, col = rank + 1, col + 1
    return rank


def _share_facet(a, verts_a, verts_b) -> bool:
    """Quick exact acceptance: vertices common to both facets span a set of dimension dim(a) - 1,
    so the closures meet in (at least) their convex hull."""
    common = verts_a & verts_b
    return len(common) >= a.dim and _affine_rank(common) >= a.dim - 1


def _integer_atoms(p, names, cache: dict):
    """The piece's constraints as primitive integer rows (w, c) with the sign of w.x + c: once per
    polytope (all later tests are integer arithmetic)."""
    key = ("atoms", id(p))
    if key not in cache:
        rows = []
        for atom in p.polyhedron.atoms:
            m = common_denominator([c for _, c in atom.form.coeffs] + [atom.form.const])
            coeffs = dict(atom.form.coeffs)
            rows.append(([int(coeffs.get(n, 0) * m) for n in names], int(atom.form.const * m)))
        cache[key] = rows
    return cache[key]


def _parallel(u, w) -> bool:
    """Are the integer vectors u and w proportional (u x w = 0 componentwise)?"""
    k = next((i for i, x in enumerate(w) if x != 0), None)
    if k is None:
        return True
    return all(x * w[k] == y * u[k] for x, y in zip(u, w))


def _separated(rows, hv, scale: int, verts) -> bool:
    """Quick exact rejection: a constraint of one piece (valid on its facet), not parallel to the
    plane (normal hv), is <= 0 on every vertex of the other (bounded) facet, so the facets meet only
    inside that constraint's boundary: a set of dimension below the facets' own.  `verts` are
    integer vertices scaled by `scale`, so w.x + c <= 0 is w.X + c*scale <= 0."""
    return bool(verts) and any(not _parallel(w, hv) and
                               all(sum(a * x for a, x in zip(w, v)) + c * scale <= 0 for v in verts)
                               for w, c in rows)


def _adjacent(a, b, h: Affine, names) -> bool:
    """Do the closures of a and b meet in a set of dimension dim(a) - 1 inside h = 0?"""
    meet = [x.relaxed() for x in a.polyhedron.atoms + b.polyhedron.atoms]
    if a.dim < len(names):
        meet += [Atom(h, False), Atom(h, False).negated().relaxed()]
        s = shape(meet, names)
        return s is not None and s.dim == a.dim - 1
    # full-dimensional: substitute the first parameter of h away and ask for an interior point
    first = h.coeffs[0][0]
    rest = affine([(n, -c) for n, c in h.coeffs[1:]], -h.const)
    others = [n for n in names if n != first]
    atoms = []
    for x in meet:
        f = substitute_affine(x.form, first, rest)
        if not f.coeffs:
            if f.const < 0:
                return False
            continue
        atoms.append(Atom(f, True))
    if not others or not atoms:
        return True
    return feasible(atoms, others) is not None


def thresholds(regimes: Sequence, names: Sequence[str], budget=None) -> tuple[Threshold, ...]:
    """Every hyperplane separating two adjacent regimes (regimes: objects with `polytopes`).
    `budget` (verifier.core.budget.Budget) is checked once per candidate hyperplane."""
    planes: dict[Affine, list] = {}
    for r, regime in enumerate(regimes):
        for p in regime.polytopes:
            for atom in p.polyhedron.atoms:
                if atom.form.coeffs:
                    h = normalise(atom.form)
                    side = atom.form.coeffs[0][1] > 0
                    planes.setdefault(h, []).append((r, p, side))
    out, cache = [], {}
    for h, owners in planes.items():
        if budget is not None:
            budget.check("thresholds")
        if len({r for r, _, _ in owners}) < 2:
            continue
        scale = 1
        for _, p, _ in owners:
            k = _integer_vertices(p, names, cache)[0]
            scale = scale * k // gcd(scale, k)
        facets = [_facet_box(p, h, names, cache, scale) for _, p, _ in owners]
        m = common_denominator([c for _, c in h.coeffs] + [h.const])
        hv = [int(h.coeff(n) * m) for n in names]
        seps = [_integer_atoms(p, names, cache) if p.bounded and p.dim == len(names) else None
                for _, p, _ in owners]
        pairs = set()
        for i, (ra, pa, sa) in enumerate(owners):
            if budget is not None:
                budget.check("thresholds")
            for j in range(i + 1, len(owners)):
                rb, pb, sb = owners[j]
                key = (min(ra, rb), max(ra, rb))
                if ra == rb or key in pairs or not (sa != sb or pa.dim < len(names)):
                    continue
                (box_a, verts_a), (box_b, verts_b) = facets[i], facets[j]
                if _apart(box_a, box_b):
                    continue
                if seps[i] is not None and seps[j] is not None and \
                        (_separated(seps[i], hv, scale, verts_b) or _separated(seps[j], hv, scale, verts_a)):
                    continue
                if _share_facet(pa, verts_a, verts_b) or _adjacent(pa, pb, h, names):
                    pairs.add(key)
        if pairs:
            out.append(Threshold(h, equation_text(h), tuple(sorted(pairs))))
    return tuple(sorted(out, key=lambda t: (t.between, t.text)))


# ---------------------------------------------------------------------------------------------
# one-dimensional slices
# ---------------------------------------------------------------------------------------------

@dataclass(frozen=True)
class SliceProfile:
    """Along `param` with the others fixed: consecutive intervals (lo, hi) (None = infinite), the
    slope of each expression on each, and per expression the breakpoints where its slope changes."""

    param: str
    fixed: dict
    intervals: tuple[tuple[Fraction | None, Fraction | None], ...]
    slopes: tuple[tuple[Fraction, ...], ...]
    breakpoints: tuple[tuple[Fraction, ...], ...]

    @property
    def all_breakpoints(self) -> tuple[Fraction, ...]:
        return tuple(sorted({b for side in self.breakpoints for b in side}))


def _interval(cell: Cell, param: str):
    lo, hi = None, None
    for atom in cell.atoms:
        c = atom.form.coeff(param)
        if c == 0:
            continue
        bound = -atom.form.const / c
        if c > 0:
            lo = bound if lo is None else max(lo, bound)
        else:
            hi = bound if hi is None else min(hi, bound)
    return lo, hi


def slice_profile(exprs: Sequence[Expr], region: Region, param: str,
                  fixed: Mapping[str, Fraction]) -> SliceProfile:
    """Exact slopes and breakpoints of `exprs` along `param` through the point `fixed`."""
    fixed = {k: Fraction(v) for k, v in fixed.items() if k != param}
    line = [substitute(e, fixed) for e in exprs]
    cells = decompose(line, region.substitute(fixed), (param,))
    merged: list[list] = []
    for cell in cells:
        lo, hi = _interval(cell, param)
        slopes = tuple(f.coeff(param) for f in cell.forms)
        if merged and merged[-1][2] == slopes and merged[-1][1] == lo:
            merged[-1][1] = hi
        else:
            merged.append([lo, hi, slopes])
    breaks: list[list[Fraction]] = [[] for _ in exprs]
    for left, right in zip(merged, merged[1:]):
        if left[1] is not None and left[1] == right[0]:
            for k in range(len(exprs)):
                if left[2][k] != right[2][k]:
                    breaks[k].append(left[1])
    return SliceProfile(param, fixed, tuple((m[0], m[1]) for m in merged),
                        tuple(m[2] for m in merged), tuple(tuple(b) for b in breaks))
