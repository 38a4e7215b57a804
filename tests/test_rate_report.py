"""Rate regions regime by regime (verifier.rates.regimes): corner points and facet statuses per regime
of the exponents, against hand derivations and against brute-force vertex enumeration written here.

The MAC GDoF region d1 <= a1, d2 <= a2, d1 + d2 <= max(a1, a2) is from memory (Cover-Thomas,
'Elements of Information Theory', 2nd ed., 2006, ch. 15, in GDoF form: common practice).  The symmetric
IC region is the five genie-aided bounds of Etkin, Tse, Wang, 'Gaussian interference channel capacity
to within one bit', IEEE Trans. IT 54(12), 2008, in GDoF form, from memory (as in
casebook/published/etw_symmetric_ic_region.toml); its maximum sum per regime is twice the W curve of
the same paper (from memory).
"""

from __future__ import annotations

from fractions import Fraction as F
from itertools import combinations

import pytest
from hypothesis import given, settings, strategies as st

from verifier.core.budget import TooLarge
from verifier.expressions.expr import eval_affine, evaluate, to_text
from verifier.rates import regimes as RR
from verifier.rates.region import HRegion, inequality
from verifier.rates.text import parse_inequality
from verifier.text.parse import parse_expr, parse_region

RATES = ("d1", "d2")


def H(exps, *rows, nonnegative=True):
    return HRegion("R", RATES, tuple(parse_inequality(r, RATES, exps) for r in rows), nonnegative)


MAC = H(("a1", "a2"), "d1 <= a1", "d2 <= a2", "d1 + d2 <= max(a1, a2)")
IC = H(("alpha",), "d1 <= 1", "d2 <= 1", "d1 + d2 <= max(1, alpha) + (1 - alpha)^+",
       "d1 + d2 <= 2*max(alpha, 1 - alpha)",
       "2*d1 + d2 <= max(1, alpha) + (1 - alpha)^+ + max(alpha, 1 - alpha)",
       "d1 + 2*d2 <= max(1, alpha) + (1 - alpha)^+ + max(alpha, 1 - alpha)")


def brute_vertices(region: HRegion, theta, skip: int | None = None, box: F | None = None) -> set[tuple[F, F]]:
    """Every pair of constraint lines solved by Cramer's rule, kept when it satisfies all rows
    (without row `skip`; with |d_k| <= box added when given)."""
    rows = [(q.coeff("d1"), q.coeff("d2"), evaluate(q.bound, theta))
            for j, q in enumerate(region.constraints()) if j != skip]
    if box is not None:
        rows += [(F(1), F(0), box), (F(-1), F(0), box), (F(0), F(1), box), (F(0), F(-1), box)]
    out = set()
    for (a, b, e), (c, d, f) in combinations(rows, 2):
        det = a * d - b * c
        if det == 0:
            continue
        x = ((e * d - b * f) / det, (a * f - e * c) / det)
        if all(p * x[0] + q * x[1] <= r for p, q, r in rows):
            out.add(x)
    return out


def corner_values(regime, theta) -> set[tuple[F, ...]]:
    return {tuple(eval_affine(f, theta) for f in c) for c in regime.corners}


def texts(regime) -> set[str]:
    return {RR.corner_text(c) for c in regime.corners}


def test_mac_corners_per_regime():
    # hand derivation: for a1 >= a2 the sum bound is d1 + d2 <= a1, so d1 <= a1 is implied (d2 >= 0)
    # and the corners are (0,0), (a1,0), (a1-a2, a2), (0, a2); symmetrically for a2 > a1
    rr = RR.region_regimes(MAC, parse_region("a1 >= 0, a2 >= 0"))
    assert len(rr.regimes) == 2 and rr.bounded
    low = rr.regime_at({"a1": F(1), "a2": F(3)})
    high = rr.regime_at({"a1": F(3), "a2": F(1)})
    assert texts(high) == {"(0, 0)", "(a1, 0)", "(a1 - a2, a2)", "(0, a2)"}
    assert texts(low) == {"(0, 0)", "(a1, 0)", "(a1, -a1 + a2)", "(0, a2)"}
    assert high.redundant == (0,) and low.redundant == (1,)      # d1 <= a1 resp. d2 <= a2
    assert [t.text for t in rr.thresholds] == ["a1 = a2"]
    for theta in ({"a1": F(1), "a2": F(3)}, {"a1": F(3), "a2": F(1)}, {"a1": F(5, 2), "a2": F(1, 3)}):
        g = rr.regime_at(theta)
        assert corner_values(g, theta) == brute_vertices(MAC, theta)
        for c in corner_values(g, theta):                 # corners re-checked against the inequalities
            assert MAC.contains(theta, dict(zip(RATES, c)))


