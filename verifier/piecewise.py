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

from .errors import InputError
from .expr import Affine, Expr, max_, min_, to_text
from .region import Region
from .smt import Query, check


@dataclass(frozen=True)
class Piece:
    formula: Expr
    where: Region


@dataclass(frozen=True)
class PiecewiseCheck:
    """Result of checking a regime-by-regime definition against the assumed region."""

    name: str
    covered: str                      # 'proved' | 'refuted' | 'unknown'
    uncovered_point: Mapping[str, Fraction] | None
    expr: Expr | None                 # the equivalent min/max form, when it exists
    detail: str = ""                  # why there is no min/max form
    pieces: tuple[Piece, ...] = ()


def _feasible(query: Query, solver: str, timeout: float) -> str:
    return check(query, solver, timeout).status


def uncovered_point(pieces: Sequence[Piece], domain: Region, solver="z3", timeout=30.0):
    """('unsat', None) if the regimes cover the domain, else ('sat', point) or ('unknown', None)."""
    answer = check(Query(domain, outside=tuple(p.where for p in pieces)), solver, timeout)
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
        status = check(wrong, solver, timeout)
        if status.status != "unsat":
            where = p.where.text()
            why = ("the regimes disagree on an overlap or the function jumps at a regime boundary"
                   if status.status == "sat" else "the solver could not confirm the conversion")
            point = ", ".join(f"{k} = {v}" for k, v in (status.model or {}).items())
            raise InputError(f"'{name}': {why}: regime '{where}'{', near ' + point if point else ''}")
    return candidate


def check_piecewise(name: str, pieces: Sequence[Piece], domain: Region, solver="z3",
                    timeout=30.0) -> PiecewiseCheck:
    """Coverage verdict plus the min/max form when the regimes define one continuous function."""
    status, point = uncovered_point(pieces, domain, solver, timeout)
    covered = {"unsat": "proved", "sat": "refuted"}.get(status, "unknown")
    try:
        expr, detail = to_min_max(name, pieces, domain, solver, timeout), ""
    except InputError as err:
        expr, detail = None, err.message.removeprefix(f"'{name}': ")
    return PiecewiseCheck(name, covered, point if status == "sat" else None, expr, detail,
                          tuple(pieces))
