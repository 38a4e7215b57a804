"""The verdict on one case claim, the same for `gdof check`, `gdof report` and `gdof bundle`.

A case claim is proved by a plan of obligations that together cover its region R (verifier.core.verdicts
combines them; nothing here or in the commands combines verdicts by hand):
- for every bound given regime by regime that the claim mentions, "its regimes cover R": the claim
  says nothing where the scheme is undefined, so an uncovered point refutes it (a forgotten regime);
- for every combination of regimes (or the one claim, when each such bound has a verified min/max
  form), "the claim holds on R within those regimes".  A combination whose sub-region is empty is
  proved by that emptiness.
Given the coverage obligations, the sub-regions' union is R, so all obligations proved means the
claim holds on all of R.  The method decides the sub-claims: 'smt' (the one-shot query, `check`)
or 'regimes' (the region-wise proof, `report` and `bundle`, which also keeps what it found for the
report).  Every stage draws on one Budget for the whole case claim.
"""

from __future__ import annotations

from verifier.claims.kinds import claim_points, violated_at
from verifier.claims.one_shot import Verdict, prove
from verifier.claims.witness import best_point
from verifier.core.budget import Budget, OutOfBudget
from verifier.core.errors import RegionError
from verifier.core.verdicts import PROVED, REFUTED, UNKNOWN, Obligation, all_of
from verifier.expressions.expr import param
from verifier.expressions.region import Region, atoms_of
from verifier.solvers.smt import Query, check

from .outcome import Outcome, Part


def claim_space_region(claim) -> Region:
    """The set of points a claim speaks about, in its own parameters (a reduces-to claim: its slice)."""
    region = claim.region
    if claim.kind == "reduces-to":
        fixed = [a for n, v in claim.values for a in atoms_of(param(n), "==", v)]
        region = region.meet(Region.of(*fixed))
    return region


def uncovered_point(region, cover, names, solver, budget: Budget):
    """('unsat', None) when `cover` contains `region`, else ('sat', the best point of the region
    outside it by the counterexample ranking of verifier.claims.witness) or ('unknown', None)."""
    first = check(Query(region, (), None, names, (cover,)), solver, budget.timeout("coverage"))
    if first.status != "sat":
        return first.status, None

    def valid(p):
        return region.contains(p) and not cover.contains(p)
    try:
        got = best_point(lambda r, grid: Query(r, (), grid, names, (cover,)), valid, names, region,
                         solver, budget)
    except OutOfBudget:
        got = None
    return "sat", (got[0] if got is not None else dict(first.model))


def _coverage(case_claim, solver, budget) -> list[Obligation]:
    claim = case_claim.claim
    region = claim_space_region(claim)
    placeholders = {name for name, _ in case_claim.coverage}
    names = set(region.params())
    for _, sub in case_claim.subclaims:
        names |= set(sub.params)
    for _, cover in case_claim.coverage:
        names |= set(cover.params())
    names = tuple(sorted(names - placeholders))
    out = []
    for name, cover in case_claim.coverage:
        what = f"the regimes of '{name}' cover the claim's region"
        query = Query(region, (), None, names, (cover,))
        try:
            status, point = uncovered_point(region, cover, names, solver, budget)
        except OutOfBudget as exc:
            out.append(Obligation(what, UNKNOWN, str(exc), query=query))
            continue
        if status == "unsat":
            out.append(Obligation(what, PROVED, query=query))
        elif status == "sat":
            def recheck(p=point, cover=cover):
                return region.contains(p) and claim.region.contains(p) and not cover.contains(p)
            out.append(Obligation(what, REFUTED, f"not covered: no regime of '{name}' contains "
                                  + ", ".join(f"{k} = {v}" for k, v in point.items()) + " (a forgotten regime?)",
                                  recheck, query, (name, point)))
        else:
            out.append(Obligation(what, UNKNOWN, "the solver could not decide coverage "
                                  f"(timeout {budget.query_timeout:g} s per query)", query=query))
    return out


