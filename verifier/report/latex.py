"""LaTeX rendering of a Report: each side as a `cases` environment over the regimes, tables for
counterexamples, and a standalone wrapper document that compiles with plain pdflatex + amsmath.

Why `cases`: it is how a GDoF paper states a piecewise formula, so the fragment can be pasted into a
manuscript as is.  Parameter names become Greek letters (alpha -> \\alpha, alpha_1 -> \\alpha_{1});
numbers stay exact (\\tfrac{2}{3}).  Formulas and names come from verifier.text.latex_out, so the
tool prints one LaTeX dialect.
"""

from __future__ import annotations

from verifier.expressions.expr import affine
from verifier.report.build import ClaimReport, Report, num
from verifier.report.latex_math import (DISPLAY_LATEX, affine_latex, atom_latex, bound_math, caption_math,
                                        claim_math, compared_side_math, condition_latex, equation_latex,
                                        escape, label_math, name_latex, number_latex, side_math)
from verifier.text.latex_out import expr_to_latex

__all__ = ["render_latex", "latex_document", "referee_sentence", "claim_latex", "section_latex",
           "cases_latex", "counterexample_table", "escape", "name_latex", "number_latex",
           "affine_latex", "atom_latex", "bound_math", "caption_math", "claim_math", "compared_side_math",
           "label_math", "side_math"]

def regime_condition(row) -> str:
    conds = [condition_latex(p.polyhedron.atoms, row.names) for p in row.polytopes]
    return conds[0] if len(conds) == 1 else r"\text{ or }".join(f"({c})" for c in conds)


def cases_latex(section: ClaimReport, side: int) -> str:
    """One side of the claim as \\begin{cases} formula & condition \\\\ ... \\end{cases}."""
    rows = [f"  {affine_latex(r.sides[side].formula)}, & {regime_condition(r)}"
            for r in section.regimes]
    sym = r"\mathrm{lhs}" if side == 0 else r"\mathrm{rhs}"
    return ("\\[\n" + sym + " = \\begin{cases}\n" + " \\\\\n".join(rows) + "\n\\end{cases}\n\\]")


def counterexample_table(section: ClaimReport, limit: int = 8) -> str:
    names = list(section.counterexamples[0].point) if section.counterexamples else []
    cols = "c" * (len(names) + 4)
    head = " & ".join([f"${name_latex(n)}$" for n in names] + ["lhs", "rhs", "difference", "inside"])
    rows = [" & ".join([f"${number_latex(c.point[n])}$" for n in names]
                       + [f"${number_latex(c.lhs_value)}$", f"${number_latex(c.rhs_value)}$",
                          f"${number_latex(c.difference)}$", "yes" if c.strictly_inside else "boundary"])
            + r" \\" for c in section.counterexamples[:limit]]
    return "\n".join([f"\\begin{{tabular}}{{{cols}}}", r"\hline", head + r" \\", r"\hline"] + rows
                     + [r"\hline", r"\end{tabular}"])


def _summary(section: ClaimReport) -> list[str]:
    out = []
    if section.thresholds:
        items = ", ".join(f"${equation_latex(t.form, section.names)}$" for t in section.thresholds)
        out.append(f"Thresholds: {items}.")
    f = section.failure
    if f is not None and f.pieces:
        where = "; ".join(f"${regime_condition_of(p.polyhedron, section.names)}$ (dimension {p.dim})"
                          for p in f.pieces)
        share = escape(f"{num(f.share)} ({f.share_note})" if f.share is not None else f.share_note)
        out.append(f"The claim fails on: {where}. Share of the region: {share}.")
    sentence = optimality_sentence(section)
    if sentence:
        out.append(sentence)
    if section.redundant:
        out.append("Redundant bounds: " + ", ".join(f"${bound_math(p.name)}$" for p in section.redundant) + ".")
    out += [gap_latex(g) for g in section.gaps]
    return out


