"""Fourier-Motzkin projection of rate regions whose right-hand sides are piecewise-linear in exponents.

Why: achievable schemes and converses are stated as linear inequalities in rates (and auxiliary split
rates, e.g. common and private parts) whose right-hand sides are GDoF expressions; a sum-GDoF (or any
weighted sum) formula is what a reviewer compares.  Because the coefficient matrix is constant, the
largest weighted sum is min over nonnegative combinations y of the rows with y A = w of y . b, and
Fourier-Motzkin elimination with exact Fractions produces exactly those combinations.

Each derived row remembers its multipliers y over the original rows.  After each elimination a row whose
support (the set of original rows it uses) strictly contains another row's support is dropped, and rows
with equal support are merged (Chernikov's rule in its exact form: the surviving rows are the extreme
rays of the cone of valid combinations, so the pruning never loses a bound whatever the exponents are).
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Iterable, Mapping, Sequence

from verifier.core.errors import InputError
from verifier.expressions.expr import Affine, Expr, Max, Min, Sum, add, as_fraction, lift, min_, scale

_OBJ = "\0objective"


@dataclass(frozen=True)
class Inequality:
    """sum(coeffs[v] * v) <= rhs, with rational coefficients and an Expr right-hand side."""

    coeffs: tuple[tuple[str, Fraction], ...]
    rhs: Expr

    def coeff(self, var: str) -> Fraction:
        return dict(self.coeffs).get(var, Fraction(0))

    def variables(self) -> set[str]:
        return {v for v, _ in self.coeffs}


def le(coeffs: Mapping[str, object] | Iterable[str], rhs) -> Inequality:
    """Inequality sum(coeffs[v] * v) <= rhs; a plain list of names means unit coefficients."""
    items = coeffs.items() if isinstance(coeffs, Mapping) else ((v, 1) for v in coeffs)
    merged: dict[str, Fraction] = {}
    for v, c in items:
        merged[v] = merged.get(v, Fraction(0)) + as_fraction(c)
    return Inequality(tuple(sorted((v, c) for v, c in merged.items() if c != 0)), lift(rhs))


@dataclass
class _Row:
    coeffs: dict[str, Fraction]
    mult: tuple[Fraction, ...]  # multipliers over the original rows

    @property
    def support(self) -> int:
        return sum(1 << i for i, y in enumerate(self.mult) if y)


def _normalised(coeffs: dict[str, Fraction], mult: Sequence[Fraction]) -> _Row:
    lead = next(y for y in mult if y)
    return _Row({v: c / lead for v, c in coeffs.items() if c}, tuple(y / lead for y in mult))


def _combine(p: _Row, n: _Row, var: str) -> _Row:
    a, b = -n.coeffs[var], p.coeffs[var]  # both positive
    names = set(p.coeffs) | set(n.coeffs)
    coeffs = {v: a * p.coeffs.get(v, 0) + b * n.coeffs.get(v, 0) for v in names}
    coeffs.pop(var, None)
    return _normalised(coeffs, [a * x + b * y for x, y in zip(p.mult, n.mult)])


def _prune(rows: list[_Row]) -> list[_Row]:
    """Keep rows with minimal support; among equal supports keep one (they are proportional)."""
    by_support: dict[int, _Row] = {}
    for r in rows:
        by_support.setdefault(r.support, r)
    supports = sorted(by_support, key=lambda s: bin(s).count("1"))
    kept: list[int] = []
    for s in supports:
        if not any(k & s == k for k in kept):
            kept.append(s)
    return [by_support[s] for s in kept]


def _eliminate_rows(rows: list[_Row], variables: Iterable[str]) -> list[_Row]:
    pending = set(variables)
    while pending:
        def cost(v):
            pos = sum(1 for r in rows if r.coeffs.get(v, 0) > 0)
            neg = sum(1 for r in rows if r.coeffs.get(v, 0) < 0)
            return (pos * neg - pos - neg, v)
        var = min(pending, key=cost)
        pending.discard(var)
        plus = [r for r in rows if r.coeffs.get(var, 0) > 0]
        minus = [r for r in rows if r.coeffs.get(var, 0) < 0]
        rest = [r for r in rows if not r.coeffs.get(var, 0)]
        rows = _prune(rest + [_combine(p, n, var) for p in plus for n in minus])
    return rows


def _initial_rows(constraints: Sequence[Inequality]) -> list[_Row]:
    size = len(constraints)
    return [_Row(dict(c.coeffs), tuple(Fraction(int(i == k)) for i in range(size)))
            for k, c in enumerate(constraints)]


def _rhs(mult: Sequence[Fraction], constraints: Sequence[Inequality], divide: Fraction = Fraction(1)) -> Expr:
    return add(*(scale(y / divide, c.rhs) for y, c in zip(mult, constraints) if y))


def _with_nonnegativity(constraints: Sequence[Inequality], nonnegative) -> list[Inequality]:
    rows = list(constraints)
    variables = sorted(set().union(*(c.variables() for c in rows))) if rows else []
    chosen = variables if nonnegative is True else sorted(nonnegative or ())
    rows += [le({v: -1}, 0) for v in chosen]
    return rows


def eliminate(constraints: Sequence[Inequality], variables: Iterable[str], nonnegative=False) -> list[Inequality]:
    """Project the region onto the variables not listed: the implied inequalities among the rest.

    Rows left with no variable are feasibility conditions `0 <= rhs`.  `nonnegative` is True (every
    variable >= 0), False, or the names of the variables that are nonnegative.
    """
    rows = _with_nonnegativity(constraints, nonnegative)
    out = _eliminate_rows(_initial_rows(rows), variables)
    return [Inequality(tuple(sorted(r.coeffs.items())), _rhs(r.mult, rows)) for r in out]


@dataclass(frozen=True)
class Projection:
    """max of the weighted sum: `value`, valid wherever every `feasibility` expression is >= 0."""

    value: Expr
    bounds: tuple[Expr, ...]
    feasibility: tuple[Expr, ...]


def maximize(constraints: Sequence[Inequality], weights: Mapping[str, object], nonnegative=True) -> Projection:
    """Largest sum(weights[v] * v) over the region, as min over the surviving combinations of rows."""
    rows = _with_nonnegativity(constraints, nonnegative)
    variables = set().union(set(weights), *(c.variables() for c in rows))
    objective = le({_OBJ: 1, **{v: -as_fraction(w) for v, w in weights.items()}}, 0)
    allrows = rows + [objective]
    final = _eliminate_rows(_initial_rows(allrows), variables)
    uppers, feasibility = [], []
    for r in final:
        t = r.coeffs.get(_OBJ, Fraction(0))
        if t > 0:
            uppers.append(_rhs(r.mult, allrows, t))
        elif t == 0:
            cond = _rhs(r.mult, allrows)
            if not obviously_nonnegative(cond):
                feasibility.append(collect_terms(cond))
    if not uppers:
        raise InputError("the weighted sum is unbounded on this region: add upper bounds on the rates")
    uppers = [collect_terms(u) for u in drop_dominated(uppers)]
    return Projection(min_(*uppers), tuple(uppers), tuple(feasibility))


# ---------------------------------------------------------------------------------------------
# syntactic tidying: exact rewrites only
# ---------------------------------------------------------------------------------------------

def obviously_nonnegative(e: Expr) -> bool:
    """True when e >= 0 follows from its shape alone (a max with a nonnegative argument, sums of such)."""
    if isinstance(e, Affine):
        return not e.coeffs and e.const >= 0
    if isinstance(e, Max):
        return any(obviously_nonnegative(a) for a in e.args) or _pair_nonnegative(e.args)
    if isinstance(e, Min):
        return all(obviously_nonnegative(a) for a in e.args)
    return obviously_nonnegative(e.affine) and all(obviously_nonnegative(t) for t in e.terms)


def _pair_nonnegative(args: Sequence[Expr]) -> bool:
    """max(u, v) >= 0 when u + c*v is a nonnegative constant for some c > 0 (as in max(alpha, 1 - alpha))."""
    affs = [a for a in args if isinstance(a, Affine) and a.coeffs]
    for i, u in enumerate(affs):
        for v in affs[i + 1:]:
            name, cu = u.coeffs[0]
            c = -cu / v.coeff(name) if v.coeff(name) else Fraction(0)
            if c > 0 and not add(u, scale(c, v)).coeffs and u.const + c * v.const >= 0:
                return True
    return False


def _parts(e: Expr) -> tuple[Affine, list[Expr]]:
    if isinstance(e, Affine):
        return e, []
    if isinstance(e, Sum):
        return e.affine, list(e.terms)
    return lift(0), [e]


def dominates(a: Expr, b: Expr) -> bool:
    """True when a >= b everywhere because a = b + (terms that are obviously nonnegative)."""
    aff_a, terms_a = _parts(a)
    aff_b, terms_b = _parts(b)
    if aff_a.coeffs != aff_b.coeffs or aff_a.const < aff_b.const:
        return False
    left = list(terms_a)
    for t in terms_b:
        if t not in left:
            return False
        left.remove(t)
    return all(obviously_nonnegative(t) for t in left)


def drop_dominated(bounds: Sequence[Expr]) -> list[Expr]:
    """Upper bounds with every one that is syntactically at least another removed (first kept on ties)."""
    unique = list(dict.fromkeys(bounds))
    kept = []
    for i, a in enumerate(unique):
        if not any(j != i and dominates(a, b) and not (dominates(b, a) and j > i) for j, b in enumerate(unique)):
            kept.append(a)
    return kept


def collect_terms(e: Expr) -> Expr:
    """Merge repeated min/max terms of a sum: t + t becomes 2*t (pushed inside, as scale does)."""
    if not isinstance(e, Sum):
        return e
    counts: dict[Expr, int] = {}
    for t in e.terms:
        counts[t] = counts.get(t, 0) + 1
    return add(e.affine, *(scale(k, t) for t, k in counts.items()))


def max_weighted_sum(constraints: Sequence[Inequality], weights: Mapping[str, object], nonnegative=True) -> Expr:
    """Shorthand for maximize(...).value."""
    return maximize(constraints, weights, nonnegative).value


def max_sum(constraints: Sequence[Inequality], variables: Iterable[str], nonnegative=True) -> Expr:
    """Sum-GDoF: the largest sum of the named rate variables."""
    return max_weighted_sum(constraints, {v: 1 for v in variables}, nonnegative)