IC_CORNERS = {   # hand derivation: the non-trivial corners besides (0,0), (1,0), (0,1)
    F(1, 3): {"(1 - 2*alpha, 1)", "(1, 1 - 2*alpha)"},           # alpha < 1/2: d_i <= 1 and the ETW sum
    F(3, 5): {"(2 - 2*alpha, 4*alpha - 2)", "(4*alpha - 2, 2 - 2*alpha)"},   # 2d1+d2 meets 2*alpha
    F(5, 7): {"(2 - 2*alpha, alpha)", "(alpha, 2 - 2*alpha)"},   # 2d1+d2 meets the Z sum 2 - alpha
    F(4, 3): {"(1, alpha - 1)", "(alpha - 1, 1)"},               # d_i <= 1 meets the sum alpha
    F(5, 2): {"(1, 1)"},                                         # strong enough: the box
}
W_SUM = {F(1, 3): lambda a: 2 - 2 * a, F(3, 5): lambda a: 2 * a, F(5, 7): lambda a: 2 - a,
         F(4, 3): lambda a: a, F(5, 2): lambda a: 2}             # twice the W curve (ETW 2008, from memory)


def test_symmetric_ic_corners_per_regime_and_the_w_curve():
    rr = RR.region_regimes(IC, parse_region("0 <= alpha <= 3"))
    assert [t.text for t in rr.thresholds] == ["alpha = 1/2", "alpha = 2/3", "alpha = 1", "alpha = 2"]
    assert len(rr.regimes) == 5
    for a, corners in IC_CORNERS.items():
        theta = {"alpha": a}
        g = rr.regime_at(theta)
        assert texts(g) == corners | {"(0, 0)", "(1, 0)", "(0, 1)"}
        values = corner_values(g, theta)
        assert values == brute_vertices(IC, theta)
        assert max(x + y for x, y in values) == W_SUM[a](a)
        for c in values:
            assert IC.contains(theta, dict(zip(RATES, c)))


def test_ic_facet_statuses_by_hand():
    rr = RR.region_regimes(IC, parse_region("0 <= alpha <= 3"))
    # alpha in (2/3, 1): the single-user bounds and the ETW sum are implied; the Z sum and both
    # 2d1 + d2 bounds cut (hand derivation from the corners above)
    g = rr.regime_at({"alpha": F(5, 7)})
    assert g.facets == (2, 4, 5, 6, 7) and g.redundant == (0, 1, 3)
    # there max(1, alpha) + (1 - alpha)^+ = 2 - alpha and max(1, alpha) + (1 - alpha)^+ + alpha = 2
    assert {i: to_text(g.bounds[i]) for i in g.facets} == {2: "2 - alpha", 4: "2", 5: "2", 6: "0", 7: "0"}
    strong = rr.regime_at({"alpha": F(5, 2)})        # alpha >= 2: only the box d_i <= 1 is left
    assert strong.facets == (0, 1, 6, 7)


def test_thresholds_sampled_on_both_sides():
    rr = RR.region_regimes(IC, parse_region("0 <= alpha <= 3"))
    eps = F(1, 1000)
    for t in rr.thresholds:
        c = -t.form.const / t.form.coeff("alpha")
        left, right = rr.regime_at({"alpha": c - eps}), rr.regime_at({"alpha": c + eps})
        assert left is not right
        assert (left.index, right.index) in t.between
        for side in (c - eps, c + eps):
            theta = {"alpha": side}
            assert corner_values(rr.regime_at(theta), theta) == brute_vertices(IC, theta)
        changed = {k for k in range(len(left.status)) if left.status[k] != right.status[k]}
        named = [f"({k + 1})" if k < len(IC.inequalities) else IC.constraints()[k].label for k in changed]
        assert all(any(ch.startswith(n + " is ") for ch in t.changes) for n in named)


def test_unbounded_and_nonpointed_rows():
    # without d >= 0 and with one row only, the rows are not pointed: statuses not shown, no corner
    rr = RR.region_regimes(H(("a",), "d1 + d2 <= a", nonnegative=False), parse_region("a >= 0"))
    (g,) = rr.regimes
    assert g.status == ("not shown",) and g.corners == () and not rr.bounded and not rr.pointed


