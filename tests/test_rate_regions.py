"""Rate-region claims (verifier.rates): every kind proved and refuted on hand-derived cases, every
refuting pair re-checked here by direct exact evaluation, the support formula against brute-force
vertex enumeration.

Hand derivations are given beside each case.  The MAC region d1 <= a1, d2 <= a2, d1 + d2 <= max(a1, a2)
is from memory (Cover-Thomas, 'Elements of Information Theory', 2nd ed., 2006, ch. 15, in GDoF form:
common practice).
"""

from __future__ import annotations

from fractions import Fraction as F
from itertools import combinations

import pytest
from hypothesis import given, settings, strategies as st

from verifier.core.errors import InputError
from verifier.expressions.expr import evaluate, max_, param
from verifier.rates import claims as RC
from verifier.rates.decide import decide
from verifier.rates.region import HRegion, VRegion, inequality
from verifier.rates.support import dual_vertices, optimum_at, support_expr
from verifier.rates.text import parse_corner, parse_inequality
from verifier.text.parse import parse_expr, parse_region

RATES, EXPS = ("d1", "d2"), ("a1", "a2")
QUADRANT = parse_region("a1 >= 0, a2 >= 0")


def H(name, *rows, nonnegative=True):
    return HRegion(name, RATES, tuple(parse_inequality(r, RATES, EXPS) for r in rows), nonnegative)


def V(name, *corners, free=False):
    return VRegion(name, RATES, tuple(parse_corner(c, RATES, EXPS) for c in corners), free)


MAC = H("MAC", "d1 <= a1", "d2 <= a2", "d1 + d2 <= max(a1, a2)")
BOX = H("BOX", "d1 <= a1", "d2 <= a2")
SD = V("SD", "(a1, (a2 - a1)^+)", "((a1 - a2)^+, a2)", free=True)   # successive decoding, both orders


def run(claim, **kw):
    return decide(claim, improve_witness=kw.pop("improve", False), **kw)


def assert_refutes(verdict, inside, outside):
    """The printed pair, re-checked here: theta in the claim's region, rates in `inside` and not in
    `outside` (an H-form), by direct evaluation of the inequalities."""
    w = verdict.witness
    assert verdict.status == "refuted" and w is not None
    assert verdict.claim.region.contains(w.theta)
    if inside is not None:
        assert inside.contains(w.theta, w.rates)
    assert not outside.contains(w.theta, w.rates)


# --- subset / equal ---------------------------------------------------------------------------

def test_h_subset_h_proved_and_refuted():
    # MAC adds a facet to the box: MAC inside BOX; (a1, a2) = (1, 1), d = (1, 1) is in BOX, not MAC
    assert run(RC.subset(MAC, BOX, QUADRANT)).status == "proved"
    v = run(RC.subset(BOX, MAC, QUADRANT), improve=True)
    assert_refutes(v, BOX, MAC)
    assert v.witness.theta == {"a1": 1, "a2": 1} and v.witness.rates == {"d1": 1, "d2": 1}
    assert v.witness.strictly_inside


def test_corners_equal_h_form():
    # successive decoding with time sharing and free disposal is the MAC region (hand: the corners
    # are the two vertices of the dominant face, and the region is down-closed)
    assert run(RC.equal(SD, MAC, QUADRANT)).status == "proved"
    assert run(RC.subset(MAC, SD, QUADRANT)).status == "proved"
    # the single-user corners (a1, 0), (0, a2) miss the dominant face whenever a1, a2 > 0
    v = run(RC.equal(V("TDMA", "(a1, 0)", "(0, a2)", free=True), MAC, QUADRANT))
    assert v.status == "refuted"
    w = v.witness
    assert MAC.contains(w.theta, w.rates)
    from verifier.rates.membership import in_hull
    assert not in_hull(V("TDMA", "(a1, 0)", "(0, a2)", free=True), w.theta, w.rates)


