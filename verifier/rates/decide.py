"""Decide a RateClaim: proved, refuted (an exponent point AND a rate tuple) or unknown.

The soundness argument, in the order of the work:
1. the claim's exponent region must have a point (an empty one is bad input, never a vacuous proof);
2. the claim becomes a plan of obligations (queries.py), which together are the claim: every
   constraint of the containing region for every rate tuple or corner of the other, or (max) the
   scalar claim on the support formula (support.py) plus the well-formedness it relies on;
3. each obligation is one verifier.solvers.smt query per backend; verifier.core.verdicts.backends turns the answers
   into its status (only unsat from every backend asked proves; a model must pass the exact re-check
   of queries.py, in the claim's own region, to refute); a well-formedness obligation whose query is
   sat is unknown, not refuted;
4. verifier.core.verdicts.all_of combines them (unknown dominates proved, a re-checked refutation wins);
5. the witness shown is chosen by verifier.claims.witness.best_point (small denominators, strictly inside R);
6. everything runs in the claim's Budget; running out (or a named size limit) is unknown.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from fractions import Fraction

from verifier.claims.kinds import Side, relation, violated_at, violation_query
from verifier.claims.one_shot import Verdict, prove
from verifier.claims.witness import best_point
from verifier.core.budget import Budget, OutOfBudget
from verifier.core.errors import RegionError
from verifier.core.verdicts import PROVED, REFUTED, UNKNOWN, Obligation, all_of, backends
from verifier.expressions.expr import evaluate, format_number, to_text
from verifier.solvers.smt import Query, check

from verifier.rates import queries as Q
from verifier.rates.claims import RateClaim
from verifier.rates.region import HRegion, VRegion
from verifier.rates.support import optimum_at, support_expr

STAGE = "rate region query"


@dataclass(frozen=True)
class RateVerdict:
    claim: RateClaim
    status: str
    obligations: tuple[Obligation, ...] = ()
    witness: Q.RateWitness | None = None
    detail: str = ""
    scalar: Verdict | None = None     # the support-formula claim behind a 'max' claim
    seconds: float = 0.0

    def lines(self) -> list[str]:
        out = [f"{self.claim.name or 'claim'} -- {self.status}", f"    {self.claim.text()}"]
        if self.detail:
            out.append(f"    note: {self.detail}")
        if self.witness is not None:
            out += ["    " + line for line in self.witness.lines()]
        return out

    def __str__(self) -> str:
        return "\n".join(self.lines())


def exponents_of(claim: RateClaim) -> tuple[str, ...]:
    return tuple(claim.params)


def plan(claim: RateClaim) -> list[Q.Check]:
    """The checks whose violation queries together decide a set-kind claim (or the well-formedness
    checks of a 'max' claim)."""
    R, exps = claim.region, exponents_of(claim)
    a, b = claim.first, claim.second
    if claim.kind == "region contains":
        point = VRegion("the point", a.rates, (claim.point,))
        return Q.corners_inside_h(point, a, R, exps, "point")
    if claim.kind == "region max":
        if isinstance(a, HRegion):
            return Q.zero_inside(a, R, exps)
        return Q.corners_nonnegative(a, R, exps) if a.free_disposal else []
    pairs = [(a, b)] if claim.kind == "region subset" else [(a, b), (b, a)]
    out: list[Q.Check] = []
    for region in (a, b):
        if isinstance(region, VRegion) and region.free_disposal:
            out += Q.corners_nonnegative(region, R, exps)
    for inner, outer in pairs:
        out += inclusion(inner, outer, R, exps)
    return out


def inclusion(inner, outer, R, exps) -> list[Q.Check]:
    if isinstance(outer, HRegion):
        if isinstance(inner, HRegion):
            return Q.h_inside_h(inner, outer, R, exps)
        return Q.corners_inside_h(inner, outer, R, exps)
    return Q.h_inside_corners(inner, outer, R, exps)


def run_check(c: Q.Check, solvers, budget: Budget) -> Obligation:
    """One obligation from one check (rule 2 of verifier.core.verdicts for the backends)."""
    try:
        answers = [check(c.query, s, budget.timeout(STAGE)) for s in solvers]
    except OutOfBudget as exc:
        return Obligation(c.what, UNKNOWN, str(exc), query=c.query)
    rechecks = {a.solver: a.status == "sat" and c.valid(a.model) for a in answers}
    status, decisive, note = backends(answers, rechecks)
    if status != REFUTED:
        return Obligation(c.what, status, note, query=c.query)
    point = dict(decisive.model)
    story = c.witness(point).story
    if not c.refutes:
        return Obligation(c.what, UNKNOWN, f"{story} (at {_at(c.split(point)[0])})", query=c.query)
    return Obligation(c.what, REFUTED, note or story, lambda: c.valid(point), c.query, (c, point))


def _at(theta) -> str:
    return ", ".join(f"{k} = {format_number(v)}" for k, v in theta.items())


def best_witness(c: Q.Check, point, R, solver, budget: Budget) -> Q.RateWitness:
    """The refuting pair to print: the ranking of verifier.claims.witness over (exponents, rates)."""
    label = "solver model"
    try:
        got = best_point(lambda region, grid: replace(c.query, region=region, grid=grid), c.valid,
                         c.names, R, solver, budget)
        if got is not None:
            point, label = got
    except OutOfBudget:
        label = "solver model: the search for a simpler point ran out of time"
    w = c.witness(point)
    inside = R.relative_interior().contains(w.theta)
    return replace(w, strictly_inside=inside, origin=label)


def ensure_nonempty(claim: RateClaim, solver: str, budget: Budget) -> str:
    answer = check(Query(claim.region, (), None, exponents_of(claim)), solver, budget.timeout("region check"))
    if answer.status == "unsat":
        raise RegionError(f"the region '{claim.region.text()}' of claim '{claim.name or claim.text()}' is empty")
    return answer.status


def first_counterexample(result):
    """The counterexample of a one-shot Verdict or the best one of a region-wise RegimeProof."""
    if hasattr(result, "counterexample"):
        return result.counterexample
    found = getattr(result, "counterexamples", None)
    return found[0] if found else None


def scalar_claim(claim: RateClaim):
    """The 'max' claim as an ordinary verifier claim on the support formula (support.py)."""
    h = support_expr(claim.first, claim.weights)
    side = Side(h, f"max of {claim.weights_text()} over {claim.first.name}")
    return relation(side, claim.rel, Side(claim.formula), claim.region, claim.name)


def _theta(claim: RateClaim, cex) -> dict:
    return {n: Fraction(cex.point[n]) for n in exponents_of(claim) if n in cex.point}


def max_refutes(claim: RateClaim, scalar_claim_, result) -> bool:
    """The exact re-check of a refuted 'max' claim: the scalar counterexample violates the scalar
    claim in its region, AND the maximum computed again at that point by exact LP (or over the
    corners) equals the support formula there and violates the claimed relation.  The second part
    does not trust the duality argument: where the region is empty, or the formula were wrong, the
    refutation does not count (verifier.core.verdicts then says unknown)."""
    cex = first_counterexample(result)
    if cex is None or not violated_at(scalar_claim_, cex.point):
        return False
    theta = _theta(claim, cex)
    best = optimum_at(claim.first, claim.weights, theta)
    if best is None or best.value != cex.lhs_value:
        return False
    return not _holds(best.value, claim.rel, evaluate(claim.formula, theta))


def _holds(a, rel: str, b) -> bool:
    return {"<": a < b, "<=": a <= b, "==": a == b, ">=": a >= b, ">": a > b}[rel]


def max_witness(claim: RateClaim, verdict: Verdict) -> Q.RateWitness:
    """The optimising rate tuple at the (re-checked, see max_refutes) scalar counterexample."""
    cex = first_counterexample(verdict)
    theta = _theta(claim, cex)
    best = optimum_at(claim.first, claim.weights, theta)
    story = (f"max of {claim.weights_text()} over {claim.first.name} here is {format_number(best.value)} "
             f"(attained at this rate tuple; {best.certificate}); {to_text(claim.formula)} = "
             f"{format_number(cex.rhs_value)}, so '{claim.rel}' fails")
    return Q.RateWitness(theta, best.rates, story, cex.strictly_inside, cex.origin)


def decide(claim: RateClaim, solver: str = "z3", timeout: float = 30.0, cross_check: bool = False,
           budget: Budget | None = None, scalar_decider=None, improve_witness: bool = True) -> RateVerdict:
    """The verdict (module docstring).  `scalar_decider(claim, budget)`: how a 'max' claim's scalar
    claim is decided (default verifier.claims.one_shot.prove; the workbench passes the region-wise prover).
    `improve_witness=False` keeps the solver's refuting pair (re-checked all the same): for tests."""
    budget = Budget.of(budget, timeout)
    if claim.kind == "region redundant":
        from verifier.rates.claims import without_facet
        verdict = decide(without_facet(claim), solver, timeout, cross_check, budget, scalar_decider,
                         improve_witness)
        return replace(verdict, claim=claim)
    solvers = ("z3", "cvc5") if cross_check else (solver,)
    try:
        region_status = ensure_nonempty(claim, solvers[0], budget)
        checks = plan(claim)
    except OutOfBudget as exc:
        return RateVerdict(claim, UNKNOWN, (), None, str(exc), seconds=budget.spent())
    obligations = [run_check(c, solvers, budget) for c in checks]
    scalar = None
    if claim.kind == "region max":
        try:
            sc = scalar_claim(claim)
        except OutOfBudget as exc:
            return RateVerdict(claim, UNKNOWN, tuple(obligations), None, str(exc), seconds=budget.spent())
        decider = scalar_decider or (lambda c, b: prove(c, solver, timeout, cross_check, improve_witness, b))
        scalar = decider(sc, budget)
        obligations.append(Obligation(f"the maximum {claim.rel} {to_text(claim.formula)}", scalar.status,
                                      scalar.detail, lambda: max_refutes(claim, sc, scalar),
                                      violation_query(sc), scalar))
    combined = all_of(obligations)
    status, notes = combined.status, list(combined.notes)
    if status == PROVED and region_status != "sat":
        status, notes = UNKNOWN, ["the solver could not decide whether the region is empty"]
    witness = None
    if status == REFUTED:
        notes = [n for n in notes if "DISAGREE" in n]
        first = next(ob for ob in obligations if ob.status == REFUTED and ob.recheck and ob.recheck())
        if isinstance(first.evidence, tuple):
            c, point = first.evidence
            witness = best_witness(c, point, claim.region, solvers[0], budget) if improve_witness else \
                replace(c.witness(point), strictly_inside=claim.region.relative_interior().contains(
                    c.split(point)[0]))
        else:
            witness = max_witness(claim, first.evidence)
    return RateVerdict(claim, status, tuple(obligations), witness, "; ".join(notes), scalar, budget.spent())
