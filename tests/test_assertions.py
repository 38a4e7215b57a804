"""assert_claim / assert_case for users' own pytest suites, and the notebook display of verdicts.

The failure message must carry the exact counterexample: the point and both sides' values, as exact
fractions a reader can re-check by hand.  Facts used below are elementary (common practice) or the W
curve of Etkin, Tse, Wang, IEEE Trans. Inf. Theory 54(12), 2008 (from memory; REFERENCES.md section 1).
"""

from __future__ import annotations

import re
from fractions import Fraction
from pathlib import Path

import pytest

from verifier.claims import kinds as C
from verifier.claims.one_shot import prove
from verifier.core.errors import CaseFileError, InputError, RegionError, UnknownNameError
from verifier.expressions.expr import evaluate, min_, param
from verifier.text.parse import parse_expr, parse_region
from workbench.assertions import assert_case, assert_claim, claim_from_text
from workbench.notebook import show

ROOT = Path(__file__).resolve().parent.parent
W = "min(1, max(alpha/2, 1 - alpha/2), max(alpha, 1 - alpha))"   # Etkin-Tse-Wang 2008, from memory


def _failure(*args, **kw) -> str:
    with pytest.raises(AssertionError) as info:
        assert_claim(*args, **kw)
    return str(info.value)


def _point(message: str) -> dict[str, Fraction]:
    """The counterexample point as printed, read back as exact fractions."""
    line = next(l for l in message.splitlines() if "counterexample" in l)
    return {k: Fraction(v) for k, v in re.findall(r"(\w+) = (-?\d+(?:/\d+)?)", line.split("(")[0])}


def test_a_true_claim_passes_and_returns_the_verdict():
    v = assert_claim("min(1, alpha) <= 1 + alpha", where="alpha >= 0")
    assert v.status == "proved"


def test_refuted_message_has_the_exact_point_and_both_values():
    msg = _failure("min(1, alpha) >= alpha", where="alpha >= 0")
    assert msg.startswith("GDoF claim refuted: min(1, alpha) >= alpha where alpha >= 0")
    point = _point(msg)
    lhs, rhs = min(1, point["alpha"]), point["alpha"]     # evaluated by hand: common practice
    assert lhs < rhs
    assert f"min(1, alpha) = {lhs}" in msg and f"alpha = {rhs}" in msg
    assert f"difference = {lhs - rhs}" in msg


def test_refuted_message_values_agree_with_exact_evaluation():
    # W is not below 1 - alpha/2 ... only on part of [0, 2]; the counterexample must show where.
    msg = _failure(f"{W} >= 1 - alpha/2", where="0 <= alpha <= 2")
    point = _point(msg)
    w, rhs = evaluate(parse_expr(W), point), 1 - point["alpha"] / 2
    assert w < rhs and f"= {_fmt(w)}" in msg and f"1 - alpha/2 = {_fmt(rhs)}" in msg


def _fmt(q: Fraction) -> str:
    return str(q.numerator) if q.denominator == 1 else f"{q.numerator}/{q.denominator}"


def test_monotone_failure_spells_out_both_points():
    msg = _failure("w nondecreasing in alpha", where="alpha >= 0", definitions={"w": W})
    lines = [l.strip() for l in msg.splitlines() if l.strip().startswith("w at alpha = ")]
    assert len(lines) == 2
    (a1, v1), (a2, v2) = [(Fraction(m[0]), Fraction(m[1])) for m in
                          (re.match(r"w at alpha = (\S+):\s+(\S+)", l).groups() for l in lines)]
    w = parse_expr(W)
    assert a1 < a2 and v1 > v2
    assert evaluate(w, {"alpha": a1}) == v1 and evaluate(w, {"alpha": a2}) == v2


def test_symmetric_failure_spells_out_the_swapped_point():
    msg = _failure("max(a1, 2*a2) symmetric in a1, a2", where="a1 >= 0, a2 >= 0")
    assert "swapping a1 and a2 changes the value" in msg
    points = re.findall(r"at a1 = (\S+), a2 = (\S+):", msg)
    assert len(points) == 2 and points[0] == points[1][::-1]


