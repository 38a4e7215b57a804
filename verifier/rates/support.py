"""The largest weighted sum w.d over a rate region, as an ordinary piecewise-linear expression.

Why LP duality: for an H-form {A d <= b(theta), d >= 0} with a constant matrix A,
    max {w.d : A d <= b(theta), d >= 0} = min {y.b(theta) : y >= 0, A^T y >= w}
whenever the primal is feasible (strong duality).  The dual feasible set does not depend on theta, so
its vertices are enumerated once, exactly (verifier.geometry.vertices), and the maximum is the expression
min over dual vertices y of y.b(theta): a min of sums of the right sides, which the scalar engine
(verifier.claims.kinds, verifier.claims.one_shot, the region-wise report) decides like any other formula.
The minimum over the dual polyhedron is attained at a vertex because y >= 0 makes it pointed and the
objective is bounded below once the primal is feasible; primal feasibility is the caller's obligation
(decide.py requires b(theta) >= 0 on the claim's region, i.e. 0 is in the region).  Without d >= 0
the dual constraints are A^T y = w.
For a V-form the maximum is max over corners of w.c_i(theta) (with free disposal: w^+.c_i, since a
coordinate with a negative weight is best disposed of; corners must then be non-negative).
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Mapping

from verifier.core.budget import TooLarge
from verifier.core.errors import InputError
from verifier.expressions.expr import Expr, add, affine, evaluate, format_number, max_, min_, scale
from verifier.expressions.region import Atom, atoms_of
from verifier.geometry.lp import maximize
from verifier.geometry.vertices import generators

from verifier.rates.region import HRegion, RateRegion, VRegion

MAX_DUAL_ROWS = 40          # inequalities of one H-form whose dual is enumerated (double description)
MAX_DUAL_VERTICES = 20000   # vertices of that dual polyhedron

Weights = tuple[tuple[str, Fraction], ...]


@dataclass(frozen=True)
class DualVertex:
    """multipliers[j] of the region's j-th inequality: w.d <= sum_j y_j b_j is a valid bound."""

    multipliers: tuple[Fraction, ...]

    def bound(self, region: HRegion) -> Expr:
        return add(*(scale(y, q.bound) for y, q in zip(self.multipliers, region.inequalities) if y))

    def text(self, region: HRegion) -> str:
        return " + ".join(f"{format_number(y)}*[{q.label or q.text()}]"
                          for y, q in zip(self.multipliers, region.inequalities) if y) or "0"


def _y(j: int) -> str:
    return f"y{j}"


def dual_vertices(region: HRegion, weights: Weights) -> tuple[DualVertex, ...]:
    """Vertices of {y >= 0 : A^T y >= w} (= w without d >= 0); InputError when empty (w.d unbounded)."""
    m = len(region.inequalities)
    if m > MAX_DUAL_ROWS:
        raise TooLarge("support function (dual vertices)", m, MAX_DUAL_ROWS)
    names = [_y(j) for j in range(m)]
    w = dict(weights)
    atoms: list[Atom] = [a for n in names for a in atoms_of(affine({n: 1}), ">=", 0)]
    for r in region.rates:
        column = affine({_y(j): q.coeff(r) for j, q in enumerate(region.inequalities)})
        atoms += atoms_of(column, ">=" if region.nonnegative else "==", w.get(r, 0))
    gens = generators(atoms, names) if names else None
    if gens is None or not gens.vertices:
        raise InputError(f"the weighted sum is unbounded over region '{region.name}': no combination of "
                         "its inequalities bounds it (a missing bound?)")
    if len(gens.vertices) > MAX_DUAL_VERTICES:
        raise TooLarge("support function (dual vertices)", len(gens.vertices), MAX_DUAL_VERTICES)
    return tuple(DualVertex(tuple(Fraction(v[n]) for n in names)) for v in gens.vertices)


def disposal_weights(weights: Weights) -> Weights:
    return tuple((r, c) for r, c in weights if c > 0)


def corner_value(region: VRegion, index: int, weights: Weights) -> Expr:
    w = dict(disposal_weights(weights) if region.free_disposal else weights)
    return add(*(scale(w.get(r, 0), e) for r, e in zip(region.rates, region.corners[index])))


def support_expr(region: RateRegion, weights: Weights) -> Expr:
    """max of w.d over the region, as a PL expression of the exponents (see the module docstring)."""
    if isinstance(region, VRegion):
        return max_(*(corner_value(region, i, weights) for i in range(len(region.corners))))
    return min_(*(v.bound(region) for v in dual_vertices(region, weights)))


@dataclass(frozen=True)
class Optimum:
    """The maximum at one exponent point: its value, a maximising rate tuple, and how it is certified."""

    value: Fraction
    rates: dict
    certificate: str


def optimum_at(region: RateRegion, weights: Weights, theta: Mapping[str, Fraction]) -> Optimum | None:
    """The exact maximiser at `theta` (exact LP for an H-form; the best corner for a V-form), or None
    when the region is empty or the sum unbounded there."""
    w = dict(weights)
    if isinstance(region, VRegion):
        values = [evaluate(corner_value(region, i, weights), theta) for i in range(len(region.corners))]
        best = values.index(max(values))
        rates = region.corner_at(best, theta)
        if region.free_disposal:
            rates = {r: (v if w.get(r, 0) > 0 else Fraction(0)) for r, v in rates.items()}
        return Optimum(max(values), rates, f"corner {best + 1} {region.corner_text(best)}")
    atoms = [a for q in region.constraints()
             for a in atoms_of(affine(q.coeffs), "<=", evaluate(q.bound, theta))]
    res = maximize(affine(w), atoms, list(region.rates))
    if res.status != "optimal":
        return None
    rates = {r: Fraction(res.point[r]) for r in region.rates}
    duals = [y for y, q in zip(res.multipliers, region.constraints())]
    cert = " + ".join(f"{format_number(y)}*[{q.label or q.text()}]"
                      for y, q in zip(duals, region.constraints()) if y and q in region.inequalities)
    return Optimum(Fraction(res.value), rates, f"dual certificate {cert or '0'}")
