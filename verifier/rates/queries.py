"""The violation questions of the region claims, each a verifier.solvers.smt Query with an exact re-check.

Every question is quantifier free: "exists theta in R (and a rate tuple d) such that ...".
- H-form A inside H-form B: per constraint q of B, d in A(theta) and q violated;
- corners (or a point) inside H-form B: per constraint q of B, max over corners of q's left side at
  the corner > q's bound (free disposal: positive coefficients only, the best disposal of a corner);
- H-form A inside corners C: per basis S of A (vertices.py), x_S(theta) in A(theta) and no corner
  dominates it (free disposal) / equals it; the exponent point found is then re-checked by an exact
  vertex enumeration of A(theta) and an exact LP for conv C(theta) (membership.py);
- well-formedness: 0 in A (the support formula needs a feasible primal), non-negative corners (free
  disposal).
A `Check` carries the query, the witness coordinates (exponents first, then rates), the exact re-check
and the witness it stands for.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Callable, Mapping

from verifier.expressions.expr import Expr, abs_, add, affine, evaluate, format_number, lift, max_, min_, scale
from verifier.expressions.region import Region
from verifier.solvers.smt import Query

from verifier.rates.membership import in_hull, vertices_at
from verifier.rates.region import HRegion, RateInequality, VRegion
from verifier.rates.vertices import basic_solutions


@dataclass(frozen=True)
class RateWitness:
    """An exponent point and a rate tuple that refute (or expose) something, both exact."""

    theta: dict
    rates: dict
    story: str             # what the pair shows, with exact values
    strictly_inside: bool = False
    origin: str = "solver model"

    def lines(self) -> list[str]:
        where = "strictly inside the region" if self.strictly_inside else "on the region's boundary"
        at = ", ".join(f"{k} = {format_number(v)}" for k, v in self.theta.items())
        d = ", ".join(f"{k} = {format_number(v)}" for k, v in self.rates.items())
        return [f"exponent point: {at}  ({where}; {self.origin})", f"rate tuple: ({d})", self.story]


@dataclass(frozen=True)
class Check:
    what: str
    query: Query
    exponents: tuple[str, ...]
    rates: tuple[str, ...]
    valid: Callable[[Mapping[str, Fraction]], bool]
    witness: Callable[[Mapping[str, Fraction]], RateWitness]
    refutes: bool = True      # False: a sat answer means "unknown" (a well-formedness condition)

    @property
    def names(self) -> tuple[str, ...]:
        return self.exponents + self.rates

    def split(self, point: Mapping[str, Fraction]) -> tuple[dict, dict]:
        theta = {n: Fraction(point.get(n, 0)) for n in self.exponents}
        return theta, {n: Fraction(point[n]) for n in self.rates if n in point}


def _fmt(q: Fraction) -> str:
    return format_number(Fraction(q))


def _row_conditions(region: HRegion):
    return tuple((affine(q.coeffs), "<=", q.bound) for q in region.constraints())


def _label(q: RateInequality) -> str:
    return f"'{q.label}'" if q.label and q.label != q.text() else f"'{q.text()}'"


def h_inside_h(a: HRegion, b: HRegion, R: Region, exps: tuple[str, ...]) -> list[Check]:
    rows = _row_conditions(a)
    out = []
    for q in b.constraints():
        if a.nonnegative and len(q.coeffs) == 1 and q.coeffs[0][1] < 0 and q.bound == lift(0):
            continue     # d_k >= 0 of B is implied by d >= 0 of A
        query = Query(R, rows + ((affine(q.coeffs), ">", q.bound),), None, exps + a.rates)

        def valid(p, q=q):
            theta, d = _split(p, exps, a.rates)
            return R.contains(theta) and a.contains(theta, d) and not q.holds(theta, d)

        def witness(p, q=q):
            theta, d = _split(p, exps, a.rates)
            return RateWitness(theta, d, f"in {a.name}, but violates {_label(q)} of {b.name}: "
                               f"{q.lhs_text()} = {_fmt(q.lhs_value(d))} > {_fmt(evaluate(q.bound, theta))}")
        out.append(Check(f"{a.name} satisfies {_label(q)} of {b.name}", query, exps, a.rates, valid, witness))
    return out


def _split(p, exps, rates):
    return ({n: Fraction(p.get(n, 0)) for n in exps}, {n: Fraction(p[n]) for n in rates})


def _corner_lhs(q: RateInequality, corner, rates, dispose: bool) -> Expr:
    coef = {r: c for r, c in q.coeffs if c > 0 or not dispose}
    return add(*(scale(coef.get(r, 0), e) for r, e in zip(rates, corner)))


def _disposed(q: RateInequality, corner_value: dict, dispose: bool) -> dict:
    """The point of the corner's down-closure that does worst on q (the corner when not disposing)."""
    if not dispose:
        return corner_value
    return {r: (v if q.coeff(r) > 0 else Fraction(0)) for r, v in corner_value.items()}


