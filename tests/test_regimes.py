"""Regime decomposition and the region-wise prover: published curves, a hand-derived 3-parameter case,
and properties on random claims (partition, affinity, agreement with the one-shot SMT prover)."""

from fractions import Fraction as F

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from verifier.claims.kinds import Side, monotone, reduces_to, relation, symmetric
from verifier.claims.one_shot import prove
from verifier.core.errors import RegionError
from verifier.expressions.expr import affine, evaluate, max_, min_, param
from verifier.expressions.region import Polyhedron, Region, atoms_of
from verifier.regimes.decompose import decompose
from verifier.regimes.proof import prove_by_regimes
from verifier.regimes.thresholds import slice_profile
from verifier.text.parse import parse_region
from tests.strategies import exprs, points

a, b, g = param("alpha"), param("beta"), param("gamma")
# Etkin, Tse, Wang, "Gaussian interference channel capacity to within one bit", IEEE Trans. IT 54(12),
# 2008: the symmetric two-user GDoF curve d(alpha) (the "W" curve), from memory.
W = min_(1, max_(a / 2, 1 - a / 2), max_(a, 1 - a))
ALPHA_NONNEG = Region.of(*atoms_of(a, ">=", 0))


def test_w_curve_has_five_regimes_with_published_breakpoints_and_slopes():
    rp = prove_by_regimes(relation(W, "<=", 1, ALPHA_NONNEG), improve_witness=False)
    assert rp.status == "proved" and rp.certified and rp.agree
    # Etkin-Tse-Wang 2008: breakpoints 1/2, 2/3, 1, 2; slopes -1, +1, -1/2, +1/2, 0 (from memory).
    assert [r.forms[0] for r in rp.regimes] == [1 - a, a, 1 - a / 2, a / 2, affine({}, 1)]
    assert [r.forms[0].coeff("alpha") for r in rp.regimes] == [-1, 1, F(-1, 2), F(1, 2), 0]
    assert [t.text for t in rp.thresholds] == ["alpha = 1/2", "alpha = 2/3", "alpha = 1", "alpha = 2"]
    assert [t.between for t in rp.thresholds] == [((0, 1),), ((1, 2),), ((2, 3),), ((3, 4),)]
    profile = slice_profile([W], ALPHA_NONNEG, "alpha", {})
    assert profile.breakpoints == ((F(1, 2), F(2, 3), F(1), F(2)),)
    assert [s[0] for s in profile.slopes] == [-1, 1, F(-1, 2), F(1, 2), 0]
    assert profile.intervals[0] == (0, F(1, 2)) and profile.intervals[-1] == (2, None)


def test_boundary_points_belong_to_the_regime_on_their_right():
    # Documented convention (verifier.regimes.decompose): a cut h = 0 goes to the side h >= 0.
    cells = decompose([W], ALPHA_NONNEG, ("alpha",))
    for x, form in [(F(1, 2), a), (F(2, 3), 1 - a / 2), (F(1), a / 2), (F(2), affine({}, 1))]:
        owners = [c for c in cells if Polyhedron(c.atoms).contains({"alpha": x})]
        assert len(owners) == 1 and owners[0].forms[0] == form


# --- a 3-parameter claim derived by hand --------------------------------------------------------
# Region gamma > alpha > 1, beta >= 0; lhs = min(gamma, alpha + beta, 2 alpha), rhs = max(alpha,
# gamma - beta).  With u = gamma - alpha > 0: lhs = alpha + min(u, beta, alpha) and
# rhs = alpha + max(0, u - beta).  Hand derivation (interiors):
#   R1: beta < u, beta < alpha      lhs = alpha + beta,  rhs = gamma - beta   (fails iff 2 beta < u)
#   R2: u < beta, u < alpha         lhs = gamma,         rhs = alpha          (holds)
#   R3a: alpha < beta < u           lhs = 2 alpha,       rhs = gamma - beta   (fails iff beta < u - alpha)
#   R3b: alpha < u < beta           lhs = 2 alpha,       rhs = alpha          (holds)
# Adjacent pairs: R1|R2 and R3a|R3b across beta = u (printed alpha + beta = gamma), R1|R3a across beta = alpha, R2|R3b across u = alpha.
HAND_REGION = Region.of(*atoms_of(g, ">", a), *atoms_of(a, ">", 1), *atoms_of(b, ">=", 0))
HAND_LHS = min_(g, a + b, 2 * a)
HAND_RHS = max_(a, g - b)
HAND = {"R1": (a + b, g - b, "refuted"), "R2": (g, a, "proved"),
        "R3a": (2 * a, g - b, "refuted"), "R3b": (2 * a, a, "proved")}


