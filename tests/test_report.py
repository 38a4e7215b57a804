"""The report object and its four renderers: one object, the same facts in every format, exact numbers."""

import json
import subprocess
import sys
from fractions import Fraction

import pytest

from report_fixtures import DEMO, DEMO_WRONG, ETW, W_CLAIM, section
from verifier.expressions.expr import param
from verifier.expressions.region import Atom, atoms_of
from verifier.report.build import CAUTION, build_report, constraint_text
from verifier.report.json_out import fraction, render_json
from verifier.report.latex import render_latex
from verifier.report.markdown import render_markdown
from verifier.report.text import render_text

RENDERERS = (render_text, render_markdown, render_latex, render_json)


@pytest.fixture(scope="module")
def w_report():
    return build_report(section(ETW, W_CLAIM), title="W curve")


@pytest.fixture(scope="module")
def demo_report():
    return build_report([section(ETW, W_CLAIM), section(DEMO, DEMO_WRONG)], title="two claims")


def test_w_curve_has_five_regimes_and_the_published_thresholds(w_report):
    # Etkin, Tse, Wang, IEEE Trans. IT 54(12), 2008: the W curve has five linear pieces with corners at
    # alpha = 1/2, 2/3, 1, 2 (from memory, /work/shared/REFERENCES.md section 1)
    s = w_report.sections[0]
    assert s.status == "proved" and len(s.regimes) == 5
    assert [t.text for t in s.thresholds] == ["alpha = 1/2", "alpha = 2/3", "alpha = 1", "alpha = 2"]
    assert [str(r.sides[0].formula) for r in s.regimes] == ["1 - alpha", "alpha", "1 - alpha/2", "alpha/2", "1"]
    # from memory (same paper): the 2R1 + R2 bound is never the unique tight bound
    assert [p.name for p in s.redundant] == ["two_plus_one"]
    for fmt in RENDERERS:
        assert "two_plus_one" in fmt(w_report).replace("\\_", "_")


def test_text_table_has_one_row_per_regime(w_report):
    text = render_text(w_report)
    rows = [ln for ln in text.splitlines() if ln.strip()[:2] in {f"{k} " for k in range(5)}]
    assert len(rows) == 5
    assert "1/2 <= alpha < 2/3" in text and "proved, certified" in text


@pytest.mark.parametrize("render", RENDERERS)
def test_caution_and_versions_in_every_format(demo_report, render):
    out = render(demo_report)
    assert "asymptotic in SNR" in out
    assert "z3" in out


def test_every_format_lists_the_same_counterexample(demo_report):
    cex = demo_report.sections[1].counterexamples[0]
    assert demo_report.sections[1].status == "refuted"
    for render in (render_text, render_markdown):
        assert f"lhs = {cex.lhs_value}" in render(demo_report)
    assert "\\tfrac{3}{2}" in render_latex(demo_report) or "\\frac{3}{2}" in render_latex(demo_report)


def test_json_round_trips_exactly(demo_report):
    data = json.loads(render_json(demo_report))
    assert data["schema"] == "gdof-report" and data["caution"] == demo_report.caution
    assert data["claims"][1]["status"] == demo_report.claims[1].status
    (wrong,) = data["claims"][1]["parts"]
    sec = demo_report.sections[1]
    for got, cex in zip(wrong["counterexamples"], sec.counterexamples):
        assert {k: fraction(v) for k, v in got["point"].items()} == dict(cex.point)
        assert fraction(got["difference"]) == cex.difference
    for got, row in zip(wrong["regimes"], sec.regimes):
        form = row.sides[1].formula
        assert {k: fraction(v) for k, v in got["sides"][1]["formula"]["coeffs"].items()} == dict(form.coeffs)
        assert fraction(got["sides"][1]["formula"]["const"]) == form.const
    # no float anywhere: every leaf is a string, bool, int (index/count) or null
    def leaves(x):
        if isinstance(x, dict):
            for v in x.values():
                yield from leaves(v)
        elif isinstance(x, list):
            for v in x:
                yield from leaves(v)
        else:
            yield x
    assert not any(isinstance(v, float) for v in leaves(data))


def test_latex_has_one_cases_environment_per_side(demo_report):
    tex = render_latex(demo_report)
    sides = sum(len(s.labels) for s in demo_report.sections)
    assert tex.count("\\begin{cases}") == sides == tex.count("\\end{cases}")
    assert "\\alpha" in tex and "\\begin{tabular}" in tex


def test_notebook_reprs(w_report):
    from workbench.notebook import show
    assert "| regime |" in show(w_report)._repr_markdown_()
    assert show(w_report)._repr_html_().count("<tr>") == 6  # header + five regimes


def test_constraint_text_chains_one_parameter_bounds():
    atoms = atoms_of(param("alpha"), ">=", Fraction(1, 2)) + atoms_of(param("alpha"), "<", Fraction(2, 3)) \
        + atoms_of(param("gamma"), ">", param("alpha"))
    assert constraint_text(atoms) == "1/2 <= alpha < 2/3, alpha < gamma"   # display: alpha first
    assert constraint_text(()) == "everywhere"


def test_default_caution_is_the_engine_one():
    assert "asymptotic in SNR" in CAUTION


def test_cli_report_json_and_exit_code(tmp_path):
    out = tmp_path / "r.json"
    proc = subprocess.run([sys.executable, "-m", "workbench", "report", str(DEMO), "--claim", DEMO_WRONG,
                           "--format", "json", "--out", str(out)], capture_output=True, text=True)
    assert proc.returncode == 1, proc.stderr  # refuted, as `check` (workbench/exit_codes.py)
    assert proc.stderr == ""  # no progress bar when stderr is not a terminal
    data = json.loads(out.read_text())
    assert data["claims"][0]["status"] == "refuted"


def test_a_refuted_claim_carries_a_paste_ready_sentence_with_its_counterexample(demo_report):
    from verifier.report.latex import referee_sentence
    entry = demo_report.claims[1]
    cex = entry.sections[0].counterexamples[0]
    sentence = referee_sentence(entry)
    assert entry.status == "refuted" and sentence.startswith("At $")
    from verifier.report.latex import name_latex, number_latex
    assert all(f"${name_latex(k)} = {number_latex(v)}$" in sentence for k, v in cex.point.items())
    assert f"achieves ${number_latex(cex.lhs_value)}$" in sentence   # the scheme's exact value
    assert sentence in render_latex(demo_report) and sentence in render_markdown(demo_report)
    assert referee_sentence(demo_report.claims[0]) is None   # proved: nothing to object to
