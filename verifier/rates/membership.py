"""Exact membership of a numeric rate tuple at one numeric exponent point (re-checks, witnesses).

Why separate from the solver queries: every counterexample is re-evaluated here with Fractions only
(an exact LP for the convex hull of corners), so a solver model never refutes anything by itself.
"""

from __future__ import annotations

from fractions import Fraction
from typing import Mapping

from verifier.expressions.expr import affine, evaluate
from verifier.expressions.region import atoms_of
from verifier.geometry.lp import feasible
from verifier.geometry.vertices import generators

from verifier.rates.region import HRegion, RateRegion, VRegion


def _lam(i: int) -> str:
    return f"lambda{i}"


def in_hull(region: VRegion, theta: Mapping[str, Fraction], rates: Mapping[str, Fraction]) -> bool:
    """Is `rates` in conv(corners(theta)) (with free disposal: 0 <= rates <= a point of it)?"""
    names = [_lam(i) for i in range(len(region.corners))]
    atoms = [a for n in names for a in atoms_of(affine({n: 1}), ">=", 0)]
    atoms += atoms_of(affine({n: 1 for n in names}), "==", 1)
    for k, r in enumerate(region.rates):
        value = Fraction(rates[r])
        if region.free_disposal and value < 0:
            return False
        mix = affine({_lam(i): evaluate(c[k], theta) for i, c in enumerate(region.corners)})
        atoms += atoms_of(mix, ">=" if region.free_disposal else "==", value)
    return feasible(atoms, names) is not None


def contains(region: RateRegion, theta, rates) -> bool:
    if isinstance(region, HRegion):
        return region.contains(theta, rates)
    return in_hull(region, theta, rates)


def vertices_at(region: HRegion, theta: Mapping[str, Fraction]) -> tuple[tuple[dict, ...], bool] | None:
    """(vertices, bounded) of the H-form at a numeric exponent point, or None when it is empty there."""
    atoms = [a for q in region.constraints()
             for a in atoms_of(affine(q.coeffs), "<=", evaluate(q.bound, theta))]
    gens = generators(atoms, list(region.rates))
    if gens is None:
        return None
    verts = tuple({r: Fraction(v[r]) for r in region.rates} for v in gens.vertices)
    return verts, gens.bounded