def corners_inside_h(a: VRegion, b: HRegion, R: Region, exps: tuple[str, ...], what_corner: str = "corner") -> list[Check]:
    out = []
    for q in b.constraints():
        lhs = [_corner_lhs(q, c, a.rates, a.free_disposal) for c in a.corners]
        query = Query(R, ((max_(*lhs), ">", q.bound),), None, exps)

        def best(theta, lhs=lhs):
            values = [evaluate(e, theta) for e in lhs]
            return values.index(max(values))

        def rates_of(theta, q=q, best=best):
            return _disposed(q, a.corner_at(best(theta), theta), a.free_disposal)

        def valid(p, q=q, rates_of=rates_of):
            theta = {n: Fraction(p.get(n, 0)) for n in exps}
            d = rates_of(theta)
            if not R.contains(theta) or q.holds(theta, d):
                return False
            if a.free_disposal:   # d must really be in the down-closure: a non-negative corner above it
                corner = a.corner_at(best(theta), theta)
                return all(v >= 0 for v in corner.values()) and all(d[r] <= corner[r] for r in d)
            return True

        def witness(p, q=q, rates_of=rates_of, best=best):
            theta = {n: Fraction(p.get(n, 0)) for n in exps}
            d = rates_of(theta)
            i = best(theta)
            src = f"the {what_corner} {a.corner_text(0)}" if len(a.corners) == 1 else \
                f"{what_corner} {i + 1} {a.corner_text(i)} of {a.name}"
            kept = " (after free disposal)" if a.free_disposal and d != a.corner_at(i, theta) else ""
            return RateWitness(theta, d, f"{src}{kept} violates {_label(q)} of {b.name}: "
                               f"{q.lhs_text()} = {_fmt(q.lhs_value(d))} > {_fmt(evaluate(q.bound, theta))}")
        name = f"the {what_corner}s of {a.name}" if len(a.corners) > 1 else f"the {what_corner}"
        out.append(Check(f"{name} satisfy {_label(q)} of {b.name}", query, exps, (), valid, witness))
    return out


def corners_nonnegative(a: VRegion, R: Region, exps) -> list[Check]:
    """Free disposal is meant for non-negative corners; a negative coordinate makes the region unclear."""
    coords = [e for c in a.corners for e in c]
    query = Query(R, ((min_(*coords), "<", lift(0)),), None, exps)

    def valid(p):
        theta = {n: Fraction(p.get(n, 0)) for n in exps}
        return R.contains(theta) and min(evaluate(e, theta) for e in coords) < 0

    def witness(p):
        theta = {n: Fraction(p.get(n, 0)) for n in exps}
        i = next(i for i in range(len(a.corners)) if min(a.corner_at(i, theta).values()) < 0)
        return RateWitness(theta, a.corner_at(i, theta), f"corner {i + 1} of {a.name} has a negative "
                           "coordinate here: free disposal assumes non-negative corners")
    return [Check(f"the corners of {a.name} are non-negative", query, exps, (), valid, witness, False)]