def test_constant_region_is_one_regime_and_an_empty_regime_says_so():
    from verifier.expressions.region import Region
    from verifier.report.regions import region_lines
    # hand derivation: d1 <= 1, d2 <= 2, d1 + d2 <= 5/2 cuts the box at (1, 3/2) and (1/2, 2)
    rr = RR.region_regimes(H((), "d1 <= 1", "d2 <= 2", "d1 + d2 <= 5/2"), Region.everywhere())
    (g,) = rr.regimes
    assert texts(g) == {"(0, 0)", "(1, 0)", "(1, 3/2)", "(1/2, 2)", "(0, 2)"} and not rr.thresholds
    # the MAC with a1 < 0 is empty; removing d1 <= a1 or d1 >= 0 alone would make it non-empty
    rr = RR.region_regimes(MAC, parse_region("a1 < 0, a2 >= 0"))
    (g,) = rr.regimes
    assert g.corners == () and g.facets == (0, 3)
    assert "facets: none: the region is empty here (without any one of (1) d1 <= a1; d1 >= 0" in \
        "\n".join(region_lines(rr))


def test_size_limit_is_named(monkeypatch):
    monkeypatch.setattr(RR, "MAX_MARGINS", 3)
    with pytest.raises(TooLarge, match="margins"):
        RR.region_regimes(MAC, parse_region("a1 >= 0, a2 >= 0"))


BOUNDS = ["1", "alpha", "max(alpha, 1 - alpha)", "(1 - alpha)^+ + alpha/2", "min(2, 1 + alpha) - 1/3",
          "2*alpha - 1", "(alpha - 1)^+ + 1/2"]
SHAPES = [{"d1": 1, "d2": 1}, {"d1": 2, "d2": 1}, {"d1": 1, "d2": 3}, {"d1": 1}, {"d2": 1}, {"d1": 1, "d2": -1}]


