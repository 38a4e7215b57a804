"""Bound analysis: which named bounds ever matter, and how far apart the two sides get.

Why: a converse that is the min of many bounds usually has some that are never tight; knowing which
(and in which regimes the others are tight) is the first thing a theorist asks.  A part is *active* in
a regime when it equals its side on the whole regime (compared as affine forms on the region's affine
hull, after every part was made affine on every cell), and *redundant* when it is never the unique
active part of any regime: then the remaining parts attain the side everywhere, so dropping it changes
nothing (this reading assumes the side is the min or max of its parts).
The maximum gap sup(L - R) is an exact LP per cell; 'attained' says whether the maximiser lies in the
cell itself or only in its closure (a supremum approached at an open boundary).
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Sequence

from verifier.expressions.expr import add, scale
from verifier.expressions.region import Polyhedron
from verifier.geometry.lp import maximize


@dataclass(frozen=True)
class PartReport:
    """Named part `name` of side `side` (0 = lhs, 1 = rhs)."""

    side: int
    name: str
    redundant: bool
    active_in: tuple[int, ...]
    unique_in: tuple[int, ...]

    @property
    def note(self) -> str:
        """What a report says beside the name: 'never active', 'only tied: active in regime 3',
        'active in regimes 0, 2' (a redundant part is listed as redundant already)."""
        if self.redundant:
            return "never active" if not self.active_in else "only tied: " + _active(self.active_in)
        return _active(self.active_in)


def _active(indices) -> str:
    word = "regime" if len(indices) == 1 else "regimes"
    return f"active in {word} " + ", ".join(str(i) for i in indices)


def part_reports(parts: Sequence[tuple[int, str]], regimes: Sequence) -> tuple[PartReport, ...]:
    """One report per (side, name) in `parts`, from each regime's `active` tuple of part names."""
    out = []
    for side, name in parts:
        active = tuple(r.index for r in regimes if side < len(r.active) and name in r.active[side])
        unique = tuple(r.index for r in regimes if side < len(r.active) and r.active[side] == (name,))
        out.append(PartReport(side, name, not unique, active, unique))
    return tuple(out)


@dataclass(frozen=True)
class Gap:
    """sup of `direction` ('lhs - rhs' or 'rhs - lhs') over the region; value None = unbounded."""

    direction: str
    value: Fraction | None
    point: dict | None
    attained: bool
    regime: int | None


def max_gap(regimes: Sequence, names: Sequence[str], sign: int = 1, budget=None) -> Gap:
    """sup of sign * (L - R) over all cells of all regimes (regimes carry `cells` with `forms`).
    `budget` (verifier.core.budget.Budget) is checked once per regime."""
    direction = "lhs - rhs" if sign > 0 else "rhs - lhs"
    best = None
    for r in regimes:
        if budget is not None:
            budget.check("largest gap")
        for cell in r.cells:
            diff = scale(sign, add(r.forms[0], scale(-1, r.forms[1])))
            res = maximize(diff, cell.atoms, names)
            if res.status == "unbounded":
                return Gap(direction, None, res.point, False, r.index)
            if res.status != "optimal":
                continue
            attained = Polyhedron(cell.atoms).contains(res.point)
            cand = (res.value, attained, res.point, r.index)
            if best is None or (cand[0], cand[1]) > (best[0], best[1]):
                best = cand
    if best is None:
        return Gap(direction, None, None, False, None)
    return Gap(direction, best[0], best[2], best[1], best[3])
