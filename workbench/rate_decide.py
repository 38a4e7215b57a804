"""The verdict on a case claim about rate regions, in the Outcome shape `check`, `report` and the
casebook runner already display.

Why a module of its own: the plan of obligations is the engine's (verifier.rates.decide, combined by
verifier.core.verdicts); here only the method is chosen for the scalar claim behind a 'max' claim -- the
one-shot query for `check`, the region-wise prover for `report`, whose regime table then shows the
support formula against the claimed one -- and the result is packed into a workbench.decide.Outcome.
"""

from __future__ import annotations

from verifier.core.budget import Budget
from verifier.rates.decide import decide as decide_claim

from .outcome import Outcome, Part


def decide_rates(case_claim, solver="z3", timeout=30.0, cross_check=False, method="smt", budget=None,
                 workers=1, progress=None) -> Outcome:
    clock = Budget.of(None, timeout, budget)
    def by_regimes(claim, b, exact_sets=True):
        from verifier.regimes.proof import prove_by_regimes
        return prove_by_regimes(claim, solver, b.query_timeout, cross_check, workers,
                                progress(claim.name) if progress else None, budget=b,
                                exact_sets=exact_sets)

    def for_facets(claim, b):      # the facet listing reads failure sets only
        return by_regimes(claim, b, exact_sets=False)
    scalar_decider = by_regimes if method == "regimes" else None
    verdict = decide_claim(case_claim.claim, solver, timeout, cross_check, clock, scalar_decider)
    out = Outcome(case_claim, verdict.status, obligations=verdict.obligations, seconds=clock.spent())
    if verdict.scalar is not None:
        out.parts.append(Part("", verdict.scalar.claim, verdict.scalar))
    if verdict.detail:
        out.notes.append(verdict.detail)
    if verdict.status == "unknown":
        out.notes += [f"{ob.what}: {ob.reason or 'undecided'}" for ob in verdict.obligations
                      if ob.status != "proved" and ob.reason not in out.notes]
    out.rate_witness = verdict.witness
    if method == "regimes":          # the report also says where each inequality is a facet
        out.notes += facet_notes(case_claim.claim, for_facets, clock)
        from .rate_report import region_regimes_of
        out.rate_regimes = region_regimes_of(case_claim.claim, clock)
    return out


def facet_notes(claim, decide_scalar, clock: Budget) -> list[str]:
    """For each region given by inequalities in the claim: where each inequality is a facet, exactly
    (verifier.rates.facets).  Display only: it never changes the claim's verdict."""
    from verifier.rates.facets import activity_lines, facet_activity
    from verifier.rates.region import HRegion
    lines: list[str] = []
    seen: set[str] = set()
    for region in (claim.first, claim.second):
        if isinstance(region, HRegion) and region.name not in seen:
            seen.add(region.name)
            lines += activity_lines(region, facet_activity(region, claim.region, decide_scalar, clock))
    return lines
