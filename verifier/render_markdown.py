"""Markdown (and a minimal HTML for notebooks) rendering of a Report.

Why Markdown first: it is what goes into an issue, a wiki page or a referee report; the HTML form
exists only so that a Jupyter cell shows the same table without a Markdown extension.
"""

from __future__ import annotations

import html

from .render_text import summary_lines, table_rows
from .report import ClaimReport, Report, solver_text


def _cell(text: str) -> str:
    """A Markdown table cell: pipes escaped (|x| appears in within-claims), code spans for formulas."""
    return text.replace("|", "\\|")


def _table(head, rows) -> list[str]:
    out = ["| " + " | ".join(_cell(h) for h in head) + " |", "|" + "---|" * len(head)]
    return out + ["| " + " | ".join(_cell(c) for c in r) + " |" for r in rows]


def section_markdown(section: ClaimReport) -> list[str]:
    lines = [f"## {section.title}", "", f"**{section.status.upper()}** — `{section.statement}`", ""]
    if section.expect and section.expect != section.status:
        lines += [f"> Declared verdict was **{section.expect}**.", ""]
    lines += [f"Parameters: {', '.join(section.names)}; {len(section.regimes)} regimes from "
              f"{section.cells} cells; method: {section.method}."
              + (f" One-shot check by {section.smt_solver}: {section.smt_status}." if section.smt_solver else ""),
              ""]
    if section.detail:
        lines += [f"Note: {section.detail}", ""]
    lines += _table(*table_rows(section)) + [""]
    for s in summary_lines(section):
        lines.append(f"  - {s.strip()}" if s.startswith("  ") else f"- {s}")
    return lines + [""]


def render_markdown(report: Report) -> str:
    """The whole report as Markdown, with solver versions and the caution at the end."""
    lines = [f"# {report.title or 'Region-wise report'}", ""]
    if report.source:
        lines += [f"Source: {report.source}", ""]
    for section in report.sections:
        lines += section_markdown(section)
    counts = report.status_counts
    lines += [f"Summary: {counts['proved']} proved, {counts['refuted']} refuted, {counts['unknown']} unknown.",
              "", f"Solver: {solver_text(report)}", "", f"> **Caution.** {report.caution}", ""]
    return "\n".join(lines)


def _html_table(head, rows) -> str:
    th = "".join(f"<th>{html.escape(h)}</th>" for h in head)
    body = "".join("<tr>" + "".join(f"<td>{html.escape(c)}</td>" for c in r) + "</tr>" for r in rows)
    return f"<table><thead><tr>{th}</tr></thead><tbody>{body}</tbody></table>"


def render_html(report: Report) -> str:
    """A small self-contained HTML view (for notebooks); same facts as the Markdown."""
    parts = [f"<h3>{html.escape(report.title or 'Region-wise report')}</h3>"]
    for s in report.sections:
        parts.append(f"<h4>{html.escape(s.title)}: <b>{s.status.upper()}</b></h4>"
                     f"<p><code>{html.escape(s.statement)}</code></p>")
        parts.append(_html_table(*table_rows(s)))
        items = "".join(f"<li>{html.escape(x.strip())}</li>" for x in summary_lines(s))
        parts.append(f"<ul>{items}</ul>" if items else "")
    parts.append(f"<p>Solver: {html.escape(solver_text(report))}</p>")
    parts.append(f"<p><b>Caution.</b> {html.escape(report.caution)}</p>")
    return "\n".join(parts)
