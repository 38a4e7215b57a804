"""A bound pasted as a LaTeX `cases` environment reads exactly like its text twin `f if cond; ...`, in
the parser and in a case file (decided the same), and malformed math (`$`, `\\begin`, `\\end`, rows) is a
one-line error at the offending character, never a silently different bound."""

import tomllib

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from tests.strategies import exprs, regions
from verifier.core.errors import CaseFileError, ParseError
from verifier.text.latex_in import parse_latex_expr, parse_latex_piecewise, parse_latex_region
from verifier.text.latex_out import piecewise_to_latex
from verifier.text.parse import Piecewise, parse_piecewise
from workbench.casefile import build_case
from workbench.decide import decide

# The ways GDoF papers typeset a regime-wise scheme (common practice in the literature: amsmath's
# `cases`, mathtools' `dcases`), each beside the text form it must read to.
TWINS = [
    (r"\begin{cases} \alpha & \alpha \le 1 \\ 1 & \alpha > 1 \end{cases}",
     "alpha if alpha <= 1; 1 if alpha > 1"),
    (r"\begin{cases} \alpha & \text{if } \alpha \leq 1 \\ 1 & \text{if } \alpha > 1 \end{cases}",
     "alpha if alpha <= 1; 1 if alpha > 1"),
    (r"\begin{cases} \alpha, & \alpha \le 1, \\ 1, & \alpha > 1. \end{cases}",
     "alpha if alpha <= 1; 1 if alpha > 1"),
    (r"\begin{cases} 1-\alpha &\text{for } 0 \le \alpha < \frac12 \\ \alpha &\text{for } \alpha \geq \frac12"
     r" \end{cases}", "1 - alpha if 0 <= alpha < 1/2; alpha if alpha >= 1/2"),
    (r"\begin{dcases} \frac{\alpha}{2} & \alpha < 1,\ \beta > 0 \\ 1 & \alpha \ge 1 \text{ and } \beta > 0"
     r" \end{dcases}", "alpha/2 if alpha < 1, beta > 0; 1 if alpha >= 1 and beta > 0"),
    (r"$\begin{cases} \alpha & \gamma > \alpha > 1 \\ \gamma & \text{otherwise} \\ \end{cases}$",
     "alpha if gamma > alpha > 1; gamma otherwise"),
    ("\\begin{cases}\n  \\alpha & \\alpha \\le 1 \\\\\n  1 & \\alpha > 1\n\\end{cases}.",
     "alpha if alpha <= 1; 1 if alpha > 1"),
]


@pytest.mark.parametrize("latex,text", TWINS)
def test_cases_reads_like_its_text_twin(latex, text):
    assert parse_latex_piecewise(latex) == parse_piecewise(text)


@settings(max_examples=60, deadline=None)
@given(st.lists(st.tuples(exprs(("alpha", "beta"), max_leaves=4), regions(("alpha", "beta"))),
                min_size=1, max_size=3))
def test_printed_cases_read_back(rows):
    pw = Piecewise(tuple(rows))
    assert parse_latex_piecewise(piecewise_to_latex(pw)) == pw


BAD = [
    (r"$\alpha", r"^unbalanced '\$' \(this math delimiter is never closed\) at column 1$"),
    (r"$\alpha$ + $1", r"^unbalanced '\$' .* at column 12$"),
    (r"\alpha \end{cases}", r"^'\\end\{cases\}' without '\\begin\{cases\}' at column 8$"),
    (r"\begin{cases} \alpha & \alpha \le 1", r"^'\\begin\{cases\}' without '\\end\{cases\}' at column 1$"),
    (r"\begin{matrix} 1 \end{matrix}", r"^unsupported environment 'matrix' \(only cases\) at column 1$"),
    (r"\begin{cases} 1 & \alpha < 1 \end{array}",
     r"^'\\end\{array\}' does not close '\\begin\{cases\}' at column 30$"),
    (r"\begin{cases} 1 & \alpha > 1 \end{cases} + 1",
     r"^text after '\\end\{cases\}': a cases environment must be the whole value at column 42$"),
    (r"2 + \begin{cases} 1 & \alpha > 1 \end{cases}",
     r"^a cases environment must be the whole value; found text before '\\begin\{cases\}' at column 5$"),
    (r"\begin{cases} \begin{cases} 1 & \alpha < 0 \end{cases} & \alpha < 1 \end{cases}",
     r"^'\\begin\{cases\}' inside '\\begin\{cases\}': cases do not nest at column 15$"),
    (r"\begin{cases} 1 & \alpha < 1 & 2 \end{cases}",
     r"^a second '&' in one row of cases \(a row is 'value & condition'\) at column 30$"),
    (r"\begin{cases} 1 \\ 2 & \alpha > 1 \end{cases}",
     r"^a row of cases needs '&' and its condition \(or 'otherwise'\) at column 15$"),
]