@settings(max_examples=max(10, settings.default.max_examples // 2), deadline=None)
@given(rows=st.lists(st.tuples(st.sampled_from(SHAPES), st.sampled_from(BOUNDS)), min_size=1, max_size=4),
       caps=st.tuples(st.sampled_from(BOUNDS), st.sampled_from(BOUNDS)),
       points=st.lists(st.fractions(min_value=0, max_value=3, max_denominator=11), min_size=1, max_size=6))
def test_regime_corners_and_statuses_match_brute_force_enumeration(rows, caps, points):
    specs = [({"d1": 1}, caps[0]), ({"d2": 1}, caps[1])] + rows
    region = HRegion("R", RATES, tuple(inequality(c, parse_expr(b)) for c, b in specs))
    rr = RR.region_regimes(region, parse_region("0 <= alpha <= 3"))
    cuts = {-t.form.const / t.form.coeff("alpha") for t in rr.thresholds}
    for a in points:
        if a in cuts:       # on a threshold corners may merge: formulas are claimed off thresholds
            continue
        theta = {"alpha": a}
        g = rr.regime_at(theta)
        assert g is not None
        assert corner_values(g, theta) == brute_vertices(region, theta)
        if a in (0, 3):     # statuses are claimed off the edges of the exponent region too
            continue
        # row i cuts iff its left side exceeds its right side somewhere without it; a box of 1000
        # (far beyond every bound used here, all below 4) stands in for unboundedness
        for i, q in enumerate(region.constraints()):
            others = brute_vertices(region, theta, skip=i, box=F(1000))
            cut = any(q.coeff("d1") * x + q.coeff("d2") * y > evaluate(q.bound, theta) for x, y in others)
            assert g.status[i] == ("facet" if cut else "redundant"), (i, q.text(), theta)


# --- gdof report / bundle ------------------------------------------------------------------------

CASE = """
title = "MAC region (from memory: Cover-Thomas 2006, ch. 15, GDoF form, common practice)"
[parameters]
a1 = "user 1"
a2 = "user 2"
[assume]
region = "a1 >= 0, a2 >= 0"
[rates]
d1 = "user 1"
d2 = "user 2"
[region.capacity]
inequalities = ["d1 <= a1", "d2 <= a2", "d1 + d2 <= max(a1, a2)"]
[region.box]
inequalities = ["d1 <= a1", "d2 <= a2"]
[[claims]]
name = "sum"
statement = "max d1 + d2 over capacity == max(a1, a2)"
expect = "proved"
[[claims]]
name = "box"
statement = "box == capacity"
expect = "refuted"
"""


@pytest.fixture(scope="module")
def mac_report(tmp_path_factory):
    from case_files import write
    from workbench.casefile import load_case
    from workbench.report_cmd import case_report
    case = load_case(write(tmp_path_factory.mktemp("case"), CASE))
    return case_report(case, case.claims)


def test_report_shows_each_region_once_in_every_format(mac_report):
    from verifier.report.json_out import report_json
    from verifier.report.latex import render_latex
    from verifier.report.markdown import render_markdown
    from verifier.report.text import render_text
    text = render_text(mac_report)
    assert text.count("regimes of region capacity: 2 regimes") == 1
    assert "as under the claim 'sum' above" in text
    assert "corners: (0, 0), (0, a2), (a1 - a2, a2), (a1, 0)" in text
    assert "facets: (2) d2 <= a2; (3) d1 + d2 <= a1; d1 >= 0; d2 >= 0" in text
    from verifier.report.markdown import render_html
    assert "regimes of region capacity: 2 regimes" in render_html(mac_report)
    md = render_markdown(mac_report)
    assert "| corner points |" in md and "(a1 - a2, a2)" in md
    tex = render_latex(mac_report)
    assert "\\begin{aligned}\nd_{1} &\\le \\mathrm{a1}\\\\\nd_{1} + d_{2} &\\le \\mathrm{a2}" in tex
    data = report_json(mac_report)
    shown = data["claims"][0]["regions"][0]
    assert shown["shown"] and shown["thresholds"][0]["text"] == "a1 = a2"
    corners = shown["regimes"][1]["corners"]
    assert [[F(x["const"]) for x in c] for c in corners if not any(x["coeffs"] for x in c)] == [[0, 0]]
    box, again = data["claims"][1]["regions"]                     # 'box == capacity': box first
    assert box["region"] == "box" and box["shown"] and again["see"] == "sum"


def test_a_spent_budget_or_a_size_limit_shows_the_region_as_not_shown(monkeypatch):
    import time
    from verifier.core.budget import Budget
    from verifier.rates import claims as RC
    from workbench import rate_report
    # exponent regions used nowhere else: workbench.rate_report keeps finished results per (region, R)
    claim = RC.equal(MAC, MAC, parse_region("a1 >= 0, a2 >= 1/7"))
    spent = Budget(0.001)
    time.sleep(0.01)
    (item,) = rate_report.region_regimes_of(claim, spent)
    assert isinstance(item, RR.RegionNotShown) and "ran out of the claim's time budget" in item.reason
    monkeypatch.setattr(RR, "MAX_REGION_CELLS", 1)
    (item,) = rate_report.region_regimes_of(RC.equal(MAC, MAC, parse_region("a1 >= 0, a2 >= 1/5")), Budget())
    assert isinstance(item, RR.RegionNotShown) and "size limit (2 > 1)" in item.reason


def test_bundle_draws_the_refuted_region_claim(mac_report, tmp_path):
    from workbench.bundle_cmd import region_plot
    sum_claim, box_claim = mac_report.claims
    assert region_plot(sum_claim) is None                    # proved: nothing to draw
    fig, caption = region_plot(box_claim)
    polygons, theta, rates = fig.gdof["polygons"], fig.gdof["theta"], fig.gdof["rates"]
    assert set(polygons) == {"box", "capacity"} and "refuting rate tuple" in caption
    # the marked tuple is in the box and outside the MAC region, exactly
    assert rates["d1"] + rates["d2"] > max(theta["a1"], theta["a2"])
    assert rates["d1"] <= theta["a1"] and rates["d2"] <= theta["a2"]


BOUNDS2 = ["a1", "a2", "max(a1, a2)", "(a1 - a2)^+ + a2/2", "min(a1, 1) + a2/2", "1 + (a2 - 1)^+",
           "max(a1, 1 - a2) + 1/3"]


@settings(max_examples=max(5, settings.default.max_examples // 4), deadline=None)
@given(rows=st.lists(st.tuples(st.sampled_from(SHAPES[:3]), st.sampled_from(BOUNDS2)), min_size=1, max_size=3),
       caps=st.tuples(st.sampled_from(BOUNDS2), st.sampled_from(BOUNDS2)),
       points=st.lists(st.tuples(st.fractions(min_value=0, max_value=2, max_denominator=7),
                                 st.fractions(min_value=0, max_value=2, max_denominator=7)), min_size=1, max_size=6))
def test_two_exponents_corners_and_statuses_match_brute_force(rows, caps, points):
    specs = [({"d1": 1}, caps[0]), ({"d2": 1}, caps[1])] + rows
    region = HRegion("R", RATES, tuple(inequality(c, parse_expr(b)) for c, b in specs))
    rr = RR.region_regimes(region, parse_region("0 <= a1 <= 2, 0 <= a2 <= 2"))
    for a1, a2 in points:
        theta = {"a1": a1, "a2": a2}
        if any(eval_affine(t.form, theta) == 0 for t in rr.thresholds) or {a1, a2} & {0, 2}:
            continue        # on a threshold or an edge of the exponent region: not claimed
        g = rr.regime_at(theta)
        assert corner_values(g, theta) == brute_vertices(region, theta)
        for i, q in enumerate(region.constraints()):
            others = brute_vertices(region, theta, skip=i, box=F(1000))
            cut = any(q.coeff("d1") * x + q.coeff("d2") * y > evaluate(q.bound, theta) for x, y in others)
            assert g.status[i] == ("facet" if cut else "redundant"), (i, q.text(), theta)
