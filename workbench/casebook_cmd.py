"""`gdof casebook [PATH ...]`: run every case file and compare each verdict with the declared one.

The casebook is the project's regression suite and a user's own: each claim declares `expect`, so a
change in the engine that flips a verdict (a proof lost, a refutation gone silent) shows up as a
mismatch.  Why the exit status is about *agreement* and not about verdicts: a planted error that is
refuted as declared is a success here, while `gdof check` would exit 1 for it.

Exit status: 0 every verdict as declared; 1 some verdict differs (or a claim declares nothing);
2 bad input (a file that does not load, an empty region, no case files at all).  A bad file does not
stop the run: the others are still checked, and each problem is one line on stderr naming file and key.
Order is deterministic: arguments in the order given, files inside a folder sorted by path.
"""

from __future__ import annotations

import sys
import time
from dataclasses import dataclass, field
from pathlib import Path

from verifier.core.errors import CaseFileError, GdofError, InputError

from . import verdict_text as vt
from .bundled import bundled_name, casebook_root, default_casebook, resolve_folder, shown
from .casefile import load_case, read_toml
from .decide import decide
from .exit_codes import EXIT_INPUT, EXIT_OK, EXIT_REFUTED

STATUSES = ("proved", "refuted", "unknown")


@dataclass
class CaseRun:
    """One case file's run: (CaseClaim, Outcome) pairs, or the one-line error that stopped it."""

    path: str
    title: str = ""
    source: str = ""
    results: list = field(default_factory=list)
    seconds: float = 0.0
    error: str | None = None
    case: object = None          # the loaded workbench.casefile.Case, when it loaded

    def count(self, status: str) -> int:
        return sum(o.status == status for _, o in self.results)

    @property
    def mismatches(self) -> list:
        """(CaseClaim, Outcome) pairs whose verdict is not the declared one (or nothing is declared)."""
        return [(cc, o) for cc, o in self.results if cc.expect != o.status]


def case_files(paths) -> list[Path]:
    """The *.toml files named or found (recursively, sorted) under the given paths, each once."""
    found: list[Path] = []
    for raw in paths:
        p = Path(raw)
        if p.is_dir():
            found += sorted(p.rglob("*.toml"))
        elif p.is_file():
            found.append(p)
        else:
            raise InputError(f"{raw}: no such case file or folder")
    unique = list(dict.fromkeys(found))
    if not unique:
        raise InputError(f"no case files (*.toml) under {', '.join(map(str, paths))}")
    return unique


def run_case(path, solver: str = "z3", timeout: float = 30.0, cross_check: bool = False,
             budget: float | None = None) -> CaseRun:
    """Load one case file and decide every claim; bad input is recorded, never raised.
    `budget`: seconds per claim over all stages (verifier.core.budget)."""
    run = CaseRun(str(path))
    start = time.perf_counter()
    try:
        case = load_case(path, solver, timeout, budget)
        run.case, run.title, run.source = case, case.title, case.source
        for cc in case.claims:
            run.results.append((cc, _decide(cc, run.path, solver, timeout, cross_check, budget)))
    except GdofError as err:
        run.error = str(err)
    run.seconds = time.perf_counter() - start
    return run


def _decide(cc, path: str, solver, timeout, cross_check, budget=None):
    """decide(), with an error inside a claim (an empty region) turned into one naming file and key."""
    try:
        return decide(cc, solver, timeout, cross_check, "smt", budget)
    except CaseFileError:
        raise
    except InputError as err:
        raise CaseFileError(f"{path}: {cc.key} ('{cc.claim.name}'): {err.message}") from None


def exit_status(runs) -> int:
    if any(r.error for r in runs):
        return EXIT_INPUT
    if any(r.mismatches for r in runs):
        return EXIT_REFUTED
    return EXIT_OK


# ---------------------------------------------------------------------------------------------
# the subcommand
# ---------------------------------------------------------------------------------------------

def configure(p) -> None:
    p.add_argument("paths", nargs="*", metavar="PATH",
                   help="case files or folders, searched recursively; a name that is no local path may "
                        "name a bundled shelf or case (demo, published/suh_tse_2011.toml); default: the "
                        "bundled casebook")
    p.add_argument("--json", action="store_true", help="machine-readable output on stdout")
    p.add_argument("--list", action="store_true",
                   help="name each case file with its title instead of running it (the names that "
                        "check, report and bundle accept for bundled cases)")


