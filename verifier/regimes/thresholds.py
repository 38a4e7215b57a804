"""Thresholds: the hyperplanes where one regime hands over to another, and 1-D slice breakpoints.

Why: papers state regimes by their boundaries ("for alpha <= 1/2 ...", "when gamma = 2 alpha");
these are the facets shared by two regimes.  Candidates are found by hashing each polytope's
normalised facet hyperplanes, so only pieces with a facet on the same hyperplane are ever compared;
a cheap exact box test (computed once per piece and hyperplane) rejects most of those pairs, and
shared vertices and rays spanning the facet accept most of the rest, before any LP.  Two convex pieces A, B of different regimes are
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
from verifier.expressions.display import equation_display
from verifier.expressions.region import Atom, Region
from verifier.geometry.lp import feasible, substitute_affine
from verifier.geometry.shape import shape
from verifier.regimes.decompose import Cell, decompose, normalise


@dataclass(frozen=True)
class Threshold:
    """The hyperplane `form = 0` (normalised: first coefficient +1), as text like '2*alpha = gamma',
    with the pairs of regime indices (i < j) it separates."""

    form: Affine
    text: str
    between: tuple[tuple[int, int], ...]


def equation_text(form: Affine, names: Sequence[str] = ()) -> str:
    """The display form of the hyperplane (verifier.expressions.display): `2*alpha = gamma`, the
    same sides as every regime row and exact set prints it."""
    return equation_display(form, names)


def _integer_vertices(p, names, cache: dict):
    """(L, vertices as integer tuples L * v): once per polytope, so that every plane and pair test
    afterwards is integer arithmetic."""
    got = cache.get(id(p))
    if got is None:
        scale = common_denominator(v[n] for v in p.vertices for n in names)
        got = (scale, [tuple(int(v[n] * scale) for n in names) for v in p.vertices])
        cache[id(p)] = got
    return got


def _primitive(vec, line: bool = False) -> tuple[int, ...]:
    """A direction as its primitive integer vector (a line's also with a positive first entry), so
    that equal directions compare equal whatever their scale."""
    m = common_denominator(vec)
    ints = [int(x * m) for x in vec]
    g = gcd(*ints) or 1
    ints = [x // g for x in ints]
    if line and next((x for x in ints if x), 0) < 0:
        ints = [-x for x in ints]
    return tuple(ints)


def _facet_box(p, h: Affine, names, cache: dict, plane_scale: int):
    """(bounding box, vertex set, direction set) of the closure's face on h = 0: vertices as
    integers scaled by `plane_scale`, the rays and lines lying in h as primitive integer directions
    (a line as its two rays).  Box None: unbounded polytope, box unknown; box (): no vertex on h,
    so a bounded polytope has no facet there.  Computed once per polytope and hyperplane."""
    scale, verts = _integer_vertices(p, names, cache)
    m = common_denominator([c for _, c in h.coeffs] + [h.const])
    w = [int(h.coeff(n) * m) for n in names]
    c = int(h.const * m) * scale
    up = plane_scale // scale
    on = frozenset(tuple(x * up for x in v) for v in verts if sum(a * x for a, x in zip(w, v)) + c == 0)
    if not p.bounded:
        dirs = set()
        for r in p.rays:
            d = _primitive([r[n] for n in names])
            if sum(a * x for a, x in zip(w, d)) == 0:
                dirs.add(d)
        for line in p.lines:
            d = _primitive([line[n] for n in names], line=True)
            if sum(a * x for a, x in zip(w, d)) == 0:
                dirs.update((d, tuple(-x for x in d)))
        return None, on, frozenset(dirs)
    if not on:
        return (), on, frozenset()
    return tuple((min(v[k] for v in on), max(v[k] for v in on)) for k in range(len(names))), on, frozenset()


def _apart(box_a, box_b) -> bool:
    """Quick exact rejection: bounded facets on the same hyperplane whose boxes do not meet."""
    if box_a is None or box_b is None:
        return False
    if box_a == () or box_b == ():
        return True
    return any(max(lo_a, lo_b) > min(hi_a, hi_b) for (lo_a, hi_a), (lo_b, hi_b) in zip(box_a, box_b))


def _rank(vectors) -> int:
    """Rank of a list of integer vectors (exact Gaussian elimination)."""
    rows = [[Fraction(x) for x in v] for v in vectors]
    if not rows:
        return 0
    rank, col, width = 0, 0, len(rows[0])
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


def _share_facet(a, facet_a, facet_b) -> bool:
    """Quick exact acceptance: the vertices and the ray directions common to both faces on the
    hyperplane generate a set of dimension dim(a) - 1 (affine hull of the common vertices plus the
    span of the common rays), which lies in both closures: conv(common vertices) + cone(common
    rays).  At least one common vertex is needed (the closures are pointed or carry their lines as
    pairs of rays)."""
    (_, verts_a, dirs_a), (_, verts_b, dirs_b) = facet_a, facet_b
    common = sorted(verts_a & verts_b)
    if not common:
        return False
    rays = sorted(dirs_a & dirs_b)
    if len(common) + len(rays) < a.dim:
        return False
    base = common[0]
    return _rank([[x - y for x, y in zip(v, base)] for v in common[1:]] + rays) >= a.dim - 1


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


def _inside(p, h: Affine, facet, names, cache: dict) -> bool:
    """Does the piece's closure lie in the plane h = 0 (every vertex on it, every ray and line in
    it)?"""
    _, on, _ = facet
    _, verts = _integer_vertices(p, names, cache)
    return len(on) == len(verts) and all(sum(h.coeff(n) * d[n] for n in names) == 0
                                         for d in p.rays + p.lines)


def _cutting_rows(p, h: Affine, hv, names, cache: dict):
    """The piece's constraint rows (w, c) that cut its face on h = 0 properly: w is not in the span
    of h's normal and the normals of the piece's implicit equalities (rows vanishing on every
    generator).  For such a row, {w.x + c = 0} meets the piece's affine hull inside h in a set of
    dimension dim(p) - 2.  Empty when h itself does not cut the hull properly.  Once per piece and
    plane; for a full-dimensional piece this is 'not parallel to h'."""
    key = ("cut", id(p), h)
    if key not in cache:
        rows = _integer_atoms(p, names, cache)
        scale, verts = _integer_vertices(p, names, cache)
        dirs = [_primitive([r[n] for n in names]) for r in p.rays + p.lines]
        hull = [w for w, c in rows
                if all(sum(a * x for a, x in zip(w, v)) + c * scale == 0 for v in verts)
                and all(sum(a * x for a, x in zip(w, d)) == 0 for d in dirs)]
        base = _rank(hull) if hull else 0
        if _rank(hull + [hv]) == base:
            cache[key] = []
        else:
            cache[key] = [(w, c) for w, c in rows if _rank(hull + [hv, w]) == base + 2]
    return cache[key]


def _separated(rows, scale: int, facet) -> bool:
    """Quick exact rejection: a constraint w.x + c >= 0 of one piece that cuts its face properly
    (`_cutting_rows`) is <= 0 on the other piece's face on the plane (every vertex, and w.d <= 0 on
    every ray; a line counts as two rays), so the two meet only inside {w.x + c = 0}: a set of
    dimension below dim - 1.  Vertices are integers scaled by `scale`, so w.x + c <= 0 reads
    w.X + c*scale <= 0."""
    _, verts, dirs = facet
    return bool(verts) and any(all(sum(a * x for a, x in zip(w, v)) + c * scale <= 0 for v in verts)
                               and all(sum(a * x for a, x in zip(w, d)) <= 0 for d in dirs)
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
        # a piece lying inside h = 0 (h is one of its implicit equalities, e.g. the region's own
        # alpha == beta) is not divided from anything by h: h is no threshold of it
        keep = [k for k, (_, p, _) in enumerate(owners) if not _inside(p, h, facets[k], names, cache)]
        if len({owners[k][0] for k in keep}) < 2:
            continue
        owners, facets = [owners[k] for k in keep], [facets[k] for k in keep]
        m = common_denominator([c for _, c in h.coeffs] + [h.const])
        hv = [int(h.coeff(n) * m) for n in names]
        seps = [_cutting_rows(p, h, hv, names, cache) for _, p, _ in owners]
        pairs = set()
        for i, (ra, pa, sa) in enumerate(owners):
            if budget is not None:
                budget.check("thresholds")
            for j in range(i + 1, len(owners)):
                rb, pb, sb = owners[j]
                key = (min(ra, rb), max(ra, rb))
                if ra == rb or key in pairs or not (sa != sb or pa.dim < len(names)):
                    continue
                if _apart(facets[i][0], facets[j][0]):
                    continue
                if _separated(seps[i], scale, facets[j]) or _separated(seps[j], scale, facets[i]):
                    continue
                if _share_facet(pa, facets[i], facets[j]) or _adjacent(pa, pb, h, names):
                    pairs.add(key)
        if pairs:
            out.append(Threshold(h, equation_text(h, names), tuple(sorted(pairs))))
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