def _refutation_check(case_claim, sub, result):
    """An exact re-check of the part's first counterexample against the sub-claim and R."""
    def recheck():
        cex = result.counterexample if isinstance(result, Verdict) else \
            (result.counterexamples[0] if result.counterexamples else None)
        if cex is None:
            return False
        points = claim_points(sub, cex.point)
        return violated_at(sub, cex.point) and bool(points) and \
            all(case_claim.claim.region.contains(x) for x in points)
    return recheck


def _part(case_claim, label, sub, method, solver, budget, cross_check, workers, progress, raise_empty):
    """(Part, Obligation); the Part is marked empty when its sub-region is (re-raised when
    `raise_empty`: the claim's own region is empty, bad input, never a vacuous proof)."""
    what = f"the claim holds{' on ' + label if label else ''}"
    try:
        if method == "regimes":
            from verifier.regimes.proof import prove_by_regimes
            result = prove_by_regimes(sub, solver, budget.query_timeout, cross_check, workers,
                                      progress(sub.name or label) if progress else None, budget=budget)
        else:
            result = prove(sub, solver, budget.query_timeout, cross_check, budget=budget)
    except RegionError as err:
        if raise_empty:
            raise
        return Part(label, sub, None, True), Obligation(what, PROVED, f"the sub-region is empty ({err})")
    except OutOfBudget as exc:
        return None, Obligation(what, UNKNOWN, str(exc))
    from verifier.claims.kinds import violation_query
    ob = Obligation(what, result.status, result.detail, _refutation_check(case_claim, sub, result),
                    violation_query(sub), result)
    return Part(label, sub, result), ob


def decide(case_claim, solver="z3", timeout=30.0, cross_check=False, method="smt", budget=None,
           workers=1, progress=None) -> Outcome:
    """Decide a case claim by its plan of obligations (module docstring); `budget` in seconds."""
    from verifier.rates.claims import RateClaim
    if isinstance(case_claim.claim, RateClaim):   # claims about rate regions: workbench.rate_decide
        from .rate_decide import decide_rates
        return decide_rates(case_claim, solver, timeout, cross_check, method, budget, workers, progress)
    clock = Budget.of(None, timeout, budget)
    out = Outcome(case_claim, UNKNOWN)
    obligations = _coverage(case_claim, solver, clock)
    out.uncovered = [ob.evidence for ob in obligations if ob.status == REFUTED and ob.evidence]
    blocked = case_claim.blocked
    if blocked:
        obligations.append(Obligation("the claim can be stated with one formula", UNKNOWN, blocked))
    empty = 0
    for label, sub in case_claim.subclaims:
        part, ob = _part(case_claim, label, sub, method, solver, clock, cross_check, workers, progress,
                         len(case_claim.subclaims) == 1 and not out.uncovered)
        obligations.append(ob)
        if part is not None and part.empty:
            empty += 1
        elif part is not None:
            out.parts.append(part)
    if case_claim.subclaims and empty == len(case_claim.subclaims) and not out.uncovered:
        raise RegionError(f"the region of claim '{case_claim.claim.name}' meets none of the regimes it "
                          "refers to (is it empty?)")
    combined = all_of(obligations)
    out.status, out.obligations = combined.status, combined.obligations
    if combined.status == UNKNOWN:   # the parts show their own details; say what else is open
        shown = {id(p.result) for p in out.parts}
        out.notes = [f"{ob.what}: {ob.reason or 'undecided'}" for ob in obligations
                     if ob.status != PROVED and id(ob.evidence) not in shown]
    else:   # a refutation explains itself; keep only the loud notes
        out.notes = [ob.reason for ob in obligations if "DISAGREE" in ob.reason]
    out.seconds = clock.spent()
    return out


def uncovered_note(gaps) -> str:
    return "; ".join(f"not covered: no regime of '{n}' contains "
                     + ", ".join(f"{k} = {v}" for k, v in p.items()) + " (a forgotten regime?)"
                     for n, p in gaps)