def test_three_parameter_claim_matches_the_hand_derived_regimes():
    rp = prove_by_regimes(relation(HAND_LHS, ">=", HAND_RHS, HAND_REGION), improve_witness=False)
    found = {(r.forms[0], r.forms[1]): r for r in rp.regimes}
    assert set(found) == {(l, r) for l, r, _ in HAND.values()}
    for name, (l, r, status) in HAND.items():
        assert found[(l, r)].status == status, name
    idx = {name: found[(l, r)].index for name, (l, r, _) in HAND.items()}
    pair = lambda x, y: (min(idx[x], idx[y]), max(idx[x], idx[y]))  # noqa: E731
    by_text = {t.text: set(t.between) for t in rp.thresholds}
    assert by_text == {"alpha + beta = gamma": {pair("R1", "R2"), pair("R3a", "R3b")},
                       "alpha = beta": {pair("R1", "R3a")}, "2*alpha = gamma": {pair("R2", "R3b")}}
    assert rp.status == "refuted" and rp.agree
    # the failure set is exactly lhs < rhs (hand: 2 beta < gamma - alpha or beta < gamma - 2 alpha)
    for piece in rp.failure.pieces:
        p = piece.point
        assert evaluate(HAND_LHS, p) < evaluate(HAND_RHS, p) and HAND_REGION.contains(p)


# --- properties on random claims --------------------------------------------------------------
NAMES = ("alpha", "beta")
BOX = Region.of(*[x for n in NAMES for x in atoms_of(param(n), ">=", 0) + atoms_of(param(n), "<=", 3)])
RELS = st.sampled_from(["==", "<=", ">=", "<", ">"])


def _check_partition_and_affinity(rp, region, exprs_, samples):
    cells = [(r, c) for r in rp.regimes for c in r.cells]
    for p in samples:
        if not region.contains(p):
            assert not any(Polyhedron(c.atoms).contains(p) for _, c in cells)
            continue
        owners = [(r, c) for r, c in cells if Polyhedron(c.atoms).contains(p)]
        assert len(owners) == 1, p
        shown = [r for r in rp.regimes if any(t.polyhedron.contains(p) for t in r.polytopes)]
        assert shown == [owners[0][0]]
        r, c = owners[0]
        for e, f in zip(exprs_, r.forms):
            assert evaluate(e, p) == evaluate(f, p)
    for r in rp.regimes:
        for t in r.polytopes:
            for v in t.vertices + (t.point,):
                for e, f in zip(exprs_, r.forms):
                    assert evaluate(e, v) == evaluate(f, v)
            assert region.contains(t.point)


@settings(max_examples=40, deadline=None)
@given(exprs(NAMES, max_leaves=6), exprs(NAMES, max_leaves=6), RELS, st.lists(points(NAMES, 0, 3), max_size=20))
def test_random_claims_partition_the_region_and_agree_with_one_shot_prove(lhs, rhs, rel, samples):
    claim = relation(lhs, rel, rhs, BOX)
    rp = prove_by_regimes(claim, smt="none", improve_witness=False)
    _check_partition_and_affinity(rp, BOX, (lhs, rhs), samples + [{"alpha": F(3), "beta": F(0)}])
    one_shot = prove(claim, improve_witness=False)
    assert rp.status == one_shot.status
    assert all(r.certified for r in rp.regimes if r.status == "proved")


@settings(max_examples=25, deadline=None)
@given(exprs(NAMES, max_leaves=5), st.lists(points(NAMES, -3, 3), max_size=15))
def test_overlapping_region_pieces_become_disjoint_cells(e, samples):
    region = Region(Region.of(*atoms_of(a, ">=", -1), *atoms_of(a, "<=", 2), *atoms_of(b, ">=", 0),
                              *atoms_of(b, "<=", 2)).pieces
                    + Region.of(*atoms_of(a, ">=", 0), *atoms_of(a, "<=", 3), *atoms_of(b, ">", 1),
                                *atoms_of(b, "<=", 3)).pieces)
    rp = prove_by_regimes(relation(e, "<=", e + 1, region), smt="none", improve_witness=False)
    assert rp.status == "proved"
    _check_partition_and_affinity(rp, region, (e, e + 1), samples)


