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

from .claims import Claim, compared_exprs, violated_at, violation_query, witness_region
from .expr import evaluate
from .smt import check

DENOMINATORS = tuple(range(1, 25)) + (30, 36, 40, 48, 60, 72, 84, 96, 120)


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


def small_denominator_point(claim: Claim, solver: str, timeout: float, inside: bool):
    """First lattice point (smallest d) where the claim fails, inside the open region if `inside`."""
    region = witness_region(claim)
    if inside:
        region = region.interior()
    for d in DENOMINATORS:
        answer = check(violation_query(claim, region, grid=d), solver, timeout)
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
        return describe(claim, point, witness_region(claim).interior().contains(point),
                        "smallest common denominator; no violation lies strictly inside")
    return describe(claim, model, witness_region(claim).interior().contains(model), "solver model")
