"""The verdict algebra: the only place where verdicts are combined.

Why one module: a claim's verdict is assembled from many answers (two solvers, the sub-claims of a
scheme given regime by regime, the coverage of those regimes, the cells of the region-wise proof, the
region-wise method against the one-shot query).  When each caller combined them its own way, a
dropped "unknown" once printed a false "proved".  Every combination now goes through these rules:

1. Obligations (all must hold).  A claim is proved only when it has at least one obligation and
   every obligation is proved; the obligations of a plan must together cover the claimed region
   (coverage of regime-wise definitions is an obligation of its own, never a side query).
   "unknown" dominates "proved".  "refuted" needs a refuting point that re-checks exactly (the
   obligation carries the re-check); a refutation whose point fails it counts as unknown.
   A re-checked refutation dominates everything: the claim is false whatever else was undecided.
2. Backends (two solvers on one query, `--cross-check`).  A sat model that re-checks exactly refutes
   (a backend saying unsat at the same time is a defect, reported loudly); otherwise proved only when
   every backend asked says unsat; anything else is unknown.
3. Methods (the region-wise proof and the one-shot query decide the same claim independently).
   One complete proof suffices; a re-checked refutation beats a proof, loudly, because an exactly
   evaluated point is the most basic fact the tool has; otherwise unknown.
4. Reports: the status of several claims together (exit codes, tallies) is refuted if any is, else
   unknown if any is, else proved.

Renderers and the command line only display what these functions return.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Callable, Iterable, Mapping, Sequence

PROVED, REFUTED, UNKNOWN = "proved", "refuted", "unknown"
STATUSES = (PROVED, REFUTED, UNKNOWN)

CAUTION = ("GDoF statements are asymptotic in SNR: a verdict here says nothing about rates at any "
           "finite SNR, and it covers only the claim exactly as encoded.")


@dataclass(frozen=True)
class Obligation:
    """One thing that must be proved for the claim to be proved.

    `what`: the obligation in words; `status`: its own verdict; `reason`: why it is unknown (stage,
    solver) or what refuted it; `recheck`: for a refutation, an exact re-check of its point (True
    when the point is in the claim's region and really refutes); `query`: the SMT question behind it
    (exported as SMT-LIB in bundles); `evidence`: whatever the caller keeps (a Verdict, a point)."""

    what: str
    status: str
    reason: str = ""
    recheck: Callable[[], bool] | None = field(default=None, compare=False, repr=False)
    query: object = field(default=None, compare=False, repr=False)
    evidence: object = field(default=None, compare=False, repr=False)

    def __post_init__(self):
        if self.status not in STATUSES:
            raise ValueError(f"unknown status '{self.status}'")


@dataclass(frozen=True)
class Combined:
    """A combined verdict: status, the notes that explain it, and the obligations behind it."""

    status: str
    notes: tuple[str, ...] = ()
    obligations: tuple[Obligation, ...] = ()

    @property
    def detail(self) -> str:
        return "; ".join(self.notes)


def _refutes(ob: Obligation) -> bool:
    return ob.status == REFUTED and ob.recheck is not None and bool(ob.recheck())


def all_of(obligations: Sequence[Obligation]) -> Combined:
    """Rule 1: every obligation must be proved; see the module docstring."""
    obligations = tuple(obligations)
    if not obligations:
        return Combined(UNKNOWN, ("nothing was proved: the claim has no obligation",), obligations)
    refuted = [ob for ob in obligations if _refutes(ob)]
    if refuted:
        return Combined(REFUTED, tuple(ob.reason or ob.what for ob in refuted), obligations)
    open_ = [ob for ob in obligations if ob.status != PROVED]
    if open_:
        notes = []
        for ob in open_:
            if ob.status == REFUTED:
                notes.append(f"{ob.what}: a refuting point failed the exact re-check")
            else:
                notes.append(f"{ob.what}: {ob.reason or 'undecided'}")
        return Combined(UNKNOWN, tuple(dict.fromkeys(notes)), obligations)
    return Combined(PROVED, (), obligations)


def backends(answers: Sequence, rechecks: Mapping[str, bool]) -> tuple[str, object, str]:
    """Rule 2.  `answers`: smt.Answer per backend; `rechecks[solver]`: its sat model re-checked.

    Returns (status, the decisive answer or None, note)."""
    verified = [a for a in answers if a.status == "sat" and rechecks.get(a.solver)]
    unsat = [a for a in answers if a.status == "unsat"]
    if verified:
        note = ""
        if unsat:
            said = ", ".join(f"{a.solver} says unsat" for a in unsat)
            note = (f"SOLVERS DISAGREE ({said}, but {verified[0].solver}'s point re-checks exactly): "
                    "a backend defect; please report it")
        return REFUTED, verified[0], note
    if answers and len(unsat) == len(answers):
        return PROVED, unsat[0], ""
    notes = []
    for a in answers:
        if a.status == "sat":
            notes.append(f"{a.solver} returned a model that fails the exact re-check: {dict(a.model or {})}")
        elif a.status != "unsat":
            notes.append(a.detail or f"{a.solver}: no decisive answer")
    if unsat:
        notes.append(f"{', '.join(a.solver for a in unsat)} said unsat; a proof needs every backend asked")
    return UNKNOWN, None, "; ".join(notes) or "no decisive answer"


def methods(first: tuple[str, str], second: tuple[str, str], refuting_checked: bool) -> tuple[str, str]:
    """Rule 3 for two methods (name, status); `refuting_checked`: the refuting point re-checks.

    Returns (status, note)."""
    (a, sa), (b, sb) = first, second
    statuses = {sa, sb}
    if REFUTED in statuses and refuting_checked:
        if PROVED in statuses:
            who = a if sa == PROVED else b
            return REFUTED, (f"METHODS DISAGREE: {who} said proved, but the counterexample re-checks "
                             "exactly; an engine defect, please report it")
        return REFUTED, ""
    if PROVED in statuses:
        if REFUTED in statuses:
            return UNKNOWN, "METHODS DISAGREE and the refuting point fails the exact re-check"
        other = b if sa == PROVED else a
        note = "" if statuses == {PROVED} else f"proved by {a if sa == PROVED else b}; {other} undecided"
        return PROVED, note
    return UNKNOWN, ""


def overall(statuses: Iterable[str]) -> str:
    """Rule 4: several claims together (exit status, tallies)."""
    statuses = list(statuses)
    if REFUTED in statuses:
        return REFUTED
    if UNKNOWN in statuses or not statuses:
        return UNKNOWN
    return PROVED


def tally(statuses: Iterable[str]) -> dict[str, int]:
    statuses = list(statuses)
    return {s: statuses.count(s) for s in (PROVED, REFUTED, UNKNOWN)}


def tally_sentence(counts: Mapping[str, int]) -> str:
    """The closing sentence of a run: 'Of 8 claims, 5 are proved, 2 refuted and 1 undecided.'"""
    total = sum(counts.values())
    if total == 0:
        return "No claims were checked."
    if total == 1:
        status = next(s for s, n in counts.items() if n)
        word = "undecided (unknown)" if status == UNKNOWN else status
        return f"The one claim is {word}."
    parts = [f"{counts[PROVED]} proved", f"{counts[REFUTED]} refuted", f"{counts[UNKNOWN]} undecided"]
    return f"Of {total} claims, {parts[0].split()[0]} {'is' if counts[PROVED] == 1 else 'are'} proved, " \
           f"{parts[1]} and {parts[2]}."
