"""Decide one claim with the one-shot query: proved, refuted (with a counterexample) or unknown.

The order of work is the soundness argument:
1. an empty region is bad input, not a vacuous proof (and a region whose emptiness the solver cannot
   decide is no proof either);
2. the violation query goes to the solver(s); only 'unsat' from every backend asked can become
   'proved' (verifier.core.verdicts, rule 2);
3. a 'sat' model is re-evaluated exactly, in the claim's own region; a model that does not really
   violate the claim never becomes a refutation (a solver bug must not turn into one either);
4. the counterexample shown is chosen by the one ranking of verifier.claims.witness;
5. all of it runs inside the claim's Budget: running out is 'unknown' naming the stage.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from verifier.claims.kinds import Claim, violated_at, violation_query, witness_region
from verifier.claims.witness import Counterexample, best_counterexample, describe
from verifier.core.budget import Budget, OutOfBudget
from verifier.core.errors import RegionError
from verifier.core.verdicts import PROVED, REFUTED, UNKNOWN, backends
from verifier.solvers.smt import Answer, Query, check

__all__ = ["PROVED", "REFUTED", "UNKNOWN", "Verdict", "prove", "ensure_nonempty"]


@dataclass(frozen=True)
class Verdict:
    claim: Claim
    status: str
    solver: str
    counterexample: Counterexample | None = None
    detail: str = ""
    seconds: float = 0.0
    answers: tuple[Answer, ...] = field(default=())

    def __str__(self) -> str:
        head = f"{self.claim.name + ': ' if self.claim.name else ''}{self.status}: {self.claim.text()}"
        if self.counterexample is not None:
            head += f"\n  counterexample: {self.counterexample}"
        if self.detail:
            head += f"\n  note: {self.detail}"
        return head


def ensure_nonempty(claim: Claim, solver: str = "z3", timeout: float = 30.0,
                    budget: Budget | None = None) -> str:
    """Raise RegionError when the claim's region has no point (a typo like alpha > 1, alpha < 0).

    Returns the solver's status ('sat', or 'unknown' when it could not tell)."""
    budget = Budget.of(budget, timeout)
    region = witness_region(claim)
    answer = check(Query(region, (), None, claim.params), solver, budget.timeout("region check"))
    if answer.status == "unsat":
        where = claim.name or claim.text()
        raise RegionError(f"the region '{region.text()}' of claim '{where}' is empty")
    return answer.status


def prove(claim: Claim, solver: str = "z3", timeout: float = 30.0, cross_check: bool = False,
          improve_witness: bool = True, budget: Budget | None = None) -> Verdict:
    """The verdict on one claim; see the module docstring for why each step is there.

    `budget` is the claim's whole time (default: a fresh Budget with `timeout` per query)."""
    budget = Budget.of(budget, timeout)
    solvers = ("z3", "cvc5") if cross_check else (solver,)
    answers: list[Answer] = []
    try:
        region_status = ensure_nonempty(claim, solvers[0], timeout, budget)
        query = violation_query(claim)
        for s in solvers:
            answers.append(check(query, s, budget.timeout("solver query")))
    except OutOfBudget as exc:
        return Verdict(claim, UNKNOWN, "+".join(solvers), None, str(exc), budget.spent(), tuple(answers))
    rechecks = {a.solver: a.status == "sat" and violated_at(claim, a.model) for a in answers}
    status, decisive, detail = backends(answers, rechecks)
    if status == PROVED and region_status != "sat":
        status, detail = UNKNOWN, "the solver could not decide whether the region is empty"
    seconds = sum(a.seconds for a in answers)
    used = decisive.solver if decisive else "+".join(solvers)
    if status != REFUTED:
        return Verdict(claim, status, used, None, detail, seconds, tuple(answers))
    if improve_witness:
        cex = best_counterexample(claim, decisive.model, decisive.solver, budget)
    else:
        cex = describe(claim, decisive.model, "solver model")
    return Verdict(claim, REFUTED, used, cex, detail, budget.spent(), tuple(answers))