def test_lower_dimensional_region_keeps_exact_verdicts():
    # On the line alpha == beta, alpha in [0, 2]: max(alpha, beta) == alpha holds; alpha < beta nowhere.
    line = Region.of(*atoms_of(a, "==", b), *atoms_of(a, ">=", 0), *atoms_of(a, "<=", 2))
    rp = prove_by_regimes(relation(max_(a, b), "==", a, line), improve_witness=False)
    assert rp.status == "proved" and rp.certified and all(r.dim == 1 for r in rp.regimes)
    rp = prove_by_regimes(relation(min_(a, 2 * b - 1), "<", a, line), improve_witness=False)
    assert rp.status == "refuted" and rp.agree  # fails exactly for alpha >= 1 on the line
    # by the boundary convention the point alpha = 1 stays in the left cell: a 0-dimensional piece
    assert sorted(p.dim for p in rp.failure.pieces) == [0, 1]
    for k in range(9):
        x = F(k, 4)
        inside = any(p.polyhedron.contains({"alpha": x, "beta": x}) for p in rp.failure.pieces)
        assert inside == (x >= 1)


def test_monotone_by_slopes_and_fallbacks():
    # W is increasing on [1/2, 2/3] and [1, 2], decreasing on [0, 1/2] (Etkin-Tse-Wang 2008, from memory).
    inc = Region.of(*atoms_of(a, ">=", F(1, 2)), *atoms_of(a, "<=", F(2, 3)))
    rp = prove_by_regimes(monotone(W, "alpha", inc))
    assert rp.status == "proved" and rp.method == "regimes" and rp.certified
    rp = prove_by_regimes(monotone(W, "alpha", ALPHA_NONNEG))
    assert rp.status == "refuted" and rp.agree
    cex = rp.counterexamples[0]
    assert cex.point["alpha'"] > cex.point["alpha"] and cex.rhs_value < cex.lhs_value
    # two increasing pieces with a drop in between: slopes alone cannot decide, SMT does
    gap = Region(inc.pieces + Region.of(*atoms_of(a, ">=", 1), *atoms_of(a, "<=", 2)).pieces)
    rp = prove_by_regimes(monotone(W, "alpha", gap))
    assert rp.method == "smt" and rp.status == "refuted"


def test_reduces_to_and_symmetric_use_the_compared_pair():
    quad = Region.of(*atoms_of(a, ">=", 0), *atoms_of(b, ">=", 0))
    rp = prove_by_regimes(symmetric(min_(a + b, max_(a, b)), "alpha", "beta", quad))
    assert rp.status == "proved" and rp.certified and rp.agree
    rp = prove_by_regimes(symmetric(min_(a + b / 2, max_(a, b)), "alpha", "beta", quad))
    assert rp.status == "refuted" and rp.agree
    rp = prove_by_regimes(reduces_to(min_(a + b, max_(a, 2 * b)), {"beta": 1}, max_(1, a), quad))
    assert rp.status == "refuted" and rp.names == ("alpha",)
    # lhs with beta = 1 is min(alpha + 1, max(alpha, 2)): it differs from max(1, alpha) on 0 < alpha < 2
    # (hand derivation); the first point is the ranking's best: inside, denominator 1, smallest
    assert rp.counterexamples[0].point == {"alpha": F(1), "beta": F(1)}
    assert all(0 < c.point["alpha"] < 2 and c.point["beta"] == 1 for c in rp.counterexamples)


def test_named_parts_are_reported_active_per_regime():
    parts = (("one", affine({}, 1)), ("mid", max_(a / 2, 1 - a / 2)), ("weak", max_(a, 1 - a)))
    rp = prove_by_regimes(relation(Side(W, "d", parts), "<=", 1, ALPHA_NONNEG), improve_witness=False)
    # Etkin-Tse-Wang 2008 (from memory): the weak-interference bound is tight up to 2/3, the middle
    # one from 2/3 to 2, the single-user bound beyond 2.
    assert [r.active[0] for r in rp.regimes] == [("weak",), ("weak",), ("mid",), ("mid",), ("one",)]


def test_parallel_workers_give_the_same_report_in_the_same_order():
    claim = relation(HAND_LHS, ">=", HAND_RHS, HAND_REGION)
    seen = []
    one = prove_by_regimes(claim, improve_witness=False, smt="none")
    two = prove_by_regimes(claim, improve_witness=False, smt="none", workers=2,
                           progress=lambda stage, done, total: seen.append((stage, done, total)))
    assert [(r.forms, r.point, r.status, r.polytopes) for r in one.regimes] == \
        [(r.forms, r.point, r.status, r.polytopes) for r in two.regimes]
    assert one.thresholds == two.thresholds
    assert [r.certificates for r in one.regimes] == [r.certificates for r in two.regimes]
    assert {stage for stage, _, _ in seen} == {"cells"}
    assert seen[-1] == ("cells", two.cells, two.cells)


def test_empty_region_is_an_input_error():
    with pytest.raises(RegionError):
        prove_by_regimes(relation(a, "<=", 1, Region.of(*atoms_of(a, ">", 1), *atoms_of(a, "<", 0))))


