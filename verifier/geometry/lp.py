"""Exact linear programming over polyhedra given by atoms (`form >= 0`, `form > 0`), in Fractions.

Why our own simplex: every verdict of the region-wise prover rests on LP answers (is this cell split by
that hyperplane? is the claim's difference non-negative here?), so they must be exact and must come
with dual multipliers, which are the Farkas certificates a reader can check by hand.  Floats (scipy)
appear only in tests, as an oracle.

The one primitive is a dense two-phase tableau simplex with Bland's rule (no cycling) for
`max c.y  s.t.  M y = r, y >= 0`.  Minimising an affine form over a polyhedron in few parameters is
solved through its dual, which has one row per parameter, so tableaus stay tiny: for
`min f(x) s.t. a_i(x) >= 0` the dual is `max -sum b_i y_i s.t. sum y_i a_i,lin = f_lin, y >= 0`,
its optimal y are the Farkas multipliers (`f = v + sum y_i a_i` identically) and the simplex
multipliers of its rows are an optimal primal point.

Strict atoms: LP works on the closure; `feasible` (and lp_farkas.strict_farkas) settle strictness
exactly.  Farkas certificates live in lp_farkas.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from fractions import Fraction
from typing import Sequence

from verifier.expressions.expr import Affine, affine
from verifier.expressions.region import Atom

ZERO = Fraction(0)
ONE = Fraction(1)

Row = tuple[tuple[Fraction, ...], Fraction]  # (linear coefficients in `names` order, constant)


def rows_of(forms: Sequence[Affine], names: Sequence[str]) -> list[Row]:
    """Affine forms as coefficient vectors over `names` (a name missing from `names` is an error)."""
    index = {n: k for k, n in enumerate(names)}
    out = []
    for f in forms:
        vec = [ZERO] * len(names)
        for n, c in f.coeffs:
            vec[index[n]] = c
        out.append((tuple(vec), f.const))
    return out


def combine(f: Affine, g: Affine, k: Fraction = ONE) -> Affine:
    """f + k*g for canonical affine forms, fast (no re-validation; the result is canonical too)."""
    out = dict(f.coeffs)
    for n, c in g.coeffs:
        v = out.get(n, ZERO) + k * c
        if v:
            out[n] = v
        else:
            out.pop(n, None)
    return Affine(tuple(sorted(out.items())), f.const + k * g.const)


def substitute_affine(f: Affine, name: str, value: Affine) -> Affine:
    """f with parameter `name` replaced by the affine form `value`."""
    c = f.coeff(name)
    if not c:
        return f
    rest = Affine(tuple((n, v) for n, v in f.coeffs if n != name), f.const)
    return combine(rest, value, c)


def form_of(vec: Sequence[Fraction], const: Fraction, names: Sequence[str]) -> Affine:
    return affine(zip(names, vec), const)


# ---------------------------------------------------------------------------------------------
# the tableau simplex, fraction-free: integer entries over one common denominator
# ---------------------------------------------------------------------------------------------
# The tableau is kept as integers T with the true tableau equal to T / D (D > 0 the absolute value of
# the current basis determinant).  A pivot on (r, c) with p = T[r][c] maps every other row i to
# (p * T[i] - T[i][c] * T[r]) // D exactly (Bareiss, Edmonds), keeps row r, and sets D = p; the
# sign is flipped everywhere when p < 0.  Integers are an order of magnitude faster than Fractions
# and the division is exact, so nothing is rounded.

def _lcm_den(values) -> int:
    d = 1
    for v in values:
        q = v.denominator
        if d % q:
            d = d * q // math.gcd(d, q)
    return d


def _pivot(T: list[list[int]], r: int, col: int, D: int) -> int:
    row = T[r]
    p = row[col]
    nz = [(j, v) for j, v in enumerate(row) if v]
    for i, other in enumerate(T):
        if i == r:
            continue
        k = other[col]
        if k:
            new = [v * p for v in other]
            for j, v in nz:
                new[j] -= k * v
            T[i] = [v // D for v in new]
        elif p != D:
            T[i] = [v * p // D for v in other]
    if p < 0:
        for i in range(len(T)):
            T[i] = [-v for v in T[i]]
        return -p
    return p


def _run(T, basis, allowed, D):
    """Bland's-rule iterations on rows T[:-1] with objective row T[-1]; returns (bounded, D)."""
    m = len(T) - 1
    obj = T[-1]
    while True:
        obj = T[-1]
        col = next((j for j in allowed if obj[j] < 0), None)
        if col is None:
            return True, D
        best = None
        for i in range(m):
            a = T[i][col]
            if a > 0:
                if best is None:
                    best = i
                    continue
                lhs, rhs = T[i][-1] * T[best][col], T[best][-1] * a
                if lhs < rhs or (lhs == rhs and basis[i] < basis[best]):
                    best = i
        if best is None:
            return False, D
        D = _pivot(T, best, col, D)
        basis[best] = col


def _objective(T, basis, cost, D) -> list[int]:
    """Integer reduced-cost row D * (c_B B^-1 A - c) for integer costs."""
    width = len(T[0]) if T else len(cost) + 1
    obj = [-c * D for c in cost] + [0] * (width - len(cost))
    for i, b in enumerate(basis):
        cb = cost[b] if b < len(cost) else 0
        if cb:
            for j, v in enumerate(T[i]):
                if v:
                    obj[j] += cb * v
    return obj


@dataclass(frozen=True)
class StdResult:
    status: str  # 'optimal', 'infeasible', 'unbounded'
    y: tuple[Fraction, ...] = ()
    value: Fraction | None = None
    duals: tuple[Fraction, ...] = ()


