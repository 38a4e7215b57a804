"""bounds/rate_regions.py: the generators of bounds/ as rate regions, checked with region claims.

Sources beside each check:
- MAC region = successive decoding with time sharing: Cover-Thomas, 'Elements of Information Theory',
  2nd ed., 2006, ch. 15 (from memory);
- the simple Han-Kobayashi scheme of Etkin, Tse, Wang (IEEE Trans. IT 2008) achieves the GDoF region of
  the two-user IC (within one bit of capacity, hence the same GDoF region); the symmetric sum is 2 W;
- TIN with power control is GDoF optimal where a_ii >= a_ij + a_ji (Geng, Naderializadeh, Avestimehr,
  Jafar, IEEE Trans. IT 2015; condition read in the abstract, region from memory).
"""

from __future__ import annotations

from fractions import Fraction as F

import pytest

from bounds.interference import ic_network, w_curve
from bounds.rate_regions import (cutset_rate_region, hk_rate_region, ic_rate_region, mac_rate_region,
                                 projected_rate_region, tin_rate_region)
from bounds.projection import le
from bounds.tin import tin_condition
from verifier.expressions.expr import evaluate, max_, param, scale
from verifier.rates import claims as RC
from verifier.rates.decide import decide
from verifier.rates.region import VRegion
from verifier.rates.support import support_expr
from verifier.text.parse import parse_expr, parse_region


def status(claim):
    return decide(claim, improve_witness=False).status


def test_mac_region_is_successive_decoding():
    mac = mac_rate_region(["a1", "a2"])
    corners = VRegion("SD", ("d1", "d2"), ((param("a1"), max_(param("a2") - param("a1"), 0)),
                                          (max_(param("a1") - param("a2"), 0), param("a2"))), True)
    assert status(RC.equal(corners, mac, parse_region("a1 >= 0, a2 >= 0"))) == "proved"
    assert [q.label for q in mac.inequalities] == ["d1", "d2", "d1 + d2"]


def test_hk_region_equals_the_ic_outer_region_symmetric():
    # symmetric channel a11 = a22 = 1, a12 = a21 = alpha (Etkin-Tse-Wang 2008)
    alpha = parse_region("alpha >= 0, alpha <= 3")
    outer = ic_rate_region(1, "alpha", "alpha", 1)
    hk = hk_rate_region(1, "alpha", "alpha", 1)
    assert status(RC.equal(hk, outer, alpha)) == "proved"
    assert status(RC.max_of(outer, {"d1": 1, "d2": 1}, "==", scale(2, w_curve()), alpha)) == "proved"
    # the W curve is not 1 - alpha/2 everywhere (it is alpha on [1/2, 2/3]): refuted
    assert status(RC.max_of(outer, {"d1": 1, "d2": 1}, "==", parse_expr("2 - alpha"), alpha)) == "refuted"


def test_tin_region_is_optimal_in_the_tin_regime():
    a = [["a11", "a12"], ["a21", "a22"]]                      # receiver first, as bounds.tin
    tin = tin_rate_region(a)
    outer = ic_rate_region("a11", "a21", "a12", "a22")       # transmitter first (bounds.interference)
    base = parse_region("a11 >= 0, a12 >= 0, a21 >= 0, a22 >= 0")
    assert status(RC.equal(tin, outer, base.meet(tin_condition(a)))) == "proved"
    assert status(RC.equal(tin, outer, base.meet(parse_region("a11 + a22 >= a12 + a21")))) == "refuted"


def test_projection_keeps_the_rates_asked_for():
    # d = c + p with c <= 1, p <= alpha: the shadow on d is d <= 1 + alpha (hand derivation)
    rows = [le({"d": 1, "c": -1, "p": -1}, 0), le(["c"], 1), le(["p"], param("alpha"))]
    shadow, conditions = projected_rate_region("shadow", rows, ["d"])
    assert conditions == (param("alpha"),)          # p >= 0 and p <= alpha need alpha >= 0
    assert shadow.rates == ("d",)
    assert evaluate(support_expr(shadow, (("d", F(1)),)), {"alpha": F(1, 3)}) == F(4, 3)


def test_cutset_region_of_two_messages():
    net = ic_network("a11", "a12", "a21", "a22")
    region = cutset_rate_region(net)
    assert region.rates == ("d_W1", "d_W2") and len(region.inequalities) == 3
    # cut-set bounds are looser than the genie bounds: the IC outer region lies inside the cut-set
    # region, whose sum facet max(2, 2 alpha) is not the sum-GDoF 2 W (hand: at alpha = 1/2 it is 2)
    cut = cutset_rate_region(ic_network(1, "alpha", "alpha", 1), rates={"W1": "d1", "W2": "d2"})
    outer = ic_rate_region(1, "alpha", "alpha", 1)
    alpha = parse_region("alpha >= 0")
    assert status(RC.subset(outer, cut, alpha)) == "proved"
    assert status(RC.subset(cut, outer, alpha)) == "refuted"
    assert status(RC.max_of(cut, {"d1": 1, "d2": 1}, "==", scale(2, w_curve()), alpha)) == "refuted"


def _successive_decoding_corners(exponents):
    """Corners of the K-user MAC: decode users in each order, each treating the later ones as noise
    (GDoF of one decoding: max(own, later) - max(later); from memory, common practice)."""
    from itertools import permutations
    a = [param(x) for x in exponents]
    corners = []
    for order in permutations(range(len(a))):
        c = [None] * len(a)
        for k, u in enumerate(order):
            later = [a[v] for v in order[k + 1:]]
            c[u] = max_(a[u], *later) - max_(*later) if later else a[u]
        corners.append(tuple(c))
    return VRegion("SD", tuple(f"d{i + 1}" for i in range(len(a))), tuple(corners), True)


def test_three_user_mac_weighted_sum_is_the_greedy_polymatroid_value():
    # polymatroid greedy (Edmonds 1970, from memory): with weights 1 < 2 < 3 fill d3, then d2, then d1
    mac = mac_rate_region(["a1", "a2", "a3"])
    R = parse_region("a1 >= 0, a2 >= 0, a3 >= 0")
    greedy = parse_expr("a3 + max(a2, a3) + max(a1, a2, a3)")
    assert status(RC.max_of(mac, {"d1": 1, "d2": 2, "d3": 3}, "==", greedy, R)) == "proved"
    assert status(RC.max_of(_successive_decoding_corners(["a1", "a2", "a3"]), {"d1": 1, "d2": 2, "d3": 3},
                            "==", greedy, R)) == "proved"
    assert status(RC.max_of(mac, {"d1": 1, "d2": 2, "d3": 3}, "==", parse_expr("a1 + 2*a2 + 3*a3"), R)) == "refuted"


@pytest.mark.skipif(__import__("os").environ.get("GDOF_SLOW") != "1", reason="about 5 s: set GDOF_SLOW=1")
def test_three_user_mac_region_is_successive_decoding():
    R = parse_region("a1 >= 0, a2 >= 0, a3 >= 0")
    assert status(RC.equal(_successive_decoding_corners(["a1", "a2", "a3"]), mac_rate_region(["a1", "a2", "a3"]), R)) == "proved"
