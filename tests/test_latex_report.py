"""LaTeX output sets claims, regions, side names, part labels and captions as mathematics (names of
claims stay text), and the mathematics reads back with the LaTeX input parser to what it shows."""

from fractions import Fraction

import pytest
from hypothesis import given, settings

from report_fixtures import DEMO, DEMO_WRONG, ETW, W_CLAIM, section
from tests.strategies import points
from verifier.claims.kinds import Side, monotone, reduces_to, relation, symmetric, within
from verifier.expressions.expr import param
from verifier.report.build import build_report
from verifier.report.latex import render_latex
from verifier.report.latex_math import caption_math, claim_math, label_math, region_math
from verifier.text.latex_in import parse_latex_region, parse_latex_relation
from verifier.text.parse import parse_expr, parse_region

REGION = parse_region("0 <= alpha <= 1, gamma > alpha")
WHERE = r"\quad\text{for } "


@pytest.fixture(scope="module")
def demo_report():
    return build_report([section(ETW, W_CLAIM), section(DEMO, DEMO_WRONG)], title="two claims")


def test_no_typewriter_text_and_claims_are_math(demo_report):
    tex = render_latex(demo_report)
    assert r"\texttt" not in tex
    assert r"Claim: $\min\{" in tex or r"Claim: $\mathrm{" in tex
    # the claim's name is a heading in text, its underscores escaped as text
    assert "\\subsection*{" + W_CLAIM + "}" in tex


def test_a_relation_reads_back_to_its_sides_and_region():
    lhs, rhs = parse_expr("min(1, max(alpha, 1 - alpha/2))"), parse_expr("1 + gamma/3 - alpha")
    tex = claim_math(relation(lhs, "<=", rhs, REGION))
    body, where = tex.split(WHERE)
    assert parse_latex_relation(body) == (lhs, "<=", rhs)
    assert parse_latex_region(where) == REGION or _same_points(parse_latex_region(where), REGION)


@settings(max_examples=60, deadline=None)
@given(points(("alpha", "gamma")))
def test_region_math_reads_back_to_the_same_set(point):
    region = parse_region("(0 <= alpha < 1/2, gamma > 2*alpha) or alpha >= 3")
    assert parse_latex_region(region_math(region)).contains(point) == region.contains(point)


def _same_points(a, b) -> bool:
    grid = [Fraction(k, 4) for k in range(-4, 13)]
    return all(a.contains({"alpha": x, "gamma": y}) == b.contains({"alpha": x, "gamma": y})
               for x in grid for y in grid)


# Hand-written expected forms, one per claim kind (the wording of Claim.text(), set as math).
OUTER = Side(param("outer"), "outer")
KINDS = [
    (within(OUTER, Side(param("no_key"), "no_key"), Fraction(1, 2), REGION),
     r"\left|\mathrm{outer} - \mathrm{no\_key}\right| \le \tfrac{1}{2}"),
    (monotone(OUTER, "beta", REGION), r"\mathrm{outer}\ \text{is non-decreasing in } \beta"),
    (symmetric(OUTER, "alpha", "gamma", REGION),
     r"\mathrm{outer}\ \text{is symmetric in } \alpha \text{ and } \gamma"),
    (reduces_to(OUTER, {"gamma": 0}, parse_expr("1 - alpha"), REGION),
     r"\left.\mathrm{outer}\right|_{\gamma = 0} = 1 - \alpha"),
]


@pytest.mark.parametrize("claim,body", KINDS, ids=[c.kind for c, _ in KINDS])
def test_each_claim_kind_as_math(claim, body):
    assert claim_math(claim).split(WHERE)[0] == body


def test_part_labels_set_their_regions_as_math():
    assert label_math("scheme: regime 2 (1/2 < alpha <= 3/4)") == \
        r"$\mathrm{scheme}$, regime 2 ($\tfrac{1}{2} < \alpha \le \tfrac{3}{4}$)"
    two = label_math("hk: regime 1 (alpha <= 1/2); tin: regime 3 (gamma > alpha)")
    assert two == r"$\mathrm{hk}$, regime 1 ($\alpha \le \tfrac{1}{2}$); $\mathrm{tin}$, regime 3 ($\gamma > \alpha$)"
    assert label_math("a_b & c") == r"a\_b \& c"     # another shape stays (escaped) text


def test_captions_are_text_with_math_symbols(demo_report):
    s = demo_report.sections[1]
    name = s.name.replace(">", r"\textgreater{}")   # the claim's name stays text, escaped as text
    assert ">" in s.name and caption_math(s, "slice") == name + r": both sides along $\alpha$"
    assert caption_math(s, "map").endswith(r"regimes in ($\alpha$, $\gamma$)")
