"""From "the claim fails somewhere" to the one counterexample every entry point prints.

The ranking (stated in the README, the same for `gdof check`, `gdof report`, the Python API and both
solvers):
1. strictly inside the region (its relative interior: strict everywhere except stated equalities)
   before the boundary;
2. then the smallest common denominator d, searched over DENOMINATORS among points with every
   coordinate in [-BOX, BOX] (a larger box, WIDE_BOX, only when the first holds no lattice violation);
3. then the smallest magnitude max_i |x_i|, then the smallest |x_1|, |x_2|, ... in parameter order,
   a non-negative coordinate before a negative one.
Steps 2 and 3 ask only sat/unsat questions over integer numerators (x = k / d), whose answers do not
depend on the backend, so the point is the same from z3 and cvc5.  When no lattice point exists in
the searched set, or a query runs out of time, the counterexample is the solver's model, simplified
coordinate by coordinate (continued-fraction convergents kept while the claim still fails), and its
`origin` says so: a label is never stronger than the search that produced it.  Every candidate is
re-checked exactly (claims.violated_at, which also requires the claim's own region) before use.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from fractions import Fraction
from math import gcd
from typing import Mapping

from verifier.core.budget import Budget, OutOfBudget
from verifier.claims.kinds import Claim, claim_points, compared_exprs, violated_at, violation_query, witness_names, \
    witness_of, witness_region
from verifier.expressions.region import Region
from verifier.solvers.smt import check

DENOMINATORS = tuple(range(1, 65)) + (72, 80, 90, 96, 100, 120, 128, 144, 180, 240, 256, 360, 720, 1000)
BOX = 2 ** 10
WIDE_BOX = 2 ** 30
STAGE = "counterexample search"


@dataclass(frozen=True)
class Counterexample:
    """A point where the claim fails, with both sides' exact values and the active named bounds.

    `point` is a point of the claim's own parameter space (a reduces-to claim's fixed values
    included; a monotone claim's second point is the primed parameter)."""

    point: Mapping[str, Fraction]
    lhs_value: Fraction
    rhs_value: Fraction
    lhs_active: tuple[str, ...]
    rhs_active: tuple[str, ...]
    strictly_inside: bool
    origin: str

    @property
    def difference(self) -> Fraction:
        return self.lhs_value - self.rhs_value

    def denominator(self) -> int:
        d = 1
        for v in self.point.values():
            d = d * v.denominator // gcd(d, v.denominator)
        return d

    def magnitude(self) -> Fraction:
        return max((abs(v) for v in self.point.values()), default=Fraction(0))

    def rank(self) -> tuple:
        """The stated ranking as a sort key: inside first, then denominator, then magnitude."""
        return (not self.strictly_inside, self.denominator(), self.magnitude(),
                tuple((abs(v), v < 0) for _, v in sorted(self.point.items())))

    def __str__(self) -> str:
        from verifier.expressions.expr import format_number
        where = "strictly inside the region" if self.strictly_inside else "on the region's boundary"
        at = ", ".join(f"{k} = {format_number(v)}" for k, v in self.point.items())
        return (f"{at}: left side {format_number(self.lhs_value)}, right side "
                f"{format_number(self.rhs_value)} ({where}; {self.origin})")


def inside(claim: Claim, point: Mapping[str, Fraction]) -> bool:
    """Is the point in the relative interior of the claim's region (both points, for monotone)?"""
    interior = claim.region.relative_interior()
    points = claim_points(claim, point)
    return bool(points) and all(interior.contains(x) for x in points)


def describe(claim: Claim, point: Mapping[str, Fraction], origin: str) -> Counterexample:
    """The counterexample record of a witness (or claim-space point) that violates the claim."""
    w = witness_of(claim, point)
    left, right = compared_exprs(claim)
    from verifier.expressions.expr import evaluate
    full = claim_points(claim, point)[0] if claim.kind != "monotone" else _pair_point(claim, point)
    rhs_side = claim.rhs if claim.rhs is not None else claim.lhs
    lhs_active = claim.lhs.active_parts(full) if claim.kind not in ("reduces-to",) else ()
    rhs_active = rhs_side.active_parts(full) if claim.kind in ("relation", "within") else ()
    return Counterexample(full, evaluate(left, w), evaluate(right, w), lhs_active, rhs_active,
                          inside(claim, point), origin)


