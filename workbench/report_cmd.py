"""`gdof report CASE.toml`: the region-wise proof of every (sub)claim, rendered in one format.

Why a separate command from `check`: check gives one verdict per claim quickly; report runs the
region-wise prover (verifier.regimes.proof) and shows why -- regimes, active bounds, thresholds,
failure sets -- in text, Markdown, LaTeX or exact JSON, all from one verifier.report.build.Report.
"""

from __future__ import annotations

import os
import sys
import tempfile
from pathlib import Path

from verifier.claims.kinds import Claim
from verifier.report.build import ClaimEntry, Report, build_report, claim_report
from verifier.report.json_out import render_json
from verifier.report.latex import render_latex
from verifier.report.markdown import render_markdown
from verifier.report.text import render_text

from . import verdict_text as vt
from .bundled import CASE_HELP, resolve_case
from .casefile import load_case
from .check_cmd import select
from .decide import decide, uncovered_note
from .exit_codes import exit_code

RENDERERS = {"text": render_text, "markdown": render_markdown, "latex": render_latex, "json": render_json}


def configure(p) -> None:
    p.add_argument("case", help=CASE_HELP)
    p.add_argument("--format", choices=tuple(RENDERERS), default="text", help="output format (default text)")
    p.add_argument("--json", action="store_const", const="json", dest="format",
                   help="the same as --format json (exact numbers as strings)")
    p.add_argument("--claim", action="append", default=[], metavar="NAME",
                   help="report only the named claim, or the one claim whose name starts so (repeatable)")
    p.add_argument("--workers", type=int, default=1, help="processes for the region-wise prover (default 1)")
    p.add_argument("--out", metavar="FILE", help="write to FILE (atomically) instead of stdout")


def progress_bar(stream=None):
    """A progress callback drawing one updating line on stderr, or None when stderr is not a TTY."""
    stream = stream or sys.stderr
    if not stream.isatty():
        return None

    def show(label: str):
        def report(stage: str, done: int, total: int) -> None:
            filled = int(20 * done / max(total, 1))
            stream.write(f"\r{label[:40]:40} {stage:8} [{'#' * filled}{'.' * (20 - filled)}] {done}/{total}")
            stream.flush()
        return report
    return show


def case_report(case, case_claims, solver="z3", timeout=30.0, cross_check=False, workers=1,
                progress=None, budget=None) -> Report:
    """Decide every chosen case claim region by region (workbench.decide, method 'regimes': the same
    plan of obligations as `check`, so the verdicts agree claim for claim) and build the Report: one
    entry per claim, with a section per part whose sub-region is not empty."""
    from .rate_report import once_per_case
    entries, shown = [], {}
    for cc in case_claims:
        outcome = decide(cc, solver, timeout, cross_check, "regimes", budget, workers, progress)
        sections = tuple(claim_report(p.result, p.label, None) for p in outcome.parts)
        notes = tuple(uncovered_note([gap]) for gap in outcome.uncovered) + tuple(outcome.notes)
        if outcome.rate_witness is not None:   # a rate-region claim: exponent point and rate tuple
            notes += tuple(outcome.rate_witness.lines())
        entries.append(ClaimEntry(cc.claim.name, cc.claim.text(), outcome.status, sections, cc.expect,
                                  notes, tuple(outcome.obligations),
                                  once_per_case(shown, cc.claim, outcome.rate_regimes),
                                  cc.claim if outcome.rate_witness is not None else None,
                                  outcome.rate_witness,
                                  cc.claim if isinstance(cc.claim, Claim) else None))
    if progress:
        sys.stderr.write("\r" + " " * 80 + "\r")
    return build_report(entries, case.title, case.source, "z3 and cvc5" if cross_check else solver,
                        caution=vt.CAUTION)


def write_atomic(path: str | Path, text: str) -> None:
    """Write a file so that a reader never sees half of it: temporary sibling, then os.replace."""
    path = Path(path)
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", dir=path.parent or ".")
    try:
        with os.fdopen(fd, "w", encoding="utf-8") as fh:
            fh.write(text)
        os.replace(tmp, path)
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise


def run(args) -> int:
    args.case = resolve_case(args.case)   # a local file, else a bundled case of that name
    from .output_target import check_output_file, write_error
    if args.out is not None:   # refuse a bad --out before the proof, not after it
        check_output_file(args.out, keep=[args.case])
    case = load_case(args.case, args.solver, args.timeout, getattr(args, "budget", None))
    report = case_report(case, select(case, args.claim), args.solver, args.timeout, args.cross_check,
                         max(1, args.workers), progress_bar(), getattr(args, "budget", None))
    text = RENDERERS[args.format](report)
    if args.out is not None:
        try:
            write_atomic(args.out, text)
        except OSError as exc:   # a full disk or a folder made read-only meanwhile
            raise write_error(exc, args.out, "report --out") from None
    else:
        sys.stdout.write(text)
    return exit_code(c.status for c in report.claims)
