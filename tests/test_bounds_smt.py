"""Generated bounds proved equal to the published formulas by the engine (verifier.claims.one_shot, z3)."""

from fractions import Fraction

from bounds.cutset import cutset_gdof
from bounds.highsnr import gdof_of
from bounds.interference import (hk_region, ic_outer_bounds, ic_sum_gdof, symmetric_bounds, symmetric_rate,
                                 w_curve)
from bounds.network import relay_channel
from bounds.projection import max_sum
from bounds.tin import tin_condition, tin_sum_gdof
from verifier.claims.kinds import relation
from verifier.claims.one_shot import prove
from verifier.expressions.expr import evaluate, max_, min_, param
from verifier.text.parse import parse_region


def _proved(lhs, rhs, region_text):
    verdict = prove(relation(lhs, "==", rhs, parse_region(region_text)))
    return verdict.status == "proved"


def test_relay_cut_set_equals_the_published_formula():
    sd, sr, rd = param("sd"), param("sr"), param("rd")
    # Avestimehr-Diggavi-Tse 2011 single relay (REFERENCES.md #6, from memory)
    assert _proved(cutset_gdof(relay_channel(), "W"), min_(max_(sd, sr), max_(sd, rd)), "sd >= 0, sr >= 0, rd >= 0")


def test_symmetric_ic_equals_the_w_curve_for_every_alpha():
    # Etkin-Tse-Wang 2008 W curve (REFERENCES.md #1, from memory)
    sym = symmetric_rate(list(ic_outer_bounds(1, "alpha", "alpha", 1).values()))
    assert _proved(sym, w_curve(), "alpha >= 0")
    assert _proved(ic_sum_gdof(1, "alpha", "alpha", 1), 2 * w_curve(), "alpha >= 0")


def test_simple_hk_sum_equals_the_outer_sum_everywhere():
    # Etkin-Tse-Wang 2008 (from memory): the simple HK scheme reaches the outer bound in GDoF
    inner = max_sum(hk_region("a11", "a12", "a21", "a22"), ["d1", "d2"])
    outer = ic_sum_gdof("a11", "a12", "a21", "a22")
    assert _proved(inner, outer, "a11 >= 0, a12 >= 0, a21 >= 0, a22 >= 0")


def test_two_user_tin_sum_in_the_tin_regime():
    names = [["a11", "a12"], ["a21", "a22"]]
    region = tin_condition(names).meet(parse_region("a12 >= 0, a21 >= 0"))
    expected = param("a11") + param("a22") - param("a12") - param("a21")
    verdict = prove(relation(tin_sum_gdof(names), "==", expected, region))
    assert verdict.status == "proved"


def test_finite_snr_etw_bound_extracts_to_the_published_gdof_bound():
    inr = {"INR": "alpha"}
    etw = gdof_of("log2(1 + INR + SNR/(1 + INR)) + log2(1 + INR + SNR/(1 + INR))", aliases=inr)
    assert _proved(etw * Fraction(1, 2), symmetric_bounds()["sum (ETW)"], "alpha >= 0")
    # for alpha < 0 the interference falls below the noise and the finite-SNR form gives 1 per user, not
    # max(alpha, 1 - alpha): the engine must refute equality there
    assert evaluate(etw, {"alpha": -1}) == 2
    verdict = prove(relation(etw * Fraction(1, 2), "==", symmetric_bounds()["sum (ETW)"],
                             parse_region("alpha >= -1")))
    assert verdict.status == "refuted"
