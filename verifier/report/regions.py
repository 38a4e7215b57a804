"""How the regimes of a rate region (verifier.rates.regimes) read in each output format.

Why one module: text, Markdown, LaTeX and JSON show the same facts (per regime: the exponents, the
irredundant inequalities with their affine right sides, the redundant ones, the corner points; the
thresholds and what changes across them); nothing is computed here, everything is read off the
RegionRegimes object, whose every corner and status was re-checked exactly when it was built.  Text and
Markdown live here; LaTeX in latex.py (region_latex) and JSON in json_out.py (region_json), which read
the same pieces.
"""

from __future__ import annotations

import re

from verifier.rates.regimes import RegionNotShown, RegionRegimes, corner_text, row_text
from verifier.regimes.optimality import union_text
from verifier.report.build import count

CLAIM = ("the corners and statuses hold on each regime except on lower-dimensional boundaries (thresholds, "
         "the edges of the exponent region), where corners may coincide and a facet may degenerate; "
         "re-checked exactly at a point of every cell")


def heading(rr: RegionRegimes) -> str:
    extra = "" if rr.bounded else "; the region is unbounded (its recession directions are not listed)"
    if not rr.pointed:
        extra += "; it contains a line, so it has no corner points"
    return (f"regimes of region {rr.region.name}: {count(len(rr.regimes), 'regime')} from {count(rr.cells, 'cell')}; "
            f"{CLAIM}{extra}")


def _point(point) -> str:
    from verifier.expressions.expr import format_number
    return ", ".join(f"{k} = {format_number(v)}" for k, v in point.items())


def regime_facts(rr: RegionRegimes, g) -> dict:
    """The facts of one regime as short strings (shared by text and Markdown)."""
    def listed(kind):
        return [f"({i + 1}) {row_text(rr, g, i)}" if i < len(rr.region.inequalities) else row_text(rr, g, i)
                for i in range(len(rr.rows)) if g.status[i] == kind]
    corners = ", ".join(corner_text(c) for c in g.corners) if rr.pointed else "none (the region contains a line)"
    facets = "; ".join(listed("facet")) or "none"
    if rr.pointed and not g.corners:
        facets = "none: the region is empty here" + (f" (without any one of {facets} it would not be)"
                                                     if g.facets else "")
    return {"where": union_text(g.pieces, names=rr.names), "at": _point(g.point), "facets": facets,
            "redundant": "; ".join(listed("redundant")) or "none", "not shown": "; ".join(listed("not shown")),
            "corners": corners if g.corners or not rr.pointed else "none: the region is empty here"}


def changes_text(t) -> str:
    pairs = ", ".join(f"{a} | {b}" for a, b in t.between)
    return f"{t.text} (regimes {pairs}): " + ("; ".join(t.changes) or "no change in facets or corners")


def not_shown_text(item: RegionNotShown, quote=str) -> str:
    if item.see:
        return f"regimes of region {quote(item.name)}: as under the claim '{item.see}' above"
    return f"regimes of region {quote(item.name)}: not shown ({item.reason})"


def region_lines(item) -> list[str]:
    """Plain text lines for one region (or the reason it is not shown)."""
    if isinstance(item, RegionNotShown):
        return [not_shown_text(item)]
    lines = [heading(item)]
    for g in item.regimes:
        f = regime_facts(item, g)
        at = f"re-checked at {f['at']}" if f["at"] else "re-checked exactly"
        lines += [f"  regime {g.index}: {f['where']}   ({at})",
                  f"    facets: {f['facets']}", f"    redundant: {f['redundant']}"]
        if f["not shown"]:
            lines.append(f"    status not shown (the other rows contain a line): {f['not shown']}")
        lines.append(f"    corners: {f['corners']}")
    if item.thresholds:
        lines.append("  thresholds:")
        lines += [f"    {changes_text(t)}" for t in item.thresholds]
    return lines


def _cell(text: str) -> str:
    return text.replace("|", "\\|")


def region_markdown(item) -> list[str]:
    if isinstance(item, RegionNotShown):
        return [f"- {not_shown_text(item, lambda n: f'`{n}`')}", ""]
    lines = [f"**{_cell(heading(item))}**", "", "| regime | exponents | facets | redundant | corner points |",
             "| --- | --- | --- | --- | --- |"]
    for g in item.regimes:
        f = regime_facts(item, g)
        facets = f["facets"] + (f"; not shown: {f['not shown']}" if f["not shown"] else "")
        at = f" (at {_cell(f['at'])})" if f["at"] else ""
        lines.append(f"| {g.index} | `{_cell(f['where'])}`{at} | {_cell(facets)} | "
                     f"{_cell(f['redundant'])} | {_cell(f['corners'])} |")
    lines.append("")
    if item.thresholds:
        lines += ["Thresholds:", ""] + [f"- {_cell(changes_text(t))}" for t in item.thresholds] + [""]
    return lines


def subscripted(names) -> dict:
    """d1 -> d_1 for LaTeX (a rate written letters + digits reads as a subscripted symbol)."""
    out = {}
    for n in names:
        m = re.fullmatch(r"([A-Za-z]+)(\d+)", n)
        if m and f"{m[1]}_{m[2]}" not in names:
            out[n] = f"{m[1]}_{m[2]}"
    return out
