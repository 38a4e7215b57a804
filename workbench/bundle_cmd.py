"""`gdof bundle CASE.toml OUTDIR`: everything a paper or a referee report needs, in one folder.

Contents: report.md, report.tex (fragment) and main.tex (standalone, compiles with pdflatex),
report.json, plots/ (PNG + PDF per claim: a 1-D slice, and a regime map for two-parameter claims),
counterexamples.json / .csv (exact fractions as text; the regime holding each point and the active bounds
there, uncovered points too), versions.txt (solvers, libraries, caution).

Why atomic: a bundle is evidence; a half-written one (interrupted run, full disk, a plotting bug)
must never be mistaken for a finished one.  The folder is built in a temporary sibling directory and
renamed into place.  An existing OUTDIR is refused without --force, and --force replaces only an
earlier bundle (its versions.txt says so), never another folder; with --force the old folder is
moved aside, the new one renamed in, and only then is the old one deleted (if the swap fails, the old
folder is put back).
"""

from __future__ import annotations

import csv
import io
import json
import os
import platform
import shutil
import tempfile
from pathlib import Path

from verifier.core.errors import InputError
from verifier.report.build import Report
from verifier.core.verdicts import REFUTED
from verifier.report.json_out import counterexample_json, point_json, render_json
from verifier.report.latex import latex_document, render_latex
from verifier.report.latex_math import caption_math
from verifier.report.markdown import render_markdown

from .bundled import CASE_HELP, resolve_case
from .casefile import load_case
from .output_target import shown_path
from verifier.core.verdicts import tally_sentence
from .check_cmd import select
from .exit_codes import exit_code
from .plots import regime_map, save_figure, slice_figure
from .report_cmd import case_report, progress_bar
from .smtlib_files import write_obligations


def configure(p) -> None:
    p.add_argument("case", help=CASE_HELP)
    p.add_argument("outdir", help="folder to create (refused if it exists, unless --force)")
    p.add_argument("--claim", action="append", default=[], metavar="NAME",
                   help="bundle only the named claim, or the one claim whose name starts so (repeatable)")
    p.add_argument("--workers", type=int, default=1, help="processes for the region-wise prover (default 1)")
    p.add_argument("--force", action="store_true", help="replace an existing OUTDIR (atomically)")


def _located(report: Report):
    """(section, counterexample, its JSON shape, the regime rows holding it) for every counterexample."""
    for s in report.sections:
        for k, c in enumerate(s.counterexamples):
            yield s, c, counterexample_json(c), s.regimes_of(k)


def _joined(items) -> str:
    """Several values in one CSV cell ("tin; hk"): a spreadsheet keeps them in one column."""
    return "; ".join(str(x) for x in items)


def _uncovered(report: Report):
    """(claim name, bound name, point) of every point no regime of a regime-wise bound covers: the
    refutation of a claim with a forgotten regime (workbench.decide keeps (name, point) as the evidence
    of its coverage obligation), which has no side values and so no Counterexample."""
    for entry in report.claims:
        for ob in entry.obligations:
            if ob.status == REFUTED and isinstance(ob.evidence, tuple) and len(ob.evidence) == 2:
                yield entry.name, ob.evidence[0], point_json(ob.evidence[1])


def counterexample_rows(report: Report) -> tuple[list[str], list[list[str]]]:
    """One row per counterexample: its claim and part, the regime of the claim's regime table that
    holds it (number and constraints; several on a shared boundary), the point, both sides' values and
    the named bounds active on each side there; then one row per uncovered point, whose sides are
    undefined there (docs/report-schema.md)."""
    uncovered = list(_uncovered(report))
    names = sorted({n for s in report.sections for c in s.counterexamples for n in c.point}
                   | {n for _, _, point in uncovered for n in point})
    head = (["claim", "part", "regime", "regime_constraints"] + names
            + ["lhs", "rhs", "difference", "lhs_active", "rhs_active", "strictly_inside", "origin"])
    rows = []
    for s, c, d, regimes in _located(report):
        rows.append([s.name, s.label, _joined(r.index for r in regimes), _joined(r.constraints for r in regimes)]
                    + [d["point"].get(n, "") for n in names]
                    + [d["lhs"], d["rhs"], d["difference"], _joined(c.lhs_active), _joined(c.rhs_active),
                       str(c.strictly_inside).lower(), c.origin])
    for claim, bound, point in uncovered:
        rows.append([claim, f"coverage of '{bound}'", "", ""] + [point.get(n, "") for n in names]
                    + ["", "", "", "", "", "", f"no regime of '{bound}' contains this point"])
    return head, rows


def counterexamples_csv(report: Report) -> str:
    buf = io.StringIO()
    writer = csv.writer(buf, lineterminator="\n")
    head, rows = counterexample_rows(report)
    writer.writerow(head)
    writer.writerows(rows)
    return buf.getvalue()


def counterexamples_json(report: Report) -> str:
    data = [{"claim": s.name, "part": s.label,
             "regimes": [{"index": r.index, "constraints": r.constraints} for r in regimes], **d}
            for s, _, d, regimes in _located(report)]
    uncovered = [{"claim": claim, "bound": bound, "point": point} for claim, bound, point in _uncovered(report)]
    return json.dumps({"counterexamples": data, "uncovered": uncovered, "caution": report.caution}, indent=2,
                      ensure_ascii=False) + "\n"


