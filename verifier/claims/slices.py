"""Substitutions `beta = alpha, gamma = 2*alpha`: reading a claim on a slice of its region.

A paper's most common reduction sets some exponents to functions of the others ("for beta = alpha
the region reduces to ...").  We accept exactly the substitutions that keep the claim inside the
engine's fragment: each substituted name maps to an AFFINE expression of the other parameters, so
the slice {x : beta = e(x)} is a polyhedron and the claim on it is again a piecewise-linear claim.
A min/max (piecewise) right side would make the slice a union of pieces of different dimension, and
the claim would silently change meaning where the pieces meet; we refuse it rather than guess.

Why closure: `beta = gamma, gamma = 2*alpha` is a chain; eliminating names one after the other in
the order written would leave `gamma` inside beta's value.  We resolve every value until it mentions
no substituted name, refusing a name whose value uses itself (directly, or around a cycle): such a
"substitution" is an equation to solve, not a slice, and solving it silently could change the claim.
"""

from __future__ import annotations

from typing import Mapping

from verifier.core.errors import InputError
from verifier.expressions.expr import Affine, Expr, lift, params, substitute, to_text


class SliceError(InputError):
    """A substitution the engine refuses; `name` says which one (for positions in case files)."""

    def __init__(self, message: str, source: str | None = None, position: int | None = None,
                 name: str = ""):
        super().__init__(message, source, position)
        self.name = name


def closed_substitution(mapping: Mapping[str, object]) -> tuple[tuple[str, Expr], ...]:
    """(name, value) sorted by name, every value affine and free of substituted names."""
    values = {n: lift(v) for n, v in mapping.items()}
    for n, e in values.items():
        if not isinstance(e, Affine):
            raise SliceError(f"the value of '{n}' must be an affine expression of the other parameters "
                             f"(no min, max, (x)^+ or |x|), not '{to_text(e)}'", name=n)
        if n in params(e):
            raise SliceError(f"the value of '{n}' uses '{n}' itself ('{n} = {to_text(e)}'): a substitution "
                             "gives a name a value in the other parameters", name=n)
    for n in values:
        _refuse_cycle(n, values)
    closed = dict(values)
    for _ in range(len(values) + 1):
        pending = {n for n, e in closed.items() if params(e) & set(closed)}
        if not pending:
            break
        closed = {n: substitute(e, closed) if n in pending else e for n, e in closed.items()}
    return tuple(sorted(closed.items()))


def _refuse_cycle(start: str, values: Mapping[str, Expr]) -> None:
    """A name reached again by following values back to it is a circular substitution."""
    path, stack = [start], [(start, iter(sorted(params(values[start]) & set(values))))]
    while stack:
        name, rest = stack[-1]
        nxt = next(rest, None)
        if nxt is None:
            stack.pop()
            path.pop()
            continue
        if nxt == start:
            loop = " -> ".join(path + [start])
            raise SliceError(f"circular substitution: {loop}; give each name a value in parameters "
                             "that are not substituted", name=start)
        if nxt not in path:
            path.append(nxt)
            stack.append((nxt, iter(sorted(params(values[nxt]) & set(values)))))


def refuse_moved(claim, fixed: Mapping[str, Expr]) -> None:
    """A monotone claim moves its parameter and a symmetric one swaps two: neither may be a
    substituted name (the restricted function no longer has that argument)."""
    used = [claim.param] if claim.kind == "monotone" else list(claim.swap) if claim.kind == "symmetric" \
        else []
    for n in used:
        if n and n in fixed:
            what = "moves" if claim.kind == "monotone" else "swaps"
            raise SliceError(f"the claim {what} '{n}', which is substituted ('{n} = {to_text(fixed[n])}'); "
                             f"state it in a parameter that stays free", name=n)
