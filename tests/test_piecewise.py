"""Regime-by-regime definitions: verified min/max form, coverage, and claims split by regime."""

from fractions import Fraction as F

from verifier.claims.kinds import relation
from verifier.claims.one_shot import prove
from verifier.claims.piecewise import Piece, check_piecewise
from verifier.expressions.expr import evaluate, max_, min_, param
from verifier.expressions.region import Region, atoms_of
from verifier.text.parse import parse_expr, parse_region
from workbench.casefile import build_case
from workbench.decide import decide

a = param("alpha")
W = min_(1, max_(a / 2, 1 - a / 2), max_(a, 1 - a))
DOMAIN = Region.of(*atoms_of(a, ">=", 0))
# The five regimes of the symmetric two-user IC curve: Etkin, Tse, Wang, IEEE Trans. IT 54(12), 2008
# (from memory; shared/REFERENCES.md #1).
REGIMES = [("1 - alpha", "alpha <= 1/2"), ("alpha", "1/2 <= alpha <= 2/3"),
           ("1 - alpha/2", "2/3 <= alpha <= 1"), ("alpha/2", "1 <= alpha <= 2"), ("1", "alpha >= 2")]


def pieces(rows):
    return [Piece(parse_expr(e, ["alpha"]), parse_region(r, ["alpha"])) for e, r in rows]


def test_published_regimes_convert_to_an_equivalent_min_max_form():
    result = check_piecewise("W", pieces(REGIMES), DOMAIN)
    assert result.covered == "proved" and result.expr is not None
    assert prove(relation(result.expr, "==", W, DOMAIN)).status == "proved"


def test_forgotten_regime_is_found_with_an_exact_point():
    rows = REGIMES[:2] + REGIMES[3:]          # the regime 2/3 <= alpha <= 1 forgotten
    result = check_piecewise("W", pieces(rows), DOMAIN)
    assert result.covered == "refuted"
    assert F(2, 3) < result.uncovered_point["alpha"] < 1


def test_jump_at_a_wrong_threshold_has_no_min_max_form():
    rows = [("1 - alpha", "alpha <= 3/5"), ("alpha", "alpha >= 3/5")]   # jumps at 3/5
    result = check_piecewise("bad", pieces(rows), DOMAIN)
    assert result.expr is None and "jumps" in result.detail
    # the message names the exact place and both values (hand-derived: 1 - 3/5 = 2/5 against 3/5)
    assert "the function jumps at alpha = 3/5: regime 'alpha <= 3/5' gives 2/5, " \
           "regime 'alpha >= 3/5' gives 3/5" in result.detail


def test_regimes_that_disagree_on_an_overlap_are_named_with_a_point():
    rows = [("alpha", "alpha <= 1"), ("1", "alpha >= 1/2")]     # overlap [1/2, 1]: alpha != 1 there
    result = check_piecewise("bad", pieces(rows), DOMAIN)
    assert result.expr is None and "disagree on their overlap at alpha = " in result.detail
    at = F(result.detail.split("alpha = ")[1].split(":")[0])
    assert F(1, 2) <= at < 1


CASE = """
title = "split"
[parameters]
alpha = "exponent"
[assume]
region = "alpha >= 0"
[outer]
w = "min(1, max(alpha/2, 1 - alpha/2), max(alpha, 1 - alpha))"
[inner]
scheme = "{scheme}"
[[claims]]
name = "meets"
statement = "inner == outer"
where = "alpha <= 1"
"""


def load(scheme):
    import tomllib
    text = CASE.format(scheme=scheme)
    return build_case("case.toml", text, tomllib.loads(text))


def test_discontinuous_scheme_splits_claim_and_finds_the_bad_regime():
    case = load("1 - alpha if alpha <= 3/5; 1 - alpha/2 if alpha > 3/5")
    cc = case.claims[0]
    assert len(cc.subclaims) == 2
    out = decide(cc)
    assert out.status == "refuted"
    label, v = out.first_failure
    x = v.counterexample.point["alpha"]
    assert "regime" in label and evaluate(v.claim.lhs.expr, {"alpha": x}) != evaluate(W, {"alpha": x})


def test_scheme_silent_on_part_of_the_claim_region_refutes_it():
    case = load("1 - alpha if alpha <= 1/2")
    out = decide(case.claims[0])
    assert out.status == "refuted" and out.uncovered
    name, point = out.uncovered[0]
    assert name == "scheme" and F(1, 2) < point["alpha"] <= 1


def test_correct_regimes_prove_the_claim():
    text = "; ".join(f"{e} if {r}" for e, r in REGIMES)
    assert decide(load(text).claims[0]).status == "proved"