def test_a_claim_object_is_accepted():
    alpha = param("alpha")
    claim = C.relation(min_(1, alpha), "==", 1, parse_region("alpha >= 0"))
    msg = _failure(claim)
    assert "counterexample" in msg and "alpha = " in msg
    with pytest.raises(InputError, match="carries its own region"):
        assert_claim(claim, where="alpha >= 1")


def test_expect_refuted_passes_on_a_refutation_and_fails_on_a_proof():
    v = assert_claim("w == 1 - alpha", where="alpha <= 2/3, alpha >= 0", definitions={"w": W},
                     expect="refuted")
    assert v.counterexample is not None
    msg = _failure("w == 1 - alpha", where="0 <= alpha <= 1/2", definitions={"w": W}, expect="refuted")
    assert "expected to be refuted, but it is proved" in msg


def test_every_sentence_kind_is_understood():
    assert assert_claim("w within 1/2 of 1", where="alpha >= 0", definitions={"w": W}).status == "proved"
    assert assert_claim("w with alpha = 3/2 equals 3/4", definitions={"w": W}).status == "proved"
    assert assert_claim("max(a1, a2) symmetric in a1, a2").status == "proved"
    assert assert_claim("(1 - alpha)^+ nonincreasing in alpha").status == "proved"


def test_unknown_is_a_clear_failure(monkeypatch):
    from verifier.solvers.smt import Answer
    import verifier.claims.one_shot as P

    def undecided(query, solver="z3", timeout=30.0):
        if not query.conditions:      # the emptiness check of the region still answers
            return Answer("sat", solver, {"alpha": Fraction(0)})
        return Answer("unknown", solver, None, "timeout")
    monkeypatch.setattr(P, "check", undecided)
    msg = _failure("min(1, alpha) <= 1", where="alpha >= 0", timeout=0.5)
    assert "undecided (unknown; an unknown is never a proof)" in msg and "timeout" in msg


def test_bad_input_is_an_error_not_a_failure():
    with pytest.raises(UnknownNameError, match="unknown parameter 'beta'"):
        assert_claim("min(1, beta) <= 1", names=["alpha"])
    with pytest.raises(RegionError, match="empty"):
        assert_claim("min(1, alpha) <= 1", where="alpha > 1, alpha < 0")
    with pytest.raises(InputError, match="unknown parameter 'gamma'"):
        assert_claim("min(1, alpha) nondecreasing in gamma", names=["alpha"])


def test_claim_from_text_keeps_definition_names_as_labels():
    claim = claim_from_text("w <= 1", where="alpha >= 0", definitions={"w": W})
    assert claim.lhs.label == "w" and prove(claim).status == "proved"


def test_assert_case_passes_on_the_demo_and_names_mismatches(tmp_path):
    run = assert_case(ROOT / "casebook" / "demo" / "two_cell_tin_manuscript.toml")
    assert run.count("refuted") == 2
    wrong = tmp_path / "wrong.toml"
    wrong.write_text('[parameters]\nalpha = "x"\n[[claims]]\nname = "too strong"\n'
                     'statement = "min(1, alpha) == 1"\nwhere = "alpha >= 0"\nexpect = "proved"\n')
    with pytest.raises(AssertionError) as info:
        assert_case(wrong)
    msg = str(info.value)
    assert "'too strong': declared proved, came out refuted" in msg and "counterexample: alpha = " in msg
    bad = tmp_path / "bad.toml"
    bad.write_text('colour = 1\n[parameters]\nalpha = "x"\n')
    with pytest.raises(CaseFileError, match="bad.toml"):
        assert_case(bad)


def test_notebook_display_shows_status_and_exact_counterexample():
    verdict = prove(claim_from_text("min(1, alpha) >= alpha", where="alpha >= 0"))
    shown = show(verdict)
    html, latex = shown._repr_html_(), shown._repr_latex_()
    x = verdict.counterexample.point["alpha"]
    assert ">refuted</span>" in html and f"<code>{_fmt(x)}</code>" in html and "left - right" in html
    assert latex.startswith("$$") and latex.endswith("$$") and r"\text{(refuted)}" in latex
    assert r"\alpha" in latex and "counterexample" in latex
    assert " -- refuted" in repr(shown)
