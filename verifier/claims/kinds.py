"""Claims: explicit objects for the statements a GDoF paper makes, each reducible to one SMT question.

A claim is never built by overloading `==`; it is a `Claim` with a kind.  Every kind has a *violation*:
a point (or a pair of points, for monotonicity) where the statement fails.  `violation_query` states
"such a point exists" for the solver; `violated_at` re-checks a candidate exactly, so a solver model is
never trusted without our own evaluation.

Kinds and their violations (R is the claim's region):
- relation `lhs REL rhs`:         x in R and not (lhs(x) REL rhs(x))
- within c:  |lhs - rhs| <= c:     x in R and |lhs(x) - rhs(x)| > c
- monotone in p (non-decreasing): x, x' in R, x' = x except p' > p, f(x') < f(x)  (non-increasing: >)
- reduces-to under p = v, ...:     x in R with p = v and lhs(x) != rhs(x): both sides are read on
                                  the slice p = v of R (a right side that mentions p is evaluated at
                                  p = v too), so a counterexample is a point of R itself
- symmetric in (p, q):            x in R and f(x) != f(x with p and q swapped)

Any kind may be read on a slice (`... with beta = alpha`, see verifier.claims.slices): `subst` maps some
parameters to affine expressions of the others, and the claim is the claim on {x in R : beta = e(x)}.
The region keeps the slice as equalities (so it is printed, and every re-check requires it); the
compared expressions and the witness region have the substituted names eliminated (the witness
lives in the remaining parameters, full-dimensional for the regime prover), and claim_points puts
beta = e(x) back into every point a witness stands for.  For monotone and symmetric claims this is
the claim about the restricted function g(x) = f(x with beta = e(x)): monotone compares two points
of the slice, symmetric swaps two remaining parameters of g.  A reduces-to claim's numbers stay in
`values` (its slice is not part of R, as before); `substitution` is the union of both.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from fractions import Fraction
from typing import Mapping

from verifier.core.errors import InputError
from verifier.expressions.expr import Expr, Max, Min, abs_, add, evaluate, lift, param, params, rename, scale, substitute, to_text
from verifier.expressions.region import Atom, Polyhedron, Region
from verifier.solvers.smt import Query

RELATIONS = ("==", "<=", ">=", "<", ">")
NEGATED = {"==": "!=", "<=": ">", ">=": "<", "<": ">=", ">": "<="}
KINDS = ("relation", "within", "monotone", "reduces-to", "symmetric")


@dataclass(frozen=True)
class Side:
    """One side of a claim.  `parts` are the named bounds it is the min/max of, for reporting."""

    expr: Expr
    label: str = ""
    parts: tuple[tuple[str, Expr], ...] = ()

    def active_parts(self, point: Mapping[str, Fraction]) -> tuple[str, ...]:
        """Names of the parts attaining the side's value at `point` (the active bounds)."""
        if not self.parts:
            return ()
        value = evaluate(self.expr, point)
        return tuple(name for name, e in self.parts if evaluate(e, point) == value)

    def text(self) -> str:
        return self.label or to_text(self.expr)


def as_side(x) -> Side:
    return x if isinstance(x, Side) else Side(lift(x))