def _thresholds_by_lp_only(regimes, names):
    """Reference: every candidate pair decided by the exact adjacency LP alone (no quick tests); a
    piece lying inside the plane (LP: neither side of it meets the piece) is not divided by it."""
    from verifier.expressions.region import Atom
    from verifier.geometry.lp import feasible
    from verifier.regimes.decompose import normalise
    from verifier.regimes.thresholds import _adjacent

    def inside(p, h):
        return all(feasible(list(p.polyhedron.atoms) + [Atom(side, True)], names) is None for side in (h, -h))
    planes = {}
    for r, regime in enumerate(regimes):
        for p in regime.polytopes:
            for atom in p.polyhedron.atoms:
                if atom.form.coeffs and not inside(p, normalise(atom.form)):
                    planes.setdefault(normalise(atom.form), []).append((r, p, atom.form.coeffs[0][1] > 0))
    out = {}
    for h, owners in planes.items():
        pairs = {(min(ra, rb), max(ra, rb)) for i, (ra, pa, sa) in enumerate(owners)
                 for rb, pb, sb in owners[i + 1:]
                 if ra != rb and (sa != sb or pa.dim < len(names)) and _adjacent(pa, pb, h, names)}
        if pairs:
            out[h] = pairs
    return out


@settings(max_examples=15)
@given(exprs(names=("alpha", "beta"), max_leaves=6), exprs(names=("alpha", "beta"), max_leaves=6))
def test_threshold_quick_tests_never_change_the_thresholds(lhs, rhs):
    # the box, shared-vertex and separating-constraint shortcuts must agree with the plain LP test
    from verifier.regimes.thresholds import thresholds
    region = Region.of(*atoms_of(a, ">=", -2), *atoms_of(a, "<=", 2), *atoms_of(b, ">=", -2),
                       *atoms_of(b, "<=", 2))
    rp = prove_by_regimes(relation(lhs, "<=", rhs, region), smt="none", improve_witness=False)
    fast = {t.form: set(t.between) for t in thresholds(rp.regimes, rp.names)}
    assert fast == _thresholds_by_lp_only(rp.regimes, rp.names)


@settings(max_examples=15)
@given(exprs(names=("alpha", "beta", "gamma"), max_leaves=6), exprs(names=("alpha", "beta", "gamma"), max_leaves=6),
       st.sampled_from(["unbounded", "on a plane", "unbounded on a plane"]))
def test_threshold_shared_rays_never_change_the_thresholds(lhs, rhs, shape):
    # unbounded pieces and pieces of lower dimension than the space are accepted by shared vertices
    # AND rays; the result must equal the plain LP test's
    from verifier.regimes.thresholds import thresholds
    text = {"unbounded": "alpha >= 0, beta >= 0, gamma >= 0",
            "on a plane": "0 <= alpha <= 2, 0 <= beta <= 2, gamma == alpha",
            "unbounded on a plane": "alpha >= 0, beta >= 0, gamma == alpha + beta"}[shape]
    rp = prove_by_regimes(relation(lhs, "<=", rhs, parse_region(text)), smt="none", improve_witness=False)
    fast = {t.form: set(t.between) for t in thresholds(rp.regimes, rp.names)}
    assert fast == _thresholds_by_lp_only(rp.regimes, rp.names)


def test_threshold_quick_tests_on_a_chain_of_six():
    from verifier.regimes.thresholds import thresholds
    xs = [param(f"x{i}") for i in range(1, 5)]
    f = max_(xs[0] - xs[1], xs[1] - xs[0]) + max_(xs[1] - xs[2], xs[2] - xs[1]) + max_(xs[2] - xs[3], xs[3] - xs[2])
    region = Region.of(*(x for v in xs for x in atoms_of(v, ">=", 0) + atoms_of(v, "<=", 1)))
    rp = prove_by_regimes(relation(f, "<=", 3, region), smt="none", improve_witness=False)
    fast = {t.form: set(t.between) for t in thresholds(rp.regimes, rp.names)}
    assert fast == _thresholds_by_lp_only(rp.regimes, rp.names) and len(fast) == 3


def test_the_regions_own_equalities_are_no_thresholds():
    # on the slice alpha == beta, min(alpha, 1) has one threshold, alpha = 1; the slice's own
    # hyperplane separates nothing (hand-derived)
    rp = prove_by_regimes(relation(min_(a, 1), "<=", 1, parse_region("alpha == beta, alpha >= 0")), smt="none")
    assert [t.text for t in rp.thresholds] == ["alpha = 1"]
