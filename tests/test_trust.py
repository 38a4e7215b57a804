"""Regression tests for the ways a false "proved" or a misleading verdict was once printed.

Each test names the defect it guards against.  Expected values are hand derivations stated beside
the check; z3's own SMT-LIB reader (z3-solver, a reference library) re-answers the bundle's files.
"""

from fractions import Fraction as F

import pytest

from verifier.claims.kinds import claim_points, reduces_to, relation, violated_at
from verifier.claims.one_shot import prove
from verifier.core.budget import Budget
from verifier.core.verdicts import PROVED, REFUTED, UNKNOWN, Obligation, all_of, methods, overall
from verifier.expressions.expr import max_, min_, param
from verifier.regimes.proof import prove_by_regimes
from verifier.solvers import smt
from verifier.text.parse import parse_region
from workbench.cli import main
from tests.case_files import write

a, b = param("alpha"), param("beta")

FORGOTTEN = """
title = "a forgotten regime"
[parameters]
alpha = "first exponent"
beta = "second exponent"
[assume]
region = "0 <= alpha <= 8, beta >= 0"
[outer]
total = "alpha + beta + 1"
[inner]
slices = "alpha if 0 <= alpha < 1; alpha if 1 <= alpha < 2; alpha if 2 <= alpha < 3; alpha if 4 <= alpha <= 8"
[[claims]]
name = "scheme below converse"
statement = "inner <= outer"
"""


def coverage_times_out(monkeypatch):
    """Every coverage query (a query with `outside` regions) answers 'unknown', as under load."""
    real = smt.check

    def fake(query, solver="z3", timeout=30.0):
        if query.outside:
            return smt.Answer("unknown", solver, detail="simulated timeout")
        return real(query, solver, timeout)
    monkeypatch.setattr("workbench.decide.check", fake)
    monkeypatch.setattr("verifier.solvers.smt.check", fake)


# --- defect 1: coverage dropped -------------------------------------------------------------------

@pytest.mark.parametrize("command", ["check", "report", "bundle"])
def test_a_forgotten_regime_is_refuted_by_every_command(tmp_path, capsys, command):
    case = write(tmp_path, FORGOTTEN)
    argv = [command, case] + ([str(tmp_path / "out")] if command == "bundle" else [])
    assert main(argv) == 1
    out = capsys.readouterr().out
    # 3 <= alpha < 4 is in no regime; the ranking picks alpha = 3, beta = 1 (inside 0 < alpha < 8,
    # beta > 0, denominator 1, smallest magnitude): hand derivation
    if command != "bundle":
        assert "alpha = 3, beta = 1" in out


@pytest.mark.parametrize("command", ["check", "report", "bundle"])
def test_coverage_that_times_out_is_unknown_never_proved(tmp_path, capsys, monkeypatch, command):
    coverage_times_out(monkeypatch)
    case = write(tmp_path, FORGOTTEN)
    argv = [command, case] + ([str(tmp_path / "out")] if command == "bundle" else [])
    assert main(argv) == 3
    out = capsys.readouterr().out
    if command == "check":
        assert "scheme below converse -- unknown" in out
    elif command == "report":   # its part is proved on the regimes; the claim is not
        assert "scheme below converse -- unknown" in out and "could not decide coverage" in out
    else:
        assert "The one claim is undecided" in out


def test_an_obligation_plan_without_obligations_is_not_proved():
    assert all_of([]).status == UNKNOWN
    assert all_of([Obligation("x", PROVED), Obligation("y", UNKNOWN, "timeout")]).status == UNKNOWN
    # a refutation counts only when its point re-checks
    assert all_of([Obligation("x", REFUTED, recheck=lambda: False)]).status == UNKNOWN
    assert all_of([Obligation("x", REFUTED, recheck=lambda: True),
                   Obligation("y", UNKNOWN)]).status == REFUTED
    assert overall([]) == UNKNOWN and overall([PROVED, UNKNOWN]) == UNKNOWN


