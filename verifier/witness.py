"""From "the claim fails somewhere" to a counterexample a theorist can check by hand.

A raw solver model is often a vertex of the failure set with an ugly denominator, or sits on the
region's boundary.  We ask instead for points on the lattice (1/d) Z^n for d = 1, 2, 3, ... strictly
inside the region: the first d that admits a violation gives the smallest common denominator.  If the
failure lies only on the boundary, the same search runs on the closed region; the raw model is the
last resort.  Every candidate is re-checked by exact evaluation before it is returned.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Mapping

from .claims import Claim, compared_exprs, violated_at, violation_query, witness_names, witness_region
from .expr import evaluate, param
from .region import Region, atoms_of
from .smt import check

DENOMINATORS = tuple(range(1, 25)) + (30, 36, 40, 48, 60, 72, 84, 96, 120)
BOXES = (4, 64, None)


@dataclass(frozen=True)
class Counterexample:
    """A point where the claim fails, with both sides' exact values and the active named bounds."""

    point: Mapping[str, Fraction]
    lhs_value: Fraction
    rhs_value: Fraction
    lhs_active: tuple[str, ...]
    rhs_active: tuple[str, ...]
    strictly_inside: bool
    origin: str

    @property
    def difference(self) -> Fraction:
        return self.lhs_value - self.rhs_value

    def denominator(self) -> int:
        d = 1
        for v in self.point.values():
            d = d * v.denominator // _gcd(d, v.denominator)
        return d


def _gcd(a: int, b: int) -> int:
    while b:
        a, b = b, a % b
    return a


def describe(claim: Claim, point: Mapping[str, Fraction], strictly_inside: bool, origin: str) -> Counterexample:
    left, right = compared_exprs(claim)
    point = {k: Fraction(v) for k, v in sorted(point.items())}
    rhs_side = claim.rhs if claim.rhs is not None else claim.lhs
    return Counterexample(point, evaluate(left, point), evaluate(right, point),
                          claim.lhs.active_parts(point) if claim.kind != "reduces-to" else (),
                          rhs_side.active_parts(point) if claim.rhs is not None else (),
                          strictly_inside, origin)


def _box(names, bound: int) -> Region:
    """|x| <= bound for every witness variable: small magnitudes before small denominators."""
    atoms = []
    for n in names:
        atoms += atoms_of(param(n), "<=", bound) + atoms_of(param(n), ">=", -bound)
    return Region.of(*atoms)


def small_denominator_point(claim: Claim, solver: str, timeout: float, inside: bool):
    """A lattice point (smallest d, within the smallest box) where the claim fails.

    `inside` asks for the relative interior (strict except explicit equalities).  Boxes come first so
    that an unbounded region yields alpha = 2 rather than alpha = 32539; a box that admits no
    violation at all is skipped with one query.
    """
    region = witness_region(claim)
    if inside:
        region = region.relative_interior()
    if check(violation_query(claim, region), solver, timeout).status != "sat":
        return None
    names = witness_names(claim)
    for bound in BOXES:
        boxed = region if bound is None else region.meet(_box(names, bound))
        if bound is not None and check(violation_query(claim, boxed), solver, timeout).status != "sat":
            continue
        for d in DENOMINATORS:
            answer = check(violation_query(claim, boxed, grid=d), solver, timeout)
            if answer.status == "sat" and violated_at(claim, answer.model):
                return answer.model
    return None


def best_counterexample(claim: Claim, model: Mapping[str, Fraction], solver: str = "z3",
                        timeout: float = 10.0) -> Counterexample:
    """The counterexample to print: small denominators, strictly inside when possible."""
    point = small_denominator_point(claim, solver, timeout, inside=True)
    if point is not None:
        return describe(claim, point, True, "smallest common denominator")
    point = small_denominator_point(claim, solver, timeout, inside=False)
    if point is not None:
        return describe(claim, point, witness_region(claim).relative_interior().contains(point),
                        "smallest common denominator; no violation lies strictly inside")
    return describe(claim, model, witness_region(claim).relative_interior().contains(model), "solver model")