def _pair_point(claim: Claim, point: Mapping[str, Fraction]) -> dict:
    """A monotone counterexample as one record: the first point, the moved parameter primed, and a
    slice claim's substituted names at both points (`beta`, `beta'`), so the printed point says
    where on the slice each of the two points lies."""
    from verifier.claims.kinds import primed
    first, second = claim_points(claim, point)
    out = dict(first)
    out[primed(claim.param)] = second[claim.param]
    for n, _ in claim.subst:
        if second[n] != first[n]:
            out[primed(n)] = second[n]
    return dict(sorted(out.items()))


# ---------------------------------------------------------------------------------------------
# the lattice search
# ---------------------------------------------------------------------------------------------

class _Search:
    """Sat/unsat questions about wanted points (violations) in one target region, within the budget.

    `make_query(region, grid)` states "a wanted point of `region` exists" (on the lattice when grid
    is set); `valid(point)` re-checks a model exactly; `names` are the coordinates, in order."""

    def __init__(self, make_query, valid, names, region: Region, solver: str, budget: Budget):
        self.make_query, self.valid, self.names = make_query, valid, tuple(names)
        self.region, self.solver, self.budget = region, solver, budget
        self.complete = True          # every question so far got a definite answer
        self.found: dict | None = None

    def ask(self, d: int | None = None, box: int | None = None, bounds=()) -> dict | None:
        """A wanted point, on the lattice (1/d) Z^n when d is given, with |k| <= box for the
        numerators k = d x (without d: |x| <= box) and the given numerator bounds; or None."""
        region = self.region
        if d is None and box is not None:
            region = region.meet(_box(self.names, box))
        query = replace(self.make_query(region, d), box=box if d else None, numerators=tuple(bounds))
        answer = check(query, self.solver, self.budget.timeout(STAGE))
        if answer.status == "sat" and self.valid(answer.model):
            self.found = dict(answer.model)
            return self.found
        if answer.status != "unsat":  # unknown, or a model failing the exact check: trust nothing
            self.complete = False
        return None

    def denominator(self, box: int) -> int | None:
        for d in DENOMINATORS:
            if self.ask(d, box * d) is not None:
                return d
        return None

    def _top(self, d: int) -> int:
        return int(max((abs(v * d) for v in self.found.values()), default=0))

    def smallest_bound(self, d: int) -> int:
        """The least B with a lattice violation where |k| <= B for every numerator (k = d x)."""
        hi, lo, probe = self._top(d), -1, 0
        while probe < hi:             # gallop up from 0: answers are usually small
            if self.ask(d, probe) is not None:
                hi = self._top(d)
                break
            lo, probe = probe, 1 if probe == 0 else probe * 2
        while hi - lo > 1:
            mid = (lo + hi) // 2
            if self.ask(d, mid) is not None:
                hi = self._top(d)
            else:
                lo = mid
        return hi

    def lexicographic(self, d: int, bound: int) -> dict:
        """Fix |k_1| to its least value (non-negative first), then |k_2|, ... within |k| <= bound."""
        fixed: list = []
        point = dict(self.found)
        for n in self.names:
            lo, hi = -1, int(abs(point[n] * d))
            while hi - lo > 1:
                mid = (lo + hi) // 2
                if self.ask(d, bound, fixed + [(n, -mid, mid)]) is not None:
                    point = dict(self.found)
                    hi = int(abs(point[n] * d))
                else:
                    lo = mid
            if hi > 0 and point[n] < 0 and self.ask(d, bound, fixed + [(n, hi, hi)]) is not None:
                point = dict(self.found)
            value = int(point[n] * d)
            fixed.append((n, value, value))
        self.found = point
        return point

    def best(self) -> tuple[dict, str] | None:
        """The best lattice violation of the target by the stated ranking, with its label."""
        if self.ask() is None:
            return None
        for box in (BOX, WIDE_BOX):
            if self.ask(None, box) is None:
                continue
            d = self.denominator(box)
            if d is None:
                continue
            point = self.lexicographic(d, self.smallest_bound(d))
            exact = "" if self.complete else "; a search query ran out of time, so a smaller one may exist"
            return point, (f"smallest common denominator {d} (searched 1..64 and a few up to 1000, "
                           f"coordinates within +-{box}), then smallest magnitude{exact}")
        return None


