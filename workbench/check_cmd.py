"""`gdof check CASE.toml`: one verdict per claim, counterexamples in exact rationals."""

from __future__ import annotations

from verifier.core.errors import InputError

from . import verdict_text as vt
from .bundled import CASE_HELP, resolve_case
from .casefile import load_case
from .decide import decide
from .exit_codes import exit_code
from verifier.core.verdicts import tally, tally_sentence


def configure(p) -> None:
    p.add_argument("case", help=CASE_HELP)
    p.add_argument("--json", action="store_true", help="machine-readable output on stdout")
    p.add_argument("--claim", action="append", default=[], metavar="NAME",
                   help="check only the named claim, or the one claim whose name starts so (repeatable)")


def select(case, names):
    """The claims named by --claim: an exact name, else a unique prefix of one (names are long)."""
    from .output_target import shown_path
    if not names:
        return case.claims
    available = [c.claim.name for c in case.claims]
    wanted = set()
    for name in names:
        hits = [n for n in available if n == name] or [n for n in available if n.startswith(name)]
        if not hits:
            listing = "; ".join(f"'{n}'" for n in available) or "none"
            raise InputError(f"--claim '{name}': no claim of that name in {shown_path(case.path)} "
                             f"(claims: {listing})")
        if len(set(hits)) > 1:
            raise InputError(f"--claim '{name}' matches several claims of {shown_path(case.path)}: "
                             + "; ".join(f"'{n}'" for n in dict.fromkeys(hits)))
        wanted.add(hits[0])
    return [c for c in case.claims if c.claim.name in wanted]


def run(args) -> int:
    args.case = resolve_case(args.case)   # a local file, else a bundled case of that name
    case = load_case(args.case, args.solver, args.timeout, getattr(args, "budget", None))
    outcomes = [decide(cc, args.solver, args.timeout, args.cross_check, "smt", getattr(args, "budget", None))
                for cc in select(case, args.claim)]
    if args.json:
        print(vt.dumps(as_json(case, outcomes, args)))
    else:
        print("\n".join(text_lines(case, outcomes, args)))
    return exit_code(o.status for o in outcomes)


def header_lines(case, args) -> list[str]:
    lines = [f"Case: {case.title}   ({case.path})"]
    if case.source:
        lines.append(f"Source: {case.source}")
    lines += [f"Assumed region: {case.assume.text()}",
              vt.solver_line(args.solver, args.timeout, args.cross_check), ""]
    for r in case.regime_checks:
        how = "one continuous function, used in min/max form" if r.expr is not None else \
              f"not one continuous function ({r.detail}); claims split by regime"
        lines.append(f"Regime-wise bound {r.name}: {len(r.pieces)} regimes; {how}.")
    return lines + ([""] if case.regime_checks else [])


def text_lines(case, outcomes, args) -> list[str]:
    lines = header_lines(case, args)
    for o in outcomes:
        lines += vt.outcome_lines(o) + [""]
    lines.append(tally_sentence(tally(o.status for o in outcomes)))
    lines.append(vt.CAUTION)
    return lines


def as_json(case, outcomes, args) -> dict:
    return {"case": case.title, "file": case.path, "source": case.source,
            "assumed_region": case.assume.text(), "solver": args.solver,
            "cross_check": args.cross_check, "timeout": args.timeout, "versions": vt.versions(),
            "claims": [vt.outcome_json(o) for o in outcomes], "caution": vt.CAUTION}