def test_hull_without_free_disposal_misses_the_origin():
    # conv{(a1, (a2 - a1)^+), ((a1 - a2)^+, a2)} is a segment: the vertex 0 of MAC is not in it
    hull = V("segment", "(a1, (a2 - a1)^+)", "((a1 - a2)^+, a2)")
    v = run(RC.subset(MAC, hull, parse_region("a1 > 0, a2 > 0")))
    assert v.status == "refuted"
    assert MAC.contains(v.witness.theta, v.witness.rates)
    # but the segment lies in the MAC region (corners re-checked below by evaluation, too)
    assert run(RC.subset(hull, MAC, QUADRANT)).status == "proved"


@pytest.mark.parametrize("theta", [{"a1": F(0), "a2": F(0)}, {"a1": F(1), "a2": F(3, 7)},
                                   {"a1": F(2, 5), "a2": F(9, 4)}, {"a1": F(5), "a2": F(5)}])
def test_corners_recheck_against_the_inequalities(theta):
    # each corner evaluated exactly satisfies every inequality of MAC, and its sum is max(a1, a2)
    for i in range(len(SD.corners)):
        c = SD.corner_at(i, theta)
        assert MAC.contains(theta, c)
        assert c["d1"] + c["d2"] == max(theta["a1"], theta["a2"])


def test_unbounded_region_inside_corners_is_not_proved():
    half_plane = H("strip", "d1 <= a1")                 # d2 unbounded
    v = run(RC.subset(half_plane, SD, QUADRANT))
    assert v.status == "unknown" and "unbounded" in v.detail


# --- contains ----------------------------------------------------------------------------------

def test_contains_point():
    half = RC.contains(MAC, (param("a1") / 2, param("a2") / 2), QUADRANT)
    assert run(half).status == "proved"       # a1/2 + a2/2 <= max(a1, a2)
    v = run(RC.contains(MAC, (param("a1"), param("a2")), parse_region("a1 > 0, a2 > 0")), improve=True)
    assert_refutes(v, None, MAC)              # a1 + a2 > max(a1, a2) when both are positive
    assert v.witness.rates == {"d1": v.witness.theta["a1"], "d2": v.witness.theta["a2"]}


# --- max of a weighted sum ---------------------------------------------------------------------

def test_max_weighted_sum_proved_and_refuted_with_the_optimiser():
    assert run(RC.max_of(MAC, {"d1": 1, "d2": 1}, "==", max_(param("a1"), param("a2")), QUADRANT)).status == "proved"
    # 2 d1 + d2: put d1 = a1, then d2 = max(a1, a2) - a1 (hand): 2 a1 + (a2 - a1)^+
    best = parse_expr("2*a1 + (a2 - a1)^+")
    assert run(RC.max_of(MAC, {"d1": 2, "d2": 1}, "==", best, QUADRANT)).status == "proved"
    v = run(RC.max_of(MAC, {"d1": 1, "d2": 1}, "==", parse_expr("a1 + a2"), QUADRANT), improve=True)
    w = v.witness
    assert v.status == "refuted" and MAC.contains(w.theta, w.rates)
    assert w.rates["d1"] + w.rates["d2"] == max(w.theta["a1"], w.theta["a2"]) != w.theta["a1"] + w.theta["a2"]


def test_max_over_corners():
    assert run(RC.max_of(SD, {"d1": 1, "d2": 1}, "==", max_(param("a1"), param("a2")), QUADRANT)).status == "proved"
    # with free disposal a negative weight is disposed of: max d1 - d2 = a1 (corner 1 with d2 = 0)
    assert run(RC.max_of(SD, {"d1": 1, "d2": -1}, "==", param("a1"), QUADRANT)).status == "proved"


def test_max_needs_zero_in_the_region_else_unknown():
    shifted = H("shifted", "d1 <= a1 - 1", "d2 <= 1")
    v = run(RC.max_of(shifted, {"d1": 1}, "==", param("a1") - 1, QUADRANT))
    assert v.status == "unknown" and "0 is not in shifted" in v.detail


def test_unbounded_weighted_sum_is_an_input_error():
    with pytest.raises(InputError, match="unbounded over region 'strip'"):
        support_expr(H("strip", "d1 <= a1"), (("d2", F(1)),))


# --- for all weights -----------------------------------------------------------------------------

