"""Markdown (and a minimal HTML for notebooks) rendering of a Report.

Why Markdown first: it is what goes into an issue, a wiki page or a referee report; the HTML form
exists only so that a Jupyter cell shows the same table without a Markdown extension.
"""

from __future__ import annotations

import html

from verifier.core.verdicts import tally_sentence
from verifier.report.build import ClaimEntry, ClaimReport, Report, count, solver_text
from verifier.report.text import part_heading, summary_lines, table_rows


def _cell(text: str) -> str:
    """A Markdown table cell: pipes escaped (|x| appears in within-claims), code spans for formulas."""
    return text.replace("|", "\\|")


def _table(head, rows) -> list[str]:
    out = ["| " + " | ".join(_cell(h) for h in head) + " |", "|" + "---|" * len(head)]
    return out + ["| " + " | ".join(_cell(c) for c in r) + " |" for r in rows]


def section_markdown(section: ClaimReport, heading: str = "") -> list[str]:
    lines = [heading, ""] if heading else []
    lines += [f"Parameters: {', '.join(section.names)}; {count(len(section.regimes), 'regime')} from "
              f"{count(section.cells, 'cell')}; method: {section.method}."
              + (f" One-shot check by {section.smt_solver}: {section.smt_status}." if section.smt_solver else ""),
              ""]
    if section.detail:
        lines += [f"Note: {section.detail}", ""]
    if section.regimes:
        lines += _table(*table_rows(section)) + [""]
    for s in summary_lines(section):
        lines.append(f"  - {s.strip()}" if s.startswith("  ") else f"- {s}")
    return lines + [""]


def claim_markdown(entry: ClaimEntry) -> list[str]:
    lines = [f"## {entry.name or entry.statement}", "", f"Verdict: **{entry.status}** — `{entry.statement}`", ""]
    if entry.expect and entry.expect != entry.status:
        lines += [f"> Declared verdict was **{entry.expect}**.", ""]
    lines += [f"- {n}" for n in entry.notes] + ([""] if entry.notes else [])
    from verifier.report.regions import region_markdown
    for item in entry.regions:
        lines += region_markdown(item)
    from verifier.report.latex import referee_sentence
    sentence = referee_sentence(entry)
    if sentence:
        lines += ["For the referee report (LaTeX):", "", f"    {sentence}", ""]
    for k, section in enumerate(entry.sections, 1):
        heading = part_heading(entry, k, section).strip()
        lines += section_markdown(section, f"### {heading[0].upper()}{heading[1:]}" if heading else "")
    return lines


def render_markdown(report: Report) -> str:
    """The whole report as Markdown, with solver versions and the caution at the end."""
    lines = [f"# {report.title or 'Region-wise report'}", ""]
    if report.source:
        lines += [f"Source: {report.source}", ""]
    for entry in report.claims:
        lines += claim_markdown(entry)
    counts = report.status_counts
    lines += [tally_sentence(counts),
              "", f"Solver: {solver_text(report)}", "", f"> **Caution.** {report.caution}", ""]
    return "\n".join(lines)


def _html_table(head, rows) -> str:
    th = "".join(f"<th>{html.escape(h)}</th>" for h in head)
    body = "".join("<tr>" + "".join(f"<td>{html.escape(c)}</td>" for c in r) + "</tr>" for r in rows)
    return f"<table><thead><tr>{th}</tr></thead><tbody>{body}</tbody></table>"


def render_html(report: Report) -> str:
    """A small self-contained HTML view (for notebooks); same facts as the Markdown."""
    parts = [f"<h3>{html.escape(report.title or 'Region-wise report')}</h3>"]
    for entry in report.claims:
        parts.append(f"<h4>{html.escape(entry.name or entry.statement)}: <b>{entry.status}</b></h4>"
                     f"<p><code>{html.escape(entry.statement)}</code></p>")
        parts += [f"<p>{html.escape(n)}</p>" for n in entry.notes]
        from verifier.report.regions import region_lines
        parts += [f"<pre>{html.escape(chr(10).join(region_lines(item)))}</pre>" for item in entry.regions]
        for k, s in enumerate(entry.sections, 1):
            heading = part_heading(entry, k, s).strip()
            parts.append(f"<p><i>{html.escape(heading)}</i></p>" if heading else "")
            parts.append(_html_table(*table_rows(s)) if s.regimes else "")
            items = "".join(f"<li>{html.escape(x.strip())}</li>" for x in summary_lines(s))
            parts.append(f"<ul>{items}</ul>" if items else "")
    parts.append(f"<p>Solver: {html.escape(solver_text(report))}</p>")
    parts.append(f"<p><b>Caution.</b> {html.escape(report.caution)}</p>")
    return "\n".join(parts)
