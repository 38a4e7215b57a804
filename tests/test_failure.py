"""Failure sub-regions: exact sets, their dimension and share, worst violations, small witnesses."""

from fractions import Fraction as F

from hypothesis import given, settings
from hypothesis import strategies as st

from verifier.claims.kinds import relation, violated_at
from verifier.expressions.expr import abs_, evaluate, max_, min_, param
from verifier.expressions.region import Region, atoms_of
from verifier.regimes.proof import prove_by_regimes
from tests.strategies import exprs, points

a, b, c = param("alpha"), param("beta"), param("gamma")
# Etkin, Tse, Wang, IEEE Trans. IT 54(12), 2008: the W curve (from memory).
W = min_(1, max_(a / 2, 1 - a / 2), max_(a, 1 - a))


def box(names, lo=0, hi=1):
    return Region.of(*[x for n in names for x in atoms_of(param(n), ">=", lo) + atoms_of(param(n), "<=", hi)])


def test_treating_interference_as_noise_fails_exactly_beyond_one_half():
    # Etkin-Tse-Wang 2008: 1 - alpha equals the W curve iff alpha <= 1/2 (from memory).
    region = Region.of(*atoms_of(a, ">=", 0), *atoms_of(a, "<=", F(3, 5)))
    rp = prove_by_regimes(relation(1 - a, "==", W, region))
    assert rp.status == "refuted" and rp.agree
    (piece,) = rp.failure.pieces
    assert piece.full_dimensional and piece.dim == 1
    for x in [F(1, 2), F(51, 100), F(3, 5)]:
        assert piece.polyhedron.contains({"alpha": x}) == (x > F(1, 2))
    assert rp.failure.share == F(1, 6)  # length (3/5 - 1/2) / (3/5), hand computation
    assert piece.worst_value == F(1, 5) and piece.worst_point == {"alpha": F(3, 5)} and piece.worst_attained
    assert F(1, 2) < piece.point["alpha"] < F(3, 5)   # a relative-interior point of the piece
    # the first counterexample follows the ranking: strictly inside 0 < alpha < 3/5, then the
    # smallest denominator: none of 1..6 has a multiple of 1/d in (1/2, 3/5); 4/7 does
    assert rp.counterexamples[0].point == {"alpha": F(4, 7)} and rp.counterexamples[0].strictly_inside
    assert all(violated_at(rp.claim, x.point) for x in rp.counterexamples)


def test_two_dimensional_share_and_equality_half_cells():
    names = ("alpha", "beta")
    rp = prove_by_regimes(relation(min_(a, b), "<=", F(1, 2), box(names)), improve_witness=False)
    assert rp.failure.share == F(1, 4)  # the square (1/2, 1]^2 (hand computation)
    rp = prove_by_regimes(relation(a, "==", b, box(names)), improve_witness=False)
    # an equality claim fails on the two open half-cells alpha > beta and alpha < beta
    assert len(rp.failure.pieces) == 2 and rp.failure.share == 1
    assert {p.polyhedron.contains({"alpha": F(1), "beta": F(0)}) for p in rp.failure.pieces} == {True, False}
    assert not any(p.polyhedron.contains({"alpha": F(1, 3), "beta": F(1, 3)}) for p in rp.failure.pieces)


def test_three_dimensional_share_by_triangulation():
    rp = prove_by_regimes(relation(a + b + c, "<=", 1, box(("alpha", "beta", "gamma"))), improve_witness=False)
    assert rp.failure.share == F(5, 6)  # 1 - vol(unit simplex) = 1 - 1/3! (common practice)


def test_failure_only_on_a_line_or_a_point():
    names = ("alpha", "beta")
    rp = prove_by_regimes(relation(max_(a, b), ">", min_(a, b), box(names)), improve_witness=False)
    assert rp.status == "refuted" and rp.agree
    assert not rp.failure.full_dimensional and rp.failure.share == 0
    assert {p.dim for p in rp.failure.pieces} == {1}
    for p in rp.failure.pieces:
        assert p.point["alpha"] == p.point["beta"]
    rp = prove_by_regimes(relation(abs_(a - 1), ">", 0, box(("alpha",), 0, 2)), improve_witness=False)
    assert [p.dim for p in rp.failure.pieces] == [0] and rp.failure.pieces[0].point == {"alpha": 1}


def test_worst_violation_of_an_unbounded_failure_needs_a_box():
    region = Region.of(*atoms_of(a, ">=", 0))
    rp = prove_by_regimes(relation(a, "<=", 1, region), improve_witness=False)
    (piece,) = rp.failure.pieces
    assert piece.worst_value is None and rp.failure.share is None
    rp = prove_by_regimes(relation(a, "<=", 1, region), improve_witness=False, box={"alpha": (0, 5)})
    (piece,) = rp.failure.pieces
    assert piece.worst_value == 4 and piece.worst_point == {"alpha": 5}


def test_supremum_not_attained_on_an_open_boundary():
    region = Region.of(*atoms_of(a, ">=", 0), *atoms_of(a, "<", 2))
    rp = prove_by_regimes(relation(a, "<=", 1, region), improve_witness=False)
    (piece,) = rp.failure.pieces
    assert piece.worst_value == 1 and piece.worst_point == {"alpha": 2} and not piece.worst_attained


NAMES = ("alpha", "beta")
BOX = box(NAMES, 0, 2)


@settings(max_examples=40, deadline=None)
@given(exprs(NAMES, max_leaves=6), exprs(NAMES, max_leaves=6), st.sampled_from(["==", "<=", "<"]),
       st.lists(points(NAMES, 0, 2, max_denominator=4), min_size=5, max_size=25))
def test_failure_region_is_exact(lhs, rhs, rel, samples):
    claim = relation(lhs, rel, rhs, BOX)
    rp = prove_by_regimes(claim, smt="none", improve_witness=False)
    pieces = rp.failure.pieces if rp.failure else ()
    for p in samples:
        inside = [q for q in pieces if q.polyhedron.contains(p)]
        assert len(inside) <= 1
        assert bool(inside) == violated_at(claim, p), (p, evaluate(lhs, p), evaluate(rhs, p))
    for q in pieces:
        assert violated_at(claim, q.point)
    assert (rp.status == "refuted") == bool(pieces)