def test_same_support_proved_and_refuted():
    redundant = H("MAC+", "d1 <= a1", "d2 <= a2", "d1 + d2 <= max(a1, a2)", "2*d1 + d2 <= a1 + max(a1, a2)")
    assert run(RC.same_support(MAC, redundant, QUADRANT)).status == "proved"
    assert_refutes(run(RC.same_support(BOX, MAC, QUADRANT)), BOX, MAC)


def test_same_support_refuses_what_it_does_not_decide():
    with pytest.raises(InputError, match="down-closed"):
        RC.same_support(MAC, H("tilted", "d1 - d2 <= 1", "d2 <= 1"), QUADRANT)
    with pytest.raises(InputError, match="given by corners"):
        RC.same_support(MAC, SD, QUADRANT)


def test_corners_in_corners_is_refused():
    with pytest.raises(InputError, match="both regions are given by corners"):
        RC.subset(SD, SD, QUADRANT)


def test_empty_exponent_region_is_bad_input():
    from verifier.core.errors import RegionError
    with pytest.raises(RegionError, match="empty"):
        run(RC.subset(MAC, BOX, parse_region("a1 > 1, a1 < 0")))


@pytest.mark.cvc5
def test_cross_check_with_both_solvers():
    assert run(RC.equal(SD, MAC, QUADRANT), cross_check=True).status == "proved"
    assert run(RC.subset(BOX, MAC, QUADRANT), cross_check=True).status == "refuted"


# --- the support formula against brute-force vertex enumeration ---------------------------------

def brute_max(rows, weights, point):
    """max w.d over {rows, d >= 0} at a numeric point by enumerating every pairwise intersection of
    constraint lines (our own exact code, independent of verifier.geometry.lp and verifier.geometry.vertices)."""
    lines = [({r: q.coeff(r) for r in RATES}, evaluate(q.bound, point)) for q in rows]
    lines += [({"d1": F(-1), "d2": F(0)}, F(0)), ({"d1": F(0), "d2": F(-1)}, F(0))]
    best = None
    for (a, b), (c, e) in combinations(lines, 2):
        det = a["d1"] * c["d2"] - a["d2"] * c["d1"]
        if det == 0:
            continue
        x = {"d1": (b * c["d2"] - a["d2"] * e) / det, "d2": (a["d1"] * e - b * c["d1"]) / det}
        if all(g["d1"] * x["d1"] + g["d2"] * x["d2"] <= h for g, h in lines):
            value = sum(weights[r] * x[r] for r in RATES)
            best = value if best is None or value > best else best
    return best


BOUND_TEXTS = ["a1", "a2", "max(a1, a2)", "(a1 - a2)^+ + a2", "min(a1, 1) + a2/2", "1 + (a2 - 1)^+",
               "max(a1, 1 - a2) + 1/3"]
ROW_SHAPES = [{"d1": 1, "d2": 1}, {"d1": 2, "d2": 1}, {"d1": 1, "d2": 3}, {"d1": 1, "d2": 0}, {"d1": 0, "d2": 1}]
exact = st.fractions(min_value=0, max_value=3, max_denominator=7)