def versions_text(report: Report, case_path: str = "") -> str:
    import matplotlib
    lines = ["gdof report bundle", f"case: {case_path}" if case_path else "", f"solver used: {report.solver}"]
    lines += [f"{k}: {v}" for k, v in report.versions.items()]
    lines += [f"python: {platform.python_version()}", f"matplotlib: {matplotlib.__version__}", "",
              report.caution]
    return "\n".join(x for x in lines if x is not None) + "\n"


def write_plots(report: Report, folder: Path) -> list[tuple[str, str]]:
    """Plots per section; returns (pdf file relative to the bundle, caption) for main.tex."""
    plots = folder / "plots"
    plots.mkdir()
    figures = []
    for k, s in enumerate(report.sections, 1):
        if not s.names or not s.regimes:
            continue
        made = [("slice", slice_figure(s))]
        if len(s.names) == 2:
            made.append(("map", regime_map(s)))
        if s.optimality is not None and s.optimality.fails and len(s.optimality.names) == 2:
            from .exact_plot import exact_map
            made.append(("exact", exact_map(s)))
        for kind, fig in made:
            save_figure(fig, plots / f"claim{k:02d}_{kind}", ("png", "pdf"))
            figures.append((f"plots/claim{k:02d}_{kind}.pdf", caption_math(s, kind)))
    for k, entry in enumerate(report.claims, 1):
        made = region_plot(entry)
        if made is not None:
            save_figure(made[0], plots / f"region{k:02d}", ("png", "pdf"))
            figures.append((f"plots/region{k:02d}.pdf", made[1]))
    return figures


def region_plot(entry):
    """(figure, caption) for a refuted region claim over two rates: its regions at the refuting
    exponent point, overlaid, with the refuting rate tuple marked; None when there is nothing to draw
    (another verdict, more than two rates, a region unbounded there)."""
    claim, witness = entry.rate_claim, entry.rate_witness
    if entry.status != "refuted" or claim is None or witness is None or len(claim.first.rates) != 2:
        return None
    from verifier.expressions.expr import format_number
    from .region_plots import region_figure
    regions = [r for r in (claim.first, claim.second) if r is not None]
    try:
        fig = region_figure(regions, witness.theta, witness.rates)
    except InputError:
        return None
    at = ", ".join(f"{n} = {format_number(v)}" for n, v in witness.theta.items())
    return fig, f"{entry.name or entry.statement}: the regions at {at}, the refuting rate tuple marked"


def write_contents(report: Report, folder: Path, case_path: str = "") -> None:
    """Every file of the bundle, into an existing (temporary) folder."""
    (folder / "report.md").write_text(render_markdown(report), encoding="utf-8")
    (folder / "report.tex").write_text(render_latex(report), encoding="utf-8")
    (folder / "report.json").write_text(render_json(report), encoding="utf-8")
    (folder / "counterexamples.json").write_text(counterexamples_json(report), encoding="utf-8")
    (folder / "counterexamples.csv").write_text(counterexamples_csv(report), encoding="utf-8")
    (folder / "versions.txt").write_text(versions_text(report, case_path), encoding="utf-8")
    figures = write_plots(report, folder)
    (folder / "main.tex").write_text(latex_document("report.tex", figures), encoding="utf-8")
    from .standalone import write_certificates  # certificates/claimNN.json + the standalone checker
    write_certificates(report, folder)
    write_obligations(report, folder)            # obligations/*.smt2, for any SMT-LIB solver


def write_bundle(report: Report, outdir: str | Path, case_path: str = "", force: bool = False) -> Path:
    """Build the bundle in a temporary sibling and move it into place (see the module docstring)."""
    out = Path(outdir)
    if out.exists() and not force:
        raise InputError(f"bundle: '{out}' already exists (use --force to replace it)")
    from .output_target import looks_like_bundle
    if out.exists() and not looks_like_bundle(out):
        raise InputError(f"bundle: '{out}' exists and is not an earlier bundle; --force replaces only bundles")
    out.parent.mkdir(parents=True, exist_ok=True)
    tmp = Path(tempfile.mkdtemp(prefix=f".{out.name}.tmp-", dir=out.parent))
    try:
        write_contents(report, tmp, case_path)
        _swap_in(tmp, out)
    except BaseException:
        shutil.rmtree(tmp, ignore_errors=True)
        raise
    return out


def _swap_in(new: Path, out: Path) -> None:
    if not out.exists():
        os.rename(new, out)
        return
    old = Path(tempfile.mkdtemp(prefix=f".{out.name}.old-", dir=out.parent))
    os.rmdir(old)
    os.rename(out, old)
    try:
        os.rename(new, out)
    except BaseException:
        os.rename(old, out)
        raise
    shutil.rmtree(old, ignore_errors=True)


def run(args) -> int:
    args.case = resolve_case(args.case)   # a local file, else a bundled case of that name
    from .output_target import check_bundle_target, write_error
    check_bundle_target(args.outdir, args.case, args.force)  # refuse before the long proof, not after
    case = load_case(args.case, args.solver, args.timeout, getattr(args, "budget", None))
    report = case_report(case, select(case, args.claim), args.solver, args.timeout, args.cross_check,
                         max(1, args.workers), progress_bar(), getattr(args, "budget", None))
    try:
        write_bundle(report, args.outdir, str(args.case), args.force)
    except OSError as exc:   # a full disk or a folder made read-only meanwhile
        raise write_error(exc, args.outdir, "bundle") from None
    print(f"bundle written to {shown_path(args.outdir)}: {tally_sentence(report.status_counts)}")
    return exit_code(c.status for c in report.claims)
