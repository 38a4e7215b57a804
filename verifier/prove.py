"""Decide one claim: proved, refuted (with a counterexample) or unknown.

The order of work is the soundness argument:
1. an empty region is bad input, not a vacuous proof;
2. the violation query goes to the solver; only 'unsat' can become 'proved';
3. a 'sat' model is re-evaluated exactly; a model that does not really violate the claim makes the
   verdict 'unknown' (a solver bug must never turn into a refutation either);
4. in cross-check mode both backends answer; sat against unsat is a loud disagreement and the verdict
   is 'unknown'.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Sequence

from .claims import Claim, violated_at, violation_query, witness_region
from .errors import RegionError
from .smt import Answer, Query, check
from .witness import Counterexample, best_counterexample

PROVED, REFUTED, UNKNOWN = "proved", "refuted", "unknown"


@dataclass(frozen=True)
class Verdict:
    claim: Claim
    status: str
    solver: str
    counterexample: Counterexample | None = None
    detail: str = ""
    seconds: float = 0.0
    answers: tuple[Answer, ...] = field(default=())


def ensure_nonempty(claim: Claim, solver: str = "z3", timeout: float = 30.0) -> None:
    """Raise RegionError when the claim's region has no point (a typo like alpha > 1, alpha < 0)."""
    answer = check(Query(witness_region(claim), (), None, claim.params), solver, timeout)
    if answer.status == "unsat":
        where = claim.name or claim.text()
        raise RegionError(f"the region '{witness_region(claim).text()}' of claim '{where}' is empty")


def _combine(answers: Sequence[Answer]) -> tuple[str, Answer | None, str]:
    statuses = {a.solver: a.status for a in answers}
    if "sat" in statuses.values() and "unsat" in statuses.values():
        said = ", ".join(f"{s} says {v}" for s, v in statuses.items())
        return UNKNOWN, None, f"SOLVERS DISAGREE ({said}); treat as unknown and report it"
    for a in answers:
        if a.status == "unsat":
            return PROVED, a, ""
    for a in answers:
        if a.status == "sat":
            return REFUTED, a, ""
    return UNKNOWN, None, "; ".join(a.detail for a in answers if a.detail) or "no decisive answer"


def prove(claim: Claim, solver: str = "z3", timeout: float = 30.0, cross_check: bool = False,
          improve_witness: bool = True) -> Verdict:
    """The verdict on one claim; see the module docstring for why each step is there."""
    ensure_nonempty(claim, solver, timeout)
    solvers = ("z3", "cvc5") if cross_check else (solver,)
    answers = tuple(check(violation_query(claim), s, timeout) for s in solvers)
    status, decisive, detail = _combine(answers)
    seconds = sum(a.seconds for a in answers)
    used = decisive.solver if decisive else "+".join(solvers)
    if status != REFUTED:
        return Verdict(claim, status, used, None, detail, seconds, answers)
    if not violated_at(claim, decisive.model):
        return Verdict(claim, UNKNOWN, used, None,
                       f"{used} returned a model that fails the exact re-check: {dict(decisive.model)}",
                       seconds, answers)
    if improve_witness:
        cex = best_counterexample(claim, decisive.model, decisive.solver, min(timeout, 10.0))
    else:
        from .witness import describe
        cex = describe(claim, decisive.model, witness_region(claim).relative_interior().contains(decisive.model),
                       "solver model")
    return Verdict(claim, REFUTED, used, cex, detail, seconds, answers)