@dataclass(frozen=True)
class Claim:
    """A statement over a region.  Build with the functions below, not directly."""

    kind: str
    lhs: Side
    region: Region
    rhs: Side | None = None
    rel: str = "=="
    gap: Fraction = Fraction(0)
    param: str = ""
    increasing: bool = True
    values: tuple[tuple[str, Fraction], ...] = ()
    swap: tuple[str, str] = ("", "")
    name: str = ""
    params: tuple[str, ...] = field(default=())
    subst: tuple[tuple[str, Expr], ...] = ()      # the slice: name -> affine expression of others

    def named(self, name: str) -> "Claim":
        return replace(self, name=name)

    def text(self) -> str:
        """The statement in words, for reports."""
        where = f" where {self.region.text()}" if self.region != Region.everywhere() else ""
        if self.kind == "relation":
            return f"{self.lhs.text()} {self.rel} {self.rhs.text()}{where}"
        if self.kind == "within":
            rhs = self.rhs.text()
            if not self.rhs.label and not _is_atomic(self.rhs.expr) and \
                    not isinstance(self.rhs.expr, (Min, Max)):
                rhs = f"({rhs})"  # |W - (1 - alpha/2)|, not |W - 1 - alpha/2|
            return f"|{self.lhs.text()} - {rhs}| <= {_num(self.gap)}{where}"
        if self.kind == "monotone":
            trend = "non-decreasing" if self.increasing else "non-increasing"
            return f"{self.lhs.text()} is {trend} in {self.param}{where}"
        if self.kind == "reduces-to":
            fixed = ", ".join([f"{n} = {_num(v)}" for n, v in self.values] +
                              [f"{n} = {to_text(e)}" for n, e in self.subst])
            return f"{self.lhs.text()} with {fixed} equals {self.rhs.text()}{where}"
        return f"{self.lhs.text()} is symmetric in {self.swap[0]} and {self.swap[1]}{where}"


def _is_atomic(e: Expr) -> bool:
    """A single parameter or a non-negative number: safe after a minus sign without parentheses."""
    from verifier.expressions.expr import Affine
    if not isinstance(e, Affine):
        return False
    return (not e.coeffs and e.const >= 0) or (not e.const and e.coeffs == ((e.coeffs[0][0], 1),))


def _num(q: Fraction) -> str:
    return str(q.numerator) if q.denominator == 1 else f"{q.numerator}/{q.denominator}"


def _all_params(region: Region, *exprs: Expr, extra=()) -> tuple[str, ...]:
    names = set(region.params()) | set(extra)
    for e in exprs:
        names |= params(e)
    return tuple(sorted(names))


def relation(lhs, rel: str, rhs, region: Region, name: str = "") -> Claim:
    """lhs REL rhs everywhere in region."""
    if rel == "=":
        rel = "=="
    if rel not in RELATIONS:
        raise InputError(f"unknown relation '{rel}'; use one of {' '.join(RELATIONS)}")
    lhs, rhs = as_side(lhs), as_side(rhs)
    return Claim("relation", lhs, region, rhs, rel, name=name,
                 params=_all_params(region, lhs.expr, rhs.expr))


def within(lhs, rhs, gap, region: Region, name: str = "") -> Claim:
    """|lhs - rhs| <= gap everywhere in region (a constant-gap statement)."""
    gap = lift(gap)
    if params(gap):
        raise InputError(f"the gap must be a constant, not '{to_text(gap)}'")
    lhs, rhs = as_side(lhs), as_side(rhs)
    if gap.const < 0:
        raise InputError(f"the gap must be non-negative, not {_num(gap.const)}")
    return Claim("within", lhs, region, rhs, gap=gap.const, name=name,
                 params=_all_params(region, lhs.expr, rhs.expr))


def monotone(f, in_param: str, region: Region, increasing: bool = True, name: str = "") -> Claim:
    """f non-decreasing (or non-increasing) in one parameter, comparing points of the region."""
    f = as_side(f)
    return Claim("monotone", f, region, param=in_param, increasing=increasing, name=name,
                 params=_all_params(region, f.expr, extra=(in_param,)))


def reduces_to(lhs, values: Mapping[str, object], rhs, region: Region, name: str = "") -> Claim:
    """lhs with some parameters fixed (to numbers, or to affine expressions of the other parameters:
    a slice, see verifier.claims.slices) equals rhs over what remains of the region."""
    from verifier.claims.slices import closed_substitution
    if not values:
        raise InputError("reduces-to needs at least one parameter to fix")
    closed = closed_substitution(values)
    fixed = tuple((n, e.const) for n, e in closed if not params(e))
    lhs, rhs = as_side(lhs), as_side(rhs)
    claim = Claim("reduces-to", lhs, region, rhs, values=fixed, name=name,
                  params=_all_params(region, lhs.expr, rhs.expr))
    moving = {n: e for n, e in closed if params(e)}
    return on_slice(claim, moving) if moving else claim


