"""Soundness corners: failures on a line or a point, empty regions, unknown never read as proved."""

from fractions import Fraction as F

import pytest

from verifier.claims.kinds import relation, violated_at, violation_query
from verifier.claims.one_shot import PROVED, REFUTED, UNKNOWN, prove
from verifier.core.errors import RegionError
from verifier.core.verdicts import backends
from verifier.expressions.expr import max_, min_, param
from verifier.expressions.region import Region, atoms_of
from verifier.solvers import smt

a, b = param("alpha"), param("beta")
QUADRANT = Region.of(*atoms_of(a, ">=", 0), *atoms_of(b, ">=", 0))


def test_strict_inequality_failing_only_on_the_diagonal_is_refuted():
    # min(a, b) < max(a, b) fails exactly where a == b: a line inside the region.
    v = prove(relation(min_(a, b), "<", max_(a, b), QUADRANT))
    assert v.status == REFUTED
    p = v.counterexample.point
    assert p["alpha"] == p["beta"] and violated_at(v.claim, p)
    assert v.counterexample.strictly_inside  # on the diagonal but inside the open quadrant


def test_claim_failing_at_a_single_point_is_refuted_with_that_point():
    # |alpha - 1/3| > 0 fails only at alpha = 1/3.
    region = Region.of(*atoms_of(a, ">=", 0), *atoms_of(a, "<=", 1))
    v = prove(relation(max_(a - F(1, 3), F(1, 3) - a), ">", 0, region))
    assert v.status == REFUTED and v.counterexample.point == {"alpha": F(1, 3)}


def test_failure_only_on_region_boundary_is_reported_as_boundary():
    region = Region.of(*atoms_of(a, ">=", 0), *atoms_of(a, "<=", 1))
    v = prove(relation(a, "<", 1, region))
    assert v.status == REFUTED
    assert v.counterexample.point == {"alpha": F(1)} and not v.counterexample.strictly_inside


def test_empty_region_is_an_input_error_not_a_vacuous_proof():
    empty = Region.of(*atoms_of(a, ">", 1), *atoms_of(a, "<", 0))
    with pytest.raises(RegionError, match="is empty"):
        prove(relation(a, "==", b, empty))


def test_unknown_is_never_proved_even_beside_an_unsat():
    unknown = smt.Answer("unknown", "z3", detail="timeout")
    assert backends([unknown], {})[0] == UNKNOWN
    # a cross-check asks for two proofs: one backend's unsat and the other's timeout is no proof
    assert backends([unknown, smt.Answer("unsat", "cvc5")], {})[0] == UNKNOWN


def test_solver_disagreement_with_a_bogus_model_is_unknown_and_loud():
    sat = smt.Answer("sat", "cvc5", {"alpha": F(0)})
    status, _, detail = backends([smt.Answer("unsat", "z3"), sat], {"cvc5": False})
    assert status == UNKNOWN and "fails the exact re-check" in detail


def test_disagreement_with_a_point_that_rechecks_is_a_loud_refutation():
    # an exactly re-checked violating point is a fact; the backend that said unsat is wrong
    sat = smt.Answer("sat", "cvc5", {"alpha": F(0)})
    status, _, detail = backends([smt.Answer("unsat", "z3"), sat], {"cvc5": True})
    assert status == REFUTED and "DISAGREE" in detail


def test_model_failing_exact_recheck_becomes_unknown(monkeypatch):
    # A lying backend: claims 'sat' with a point that does not violate. Must not become a refutation.
    monkeypatch.setattr("verifier.claims.one_shot.check",
                        lambda q, s, t: smt.Answer("sat", s, {"alpha": F(1, 2)})
                        if q.conditions else smt.Answer("sat", s, {"alpha": F(0)}))
    v = prove(relation(a, "<=", 1, Region.of(*atoms_of(a, ">=", 0))))
    assert v.status == UNKNOWN and "exact re-check" in v.detail


def test_tiny_timeout_gives_unknown_or_a_correct_answer():
    # Whatever a 1 ms budget yields, it is never a wrong 'proved'.
    claim = relation(min_(a, b), "<", max_(a, b), QUADRANT)
    ans = smt.check(violation_query(claim), "z3", 0.001)
    assert ans.status in ("sat", "unknown")


@pytest.mark.cvc5
def test_cross_check_agrees_on_refutation():
    v = prove(relation(min_(a, b), "<", max_(a, b), QUADRANT), cross_check=True)
    assert v.status == REFUTED and {x.solver for x in v.answers} == {"z3", "cvc5"}