@pytest.mark.parametrize("latex,pattern", BAD)
def test_malformed_cases_is_a_one_line_error(latex, pattern):
    with pytest.raises(ParseError, match=pattern) as info:
        parse_latex_piecewise(latex)
    assert "\n" not in str(info.value)


def test_cases_is_refused_where_one_formula_is_expected():
    cases = r"\begin{cases} 1 & \alpha > 1 \end{cases}"
    for read in (parse_latex_expr, parse_latex_region):
        with pytest.raises(ParseError, match=r"^a cases environment defines a value regime by regime"):
            read(cases)
    with pytest.raises(ParseError, match=r"^unbalanced '\$'"):
        parse_latex_region(r"\alpha > 1$")


CASE = """
title = "cases"
[parameters]
alpha = "exponent"
[assume]
region = "alpha >= 0"
[outer]
w = "min(1, max(alpha/2, 1 - alpha/2), max(alpha, 1 - alpha))"
[inner]
scheme = {scheme}
[[claims]]
name = "meets"
statement = "inner == outer"
where = "alpha <= 1"
"""

# The W curve of the two-user symmetric interference channel (Etkin, Tse, Wang, IEEE Trans. IT 2008):
# 1 - alpha up to 1/2, alpha up to 2/3, 1 - alpha/2 up to 1.  The second text drops the middle regime's
# upper end so that `1 - alpha/2` starts too late (a planted jump at 3/4, refuted).
RIGHT = "1 - alpha if alpha <= 1/2; alpha if 1/2 < alpha <= 2/3; 1 - alpha/2 if alpha > 2/3"
RIGHT_TEX = (r"\begin{cases} 1-\alpha & \alpha \le \frac12 \\ \alpha & \frac12 < \alpha \le \frac23 \\"
             r" 1-\frac{\alpha}{2} & \text{if } \alpha > \frac23 \end{cases}")
WRONG = "1 - alpha if alpha <= 1/2; alpha if 1/2 < alpha <= 3/4; 1 - alpha/2 if alpha > 3/4"
WRONG_TEX = (r"\begin{cases} 1-\alpha, & \alpha \le \frac12, \\ \alpha, & \frac12 < \alpha \le \frac34, \\"
             r" 1-\frac{\alpha}{2}, & \text{otherwise}. \end{cases}")


def _decided(scheme: str):
    text = CASE.format(scheme="'" + scheme + "'")
    outcome = decide(build_case("case.toml", text, tomllib.loads(text)).claims[0])
    points = [p.counterexample.point for p in outcome.parts if p.counterexample is not None]
    return outcome.status, len(outcome.parts), points


@pytest.mark.parametrize("text,latex", [(RIGHT, RIGHT_TEX), (WRONG, WRONG_TEX)])
def test_case_file_decides_a_cases_bound_like_its_text_twin(text, latex):
    assert _decided(latex) == _decided(text)


def test_case_file_verdicts_of_the_twins():
    assert _decided(RIGHT_TEX)[0] == "proved" and _decided(WRONG_TEX)[0] == "refuted"


def test_case_file_names_the_bad_cases_value_and_its_place():
    text = CASE.format(scheme="'" + RIGHT_TEX.replace(r" \end{cases}", "") + "'")
    with pytest.raises(CaseFileError, match=r"inner\.scheme: '\\begin\{cases\}' without '\\end\{cases\}'.*"
                                            r"line 10, column 11"):
        build_case("case.toml", text, tomllib.loads(text))


@pytest.mark.parametrize("broken,message", [
    (RIGHT_TEX + "$", r"unbalanced '\$'"),
    (RIGHT_TEX.replace(r"\begin{cases}", r"\begin{array}").replace(r"\end{cases}", r"\end{array}"),
     r"unsupported environment 'array'"),
    (r"\alpha \end{cases}", r"'\\end\{cases\}' without '\\begin\{cases\}'"),
])
def test_the_command_line_reports_malformed_latex_on_one_line(tmp_path, capsys, broken, message):
    import re
    from tests.case_files import write
    from workbench.cli import main
    path = write(tmp_path, CASE.format(scheme="'" + broken + "'"))
    assert main(["check", path]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "Traceback" not in err
    assert err.startswith("gdof: error: ") and "inner.scheme" in err and re.search(message, err)
    assert re.search(r"line 10, column \d+", err)