def gap_latex(g) -> str:
    """As build.gap_text says it: `\\max` at a point where the value is taken, `\\sup` (approached
    near the point, not attained) where it is not, or unbounded."""
    what = f"\\mathrm{{{g.direction.replace(' ', '')}}}"
    at = ", ".join(f"${name_latex(k)} = {number_latex(v)}$" for k, v in (g.point or {}).items())
    if g.value is None:
        known = g.point is not None or g.regime is not None
        return f"$\\sup({what})$ " + ("is unbounded." if known else "was not computed.")
    if g.attained:
        return f"$\\max({what}) = {number_latex(g.value)}$" + (f" at {at}" if at else "") + "."
    return f"$\\sup({what}) = {number_latex(g.value)}$" + (f", approached near {at}" if at else "") + " (not attained)."


def optimality_sentence(section: ClaimReport) -> str:
    """'The claim holds exactly when $...$ or $...$ (for $...$), and fails exactly when $...$.':
    paste-ready (verifier.regimes.optimality: merged pieces, normalised and chained constraints)."""
    from verifier.regimes.optimality import sentences
    op = section.optimality
    if op is None or not op.fails:
        return ""
    holds, fails, within = sentences(op, DISPLAY_LATEX, joiner="$ or $")

    def shown(pieces, text):
        if not pieces:
            return "nowhere"
        return "everywhere" if pieces == ((),) else f"${text}$"
    holds, fails = shown(op.holds, holds), shown(op.fails, fails)
    where = f" (for ${within}$)" if within else ""
    return f"The claim holds exactly when {holds}{where}, and fails exactly when {fails}."


def regime_condition_of(poly, names=()) -> str:
    return condition_latex(poly.atoms, names)


SIDE_WORDS = {"inner": "the scheme achieves", "outer": "the converse gives"}


def referee_sentence(entry) -> str | None:
    """One paste-ready LaTeX sentence for a refuted claim, from its first counterexample:
    'At $\\alpha = 3/2$, $\\gamma = 5/2$ the scheme achieves $3/2$ while the converse gives $2$.'
    Only for comparisons of two sides (monotone and symmetric claims compare a point with another)."""
    if entry.status != "refuted":
        return None
    for section in entry.sections:
        if section.status == "refuted" and section.counterexamples and \
                section.kind in ("relation", "within", "reduces-to"):
            cex = section.counterexamples[0]
            at = ", ".join(f"${name_latex(k)} = {number_latex(v)}$" for k, v in cex.point.items())
            left, right = section.labels[0], section.labels[1]
            say = [SIDE_WORDS.get(left, f"the left side, ${compared_side_math(section.claim, 0)}$, is"),
                   SIDE_WORDS.get(right, f"the right side, ${compared_side_math(section.claim, 1)}$, is")]
            return (f"At {at} {say[0]} ${number_latex(cex.lhs_value)}$ while {say[1]} "
                    f"${number_latex(cex.rhs_value)}$.")
    return None


def _statement(entry) -> str:
    """The claim as inline math when the entry carries its Claim (or has one part), else its words."""
    claim = entry.claim if entry.claim is not None else \
        (entry.sections[0].claim if len(entry.sections) == 1 else None)
    return f"${claim_math(claim)}$" if claim is not None else escape(entry.statement)


def claim_latex(entry) -> str:
    """A claim: its verdict, notes, then each part (a claim decided in parts says which is which)."""
    declared = f" (declared {entry.expect})" if entry.expect and entry.expect != entry.status else ""
    parts = [f"\\subsection*{{{escape(entry.name or entry.statement)}}}",
             f"Verdict: \\textbf{{{entry.status}}}{escape(declared)}. Claim: {_statement(entry)}\\par"]
    parts += [escape(n) + "\\par" for n in entry.notes]
    parts += [region_latex(item) for item in entry.regions]
    sentence = referee_sentence(entry)
    if sentence:
        parts.append(f"% paste-ready: {sentence}")
        parts.append(f"\\emph{{For the referee report:}} {sentence}\\par")
    for k, section in enumerate(entry.sections, 1):
        if len(entry.sections) > 1 or section.label:
            parts.append(f"\\paragraph{{Part {k} of {len(entry.sections)}}} "
                         f"{label_math(section.label) if section.label else 'whole region'}: "
                         f"\\textbf{{{section.status}}}.")
        parts.append(section_latex(section))
    return "\n".join(parts)


