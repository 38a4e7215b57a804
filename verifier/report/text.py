"""Terminal rendering of a Report: one aligned table per claim plus short exact summaries.

Why plain aligned columns (no box drawing): the output must survive copy-paste into e-mail and
referee reports, and `grep` on a verdict must work.
"""

from __future__ import annotations

from verifier.core.verdicts import tally_sentence
from verifier.expressions.expr import to_text
from verifier.regimes.optimality import sentences
from verifier.report.build import (constraint_text, count, failure_share_text, gap_text, num, point_text,
    solver_text, ClaimEntry, ClaimReport, Report)


def verdict_cell(row) -> str:
    if row.verdict == "proved":
        return "proved, certified" if row.certified else "proved (SMT, no certificate)"
    return row.verdict


def active_cell(row) -> str:
    parts = [f"{s.label}: {', '.join(s.active)}" for s in row.sides if s.active]
    return "; ".join(parts) if parts else "-"


def table_rows(section: ClaimReport) -> tuple[list[str], list[list[str]]]:
    """Header and rows of the regime table, shared by the text and Markdown renderers."""
    head = ["regime", "constraints", "active bounds"] + [f"{lab}" for lab in section.labels] + ["verdict"]
    rows = [[str(r.index), r.constraints, active_cell(r)] + [to_text(s.formula) for s in r.sides]
            + [verdict_cell(r)] for r in section.regimes]
    return head, rows


def aligned(head: list[str], rows: list[list[str]]) -> list[str]:
    widths = [max(len(x) for x in col) for col in zip(head, *rows)]
    def line(cells):
        return "  ".join(c.ljust(w) for c, w in zip(cells, widths)).rstrip()
    return [line(head), line(["-" * w for w in widths])] + [line(r) for r in rows]


def counterexample_lines(section: ClaimReport, limit: int = 5) -> list[str]:
    out = []
    for c in section.counterexamples[:limit]:
        where = "strictly inside" if c.strictly_inside else "on the boundary"
        out.append(f"  {point_text(c.point)}: lhs = {num(c.lhs_value)}, rhs = {num(c.rhs_value)}, "
                   f"difference = {num(c.difference)} ({where}; {c.origin})")
    return out


def summary_lines(section: ClaimReport) -> list[str]:
    """Thresholds, failure set, counterexamples, bounds, gaps: the same facts in every format."""
    lines = []
    if section.thresholds:
        lines.append("Thresholds: " + "; ".join(t.text for t in section.thresholds))
    f = section.failure
    if f is not None and f.pieces:
        lines.append(f"Fails on {count(len(f.pieces), 'piece')}; {failure_share_text(f)}:")
        lines += [f"  regime {p.regime}: {constraint_text(p.polyhedron.atoms, section.names)} (dimension {p.dim})"
                  for p in f.pieces]
    lines += optimality_lines(section)
    if section.counterexamples:
        lines.append("Counterexamples (best first):")
        lines += counterexample_lines(section)
    if section.redundant:
        names = [p.name for p in section.parts]   # a name on both sides (two versions): say whose
        lines.append("Redundant bounds: " + ", ".join(
            (f"{section.labels[p.side]}: " if names.count(p.name) > 1 and p.side < len(section.labels) else "")
            + f"{p.name} ({p.note})" for p in section.redundant))
    lines += [gap_text(g) for g in section.gaps]
    return lines


def optimality_lines(section: ClaimReport) -> list[str]:
    """Where a refuted comparison holds and where it fails, exactly (verifier.regimes.optimality)."""
    op = section.optimality
    if op is None or not op.fails:
        return []
    holds, fails, within = sentences(op)
    return [f"Holds exactly when: {holds}" + (f"   (within {within})" if within else ""),
            f"Fails exactly when: {fails}"]


def section_lines(section: ClaimReport, heading: str = "") -> list[str]:
    """One part's regime table and summaries; `heading` names the part inside its claim."""
    lines = [heading] if heading else []
    lines += [f"  parameters: {', '.join(section.names)}; {count(len(section.regimes), 'regime')} from "
              f"{count(section.cells, 'cell')}; method {section.method}"
              + (f"; one-shot check by {section.smt_solver}: {section.smt_status}" if section.smt_solver else "")
              + ("; certificates and coverage re-checked by the standalone checker" if section.checked else "")]
    if section.detail:
        lines.append(f"  note: {section.detail}")
    if section.regimes:
        lines += [""] + ["  " + x for x in aligned(*table_rows(section))] + [""]
    return lines + ["  " + x for x in summary_lines(section)]


def part_heading(entry: ClaimEntry, k: int, section: ClaimReport) -> str:
    """'' for a claim decided as one part, else 'part 2 of 5 (label): verdict'."""
    if len(entry.sections) == 1 and not section.label:
        return ""
    return f"  part {k} of {len(entry.sections)} ({section.label or 'whole region'}) -- {section.status}"


def claim_lines(entry: ClaimEntry) -> list[str]:
    declared = f" (declared {entry.expect})" if entry.expect and entry.expect != entry.status else ""
    lines = [f"{entry.name or entry.statement} -- {entry.status}{declared}", f"  {entry.statement}"]
    lines += [f"  note: {n}" for n in entry.notes]
    from verifier.report.regions import region_lines
    for item in entry.regions:
        lines += ["  " + x for x in region_lines(item)]
    for k, section in enumerate(entry.sections, 1):
        lines += section_lines(section, part_heading(entry, k, section))
    return lines


def render_text(report: Report) -> str:
    """The whole report as terminal text, ending with solver versions and the caution."""
    lines = []
    if report.title:
        lines.append(f"Report: {report.title}")
    if report.source:
        lines.append(f"Source: {report.source}")
    lines.append(f"Solver: {solver_text(report)}")
    for entry in report.claims:
        lines += [""] + claim_lines(entry)
    lines += ["", tally_sentence(report.status_counts), report.caution]
    return "\n".join(lines) + "\n"
