"""Shape of a polyhedron, exactly: empty or not, dimension, affine hull, a relative-interior point.

Why: a regime is only meaningful with a point strictly inside it (its formulas are read there), its
dimension tells a full regime from a boundary line, and thresholds are facets shared by two cells.
Method: `max t s.t. every atom >= t` (lp.max_slack).  t > 0: full-dimensional, the optimum is an
interior point.  t < 0: empty.  t = 0: the atoms with positive dual multiplier are implicit
equalities (their weighted sum is identically 0 and each is >= 0); we eliminate them and repeat, at
most once per dimension.  A strict atom that is an implicit equality makes the polyhedron empty.

Also here: irredundant constraints (drop atoms implied by the others, with the Farkas proof of each
drop), nice interior points (small denominators), and set differences of polyhedra.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from fractions import Fraction
from typing import Sequence

from verifier.expressions.expr import Affine, affine
from verifier.expressions.region import Atom
from verifier.geometry.farkas import farkas
from verifier.geometry.lp import ONE, ZERO, feasible, max_slack, minimize_rows, rows_of


@dataclass(frozen=True)
class Shape:
    """A non-empty polyhedron's dimension, relative-interior point and affine hull.

    `hull`: independent affine forms whose common zero set is the affine hull (empty when
    full-dimensional); `implicit`: indices of atoms that hold with equality everywhere."""

    dim: int
    point: dict
    hull: tuple[Affine, ...]
    implicit: tuple[int, ...]


def _rref(eqs: list[list[Fraction]], n: int):
    """Reduced row echelon form of rows [coeffs..., const]; returns (rows, pivot columns) or None
    when some row reads 0 = c != 0."""
    rows = [list(r) for r in eqs]
    pivots: list[int] = []
    r = 0
    for col in range(n):
        k = next((i for i in range(r, len(rows)) if rows[i][col] != 0), None)
        if k is None:
            continue
        rows[r], rows[k] = rows[k], rows[r]
        p = rows[r][col]
        rows[r] = [v / p for v in rows[r]]
        for i in range(len(rows)):
            if i != r and rows[i][col] != 0:
                f = rows[i][col]
                rows[i] = [a - f * b for a, b in zip(rows[i], rows[r])]
        pivots.append(col)
        r += 1
    if any(row[-1] != 0 for row in rows[r:]):
        return None
    return rows[:r], pivots


class _Reduced:
    """x = substitution of pivot variables by free ones, from a set of equalities."""

    def __init__(self, eqs, n):
        got = _rref(eqs, n)
        if got is None:
            raise ValueError("inconsistent equalities")
        self.rows, self.pivots = got
        self.free = [j for j in range(n) if j not in self.pivots]

    def reduce(self, vec, const):
        """An affine form over x rewritten over the free coordinates."""
        vec = list(vec)
        for row, p in zip(self.rows, self.pivots):
            c = vec[p]
            if c:
                for j in self.free:
                    vec[j] -= c * row[j]
                const -= c * row[-1]
                vec[p] = ZERO
        return tuple(vec[j] for j in self.free), const

    def lift(self, u):
        x = [ZERO] * (len(self.free) + len(self.pivots))
        for j, v in zip(self.free, u):
            x[j] = v
        for row, p in zip(self.rows, self.pivots):
            x[p] = -row[-1] - sum((row[j] * x[j] for j in self.free), ZERO)
        return x


def _analyse(atoms: Sequence[Atom], names: Sequence[str]):
    """(reduced system, remaining row indices, implicit set, interior point in free coords) or None."""
    n = len(names)
    rows = rows_of([a.form for a in atoms], names)
    implicit: set[int] = set()
    while True:
        red = _Reduced([list(rows[i][0]) + [rows[i][1]] for i in sorted(implicit)], n)
        live, reduced = [], []
        for i, (vec, b) in enumerate(rows):
            if i in implicit:
                continue
            v, c = red.reduce(vec, b)
            if any(v):
                live.append(i)
                reduced.append((v, c))
            elif c < 0 or (c == 0 and atoms[i].strict):
                return None
            elif c == 0:
                implicit.add(i)
        if any(atoms[i].strict for i in implicit):
            return None
        if not live:
            return red, live, reduced, implicit, [ZERO] * len(red.free)
        got = max_slack(reduced, [True] * len(reduced))
        if got is None or got[0] < 0:
            return None
        t, u, y = got
        if t > 0:
            return red, live, reduced, implicit, list(u)
        implicit |= {live[j] for j, w in enumerate(y) if w > 0}


def shape(atoms: Sequence[Atom], names: Sequence[str]) -> Shape | None:
    """The shape of the polyhedron `atoms` in the space of `names`, or None when it is empty."""
    got = _analyse(atoms, names)
    if got is None:
        return None
    red, _, _, implicit, u = got
    hull = tuple(affine(zip(names, row[:-1]), row[-1]) for row in red.rows)
    return Shape(len(red.free), dict(zip(names, red.lift(u))), hull, tuple(sorted(implicit)))


def nice_point(atoms: Sequence[Atom], names: Sequence[str]) -> dict | None:
    """A relative-interior point with small denominators, or None when the polyhedron is empty.

    In free coordinates: the centre u and radius t of an inscribed box (max t s.t. each atom
    >= t * ||a||_1, t <= 1); every point within max-norm distance < t of u is strictly inside, so each
    free coordinate is the simplest rational of (u_j - t, u_j + t)."""
    got = _analyse(atoms, names)
    if got is None:
        return None
    red, live, reduced, _, u = got
    if reduced:
        centre = _chebyshev(reduced, [sum(abs(x) for x in v) for v, _ in reduced])
        if centre is not None:
            t, u = centre
            u = [simplest_between(x - t, x + t) for x in u]
    return dict(zip(names, red.lift(u)))


def _chebyshev(rows, weights):
    n = len(rows[0][0])
    ext = [(v + (-w,), c) for (v, c), w in zip(rows, weights)]
    ext.append(((ZERO,) * n + (-ONE,), ONE))
    status, value, x, _ = minimize_rows(((ZERO,) * n + (-ONE,), ZERO), ext)
    if status != "optimal" or -value <= 0:
        return None
    return -value, list(x[:n])


def simplest_between(lo: Fraction, hi: Fraction) -> Fraction:
    """The rational with the smallest denominator (then smallest size) in the open interval (lo, hi)."""
    if lo < 0 < hi:
        return ZERO
    if hi <= 0:
        return -simplest_between(-hi, -lo)
    fl = math.floor(lo)
    if fl + 1 < hi:
        return Fraction(fl + 1)
    # lo, hi within [fl, fl + 1]: x = fl + 1/y with y in (1/(hi - fl), 1/(lo - fl))
    upper = None if lo == fl else 1 / (lo - fl)
    low = 1 / (hi - fl)
    if upper is None:
        return fl + 1 / Fraction(math.floor(low) + 1)
    return fl + 1 / simplest_between(low, upper)


def irredundant(atoms: Sequence[Atom], names: Sequence[str]) -> tuple[tuple[Atom, ...], tuple]:
    """The atoms with every atom implied by the remaining ones dropped (in order), and for each drop
    (dropped atom, kept atoms at that time, Farkas certificate over them).  Assumes non-empty."""
    keep = list(dict.fromkeys(atoms))
    drops = []
    i = 0
    while i < len(keep):
        others = keep[:i] + keep[i + 1:]
        cert = farkas(keep[i].form, others, names, keep[i].strict)
        if cert is not None:
            drops.append((keep[i], tuple(others), cert))
            keep = others
        else:
            i += 1
    return tuple(keep), tuple(drops)


def difference(p: Sequence[Atom], qs: Sequence[Sequence[Atom]], names: Sequence[str]) -> list[tuple[Atom, ...]]:
    """P minus the union of the Q's, as pairwise disjoint non-empty polyhedra."""
    if feasible(p, names) is None:
        return []
    if not qs:
        return [tuple(p)]
    first, rest = qs[0], qs[1:]
    if feasible(list(p) + list(first), names) is None:
        return difference(p, rest, names)
    out, acc = [], list(p)
    for q in first:
        out += difference(acc + [q.negated()], rest, names)
        acc.append(q)
        if feasible(acc, names) is None:
            break
    return out


def implied(atom: Atom, atoms: Sequence[Atom], names: Sequence[str]) -> bool:
    """Does the (non-empty) polyhedron `atoms` lie inside the half-space `atom`?"""
    return feasible(list(atoms) + [atom.negated()], names) is None


def reduce_modulo(form: Affine, hull: Sequence[Affine], names: Sequence[str]) -> Affine:
    """The representative of `form` on the affine subspace {hull = 0} that does not use the pivot
    variables of the hull's echelon form: two forms agree on the subspace iff their reductions are
    equal (how regimes of a lower-dimensional region compare formulas)."""
    if not hull:
        return form
    red = _Reduced([list(v) + [c] for v, c in rows_of(list(hull), names)], len(names))
    vec, const = rows_of([form], names)[0]
    v, c = red.reduce(vec, const)
    return affine(zip([names[j] for j in red.free], v), c)