def zero_inside(a: HRegion, R: Region, exps) -> list[Check]:
    """0 in A(theta) on R: the primal feasibility the support formula (support.py) relies on."""
    bounds = [q.bound for q in a.inequalities]
    if not bounds:
        return []        # only d >= 0 (or nothing): 0 is always in the region
    query = Query(R, ((min_(*bounds), "<", lift(0)),), None, exps)

    def valid(p):
        theta = {n: Fraction(p.get(n, 0)) for n in exps}
        return R.contains(theta) and min(evaluate(e, theta) for e in bounds) < 0

    def witness(p):
        theta = {n: Fraction(p.get(n, 0)) for n in exps}
        q = next(q for q in a.inequalities if evaluate(q.bound, theta) < 0)
        return RateWitness(theta, {r: Fraction(0) for r in a.rates},
                           f"0 is not in {a.name} here ({_label(q)} has right side "
                           f"{_fmt(evaluate(q.bound, theta))}): the maximum formula needs 0 in the region")
    return [Check(f"0 is in {a.name}", query, exps, (), valid, witness, False)]


def _dominated_by(x, corner, dispose: bool) -> Expr:
    """> 0 exactly when the corner does not cover x: with disposal 0 <= x <= corner (a point of the
    corner's down-closure), without it x == corner."""
    gaps = [add(xi, scale(-1, ci)) for xi, ci in zip(x, corner)]
    if dispose:
        return max_(*gaps, *(scale(-1, xi) for xi in x))
    return max_(*(abs_(g) for g in gaps))


def outside_vertex(a: HRegion, c: VRegion, theta) -> dict | None:
    """A vertex of A(theta) outside conv C(theta) (exact), or None."""
    got = vertices_at(a, theta)
    if got is None:
        return None
    for v in got[0]:
        if not in_hull(c, theta, v):
            return v
    return None


def recession_rays(a: HRegion) -> tuple[dict, ...]:
    """Directions along which A(theta) is unbounded (the same for every theta: {A d <= 0})."""
    from verifier.geometry.vertices import generators
    from verifier.expressions.region import atoms_of
    atoms = [x for q in a.constraints() for x in atoms_of(affine(q.coeffs), "<=", 0)]
    gens = generators(atoms, list(a.rates))
    return tuple(gens.rays) + tuple(gens.lines) if gens is not None else ()


def h_inside_corners(a: HRegion, c: VRegion, R: Region, exps) -> list[Check]:
    rows = a.constraints()
    out = []
    rays = recession_rays(a)
    if rays:   # a corner region is bounded; an unbounded A fits wherever A(theta) is nonempty
        query = Query(R, _row_conditions(a), None, exps + a.rates)

        def valid(p):
            theta, d = _split(p, exps, a.rates)
            return R.contains(theta) and a.contains(theta, d)

        def witness(p):
            theta, d = _split(p, exps, a.rates)
            return RateWitness(theta, d, f"{a.name} is unbounded (direction {dict(rays[0])}), so it "
                               f"is not inside the corners of {c.name} where it has points")
        out.append(Check(f"{a.name} is bounded where it has points", query, exps, a.rates, valid, witness,
                         False))
    for tight, x in basic_solutions(a):
        feasible = tuple((add(*(scale(k, x[a.rates.index(r)]) for r, k in q.coeffs)), "<=", q.bound)
                         for q in rows)
        ordered = [[dict(zip(c.rates, corner))[r] for r in a.rates] for corner in c.corners]
        uncovered = tuple((_dominated_by(x, corner, c.free_disposal), ">", lift(0)) for corner in ordered)
        query = Query(R, feasible + uncovered, None, exps)

        def valid(p):
            theta = {n: Fraction(p.get(n, 0)) for n in exps}
            return R.contains(theta) and outside_vertex(a, c, theta) is not None

        def witness(p):
            theta = {n: Fraction(p.get(n, 0)) for n in exps}
            v = outside_vertex(a, c, theta)
            return RateWitness(theta, v, f"a vertex of {a.name}, outside {c.name} (exact LP: no mix of "
                               f"its corners {'dominates' if c.free_disposal else 'equals'} it)")
        out.append(Check(f"the vertex of {a.name} on {', '.join(_label(q) for q in tight)} lies in {c.name}",
                         query, exps, (), valid, witness))
    return out