def _box(names, bound: int) -> Region:
    from verifier.expressions.expr import param
    from verifier.expressions.region import atoms_of
    atoms = []
    for n in names:
        atoms += atoms_of(param(n), "<=", bound) + atoms_of(param(n), ">=", -bound)
    return Region.of(*atoms)


def _simplified(claim: Claim, model: Mapping[str, Fraction]) -> dict:
    """The model with each coordinate replaced by its coarsest convergent that keeps a violation
    (and keeps the point strictly inside when it was: simplifying never lowers its rank)."""
    point = dict(model)
    keep_inside = inside(claim, point)
    for n in sorted(point):
        for q in _convergents(point[n]):
            trial = dict(point)
            trial[n] = q
            if violated_at(claim, trial) and (not keep_inside or inside(claim, trial)):
                point = trial
                break
    return point


def _convergents(x: Fraction):
    """Continued-fraction convergents of x, coarse to fine (the last one is x itself)."""
    x = Fraction(x)
    h0, h1, k0, k1 = 0, 1, 1, 0
    rest = x
    for _ in range(64):
        a = rest.numerator // rest.denominator
        h0, h1 = h1, a * h1 + h0
        k0, k1 = k1, a * k1 + k0
        yield Fraction(h1, k1)
        frac = rest - a
        if frac == 0:
            return
        rest = 1 / frac


def best_point(make_query, valid, names, region: Region, solver: str, budget: Budget,
               inside_of=None):
    """The best wanted point of `region` by the ranking (module docstring), as (point, label,
    strictly_inside_known) or None when none was found; `inside_of(point)` tells whether a point
    is strictly inside (default: the region's relative interior)."""
    interior = _Search(make_query, valid, names, region.relative_interior(), solver, budget)
    got = interior.best()
    if got is not None:
        return got[0], got[1]
    if interior.found is not None:      # wanted points inside, none on the searched lattice
        return interior.found, "solver model: no lattice point in the searched set"
    closed = _Search(make_query, valid, names, region, solver, budget)
    got = closed.best()
    if got is not None:
        where = "; none lies strictly inside" if interior.complete else \
            "; whether one lies strictly inside is undecided (a query ran out of time)"
        return got[0], got[1] + where
    return None


def best_counterexample(claim: Claim, model: Mapping[str, Fraction], solver: str = "z3",
                        budget: Budget | None = None) -> Counterexample:
    """The counterexample to print, by the ranking in the module docstring.

    `model` is an exactly re-checked violating witness (the fallback).  The search spends at most
    what is left of `budget`; running out returns the best point found so far, labelled so."""
    budget = Budget.of(budget)

    def make_query(region, grid):
        return violation_query(claim, region, grid)

    def valid(point):
        return violated_at(claim, point)
    seen: list = []

    def keep(point):            # remember every checked model, for a budget that runs out
        ok = valid(point)
        if ok:
            seen.append(dict(point))
        return ok
    try:
        got = best_point(make_query, keep, witness_names(claim), witness_region(claim), solver, budget)
        if got is not None:
            point, label = got
            if label.startswith("solver model"):
                return describe(claim, _simplified(claim, point), "simplified " + label)
            return describe(claim, point, label)
        label = "simplified solver model"
    except OutOfBudget:
        label = "simplified solver model: the search for a simpler point ran out of time"
    start = min(seen, key=lambda p: describe(claim, p, "").rank()) if seen else dict(model)
    return describe(claim, _simplified(claim, start), label)
