"""Published GDoF results proved and refuted by the engine (sources named beside each check)."""

from fractions import Fraction as F

import pytest

from verifier.claims.kinds import monotone, reduces_to, relation, symmetric, within
from verifier.claims.one_shot import prove
from verifier.expressions.expr import evaluate, max_, min_, param, pos
from verifier.expressions.region import Region, atoms_of

a = param("alpha")
# Etkin, Tse, Wang, "Gaussian interference channel capacity to within one bit", IEEE Trans. IT 54(12),
# 2008: symmetric per-user GDoF, the "W" curve (from memory; listed in shared/REFERENCES.md #1).
W = min_(1, max_(a / 2, 1 - a / 2), max_(a, 1 - a))
# The symmetric outer bounds per user (same paper, from memory): d <= 1;
# 2d <= max(1, a) + (1 - a)^+; 2d <= 2 max(a, 1 - a); 3d <= max(1, a) + (1 - a)^+ + max(a, 1 - a).
OUTER = min_(1, (max_(1, a) + pos(1 - a)) / 2, max_(a, 1 - a),
             (max_(1, a) + pos(1 - a) + max_(a, 1 - a)) / 3)


def between(lo=None, hi=None, name="alpha", strict=False):
    atoms = []
    if lo is not None:
        atoms += atoms_of(param(name), ">" if strict else ">=", lo)
    if hi is not None:
        atoms += atoms_of(param(name), "<" if strict else "<=", hi)
    return Region.of(*atoms)


@pytest.mark.parametrize("solver", ["z3", pytest.param("cvc5", marks=pytest.mark.cvc5)])
def test_w_curve_equals_min_of_symmetric_bounds(solver):
    # Etkin-Tse-Wang 2008: the W curve is the min of the symmetric bounds for all alpha >= 0.
    assert prove(relation(W, "==", OUTER, between(0)), solver).status == "proved"


def test_w_curve_spot_values():
    # Etkin-Tse-Wang 2008 spot values, as listed in shared/REFERENCES.md #1 (from memory).
    spots = {F(1, 4): F(3, 4), F(1, 2): F(1, 2), F(3, 5): F(3, 5), F(4, 5): F(3, 5), F(1): F(1, 2),
             F(3, 2): F(3, 4), F(3): F(1)}
    for x, d in spots.items():
        assert evaluate(W, {"alpha": x}) == d


def test_tin_optimal_exactly_on_weak_regime():
    # Etkin-Tse-Wang 2008: treating interference as noise (1 - alpha) is GDoF-optimal iff alpha <= 1/2.
    assert prove(relation(1 - a, "==", W, between(0, F(1, 2)))).status == "proved"
    v = prove(relation(1 - a, "==", W, between(0, F(3, 5))))
    assert v.status == "refuted"
    x = v.counterexample.point["alpha"]
    assert F(1, 2) < x <= F(3, 5) and v.counterexample.strictly_inside
    assert v.counterexample.lhs_value == 1 - x and v.counterexample.rhs_value == evaluate(W, {"alpha": x})


def test_mac_sum_gdof():
    # Cover & Thomas, Elements of Information Theory, 2nd ed., ch. 15 (MAC region), in GDoF form
    # (common practice): the sum GDoF of a two-user MAC is max(a1, a2), i.e. the min of the three bounds.
    a1, a2 = param("a1"), param("a2")
    region = Region.of(*atoms_of(a1, ">=", 0), *atoms_of(a2, ">=", 0))
    region_sum = min_(a1 + a2, max_(a1, a2))
    assert prove(relation(region_sum, "==", max_(a1, a2), region)).status == "proved"
    assert prove(symmetric(max_(a1, a2), "a1", "a2", region)).status == "proved"


def test_strong_and_very_strong_regimes_by_monotonicity():
    # Common practice (Etkin-Tse-Wang 2008): d rises on the strong regime 1 <= alpha <= 2 and is flat at
    # 1 for alpha >= 2; d is not monotone over all alpha >= 0.
    assert prove(monotone(W, "alpha", between(1, 2))).status == "proved"
    assert prove(relation(W, "==", 1, between(2))).status == "proved"
    v = prove(monotone(W, "alpha", between(0)))
    assert v.status == "refuted"
    p = v.counterexample.point
    assert p["alpha'"] > p["alpha"] and v.counterexample.rhs_value < v.counterexample.lhs_value


def test_feedback_never_hurts_and_gap():
    # Suh, Tse, "Feedback capacity of the Gaussian interference channel to within 2 bits", IEEE Trans. IT
    # 57(5), 2011 (from memory): d_fb = max(1 - alpha/2, alpha/2) >= d, equal on [2/3, 2].
    d_fb = max_(1 - a / 2, a / 2)
    assert prove(relation(d_fb, ">=", W, between(0))).status == "proved"
    assert prove(relation(d_fb, "==", W, between(F(2, 3), 2))).status == "proved"
    assert prove(relation(d_fb, "==", W, between(0, 2))).status == "refuted"
    # Hand derivation from the two formulas above: on [0, 2] the largest difference is
    # d_fb(1/2) - d(1/2) = 3/4 - 1/2 = 1/4, so "within 1/4" holds and "within 1/5" fails.
    assert prove(within(d_fb, W, F(1, 4), between(0, 2))).status == "proved"
    assert prove(within(d_fb, W, F(1, 5), between(0, 2))).status == "refuted"


def test_reduces_to_known_curve():
    # A three-exponent bound reduces to the W curve when the extra exponent is 0 (invented bound whose
    # reduction is exact by construction: common practice for sanity-checking new formulas).
    g = param("gamma")
    new = min_(1 + g, max_(a / 2, 1 - a / 2) + g / 2, max_(a, 1 - a) + g)
    region = Region.of(*atoms_of(a, ">=", 0), *atoms_of(g, ">=", 0))
    assert prove(reduces_to(new, {"gamma": 0}, W, region)).status == "proved"
    assert prove(reduces_to(new, {"gamma": 1}, W, region)).status == "refuted"
