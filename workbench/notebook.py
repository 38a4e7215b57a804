"""Verdicts in Jupyter: `show(verdict)` renders as HTML (and LaTeX) with the exact counterexample.

Why a wrapper instead of methods on Verdict: the engine's data classes stay free of presentation, and
a notebook gets rich output by asking for it:

    from workbench.notebook import show
    show(prove(claim))                  # a verifier.claims.one_shot.Verdict
    show(decide(case_claim))            # a workbench.decide.Outcome (claims of case files)
    show(run_case("casebook/demo/cache_downlink_manuscript.toml"))   # a whole case (workbench.casebook_cmd)

Every number is printed as an exact fraction, as everywhere else in the tool.  LaTeX comes from
verifier.text.latex_out (expressions) and verifier.report.latex_math (claims), the report's dialect.
"""

from __future__ import annotations

from html import escape

from verifier.expressions.expr import Expr, to_text
from verifier.report.build import Report
from verifier.report.latex import name_latex, number_latex
from verifier.report.latex_math import claim_math
from verifier.text.latex_out import expr_to_latex

from . import verdict_text as vt

COLOURS = {"proved": "#1a7f37", "refuted": "#cf222e", "unknown": "#9a6700"}


class Display:
    """What a notebook cell shows for `show(x)`: HTML, LaTeX and plain text of the same content."""

    def __init__(self, item):
        self.item = item

    def _repr_html_(self) -> str | None:
        if isinstance(self.item, Report):
            from verifier.report.markdown import render_html
            return render_html(self.item)
        if isinstance(self.item, Expr):
            return None          # the notebook falls back to the LaTeX form
        return "".join(_html(x) for x in _items(self.item))

    def _repr_markdown_(self) -> str | None:
        if isinstance(self.item, Report):
            from verifier.report.markdown import render_markdown
            return render_markdown(self.item)
        return None

    def _repr_latex_(self) -> str | None:
        if isinstance(self.item, Expr):
            return f"${expr_to_latex(self.item)}$"
        if isinstance(self.item, Report):
            return None
        return "$$" + r" \\ ".join(_latex(x) for x in _items(self.item)) + "$$"

    def __repr__(self) -> str:
        if isinstance(self.item, Expr):
            return to_text(self.item)
        if isinstance(self.item, Report):
            from verifier.report.text import render_text
            return render_text(self.item)
        return "\n".join(_text(x) for x in _items(self.item))


def show(item) -> Display:
    """Wrap a Verdict, an Outcome, a CaseRun, a list of them, a region-wise Report or an expression
    for rich display."""
    return Display(item)


def _items(item) -> list:
    if isinstance(item, (list, tuple)):
        return [y for x in item for y in _items(x)]
    if hasattr(item, "results") and hasattr(item, "mismatches"):   # a casebook CaseRun
        return [o for _, o in item.results]
    return [item]


def _is_outcome(x) -> bool:
    return hasattr(x, "case_claim")


def _text(x) -> str:
    if _is_outcome(x):
        return "\n".join(vt.outcome_lines(x))
    return "\n".join(vt.verdict_lines(x))


# ---------------------------------------------------------------------------------------------
# HTML
# ---------------------------------------------------------------------------------------------

def _badge(status: str) -> str:
    """The verdict as a word after the claim (colour helps, the word alone must do: no colour needed)."""
    return (f'<span style="color:{COLOURS.get(status, "#000")};font-weight:bold">'
            f"{escape(status)}</span>")


def _html(x) -> str:
    if _is_outcome(x):
        cc = x.case_claim
        parts = [f"<div><b>{escape(cc.claim.name)}</b> &mdash; {_badge(x.status)}<br>{escape(cc.claim.text())}"]
        for name, point in x.uncovered:
            parts.append(f"<br>not covered by a regime of <code>{escape(name)}</code>: "
                         f"{escape(vt.point_text(point))}")
        for label, v in x.verdicts:
            if v.counterexample is not None:
                parts.append(("<br>" + escape(label) if label else "") + _cex_table(v))
        return "".join(parts) + "</div>"
    head = f"<div>{escape(x.claim.name or 'claim')} &mdash; {_badge(x.status)}<br>{escape(x.claim.text())}"
    if x.detail:
        head += f"<br><i>{escape(x.detail)}</i>"
    return head + (_cex_table(x) if x.counterexample is not None else "") + "</div>"


def _cex_table(v) -> str:
    cex = v.counterexample
    left, right = vt.side_names(v)
    rows = [(f"point: {k}", vt.fmt(val)) for k, val in cex.point.items()]
    rows += [(f"left: {left}", vt.fmt(cex.lhs_value)), (f"right: {right}", vt.fmt(cex.rhs_value)),
             ("left - right", vt.fmt(cex.difference))]
    body = "".join(f"<tr><td>{escape(a)}</td><td><code>{escape(b)}</code></td></tr>" for a, b in rows)
    where = "strictly inside the region" if cex.strictly_inside else "on the region's boundary"
    return f"<table><caption>counterexample ({escape(where)})</caption>{body}</table>"


# ---------------------------------------------------------------------------------------------
# LaTeX (math mode only, so the same string works in MathJax and in a real LaTeX document)
# ---------------------------------------------------------------------------------------------

def claim_latex(claim) -> str:
    """A claim as math, in the report's dialect (verifier.report.latex_math.claim_math), so a notebook
    and a LaTeX report set the same claim the same way."""
    return claim_math(claim)


def _latex(x) -> str:
    if _is_outcome(x):
        lines = [claim_latex(x.case_claim.claim) + rf"\quad \text{{({x.status})}}"]
        lines += [_cex_latex(v) for _, v in x.verdicts if v.counterexample is not None]
        return r" \\ ".join(lines)
    line = claim_latex(x.claim) + rf"\quad \text{{({x.status})}}"
    return line + (r" \\ " + _cex_latex(x) if x.counterexample is not None else "")


def _cex_latex(v) -> str:
    cex = v.counterexample
    point = ",\\ ".join(f"{name_latex(k)} = {number_latex(val)}" for k, val in cex.point.items())
    return (rf"\text{{counterexample: }} {point}:\quad \text{{left}} = {number_latex(cex.lhs_value)},\ "
            rf"\text{{right}} = {number_latex(cex.rhs_value)}")
