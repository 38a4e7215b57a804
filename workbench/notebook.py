"""Verdicts in Jupyter: `show(verdict)` renders as HTML (and LaTeX) with the exact counterexample.

Why a wrapper instead of methods on Verdict: the engine's data classes stay free of presentation, and
a notebook gets rich output by asking for it:

    from workbench.notebook import show
    show(prove(claim))                  # a verifier.claims.one_shot.Verdict
    show(decide(case_claim))            # a workbench.decide.Outcome (claims of case files)
    show(run_case("casebook/demo/cache_downlink_manuscript.toml"))   # a whole case (workbench.casebook_cmd)

Every number is printed as an exact fraction, as everywhere else in the tool.  Expressions use
verifier.text.latex_out when it is present and otherwise the plain-text form set in math mode.
"""

from __future__ import annotations

import re
from fractions import Fraction
from html import escape

from verifier.expressions.expr import Expr, to_text
from verifier.report.build import Report
from verifier.report.latex import name_latex, number_latex
from verifier.text.latex_out import expr_to_latex

from . import verdict_text as vt

COLOURS = {"proved": "#1a7f37", "refuted": "#cf222e", "unknown": "#9a6700"}
LATEX_REL = {"==": "=", "<=": r"\le", ">=": r"\ge", "<": "<", ">": ">"}


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
            return f"${expr_latex(self.item)}$"
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

_TOKEN = re.compile(r"[A-Za-z_][A-Za-z0-9_]*'?|\d+/\d+|<=|>=|==|\^\+|[<>*]")


def math_text(text: str) -> str:
    """The tool's plain-text syntax (expressions, regions) turned into LaTeX math, token by token."""
    def token(m):
        t = m.group()
        if t in ("min", "max"):
            return f"\\{t}"
        if t in ("or", "and"):
            return rf"\ \text{{{t}}}\ "
        if "/" in t:
            num, den = t.split("/")
            return number_latex(Fraction(int(num), int(den)))
        return {"<=": r"\le ", ">=": r"\ge ", "==": "=", "^+": "^{+}", "*": " ", "<": "<", ">": ">"}.get(
            t, None) or name_latex(t)
    return _TOKEN.sub(token, text)


def expr_latex(e) -> str:
    """An expression in the tool's one LaTeX dialect (verifier.text.latex_out)."""
    return expr_to_latex(e)


def _side_latex(side) -> str:
    return rf"\mathrm{{{side.label}}}" if side.label in ("inner", "outer") else expr_latex(side.expr)


def claim_latex(claim) -> str:
    lhs = _side_latex(claim.lhs)
    if claim.kind == "relation":
        body = f"{lhs} {LATEX_REL[claim.rel]} {_side_latex(claim.rhs)}"
    elif claim.kind == "within":
        body = rf"\left|{lhs} - {_side_latex(claim.rhs)}\right| \le {number_latex(claim.gap)}"
    elif claim.kind == "monotone":
        trend = "non-decreasing" if claim.increasing else "non-increasing"
        body = rf"{lhs}\ \text{{{trend} in }} {name_latex(claim.param)}"
    elif claim.kind == "reduces-to":
        fixed = ", ".join([f"{name_latex(n)} = {number_latex(v)}" for n, v in claim.values] +
                          [f"{name_latex(n)} = {expr_latex(e)}" for n, e in claim.subst])
        body = rf"\left.{lhs}\right|_{{{fixed}}} = {_side_latex(claim.rhs)}"
    else:
        body = rf"{lhs}\ \text{{symmetric in }} {name_latex(claim.swap[0])}, {name_latex(claim.swap[1])}"
    return body + rf"\quad \text{{where }} {math_text(claim.region.text())}"


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
