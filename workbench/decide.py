"""Verdict on one case claim: coverage by regime-wise bounds, then every sub-claim.

The claim is proved only when every sub-claim is proved and every regime-wise bound it mentions
covers its region; an uncovered point is a refutation (the claim speaks of a value the scheme does not
define there), reported with the exact point.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from verifier.claims import witness_region
from verifier.errors import RegionError
from verifier.prove import PROVED, REFUTED, UNKNOWN, Verdict, prove
from verifier.smt import Query, check
from verifier.witness import DENOMINATORS


@dataclass
class Outcome:
    case_claim: object
    status: str
    verdicts: list = field(default_factory=list)     # [(label, Verdict)]
    uncovered: list = field(default_factory=list)    # [(name, point)]
    seconds: float = 0.0

    @property
    def first_failure(self) -> tuple[str, Verdict] | None:
        for label, v in self.verdicts:
            if v.status == REFUTED:
                return label, v
        return None


def uncovered_point(region, cover, names, solver, timeout):
    """A small-denominator point of `region` outside `cover`, strictly inside when possible."""
    base = Query(region, (), None, names, (cover,))
    first = check(base, solver, timeout)
    if first.status != "sat":
        return first.status, None
    for inner in (region.relative_interior(), region):
        for d in DENOMINATORS[:12]:
            a = check(Query(inner, (), d, names, (cover,)), solver, timeout)
            if a.status == "sat":
                return "sat", a.model
    return "sat", first.model


def coverage_gaps(case_claim, solver="z3", timeout=30.0) -> tuple[list, bool]:
    """([(bound name, uncovered point)], whether some coverage question stayed unknown)."""
    claim = case_claim.claim
    names = case_claim.subclaims[0][1].params if case_claim.subclaims else claim.params
    gaps, unknown = [], False
    for name, cover in case_claim.coverage:
        status, point = uncovered_point(witness_region(claim), cover, names, solver, timeout)
        if status == "sat":
            gaps.append((name, point))
        elif status != "unsat":
            unknown = True
    return gaps, unknown


def uncovered_note(gaps) -> str:
    return "; ".join(f"not covered: no regime of '{n}' contains "
                     + ", ".join(f"{k} = {v}" for k, v in p.items()) + " (a forgotten regime?)"
                     for n, p in gaps)


def decide(case_claim, solver="z3", timeout=30.0, cross_check=False) -> Outcome:
    out = Outcome(case_claim, PROVED)
    claim = case_claim.claim
    out.uncovered, unknown = coverage_gaps(case_claim, solver, timeout)
    if unknown:
        out.status = UNKNOWN
    for label, sub in case_claim.subclaims:
        try:
            v = prove(sub, solver, timeout, cross_check)
        except RegionError:
            if len(case_claim.subclaims) == 1:
                raise
            continue  # this regime does not meet the claim's region
        out.verdicts.append((label, v))
        out.seconds += v.seconds
    if not out.verdicts:
        raise RegionError(f"the region of claim '{claim.name}' meets none of the regimes it refers to")
    statuses = {v.status for _, v in out.verdicts}
    if out.uncovered or REFUTED in statuses:
        out.status = REFUTED
    elif UNKNOWN in statuses:
        out.status = UNKNOWN
    return out