def solve_standard(c: Sequence[Fraction], M: Sequence[Sequence[Fraction]], r: Sequence[Fraction]) -> StdResult:
    """max c.y s.t. M y = r, y >= 0, exactly.  `duals` pi satisfy pi M >= c and pi.r = value.

    Entries may be ints or Fractions (anything with numerator/denominator)."""
    m, N = len(M), len(c)
    scale = []
    T = []
    for i in range(m):
        row = list(M[i]) + [r[i]]
        s = _lcm_den(row) * (1 if r[i] >= 0 else -1)
        scale.append(s)
        ints = [v.numerator * (s // v.denominator) for v in row]
        T.append(ints[:-1] + [int(k == i) for k in range(m)] + [ints[-1]])
    basis = [N + i for i in range(m)]
    D = 1
    T.append(_objective(T, basis, [0] * N + [-1] * m, D))
    _, D = _run(T, basis, range(N), D)
    if any(T[i][-1] != 0 for i in range(m) if basis[i] >= N):
        return StdResult("infeasible")
    for i in range(m):  # drive zero-level artificials out of non-redundant rows
        if basis[i] >= N:
            col = next((j for j in range(N) if T[i][j] != 0), None)
            if col is not None:
                D = _pivot(T, i, col, D)
                basis[i] = col
    L = _lcm_den(c)
    T[-1] = _objective(T[:-1], basis, [v.numerator * (L // v.denominator) for v in c] + [0] * m, D)
    bounded, D = _run(T, basis, range(N), D)
    if not bounded:
        return StdResult("unbounded")
    y = [ZERO] * N
    for i, b in enumerate(basis):
        if b < N:
            y[b] = Fraction(T[i][-1], D)
    obj = T[-1]
    duals = tuple(Fraction(obj[N + i] * scale[i], D * L) for i in range(m))
    return StdResult("optimal", tuple(y), Fraction(obj[-1], D * L), duals)


# ---------------------------------------------------------------------------------------------
# minimising an affine form over a polyhedron (closure), with Farkas multipliers
# ---------------------------------------------------------------------------------------------

@dataclass(frozen=True)
class LPResult:
    """status 'optimal' | 'unbounded' | 'infeasible'.  With 'optimal':
    `value` = min of the form, `point` a minimiser (a dict), `multipliers` y >= 0 per atom with
    form == value + sum y_i atom_i identically (the Farkas certificate of form >= value)."""

    status: str
    value: Fraction | None = None
    point: dict | None = None
    multipliers: tuple[Fraction, ...] = ()


def minimize_rows(f: Row, rows: Sequence[Row]) -> tuple[str, Fraction | None, tuple, tuple]:
    """min f over {a_i.x + b_i >= 0}; returns (status, value, x, y). 'infeasible' may also mean
    'unbounded' when the primal has points: callers that need the distinction use `minimize`."""
    n = len(f[0])
    c = [-b for _, b in rows]
    M = [[a[k] for a, _ in rows] for k in range(n)]
    res = solve_standard(c, M, f[0])
    if res.status == "unbounded":
        return "infeasible", None, (), ()
    if res.status == "infeasible":
        return "unbounded", None, (), ()
    return "optimal", f[1] + res.value, res.duals, res.y


def minimize(form: Affine, atoms: Sequence[Atom], names: Sequence[str]) -> LPResult:
    """min of `form` over the closure of the polyhedron `atoms`, exactly."""
    rows = rows_of([a.form for a in atoms], names)
    f = rows_of([form], names)[0]
    status, value, x, y = minimize_rows(f, rows)
    if status == "unbounded":
        probe = minimize_rows(((ZERO,) * len(names), ZERO), rows)
        if probe[0] != "optimal":
            return LPResult("infeasible")
        return LPResult("unbounded", point=dict(zip(names, probe[2])))
    if status == "infeasible":
        return LPResult("infeasible")
    return LPResult("optimal", value, dict(zip(names, x)), y)


def maximize(form: Affine, atoms: Sequence[Atom], names: Sequence[str]) -> LPResult:
    """max of `form` over the closure; multipliers certify `value - form >= 0`."""
    res = minimize(_neg(form), atoms, names)
    if res.status != "optimal":
        return res
    return LPResult("optimal", -res.value, res.point, res.multipliers)


def _neg(f: Affine) -> Affine:
    return affine([(n, -c) for n, c in f.coeffs], -f.const)


def max_slack(rows: Sequence[Row], strict_mask: Sequence[bool], cap: Fraction = ONE):
    """max t s.t. a_i >= t for masked rows, a_i >= 0 for the others, t <= cap.

    Returns (t, x, y) with y the multipliers of the rows (cap excluded), or None if the closure is
    empty.  t > 0 means every masked row can be made positive at once (x is such a point)."""
    n = len(rows[0][0]) if rows else 0
    ext = [(a + ((-ONE if s else ZERO),), b) for (a, b), s in zip(rows, strict_mask)]
    ext.append(((ZERO,) * n + (-ONE,), Fraction(cap)))
    target = ((ZERO,) * n + (-ONE,), ZERO)
    status, value, x, y = minimize_rows(target, ext)
    if status != "optimal":
        return None
    return -value, x[:n], y[:-1]


def feasible(atoms: Sequence[Atom], names: Sequence[str]) -> dict | None:
    """A point of the polyhedron (strict atoms honoured), or None when it is empty."""
    if not atoms:
        return {n: ZERO for n in names}
    rows = rows_of([a.form for a in atoms], names)
    mask = [a.strict for a in atoms]
    if not any(mask):
        status, _, x, _ = minimize_rows(((ZERO,) * len(names), ZERO), rows)
        return dict(zip(names, x)) if status == "optimal" else None
    got = max_slack(rows, mask)
    if got is None or got[0] <= 0:
        return None
    return dict(zip(names, got[1]))