def test_methods_rule():
    assert methods(("a", PROVED), ("b", UNKNOWN), True)[0] == PROVED
    assert methods(("a", UNKNOWN), ("b", UNKNOWN), True)[0] == UNKNOWN
    status, note = methods(("a", PROVED), ("b", REFUTED), True)
    assert status == REFUTED and "DISAGREE" in note
    assert methods(("a", PROVED), ("b", REFUTED), False)[0] == UNKNOWN


# --- defect 3: counterexample outside the region -------------------------------------------------

QUADRANT = parse_region("alpha >= 0, beta >= 0")


def test_reduces_to_reads_both_sides_on_the_slice():
    # alpha + beta with beta = 0 is alpha; the right side read at beta = 0 is alpha too: proved
    assert prove(reduces_to(a + b, {"beta": 0}, a + b, QUADRANT)).status == PROVED


def test_reduces_to_counterexample_is_a_point_of_the_region():
    claim = reduces_to(max_(a, b), {"beta": 1}, a, QUADRANT)   # max(alpha, 1) != alpha for alpha < 1
    for verdict_point in (prove(claim).counterexample.point,
                          prove_by_regimes(claim).counterexamples[0].point):
        assert verdict_point["beta"] == 1 and QUADRANT.contains(verdict_point)
        assert violated_at(claim, verdict_point)
        # inside 0 < alpha (< 1 where it fails): the smallest denominator is 2 (hand derivation)
        assert verdict_point == {"alpha": F(1, 2), "beta": F(1)}


def test_a_point_outside_the_region_never_counts_as_a_violation():
    claim = relation(a, "<=", 1, parse_region("0 <= alpha <= 2"))
    assert violated_at(claim, {"alpha": F(3, 2)})
    assert not violated_at(claim, {"alpha": F(3)})          # violates, but outside the region
    mono = reduces_to(a, {"beta": 1}, a + b - 1, QUADRANT)
    assert claim_points(mono, {"alpha": F(1), "beta": F(2)}) == ()   # the fixed value disagrees


# --- defect 4: a timeout is unknown (exit 3), not bad input (exit 2) -----------------------------

MONOTONE = """
title = "a scheme in regimes"
[parameters]
alpha = "exponent"
[assume]
region = "0 <= alpha <= 3"
[inner]
scheme = "alpha if alpha <= 1; 1 if 1 <= alpha <= 2; alpha - 1 if alpha >= 2"
[[claims]]
name = "monotone"
statement = "inner nondecreasing in alpha"
"""


def test_min_max_form_undecided_makes_the_claim_unknown(tmp_path, capsys, monkeypatch):
    real = smt.check

    def fake(query, solver="z3", timeout=30.0):
        if any(rel == "!=" for _, rel, _ in query.conditions):
            return smt.Answer("unknown", solver, detail="simulated timeout")
        return real(query, solver, timeout)
    monkeypatch.setattr("verifier.claims.piecewise.check", fake)
    assert main(["check", write(tmp_path, MONOTONE)]) == 3
    out = capsys.readouterr().out
    assert "could not confirm" in out


def test_min_max_form_confirmed_proves_the_claim(tmp_path, capsys):
    assert main(["check", write(tmp_path, MONOTONE)]) == 0


# --- bounded time -----------------------------------------------------------------------------------

def test_a_spent_budget_is_unknown_naming_the_stage():
    names = [param(f"x{i}") for i in range(1, 10)]
    f = names[0] * 0
    for u, v in zip(names, names[1:]):
        f = f + max_(u - v, v - u)
    region = parse_region(", ".join(f"0 <= x{i} <= 1" for i in range(1, 10)))
    proof = prove_by_regimes(relation(f, "<=", 8, region), budget=Budget(0.3, 0.05))
    assert "ran out of the claim's time budget" in proof.detail
    assert proof.status in (UNKNOWN, PROVED)
    if proof.status == PROVED:   # then the one-shot query proved it inside its share of the budget
        assert proof.smt is not None and proof.smt.status == PROVED
    verdict = prove(relation(f, "<=", 8, region), budget=Budget(1e-6, 1e-6))
    assert verdict.status == UNKNOWN and "stage" in verdict.detail


