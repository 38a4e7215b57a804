"""The LaTeX subset: manuscript fragments read to the same trees as their text twins, output round trips,
and one-line errors naming the macro and its column."""

from fractions import Fraction

import pytest
from hypothesis import given, settings

from tests.strategies import exprs, regions
from verifier.core.errors import NonlinearError, ParseError, UnknownNameError
from verifier.expressions.expr import param
from verifier.text.latex_in import (parse_latex_expr, parse_latex_piecewise, parse_latex_region,
                               parse_latex_relation)
from verifier.text.latex_out import (atom_to_latex, expr_to_latex, name_to_latex, piecewise_to_latex,
                                region_to_latex)
from verifier.expressions.region import Atom, Region
from verifier.text.parse import parse_expr, parse_piecewise, parse_region

NAMES = ("alpha", "beta", "gamma")

# Fragments written the way GDoF papers typeset their formulas (style: common practice in the
# literature), each beside the plain-text twin it must read to.
TWINS = [
    (r"\min\left\{2\alpha, \frac{\gamma}{2}+(1-\alpha)^+\right\}",
     "min(2*alpha, gamma/2 + (1-alpha)^+)"),
    (r"$\max\{\alpha, 1-\alpha\}$", "max(alpha, 1 - alpha)"),
    (r"\frac12\alpha + \tfrac{1}{3}\beta", "alpha/2 + beta/3"),
    (r"\left(1-\alpha_{1}\right)^{+} + n_{sd}", "(1 - alpha_1)^+ + n_sd"),
    (r"\lvert \alpha - \beta \rvert", "abs(alpha - beta)"),
    (r"\big| \alpha - 1 \big|", "|alpha - 1|"),
    (r"2\cdot\gamma - \dfrac{3\alpha}{2}", "2*gamma - 3*alpha/2"),
    (r"\min\Big(1, \max\big(\alpha, \frac{\beta}{2}\big)\Big)", "min(1, max(alpha, beta/2))"),
    (r"n_{\mathrm{sd}} \, + \; \mathrm{snr} \quad", "n_sd + snr"),
    (r"\left[1 - \alpha\right]^+ + 2 \times \beta", "[1 - alpha]^+ + 2*beta"),
    (r"\min\left\{ \max\left(\alpha, 1-\frac{\alpha}{2}\right),\ 2-\alpha \right\}",
     "min(max(alpha, 1 - alpha/2), 2 - alpha)"),
    (r"\frac{\gamma-\alpha}{2} + \left( \beta - \frac{1}{2} \right)^{+}", "(gamma - alpha)/2 + (beta - 1/2)^+"),
    (r"2\min\{\alpha,\beta\} - \max\{0, \gamma - \alpha\}", "2*min(alpha, beta) - max(0, gamma - alpha)"),
    (r"α + β_{1} − 0.5γ", "alpha + beta_1 - gamma/2"),
    (r"\frac{\frac{1}{2}}{3}\alpha", "alpha/6"),
    (r"\operatorname{max}(\alpha, \varepsilon)", "max(alpha, epsilon)"),
]


@pytest.mark.parametrize("latex,text", TWINS)
def test_fragment_reads_like_its_text_twin(latex, text):
    assert parse_latex_expr(latex) == parse_expr(text)


def test_regions_in_latex():
    assert parse_latex_region(r"0 \le \alpha \le \tfrac12,\ \gamma > \alpha") == \
        parse_region("0 <= alpha <= 1/2, gamma > alpha")
    assert parse_latex_region(r"\alpha \geq 1 \text{ and } \beta \leqslant 2") == \
        parse_region("alpha >= 1, beta <= 2")
    assert parse_latex_region(r"\left(\alpha < 1, \beta > 2\right) \text{ or } \alpha > 3") == \
        parse_region("(alpha < 1, beta > 2) or alpha > 3")
    assert parse_latex_region(r"\alpha<1 \lor \alpha \ge 2") == parse_region("alpha < 1 or alpha >= 2")
    assert parse_latex_region(r"\emptyset") == Region(())


def test_relation_and_piecewise_in_latex():
    assert parse_latex_relation(r"\min\{\alpha,1\} \le 2-\beta") == (
        parse_expr("min(alpha, 1)"), "<=", parse_expr("2 - beta"))
    pw = parse_latex_piecewise(r"1-\alpha \text{ if } \alpha \le \frac12; \alpha \text{ if } \alpha > \frac12")
    assert pw == parse_piecewise("1 - alpha if alpha <= 1/2; alpha if alpha > 1/2")


def test_cases_environment():
    cases = (r"\begin{cases} 1-\alpha, & \text{if } \alpha \le \frac12, \\ "
             r"\alpha, & \frac12 < \alpha \le \frac23, \\ \frac23, & \text{otherwise}. \end{cases}")
    assert parse_latex_piecewise(cases) == \
        parse_piecewise("1 - alpha if alpha <= 1/2; alpha if 1/2 < alpha <= 2/3; 2/3 otherwise")
    with pytest.raises(ParseError, match=r"^unsupported environment 'matrix' \(only cases\) at column 1$"):
        parse_latex_piecewise(r"\begin{matrix} 1 \end{matrix}")