def run(args) -> int:
    files = case_files([resolve_folder(p) for p in args.paths] or [default_casebook()])
    if args.list:
        print("\n".join(listing_lines(files)))
        return EXIT_OK
    runs = [run_case(f, args.solver, args.timeout, args.cross_check, getattr(args, "budget", None))
            for f in files]
    for r in runs:
        if r.error:
            print(f"gdof: error: {r.error}", file=sys.stderr)
    if args.json:
        print(vt.dumps(as_json(runs, args)))
    else:
        print("\n".join(text_lines(runs, args)))
    return exit_status(runs)


# ---------------------------------------------------------------------------------------------
# output
# ---------------------------------------------------------------------------------------------

HEADER = ("case", "claims", "proved", "refuted", "unknown", "mismatches", "time")


def _row(r: CaseRun) -> tuple:
    name = bundled_name(r.path) or r.path   # a bundled case by the name check and report accept
    if r.error:
        return (name, "-", "-", "-", "-", "ERROR", f"{r.seconds:.2f} s")
    return (name, len(r.results), r.count("proved"), r.count("refuted"), r.count("unknown"),
            len(r.mismatches), f"{r.seconds:.2f} s")


def _total_row(runs) -> tuple:
    ok = [r for r in runs if not r.error]
    return ("total", sum(len(r.results) for r in ok), *(sum(r.count(s) for r in ok) for s in STATUSES),
            sum(len(r.mismatches) for r in ok), f"{sum(r.seconds for r in runs):.2f} s")


def table_lines(rows) -> list[str]:
    widths = [max(len(str(row[i])) for row in rows) for i in range(len(HEADER))]
    out = []
    for row in rows:
        cells = [str(row[0]).ljust(widths[0])] + [str(c).rjust(w) for c, w in zip(row[1:], widths[1:])]
        out.append("  ".join(cells))
    return out


def mismatch_lines(runs) -> list[str]:
    lines = []
    for r in runs:
        for cc, o in r.mismatches:
            declared = f"declared {cc.expect}" if cc.expect else "declares no expect"
            lines.append(f"{r.path}: {cc.key} '{cc.claim.name}': {declared}, came out {o.status}")
            lines += ["    " + line for line in vt.outcome_lines(o)]
    return lines


def text_lines(runs, args) -> list[str]:
    lines = [f"Casebook: {len(runs)} case files"]
    if any(bundled_name(r.path) for r in runs):
        lines.append(f"Bundled cases from {shown(casebook_root())}")
    lines += [vt.solver_line(args.solver, args.timeout, args.cross_check), ""]
    lines += table_lines([HEADER] + [_row(r) for r in runs] + [_total_row(runs)])
    wrong = mismatch_lines(runs)
    if wrong:
        lines += ["", "Verdicts that differ from the declared ones:"] + wrong
    bad = sum(1 for r in runs if r.error)
    n_wrong = sum(len(r.mismatches) for r in runs)
    lines.append("")
    if bad:
        lines.append(f"{vt.count(bad, 'case file')} could not be checked (bad input; see the errors above).")
    lines.append("Every verdict as declared." if not n_wrong else
                 f"{vt.count(n_wrong, 'verdict')} {'differs' if n_wrong == 1 else 'differ'} from the declared ones.")
    return lines


def listing_lines(files) -> list[str]:
    """One line per case file: the name to type (relative to the bundled casebook when it is one of
    its files, else the path) and its title; a file whose TOML does not read says why."""
    rows = []
    for f in files:
        name = bundled_name(f) or str(f)
        try:
            title = read_toml(str(f))[1].get("title", "")
        except GdofError as err:
            title = f"(does not load: {err})"
        rows.append((name, title if isinstance(title, str) else ""))
    width = max(len(n) for n, _ in rows)
    return [f"{n.ljust(width)}  {t}".rstrip() for n, t in rows]


def run_json(r: CaseRun) -> dict:
    claims = [dict(vt.outcome_json(o), matches=cc.expect == o.status) for cc, o in r.results]
    return {"file": r.path, "title": r.title, "source": r.source, "error": r.error,
            "seconds": round(r.seconds, 4), "claims": claims,
            "counts": {s: r.count(s) for s in STATUSES}, "mismatches": len(r.mismatches)}


def as_json(runs, args) -> dict:
    return {"solver": args.solver, "timeout": args.timeout, "cross_check": args.cross_check,
            "versions": vt.versions(), "cases": [run_json(r) for r in runs],
            "mismatches": sum(len(r.mismatches) for r in runs),
            "errors": [r.error for r in runs if r.error], "exit_status": exit_status(runs),
            "caution": vt.CAUTION}