def region_latex(item) -> str:
    """Per regime: its exponents, the region as an `aligned` system of its irredundant inequalities,
    and the list of corner points."""
    from verifier.expressions.expr import rename
    from verifier.rates.regimes import RegionNotShown
    from verifier.report.regions import changes_text, heading, not_shown_text, subscripted
    if isinstance(item, RegionNotShown):
        return escape(not_shown_text(item)) + ".\\par"
    rr, names = item, subscripted(item.region.rates)
    tex = lambda e: expr_to_latex(rename(e, names))  # noqa: E731
    parts = [f"\\paragraph{{Region \\texttt{{{escape(rr.region.name)}}} by regime.}} {escape(heading(rr))}.\\par"]
    for g in rr.regimes:
        conds = [condition_latex(p, rr.names) for p in g.pieces]
        where = conds[0] if len(conds) == 1 else r"\text{ or }".join(f"({c})" for c in conds)
        rows = []
        for i in g.facets:
            q = rr.rows[i]
            if i < len(rr.region.inequalities):
                rows.append(f"{tex(affine(q.coeffs))} &\\le {tex(g.bounds[i])}")
            else:
                rows.append(f"{tex(affine([(r, -c) for r, c in q.coeffs]))} &\\ge 0")
        system = "\\\\\n".join(rows) if rows else r"&\text{(no irredundant inequality)}"
        if rr.pointed and not g.corners:
            system = r"&\text{(the region is empty here)}"
        corners = ", ".join("$(" + ", ".join(tex(f) for f in c) + ")$" for c in g.corners) or "none"
        parts.append(f"Regime {g.index}, ${where}$:\n\\[\\begin{{aligned}}\n{system}\n\\end{{aligned}}\\]\n"
                     f"Corner points: {corners}.\\par")
    for t in rr.thresholds:
        parts.append(f"Threshold {escape(changes_text(t))}.\\par")
    return "\n".join(parts)


def section_latex(section: ClaimReport) -> str:
    parts = []
    for side, label in enumerate(section.labels):
        parts.append(f"{'Left' if side == 0 else 'Right'} side, ${compared_side_math(section.claim, side)}$:")
        parts.append(cases_latex(section, side))
    parts += [p + "\\par" for p in _summary(section)]
    if section.counterexamples:
        parts += ["Counterexamples (best first):\\par", "\\begin{center}", counterexample_table(section),
                  "\\end{center}"]
    return "\n".join(parts)


def render_latex(report: Report) -> str:
    """A LaTeX fragment (needs amsmath) with every section, the solver versions and the caution."""
    head = [f"% generated by gdof: {escape(report.title)}", f"\\section*{{{escape(report.title or 'Report')}}}"]
    if report.source:
        head.append(f"Source: {escape(report.source)}\\par")
    body = [claim_latex(c) for c in report.claims]
    have = ", ".join(f"{k} {v}" for k, v in report.versions.items())
    tail = [f"\\paragraph{{Solver.}} {escape(report.solver)} ({escape(have)}).",
            f"\\paragraph{{Caution.}} {escape(report.caution)}"]
    return "\n\n".join(head + body + tail) + "\n"


def latex_document(fragment_file: str = "report.tex", figures=()) -> str:
    """A standalone document that \\input's the fragment and includes the given figure files, each a
    (file, caption) pair whose caption is LaTeX already (latex_math.caption_math; escape plain text)
    (a \\clearpage after every four figures keeps LaTeX's float queue short)."""
    figs = []
    for k, (f, cap) in enumerate(figures, 1):
        figs.append(f"\\begin{{figure}}[htbp]\\centering\\includegraphics[width=3.5in]{{{f}}}"
                    f"\\caption{{{cap}}}\\end{{figure}}")
        if k % 4 == 0:
            figs.append(r"\clearpage")
    return "\n".join([r"\documentclass[11pt]{article}", r"\usepackage[T1]{fontenc}",
                      r"\usepackage[margin=1in]{geometry}", r"\usepackage{amsmath,amssymb}",
                      r"\usepackage{graphicx}", r"\begin{document}", f"\\input{{{fragment_file}}}"] + figs
                     + [r"\end{document}", ""])
