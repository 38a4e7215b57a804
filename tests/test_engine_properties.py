"""Property tests of the one-shot prover against brute-force exact evaluation.

Oracle: our exact evaluator at random rational points (and the exact re-check of counterexamples);
no solver answer is taken on trust.
"""

from fractions import Fraction as F

from hypothesis import assume, given, settings
from hypothesis import strategies as st

from verifier.claims.kinds import relation, violated_at, within
from verifier.claims.one_shot import prove
from verifier.expressions.expr import evaluate, param
from verifier.expressions.region import Region, atoms_of
from tests.strategies import exprs, points

NAMES = ("alpha", "beta")
BOX = Region.of(*[x for n in NAMES for x in atoms_of(param(n), ">=", 0) + atoms_of(param(n), "<=", 3)])
RELS = st.sampled_from(["==", "<=", ">=", "<", ">"])


def holds(l, rel, r):
    return {"==": l == r, "<=": l <= r, ">=": l >= r, "<": l < r, ">": l > r}[rel]


@settings(max_examples=30, deadline=None)
@given(exprs(NAMES, max_leaves=6), exprs(NAMES, max_leaves=6), RELS, st.lists(points(NAMES, 0, 3), max_size=25))
def test_proved_claims_hold_at_random_points_and_counterexamples_violate(lhs, rhs, rel, samples):
    v = prove(relation(lhs, rel, rhs, BOX))
    if v.status == "proved":
        for p in samples:
            if BOX.contains(p):
                assert holds(evaluate(lhs, p), rel, evaluate(rhs, p)), (p, v)
    elif v.status == "refuted":
        cex = v.counterexample
        assert BOX.contains(cex.point) and violated_at(v.claim, cex.point)
        assert not holds(cex.lhs_value, rel, cex.rhs_value)
        assert cex.lhs_value == evaluate(lhs, cex.point) and cex.rhs_value == evaluate(rhs, cex.point)


@settings(max_examples=20, deadline=None)
@given(exprs(NAMES, max_leaves=5), exprs(NAMES, max_leaves=5), st.fractions(0, 2, max_denominator=4))
def test_within_agrees_with_a_grid_refutation(lhs, rhs, gap):
    # Brute force on the 1/4-grid of the box: any grid violation forces 'refuted'.
    v = prove(within(lhs, rhs, gap, BOX))
    grid = [F(k, 4) for k in range(13)]
    bad = [(x, y) for x in grid for y in grid
           if abs(evaluate(lhs, {"alpha": x, "beta": y}) - evaluate(rhs, {"alpha": x, "beta": y})) > gap]
    if bad:
        assert v.status == "refuted"
    if v.status == "refuted":
        assert violated_at(v.claim, v.counterexample.point)


@settings(max_examples=25, deadline=None)
@given(exprs(NAMES, max_leaves=6))
def test_an_expression_equals_itself_rebuilt(e):
    assume(e is not None)
    assert prove(relation(e, "==", e + 0, BOX)).status == "proved"