def test_names_in_latex():
    assert parse_latex_expr(r"\alpha + \beta", names=["alpha", "beta"]) == parse_expr("alpha + beta")
    with pytest.raises(UnknownNameError, match=r"^unknown parameter 'delta' .*at column 10$"):
        parse_latex_expr(r"\alpha + \delta", names=["alpha"])


# --- output, and reading it back ---------------------------------------------------------------

def test_expr_to_latex_style():
    e = parse_expr("min(2*alpha, gamma/2 + (1-alpha)^+)")
    assert expr_to_latex(e) == r"\min\{2\alpha, \frac{\gamma}{2} + (1 - \alpha)^+\}"
    assert expr_to_latex(parse_expr("3*alpha_1/2 - 1/3")) == r"\frac{3\alpha_{1}}{2} - \frac{1}{3}"
    assert name_to_latex("n_sd") == "n_{sd}" and name_to_latex("snr") == r"\mathrm{snr}"
    from workbench.notebook import show
    assert show(e)._repr_latex_() == "$" + expr_to_latex(e) + "$"


def test_region_and_atom_latex():
    r = parse_region("(alpha < 1, beta > 2*gamma) or alpha >= 3")
    assert region_to_latex(r) == (r"\left(\alpha < 1,\ \beta > 2\gamma\right) \text{ or } "
                                  r"\left(\alpha \geq 3\right)")
    assert atom_to_latex(Atom(parse_expr("1 - alpha"), False)) == r"\alpha \leq 1"
    assert region_to_latex(Region.everywhere()) == r"\text{everywhere}"
    pw = parse_piecewise("1 - alpha if alpha <= 1/2; alpha if alpha > 1/2")
    assert piecewise_to_latex(pw).startswith(r"\begin{cases} 1 - \alpha & \text{if } \alpha \leq \frac{1}{2}")


@settings(max_examples=120, deadline=None)
@given(exprs(NAMES + ("n_sd", "snr", "x1"), max_leaves=8))
def test_latex_round_trip(e):
    assert parse_latex_expr(expr_to_latex(e)) == e


@settings(max_examples=80, deadline=None)
@given(regions(NAMES))
def test_region_latex_round_trip(r):
    assert parse_latex_region(region_to_latex(r)) == r


# --- errors ----------------------------------------------------------------------------------------

BAD = [
    (r"\log(\alpha)", UnknownNameError, r"^unknown macro '\\log' at column 1$"),
    (r"\alpha + \sqrt{2}", UnknownNameError, r"^unknown macro '\\sqrt' at column 10$"),
    (r"$\alpha + \foo$", UnknownNameError, r"^unknown macro '\\foo' at column 11$"),
    (r"n_{\foo}", UnknownNameError, r"^unknown macro '\\foo' in subscript at column 4$"),
    (r"1 + \frac{1}{\alpha}", NonlinearError, r"^nonlinear term '\\frac\{1\}\{\\alpha\}' at column 5$"),
    (r"\alpha\beta", NonlinearError, r"^nonlinear term '\\alpha\\beta' at column 1$"),
    (r"\alpha \cdot \beta", NonlinearError, r"^nonlinear term '\\alpha \\cdot \\beta' at column 1$"),
    (r"\alpha^2", NonlinearError, r"^nonlinear term '\\alpha\^2' at column 1$"),
    (r"\frac{1}", ParseError, r"^\\frac needs two arguments at column 9$"),
    (r"\min\{1, 2", ParseError, r"^unclosed '\{' at column 5$"),
    (r"\left( \alpha \right]", ParseError, r"^mismatched '\]' for '\(' at column 21$"),
    (r"\text{hello}", ParseError, r"^unsupported text '\\text\{hello\}'.* at column 1$"),
    (r"a_{}", ParseError, r"^empty subscript at column 2$"),
    (r"a_{1,2}", ParseError, r"^unsupported character ',' in subscript at column 5$"),
    (r"\alpha +", ParseError, r"^unexpected end of input at column 9$"),
    (r"", ParseError, r"^empty input at column 1$"),
]


@pytest.mark.parametrize("latex,cls,pattern", BAD)
def test_bad_latex(latex, cls, pattern):
    with pytest.raises(cls, match=pattern) as info:
        parse_latex_expr(latex)
    assert "\n" not in str(info.value)


def test_latex_limits():
    with pytest.raises(ParseError, match=r"nested too deeply"):
        parse_latex_expr(r"\left(" * 150 + r"\alpha" + r"\right)" * 150)
    assert parse_latex_expr(r"\frac{1}{2}" + "+" + r"\frac12") == parse_expr("1")
    assert parse_latex_expr(r"\alpha") == param("alpha")
    assert parse_latex_expr(r"0.25") == parse_expr("1/4") == parse_expr(str(Fraction(1, 4)))