# --- one counterexample policy ----------------------------------------------------------------------

W = min_(1, max_(a / 2, 1 - a / 2), max_(a, 1 - a))  # the W curve, Etkin-Tse-Wang 2008 (from memory)


@pytest.mark.parametrize("claim,expected", [
    # 1 - alpha equals W exactly for alpha <= 1/2; inside (0, 3/5) the failure is (1/2, 3/5), whose
    # smallest-denominator point is 4/7 (no multiple of 1/d in it for d <= 6): hand derivation
    (relation(1 - a, "==", W, parse_region("0 <= alpha <= 3/5")), {"alpha": F(4, 7)}),
    # min(a, b) < max(a, b) fails on the diagonal; inside the open quadrant the smallest point is (1, 1)
    (relation(min_(a, b), "<", max_(a, b), QUADRANT), {"alpha": F(1), "beta": F(1)}),
    # a + b <= 3/2 fails for a + b > 3/2: denominator 1, smallest magnitude (1, 1)
    (relation(a + b, "<=", F(3, 2), QUADRANT), {"alpha": F(1), "beta": F(1)}),
])
def test_every_entry_point_and_solver_prints_the_same_first_counterexample(claim, expected):
    from workbench.assertions import assert_claim
    points = [prove(claim, "z3").counterexample.point,
              prove(claim, "cvc5").counterexample.point,
              prove(claim, cross_check=True).counterexample.point,
              prove_by_regimes(claim, "z3").counterexamples[0].point,
              prove_by_regimes(claim, "cvc5").counterexamples[0].point,
              assert_claim(claim, expect="refuted").counterexample.point]
    assert all(p == expected for p in points), points


def test_counterexample_lists_are_ordered_by_the_ranking_without_duplicates():
    claim = relation(1 - a, "==", W, parse_region("0 <= alpha <= 1"))
    cexs = prove_by_regimes(claim).counterexamples
    assert [c.rank() for c in cexs] == sorted(c.rank() for c in cexs)
    assert len({tuple(sorted(c.point.items())) for c in cexs}) == len(cexs)
    assert all(violated_at(claim, c.point) for c in cexs)


# --- re-checkable obligations ------------------------------------------------------------------------

def test_bundle_obligations_are_answered_the_same_by_z3_reading_smtlib(tmp_path, capsys):
    import z3
    case = write(tmp_path, FORGOTTEN.replace("2 <= alpha < 3; alpha if 4", "2 <= alpha < 4; alpha if 4"))
    assert main(["bundle", case, str(tmp_path / "out")]) == 0
    files = sorted((tmp_path / "out" / "obligations").glob("*.smt2"))
    assert files
    for f in files:
        text = f.read_text()
        assert "(set-info :status unsat)" in text           # every obligation of a proved claim
        solver = z3.Solver()
        solver.from_string(text)
        assert solver.check() == z3.unsat, f.name


@pytest.mark.parametrize("workers", [1, 2])
def test_a_wrong_certificate_from_the_engine_is_caught_and_never_proves(monkeypatch, workers):
    # Simulate an engine defect: every cell certificate gets a wrong Farkas constant.  The region-wise
    # method must then say unknown (loudly), whichever checker looks at it, also when the workers
    # check the cells in slices (workers=2; the pool is forked after the patch).
    from dataclasses import replace
    import verifier.regimes.work as work
    from verifier.geometry.farkas import Farkas
    real = work.certify

    def broken(*args, **kw):
        cert = real(*args, **kw)
        return None if cert is None else replace(cert, farkas=tuple(Farkas(f.const + 1, f.mult)
                                                                    for f in cert.farkas))
    monkeypatch.setattr(work, "certify", broken)
    claim = relation(W, "<=", 1, parse_region("alpha >= 0"))
    proof = prove_by_regimes(claim, smt="none", workers=workers)
    assert proof.status == UNKNOWN and "CERTIFICATE CHECK FAILED" in proof.detail
    assert prove_by_regimes(claim).status == PROVED      # the one-shot query still proves it (rule 3)