def on_slice(claim: Claim, mapping: Mapping[str, object]) -> Claim:
    """The claim read on the slice {x in its region : name = e(x) for each name -> e}: the region
    gains the equalities, the substituted names leave the witness (see the module docstring)."""
    from verifier.expressions.region import atoms_of
    from verifier.claims.slices import closed_substitution, refuse_moved
    closed = closed_substitution({**dict(claim.subst), **dict(mapping)})
    refuse_moved(claim, dict(closed))
    moving = tuple((n, e) for n, e in closed if n not in dict(claim.values))
    fresh = [a for n, e in moving if n not in dict(claim.subst) for a in atoms_of(param(n), "==", e)]
    # appended, not met: the equalities stay visible in the printed region even where the region
    # already has one of their halves (`beta >= 0` and the slice `beta == 0`)
    region = Region(tuple(Polyhedron(p.atoms + tuple(fresh)) for p in claim.region.pieces)) \
        if fresh else claim.region
    names = set(claim.params) | set(region.params())
    for _, e in moving:
        names |= params(e)
    return replace(claim, region=region, subst=moving, params=tuple(sorted(names)))


def substitution(claim: Claim) -> dict[str, Expr]:
    """Every substituted name: a reduces-to claim's numbers and the slice's expressions."""
    return {**{n: lift(v) for n, v in claim.values}, **dict(claim.subst)}


def symmetric(f, p: str, q: str, region: Region, name: str = "") -> Claim:
    """f unchanged when parameters p and q are swapped, at every point of the region."""
    if p == q:
        raise InputError(f"symmetric: swap two different parameters, not '{p}' with itself")
    f = as_side(f)
    return Claim("symmetric", f, region, swap=(p, q), name=name,
                 params=_all_params(region, f.expr, extra=(p, q)))


# ---------------------------------------------------------------------------------------------
# the two sides as functions of a witness point, and the violation
# ---------------------------------------------------------------------------------------------

def primed(name: str) -> str:
    """The second point's copy of a parameter in a monotonicity witness."""
    return name + "'"


def _cached(claim: Claim, key: str, make):
    """Per-claim memo of derived data (claims are immutable; re-checks call these in loops)."""
    memo = claim.__dict__.get("_memo")
    if memo is None:
        memo = {}
        object.__setattr__(claim, "_memo", memo)
    if key not in memo:
        memo[key] = make()
    return memo[key]


def compared_exprs(claim: Claim) -> tuple[Expr, Expr]:
    """The two expressions whose comparison is the claim, over the witness variables."""
    return _cached(claim, "compared", lambda: _compared_exprs(claim))


def _compared_exprs(claim: Claim) -> tuple[Expr, Expr]:
    fixed = substitution(claim)
    lhs = substitute(claim.lhs.expr, fixed) if fixed else claim.lhs.expr
    if claim.kind in ("relation", "within", "reduces-to"):
        return lhs, substitute(claim.rhs.expr, fixed) if fixed else claim.rhs.expr
    if claim.kind == "monotone":
        return lhs, rename(lhs, {claim.param: primed(claim.param)})
    p, q = claim.swap
    return lhs, rename(lhs, {p: q, q: p})


def witness_region(claim: Claim) -> Region:
    """Where witnesses live: the region, its restriction, or (monotone) pairs of region points."""
    return _cached(claim, "witness_region", lambda: _witness_region(claim))


def _witness_region(claim: Claim) -> Region:
    fixed = substitution(claim)
    region = claim.region.substitute(fixed) if fixed else claim.region
    if claim.kind != "monotone":
        return region
    p = claim.param
    moved = Region(tuple(Polyhedron(tuple(Atom(rename(a.form, {p: primed(p)}), a.strict)
                                          for a in poly.atoms)) for poly in region.pieces))
    return region.meet(moved)


