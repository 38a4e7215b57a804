"""Functions given regime by regime, as papers state achievable schemes.

"d = 1 - alpha for alpha <= 1/2; alpha for 1/2 <= alpha <= 2/3; ..." is turned into one min/max
expression so that every other stage can use it, and the definition itself is checked:

- coverage: every point of the assumed region lies in some regime (a forgotten regime is reported
  with an exact uncovered point);
- consistency: where two regimes overlap, their formulas agree;
- the min/max form: a continuous piecewise-linear function with affine pieces g_1..g_m is
  max_i min_{j in S_i} g_j with S_i = {j : g_j >= g_i on regime i} (Ovchinnikov, "Max-min
  representation of piecewise linear functions", Beitraege zur Algebra und Geometrie 43(1), 2002).
  The construction is only a candidate: it is accepted after the solver proves that it equals each
  regime's formula on that regime, so a discontinuous or non-affine definition is refused, never
  silently misread.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Mapping, Sequence

from verifier.core.errors import InputError
from verifier.expressions.expr import Affine, Expr, evaluate, format_number, max_, min_, to_text
from verifier.expressions.region import Region
from verifier.solvers.smt import Query, check


@dataclass(frozen=True)
class Piece:
    formula: Expr
    where: Region


@dataclass(frozen=True)
class PiecewiseCheck:
    """Result of checking a regime-by-regime definition against the assumed region.

    `form`: 'proved' (expr is the verified min/max form), 'refuted' (the definition is provably not
    one continuous function: a jump, or regimes disagreeing on an overlap) or 'unknown' (the solver
    or the time budget could not decide; claims are then split regime by regime, which is exact)."""

    name: str
    covered: str                      # 'proved' | 'refuted' | 'unknown'
    uncovered_point: Mapping[str, Fraction] | None
    expr: Expr | None                 # the equivalent min/max form, when it exists
    detail: str = ""                  # why there is no min/max form
    pieces: tuple[Piece, ...] = ()
    form: str = "proved"


class FormUndecided(Exception):
    """The min/max form could be neither confirmed nor refuted (solver unknown, budget spent)."""


def _feasible(query: Query, solver: str, timeout) -> str:
    return check(query, solver, _seconds(timeout)).status


def _seconds(timeout) -> float:
    """A per-query timeout from a number or a verifier.core.budget.Budget (which raises when spent)."""
    return timeout.timeout("regime-wise definitions") if hasattr(timeout, "timeout") else timeout


def uncovered_point(pieces: Sequence[Piece], domain: Region, solver="z3", timeout=30.0):
    """('unsat', None) if the regimes cover the domain, else ('sat', point) or ('unknown', None)."""
    answer = check(Query(domain, outside=tuple(p.where for p in pieces)), solver, _seconds(timeout))
    return answer.status, answer.model


def _dominating(i: int, pieces: Sequence[Piece], domain: Region, solver, timeout) -> list[Expr]:
    """S_i: the formulas that are >= formula i everywhere on regime i (within the domain)."""
    cell = domain.meet(pieces[i].where)
    keep = []
    for j, other in enumerate(pieces):
        if j == i:
            keep.append(other.formula)
            continue
        below = Query(cell, ((other.formula, "<", pieces[i].formula),))
        if _feasible(below, solver, timeout) == "unsat":
            keep.append(other.formula)
    return keep


def to_min_max(name: str, pieces: Sequence[Piece], domain: Region, solver="z3", timeout=30.0) -> Expr:
    """The verified min/max form of a regime-by-regime definition, or InputError saying why not."""
    for p in pieces:
        if not isinstance(p.formula, Affine):
            raise InputError(f"'{name}': regime formula '{to_text(p.formula)}' is not affine; "
                             "split it into more regimes")
    live = [p for p in pieces if _feasible(Query(domain.meet(p.where)), solver, timeout) != "unsat"]
    if not live:
        raise InputError(f"'{name}': no regime meets the assumed region")
    candidate = max_(*(min_(*_dominating(i, live, domain, solver, timeout)) for i in range(len(live))))
    for p in live:
        wrong = Query(domain.meet(p.where), ((candidate, "!=", p.formula),))
        status = check(wrong, solver, _seconds(timeout))
        if status.status == "unknown":
            raise FormUndecided(f"'{name}': the solver could not confirm that the regimes form one "
                                f"continuous function ({status.detail})")
        if status.status == "sat":
            raise InputError(f"'{name}': " + (_where_it_breaks(live, domain, solver, timeout) or
                             f"the regimes disagree on an overlap or the function jumps at a regime "
                             f"boundary: regime '{p.where.text()}' (its formula differs from the other "
                             "regimes' values there)"))
    return candidate


def _where_it_breaks(pieces: Sequence[Piece], domain: Region, solver, timeout) -> str:
    """An exact point where two regimes' formulas differ: first inside both regimes' interiors (they
    disagree on an overlap), else on their common boundary (the function jumps), with both values,
    re-checked with Fractions; '' when no pair shows one (the caller's general message stands)."""
    for what, shape in (("the regimes disagree on their overlap", lambda r: r.relative_interior()),
                        ("the function jumps", lambda r: r.closure())):
        for i, first in enumerate(pieces):
            for second in pieces[i + 1:]:
                meet = domain.meet(shape(first.where)).meet(shape(second.where))
                answer = check(Query(meet, ((first.formula, "!=", second.formula),)), solver,
                               _seconds(timeout))
                if answer.status != "sat" or answer.model is None:
                    continue
                point = {n: Fraction(v) for n, v in answer.model.items()}
                try:
                    a, b = evaluate(first.formula, point), evaluate(second.formula, point)
                except (KeyError, InputError):
                    continue
                if a == b or not meet.contains(point):
                    continue
                where = ", ".join(f"{n} = {format_number(v)}" for n, v in sorted(point.items()))
                return (f"{what} at {where}: regime '{first.where.text()}' gives {format_number(a)}, "
                        f"regime '{second.where.text()}' gives {format_number(b)}")
    return ""


def check_piecewise(name: str, pieces: Sequence[Piece], domain: Region, solver="z3",
                    timeout=30.0) -> PiecewiseCheck:
    """Coverage verdict plus the min/max form when the regimes define one continuous function.

    `timeout`: seconds per query, or a verifier.core.budget.Budget bounding the whole check."""
    from verifier.core.budget import Budget, OutOfBudget
    if not hasattr(timeout, "timeout"):   # one clock for the whole definition, not per query only
        timeout = Budget(query_timeout=timeout)
    form = "proved"
    try:
        status, point = uncovered_point(pieces, domain, solver, timeout)
    except OutOfBudget:
        status, point = "unknown", None
    covered = {"unsat": "proved", "sat": "refuted"}.get(status, "unknown")
    try:
        expr, detail = to_min_max(name, pieces, domain, solver, timeout), ""
    except (FormUndecided, OutOfBudget) as exc:
        expr, detail, form = None, str(exc).removeprefix(f"'{name}': "), "unknown"
    except InputError as err:
        expr, detail, form = None, err.message.removeprefix(f"'{name}': "), "refuted"
    return PiecewiseCheck(name, covered, point if status == "sat" else None, expr, detail,
                          tuple(pieces), form)