@settings(max_examples=max(10, settings.default.max_examples // 2))
@given(rows=st.lists(st.tuples(st.sampled_from(ROW_SHAPES[:3]), st.sampled_from(BOUND_TEXTS)), max_size=3),
       caps=st.tuples(st.sampled_from(BOUND_TEXTS), st.sampled_from(BOUND_TEXTS)),
       w=st.tuples(st.integers(0, 3), st.integers(0, 3)), a1=exact, a2=exact)
def test_support_formula_matches_brute_force_vertex_enumeration(rows, caps, w, a1, a2):
    specs = [({"d1": 1}, caps[0]), ({"d2": 1}, caps[1])] + rows   # single-user caps keep it bounded
    region = HRegion("R", RATES, tuple(inequality(c, parse_expr(b)) for c, b in specs))
    weights = {"d1": F(w[0]), "d2": F(w[1])}
    point = {"a1": a1, "a2": a2}
    h = support_expr(region, tuple((r, c) for r, c in weights.items() if c))  if any(w) else None
    expected = brute_max(region.inequalities, weights, point)
    if h is None:
        return
    assert evaluate(h, point) == expected
    best = optimum_at(region, tuple(weights.items()), point)
    assert best.value == expected and region.contains(point, best.rates)


def test_dual_vertices_of_the_mac_sum():
    # max d1 + d2 over MAC: dual vertices y = (1, 1, 0) (the two single-user bounds) and (0, 0, 1)
    got = {v.multipliers for v in dual_vertices(MAC, (("d1", F(1)), ("d2", F(1))))}
    assert got == {(1, 1, 0), (0, 0, 1)}


def test_free_disposal_never_covers_negative_rates():
    # without d2 >= 0 this MAC-like region has the vertex (a1, -1), dominated by the corner
    # (a1, (a2 - a1)^+) but outside the down-closure, which stays in the orthant; its other vertices
    # (0, a2), (0, a1 - 1), (a1, (a2 - a1)^+), ((a1 - a2)^+, a2) are covered (hand derivation)
    tilted = HRegion("tilted", RATES, tuple(parse_inequality(r, RATES, EXPS) for r in
                                            ["d1 <= a1", "d2 <= a2", "d1 + d2 <= max(a1, a2)",
                                             "d1 + d2 >= a1 - 1", "-d1 <= 0"]), False)
    v = run(RC.subset(tilted, SD, parse_region("a1 >= 2, a2 >= 0")))
    assert v.status == "refuted" and v.witness.rates["d2"] < 0 and tilted.contains(v.witness.theta, v.witness.rates)


def test_rate_order_of_the_corner_region_does_not_matter():
    swapped = VRegion("SD'", ("d2", "d1"), tuple((c[1], c[0]) for c in SD.corners), True)
    assert run(RC.equal(swapped, MAC, QUADRANT)).status == "proved"
    assert run(RC.subset(MAC, swapped, QUADRANT)).status == "proved"


def test_text_helpers_build_the_same_regions():
    from verifier.rates.text import h_region, v_region
    assert h_region("MAC", RATES, EXPS, ["d1 <= a1", "d2 <= a2", "d1 + d2 <= max(a1, a2)"]) == MAC
    assert v_region("SD", RATES, EXPS, ["(a1, (a2 - a1)^+)", "((a1 - a2)^+, a2)"], True) == SD


def test_a_max_refutation_needs_the_exact_optimum_to_agree():
    # at a1 = 1/2 the region {d1 <= a1 - 1} is empty: the formula min over dual vertices still reads
    # a1 - 1 there, but no maximum exists, so that point refutes nothing (unknown, never refuted)
    shifted = H("shifted", "d1 <= a1 - 1", "d2 <= 1")
    v = run(RC.max_of(shifted, {"d1": 1}, "==", parse_expr("a1"), parse_region("a1 >= 0, a1 <= 1/2")))
    assert v.status == "unknown"
    # where the region is not empty the same wrong formula is refuted, with the optimiser
    v = run(RC.max_of(shifted, {"d1": 1}, "==", parse_expr("a1"), parse_region("a1 >= 1")))
    assert v.status == "refuted" and v.witness.rates["d1"] == v.witness.theta["a1"] - 1


def test_redundant_facet_proved_and_refuted():
    # 2 d1 + d2 <= a1 + max(a1, a2) is the sum of d1 <= a1 and d1 + d2 <= max(a1, a2): redundant
    extra = H("MAC+", "d1 <= a1", "d2 <= a2", "d1 + d2 <= max(a1, a2)", "2*d1 + d2 <= a1 + max(a1, a2)")
    assert run(RC.redundant(extra, 3, QUADRANT)).status == "proved"
    # the sum facet of MAC is not: at a1 = a2 = 1 the tuple (1, 1) meets the others and breaks it
    v = run(RC.redundant(MAC, 2, QUADRANT), improve=True)
    assert v.status == "refuted"
    w = v.witness
    assert BOX.contains(w.theta, w.rates) and not MAC.contains(w.theta, w.rates)
    # ... but it is where one user is silent (a2 = 0): then d1 + d2 <= a1 follows from d1 <= a1, d2 <= 0
    assert run(RC.redundant(MAC, 2, parse_region("a1 >= 0, a2 == 0"))).status == "proved"
    with pytest.raises(InputError, match="no facet 4"):
        RC.redundant(MAC, 3, QUADRANT)
