"""Treating interference as noise (TIN) with power control in the K-user interference channel.

Why: Geng, Naderializadeh, Avestimehr, Jafar, "On the optimality of treating interference as noise", IEEE
Trans. IT 61(4), 2015 (arXiv 1305.4610) give a simple condition under which TIN achieves the whole GDoF
region, and that region is a polyhedron -- exactly the kind of object this tool checks claims against.

Index convention (the paper's, receiver first): A[i][j] is the exponent of the link from transmitter j to
receiver i; A[i][i] is user i's direct link.  None (no link) counts as exponent 0: interference at the
noise floor.  Users are numbered 1..K in names (d1, d2, ...).

- condition (read in source, abstract; the inequality from memory):
  A[i][i] >= max_{j != i} A[j][i] + max_{k != i} A[i][k] for every user i  (strongest interference
  caused plus strongest suffered), i.e. A[i][i] >= A[j][i] + A[i][k] for all j, k != i: linear atoms.
- region (from memory): 0 <= d_i <= A[i][i], and for every cycle of distinct users (i_1, ..., i_m)
  sum_k d_{i_k} <= sum_k (A[i_k][i_k] - A[i_{k-1}][i_k]) with i_0 = i_m.  Every cyclic order is
  listed, so both orientations of each cycle appear and the direction convention cannot go wrong.
"""

from __future__ import annotations

from itertools import combinations, permutations
from typing import Mapping, Sequence

from verifier.core.errors import InputError
from verifier.expressions.expr import Expr, add, const, evaluate, scale
from verifier.expressions.region import Atom, Region, atoms_of

from .network import to_expr
from .projection import Inequality, le, max_sum


def _matrix(a: Sequence[Sequence[object]]) -> list[list[Expr]]:
    k = len(a)
    if k == 0 or any(len(row) != k for row in a):
        raise InputError("a TIN exponent matrix must be square and nonempty")
    out = []
    for i, row in enumerate(a):
        cells = []
        for j, e in enumerate(row):
            if i == j and e is None:
                raise InputError(f"user {i + 1} has no direct link (entry [{i + 1}][{j + 1}])")
            cells.append(const(0) if e is None else to_expr(e, f"exponent [{i + 1}][{j + 1}]"))
        out.append(cells)
    return out


def condition_atoms(a: Sequence[Sequence[object]]) -> list[tuple[str, Atom]]:
    """The TIN-optimality condition as named linear atoms: A[i][i] >= A[j][i] + A[i][k]."""
    m = _matrix(a)
    k = len(m)
    out = []
    for i in range(k):
        for j in range(k):
            for l in range(k):
                if i in (j, l):
                    continue
                name = f"a{i + 1}{i + 1} >= a{j + 1}{i + 1} + a{i + 1}{l + 1}"
                (atom,) = atoms_of(m[i][i], ">=", add(m[j][i], m[i][l]))
                out.append((name, atom))
    return out


def tin_condition(a: Sequence[Sequence[object]]) -> Region:
    """Region of the exponent parameters where the condition holds (everywhere for one user)."""
    return Region.of(*(atom for _, atom in condition_atoms(a)))


def tin_condition_holds(a: Sequence[Sequence[object]], point: Mapping[str, object] | None = None) -> bool:
    """The condition at numeric exponents (or at `point` for symbolic ones), decided exactly."""
    m = _matrix(a)
    vals = [[evaluate(e, point or {}) for e in row] for row in m]
    k = len(vals)
    for i in range(k):
        caused = max((vals[j][i] for j in range(k) if j != i), default=0)
        suffered = max((vals[i][l] for l in range(k) if l != i), default=0)
        if vals[i][i] < caused + suffered:
            return False
    return True


def cycles(k: int) -> list[tuple[int, ...]]:
    """Every cycle of at least two distinct users of 0..k-1, once per cyclic order (smallest first)."""
    out = []
    for size in range(2, k + 1):
        for subset in combinations(range(k), size):
            first, rest = subset[0], subset[1:]
            for order in permutations(rest):
                out.append((first, *order))
    return out


def tin_bounds(a: Sequence[Sequence[object]], prefix: str = "d") -> dict[str, Inequality]:
    """Named inequalities of the polyhedral TIN region (nonnegativity left to the caller/projection)."""
    m = _matrix(a)
    k = len(m)
    names = [f"{prefix}{i + 1}" for i in range(k)]
    out = {f"{names[i]} <= a{i + 1}{i + 1}": le([names[i]], m[i][i]) for i in range(k)}
    for cyc in cycles(k):
        rhs = add(*(add(m[u][u], scale(-1, m[cyc[t - 1]][u])) for t, u in enumerate(cyc)))
        label = "cycle " + "->".join(str(u + 1) for u in (*cyc, cyc[0]))
        out[label] = le([names[u] for u in cyc], rhs)
    return out


def tin_region(a: Sequence[Sequence[object]], prefix: str = "d") -> list[Inequality]:
    return list(tin_bounds(a, prefix).values())


def tin_sum_gdof(a: Sequence[Sequence[object]]) -> Expr:
    """Sum-GDoF of the polyhedral TIN region, by Fourier-Motzkin projection (rates nonnegative)."""
    k = len(a)
    return max_sum(tin_region(a), [f"d{i + 1}" for i in range(k)])