def own_region(claim: Claim) -> Region:
    """The claim's region in the witness's own (unprimed) parameters: a slice claim's region with
    the substituted names eliminated (where a monotone claim's points both live)."""
    fixed = substitution(claim)
    return claim.region.substitute(fixed) if fixed else claim.region


def violation_conditions(claim: Claim) -> tuple[tuple[Expr, str, Expr], ...]:
    return _cached(claim, "conditions", lambda: _violation_conditions(claim))


def _violation_conditions(claim: Claim) -> tuple[tuple[Expr, str, Expr], ...]:
    left, right = compared_exprs(claim)
    if claim.kind == "relation":
        return ((left, NEGATED[claim.rel], right),)
    if claim.kind == "within":
        return ((abs_(add(left, scale(-1, right))), ">", lift(claim.gap)),)
    if claim.kind == "monotone":
        p = claim.param
        drop = "<" if claim.increasing else ">"
        return ((param(primed(p)), ">", param(p)), (right, drop, left))
    return ((left, "!=", right),)


def witness_names(claim: Claim) -> tuple[str, ...]:
    fixed = substitution(claim)
    names = [n for n in claim.params if n not in fixed]
    if claim.kind == "monotone":
        names.append(primed(claim.param))
    return tuple(sorted(set(names)))


def violation_query(claim: Claim, region: Region | None = None, grid: int | None = None) -> Query:
    """'A violation exists in `region` (default: the claim's witness region)' as a solver query."""
    return Query(region if region is not None else witness_region(claim),
                 violation_conditions(claim), grid, witness_names(claim))


def _holds(a: Fraction, rel: str, b: Fraction) -> bool:
    return {"<": a < b, "<=": a <= b, "==": a == b, "!=": a != b, ">=": a >= b, ">": a > b}[rel]


def claim_points(claim: Claim, witness: Mapping[str, Fraction]) -> tuple[dict, ...]:
    """The points of the claim's own parameter space that a witness stands for: one point (with the
    fixed values of a reduces-to claim put back), or two for a monotone claim (before and after the
    move in its parameter).  Each must lie in the claim's region for the witness to count."""
    point = {k: Fraction(v) for k, v in witness.items()}
    fixed = substitution(claim)
    moved, given = None, {}
    if claim.kind == "monotone":
        moved = point.pop(primed(claim.param), None)
        given = {n: point.pop(primed(n)) for n in fixed if primed(n) in point}
        if moved is None:
            return ()
    out = [point] if moved is None else [point, {**point, claim.param: moved, **given}]
    for x in out:
        free = {k: v for k, v in x.items() if k not in fixed}
        for n, e in fixed.items():
            try:
                v = evaluate(e, free)
            except (KeyError, InputError):
                return ()
            if n in x and x[n] != v:
                return ()
            x[n] = v
    return tuple(dict(sorted(x.items())) for x in out)


def witness_of(claim: Claim, point: Mapping[str, Fraction]) -> dict:
    """The witness variables' values at a point of the claim space (drops fixed parameters)."""
    fixed = substitution(claim)
    derived = set(fixed) | {primed(n) for n in fixed}
    return {k: Fraction(v) for k, v in point.items() if k not in derived}


def violated_at(claim: Claim, point: Mapping[str, Fraction]) -> bool:
    """Exact re-check: does `point` violate the claim, with every point it stands for in the claim's
    region?  `point` is a witness (solver model) or, for reduces-to, a point of the claim space that
    includes the fixed values."""
    points = claim_points(claim, point)
    if not points or not all(claim.region.contains(x) for x in points):
        return False
    w = witness_of(claim, point)
    missing = [n for n in witness_names(claim) if n not in w]
    if missing or not witness_region(claim).contains(w):
        return False
    return all(_holds(evaluate(l, w), r, evaluate(h, w)) for l, r, h in violation_conditions(claim))
