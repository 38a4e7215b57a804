"""Bound analysis: redundant named bounds, where the others are tight, and maximum gaps."""

from fractions import Fraction as F

from verifier.claims.kinds import Side, relation
from verifier.expressions.expr import affine, max_, min_, param, pos
from verifier.expressions.region import Region, atoms_of
from verifier.regimes.proof import prove_by_regimes

a, b = param("alpha"), param("beta")
# Etkin, Tse, Wang, "Gaussian interference channel capacity to within one bit", IEEE Trans. IT 54(12),
# 2008, symmetric GDoF bounds per user (from memory): d <= 1; d <= (max(1, a) + (1 - a)^+)/2;
# d <= max(a, 1 - a); d <= (max(1, a) + (1 - a)^+ + max(a, 1 - a))/3; their min is the W curve.
BOUNDS = (("single", affine({}, 1)), ("z", (max_(1, a) + pos(1 - a)) / 2), ("w", max_(a, 1 - a)),
          ("t", (max_(1, a) + pos(1 - a) + max_(a, 1 - a)) / 3))
OUTER = min_(*(e for _, e in BOUNDS))
W = min_(1, max_(a / 2, 1 - a / 2), max_(a, 1 - a))
ALPHA_NONNEG = Region.of(*atoms_of(a, ">=", 0))


def test_the_three_user_type_bound_is_redundant_in_the_symmetric_case():
    rp = prove_by_regimes(relation(Side(OUTER, "outer", BOUNDS), "==", W, ALPHA_NONNEG), improve_witness=False)
    assert rp.status == "proved"
    report = {p.name: p for p in rp.parts}
    # Hand derivation on the five W regimes [0,1/2), [1/2,2/3), [2/3,1), [1,2), [2,oo):
    # w = max(a, 1-a) is the min on the first two, z on the next two, the constant 1 beyond 2, and
    # t = (max(1,a) + (1-a)^+ + max(a,1-a))/3 is strictly larger except at a = 2/3: redundant.
    assert report["t"].redundant and report["t"].note == "never active"
    assert report["w"].unique_in == (0, 1) and report["z"].unique_in == (2, 3)
    assert report["single"].unique_in == (4,) and not report["single"].redundant
    assert report["w"].note == "active in regimes 0, 1"


def test_a_bound_tied_with_another_everywhere_is_redundant_but_listed_as_active():
    parts = (("p", max_(a, b)), ("q", max_(b, a) + 0), ("r", a + b + 1))
    quad = Region.of(*atoms_of(a, ">=", 0), *atoms_of(b, ">=", 0))
    rp = prove_by_regimes(relation(Side(min_(max_(a, b), a + b + 1), "m", parts), "<=", a + b + 1, quad),
                          improve_witness=False)
    report = {p.name: p for p in rp.parts}
    assert report["r"].redundant and not report["r"].active_in
    assert report["p"].active_in == report["q"].active_in != ()
    assert report["p"].redundant and report["p"].note.startswith("only tied: active in regime")


def test_maximum_gap_is_exact_attained_or_not_and_unbounded():
    # sup over [0, 3] of max(a, 1-a) - W: hand computation by regime gives 2, at a = 3 (slope 1/2 ... 1).
    region = Region.of(*atoms_of(a, ">=", 0), *atoms_of(a, "<=", 3))
    rp = prove_by_regimes(relation(max_(a, 1 - a), ">=", W, region), improve_witness=False)
    up, down = rp.gaps
    assert (up.direction, up.value, up.point, up.attained) == ("lhs - rhs", 2, {"alpha": 3}, True)
    assert down.value == 0 and down.attained
    open_region = Region.of(*atoms_of(a, ">=", 0), *atoms_of(a, "<", 3))
    up = prove_by_regimes(relation(max_(a, 1 - a), ">=", W, open_region), improve_witness=False).gaps[0]
    assert up.value == 2 and not up.attained  # a supremum approached as alpha -> 3
    up = prove_by_regimes(relation(max_(a, 1 - a), ">=", W, ALPHA_NONNEG), improve_witness=False).gaps[0]
    assert up.value is None  # grows like alpha - 1 beyond alpha = 2


def test_constant_gap_claims_report_the_gap_that_makes_them_true():
    rp = prove_by_regimes(relation(OUTER, "<=", W + F(1, 2), ALPHA_NONNEG), improve_witness=False)
    assert rp.status == "proved"
    # OUTER == W exactly (ETW 2008), so lhs - rhs is the constant -1/2 everywhere
    assert rp.gaps[0].value == F(-1, 2) and rp.gaps[1].value == F(1, 2)
