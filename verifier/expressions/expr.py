"""Exact piecewise-linear expressions: the one data type every stage of the engine shares.

Why a home-grown tree rather than sympy expressions: a GDoF formula is always built from rational
constants, parameters, sums, multiples by constants, min and max.  Keeping exactly those node kinds, in
one canonical form, makes structural equality meaningful (parse(print(e)) == e), hashing cheap, and
every later stage (SMT encoding, regimes, certificates) a short function per node kind.

Canonical form, maintained by the smart constructors `add`, `scale`, `min_`, `max_` (never build nodes
directly):
- `Affine`: sum of rational multiples of parameters plus a rational constant; covers constants and
  parameters.  Zero coefficients are dropped, names sorted.
- `Min` / `Max`: at least two arguments, flattened (no Min directly inside Min), deduplicated, sorted,
  and at most one affine argument per linear part (min(a+1, a+2) is a+1).
- `Sum`: an affine part plus at least one Min/Max term (with repeats), sorted.  Multiplication by a
  constant is pushed into min/max (c*min(x, y) = min(c*x, c*y) for c > 0, a max for c < 0), so no
  coefficient node exists.

(x)^+ is max(x, 0) and |x| is max(x, -x): sugar, not node kinds.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from fractions import Fraction
from functools import cached_property
from typing import Iterable, Mapping, Union

from verifier.core.errors import InputError, NonlinearError, UnknownNameError

Number = Union[int, Fraction]
_PLAIN_NUMBER = re.compile(r"[-+]?(\d+(\.\d*)?|\.\d+)(\s*/\s*\d+)?")


def common_denominator(numbers) -> int:
    """The least common multiple of the numbers' denominators (integer scaling of exact rows)."""
    from math import gcd
    out = 1
    for q in numbers:
        d = Fraction(q).denominator
        out = out * d // gcd(out, d)
    return out


def as_fraction(value) -> Fraction:
    """Exact rational from int, Fraction, decimal string or float.

    A float is read through its shortest decimal representation (0.1 becomes 1/10, what the user
    typed), never through its binary value; non-finite floats are refused.
    """
    if isinstance(value, bool):
        raise InputError(f"a boolean is not a number: {value!r}")
    if isinstance(value, Fraction):
        return value
    if isinstance(value, int):
        return Fraction(value)
    if isinstance(value, float):
        if not math.isfinite(value):
            raise InputError(f"not a finite number: {value!r}")
        return Fraction(repr(value))
    if isinstance(value, str):
        text = value.strip()
        # plain decimals and fractions only: '1e100000000' would build a gigantic integer
        if len(text) > 200 or not _PLAIN_NUMBER.fullmatch(text):
            raise InputError(f"not an exact number: {value[:40]!r}")
        try:
            return Fraction(text)
        except (ValueError, ZeroDivisionError):
            raise InputError(f"not an exact number: {value!r}") from None
    if hasattr(value, "p") and hasattr(value, "q") and getattr(value, "is_Rational", False):
        return Fraction(int(value.p), int(value.q))  # sympy Rational / Integer
    raise InputError(f"not an exact number: {value!r}")


class Expr:
    """Base of the node kinds.  Operators build new canonical expressions; `==` is structural."""

    __slots__ = ()

    # --- arithmetic sugar for notebooks: a + b, 2*a, a/2, -a ---------------------------------
    def __add__(self, other):
        return add(self, lift(other))

    def __radd__(self, other):
        return add(lift(other), self)

    def __sub__(self, other):
        return add(self, scale(-1, lift(other)))

    def __rsub__(self, other):
        return add(lift(other), scale(-1, self))

    def __neg__(self):
        return scale(-1, self)

    def __pos__(self):
        return self

    def __mul__(self, other):
        other = lift(other)
        if is_constant(other):
            return scale(constant_value(other), self)
        if is_constant(self):
            return scale(constant_value(self), other)
        raise NonlinearError(f"nonlinear term '({to_text(self)})*({to_text(other)})'")

    __rmul__ = __mul__

    def __truediv__(self, other):
        other = lift(other)
        if not is_constant(other):
            raise NonlinearError(f"nonlinear term '({to_text(self)})/({to_text(other)})': "
                                 "division by a non-constant")
        value = constant_value(other)
        if value == 0:
            raise InputError("division by zero")
        return scale(1 / value, self)

    def __rtruediv__(self, other):
        return lift(other) / self

    def __str__(self) -> str:
        return to_text(self)


@dataclass(frozen=True, eq=True)
class Affine(Expr):
    """sum(coef * name) + const, with nonzero coefficients and sorted names."""

    coeffs: tuple[tuple[str, Fraction], ...]
    const: Fraction

    @cached_property
    def key(self):
        return (0, self.coeffs, self.const)

    def __hash__(self) -> int:  # cached: certificate caches and memos hash the same forms very often
        got = self.__dict__.get("_hash")
        if got is None:
            got = self.__dict__["_hash"] = hash((self.coeffs, self.const))
        return got

    def __getstate__(self) -> dict:
        """The fields only: a cached hash is valid in this process alone (string hashes are salted)."""
        return {"coeffs": self.coeffs, "const": self.const}

    def coeff(self, name: str) -> Fraction:
        return dict(self.coeffs).get(name, Fraction(0))

    def __repr__(self) -> str:
        return f"Affine({to_text(self)})"


@dataclass(frozen=True, eq=True)
class Min(Expr):
    args: tuple[Expr, ...]

    @cached_property
    def key(self):
        return (1, tuple(a.key for a in self.args))

    def __repr__(self) -> str:
        return f"Min({to_text(self)})"


@dataclass(frozen=True, eq=True)
class Max(Expr):
    args: tuple[Expr, ...]

    @cached_property
    def key(self):
        return (2, tuple(a.key for a in self.args))

    def __repr__(self) -> str:
        return f"Max({to_text(self)})"


@dataclass(frozen=True, eq=True)
class Sum(Expr):
    """affine + t1 + t2 + ..., every t a Min or Max node."""

    affine: Affine
    terms: tuple[Expr, ...]

    @cached_property
    def key(self):
        return (3, self.affine.key, tuple(t.key for t in self.terms))

    def __repr__(self) -> str:
        return f"Sum({to_text(self)})"


# ---------------------------------------------------------------------------------------------
# smart constructors
# ---------------------------------------------------------------------------------------------

ZERO_AFFINE = Affine((), Fraction(0))


def affine(coeffs: Mapping[str, Number] | Iterable[tuple[str, Number]] = (), const: Number = 0) -> Affine:
    """The canonical affine form sum(coeffs[name] * name) + const."""
    items = coeffs.items() if isinstance(coeffs, Mapping) else coeffs
    merged: dict[str, Fraction] = {}
    for name, c in items:
        merged[name] = merged.get(name, Fraction(0)) + as_fraction(c)
    kept = tuple(sorted((n, c) for n, c in merged.items() if c != 0))
    return Affine(kept, as_fraction(const))


def const(value) -> Affine:
    return Affine((), as_fraction(value))


def param(name: str) -> Affine:
    if not isinstance(name, str) or not name:
        raise InputError(f"a parameter name must be a non-empty string, not {name!r}")
    return Affine(((name, Fraction(1)),), Fraction(0))


def lift(value) -> Expr:
    """An Expr unchanged, a number as a constant."""
    if isinstance(value, Expr):
        return value
    return const(value)


def _add_affine(a: Affine, b: Affine) -> Affine:
    return affine(list(a.coeffs) + list(b.coeffs), a.const + b.const)


def _scale_affine(c: Fraction, a: Affine) -> Affine:
    return affine([(n, c * k) for n, k in a.coeffs], c * a.const)


def add(*exprs) -> Expr:
    """Canonical sum; affine parts merge, min/max terms are kept as a sorted multiset."""
    aff = ZERO_AFFINE
    terms: list[Expr] = []
    for e in map(lift, exprs):
        if isinstance(e, Affine):
            aff = _add_affine(aff, e)
        elif isinstance(e, Sum):
            aff = _add_affine(aff, e.affine)
            terms.extend(e.terms)
        else:
            terms.append(e)
    if not terms:
        return aff
    counts: dict[tuple, list] = {}
    for t in terms:
        counts.setdefault(t.key, [t, 0])[1] += 1
    if any(k > 1 for _, k in counts.values()):  # t + t is 2*t, pushed into the min/max
        return add(aff, *(scale(k, t) for t, k in counts.values()))
    if len(terms) == 1 and aff == ZERO_AFFINE:
        return terms[0]
    return Sum(aff, tuple(sorted(terms, key=lambda t: t.key)))


def scale(c, e) -> Expr:
    """c * e with c a rational; pushes the factor into min/max so no coefficient node exists."""
    c = as_fraction(c)
    e = lift(e)
    if c == 0:
        return const(0)
    if c == 1:
        return e
    if isinstance(e, Affine):
        return _scale_affine(c, e)
    if isinstance(e, Sum):
        return add(_scale_affine(c, e.affine), *(scale(c, t) for t in e.terms))
    scaled = [scale(c, a) for a in e.args]
    same_kind = (c > 0)
    if isinstance(e, Min):
        return min_(*scaled) if same_kind else max_(*scaled)
    if isinstance(e, Max):
        return max_(*scaled) if same_kind else min_(*scaled)
    raise TypeError(f"unknown expression node {type(e).__name__}")


def _extremum(kind: type, exprs, pick_const) -> Expr:
    flat: list[Expr] = []
    for e in map(lift, exprs):
        flat.extend(e.args if isinstance(e, kind) else (e,))
    if not flat:
        raise InputError(f"{kind.__name__.lower()} of nothing")
    best_affine: dict[tuple, Affine] = {}
    others: dict[tuple, Expr] = {}
    for e in flat:
        if isinstance(e, Affine):
            old = best_affine.get(e.coeffs)
            if old is None or pick_const(e.const, old.const) == e.const:
                best_affine[e.coeffs] = e
        else:
            others.setdefault(e.key, e)
    args = sorted(list(best_affine.values()) + list(others.values()), key=lambda a: a.key)
    if len(args) == 1:
        return args[0]
    return kind(tuple(args))


def min_(*exprs) -> Expr:
    """Canonical minimum of one or more expressions (numbers allowed)."""
    if len(exprs) == 1 and not isinstance(exprs[0], (Expr, int, Fraction, float)):
        exprs = tuple(exprs[0])
    return _extremum(Min, exprs, min)


def max_(*exprs) -> Expr:
    """Canonical maximum of one or more expressions (numbers allowed)."""
    if len(exprs) == 1 and not isinstance(exprs[0], (Expr, int, Fraction, float)):
        exprs = tuple(exprs[0])
    return _extremum(Max, exprs, max)


def pos(e) -> Expr:
    """(e)^+ = max(e, 0)."""
    return max_(e, 0)


def abs_(e) -> Expr:
    """|e| = max(e, -e)."""
    e = lift(e)
    return max_(e, scale(-1, e))


# ---------------------------------------------------------------------------------------------
# queries
# ---------------------------------------------------------------------------------------------

def is_constant(e: Expr) -> bool:
    return isinstance(e, Affine) and not e.coeffs


def constant_value(e: Expr) -> Fraction:
    if not is_constant(e):
        raise InputError(f"not a constant: {to_text(e)}")
    return e.const


def is_affine(e: Expr) -> bool:
    return isinstance(e, Affine)


def children(e: Expr) -> tuple[Expr, ...]:
    if isinstance(e, Affine):
        return ()
    if isinstance(e, Sum):
        return (e.affine,) + e.terms
    return e.args


def params(e: Expr) -> frozenset[str]:
    """Names of the parameters the expression mentions."""
    if isinstance(e, Affine):
        return frozenset(n for n, _ in e.coeffs)
    out: frozenset[str] = frozenset()
    for c in children(e):
        out |= params(c)
    return out


def extremum_nodes(e: Expr) -> list[Expr]:
    """Every Min/Max node of the tree (outermost first), each once: the places where slopes switch."""
    seen: dict[tuple, Expr] = {}
    stack = [e]
    while stack:
        node = stack.pop()
        if isinstance(node, (Min, Max)) and node.key not in seen:
            seen[node.key] = node
        stack.extend(reversed(children(node)))
    return list(seen.values())


def size(e: Expr) -> int:
    """Number of nodes, a rough measure of work for benchmarks and strategies."""
    return 1 + sum(size(c) for c in children(e))


# ---------------------------------------------------------------------------------------------
# exact evaluation and the active affine piece
# ---------------------------------------------------------------------------------------------

def _lookup(point: Mapping[str, Fraction], name: str) -> Fraction:
    try:
        return as_fraction(point[name])
    except KeyError:
        raise UnknownNameError(f"no value given for parameter '{name}'") from None


def eval_affine(a: Affine, point: Mapping[str, Fraction]) -> Fraction:
    return a.const + sum((c * _lookup(point, n) for n, c in a.coeffs), Fraction(0))


def evaluate(e: Expr, point: Mapping[str, Number]) -> Fraction:
    """Exact value of `e` at a rational point (a mapping from parameter name to number)."""
    if isinstance(e, Affine):
        return eval_affine(e, point)
    if isinstance(e, Sum):
        return eval_affine(e.affine, point) + sum((evaluate(t, point) for t in e.terms), Fraction(0))
    values = [evaluate(a, point) for a in e.args]
    return min(values) if isinstance(e, Min) else max(values)


def affine_piece(e: Expr, point: Mapping[str, Number]) -> Affine:
    """The affine function that `e` equals near `point` on the side picked by ties.

    At a point where several arguments of a min/max tie, the first tying argument in canonical order
    is taken; callers that need the piece of a whole cell pass an interior point of the cell.
    """
    if isinstance(e, Affine):
        return e
    if isinstance(e, Sum):
        out = e.affine
        for t in e.terms:
            out = _add_affine(out, affine_piece(t, point))
        return out
    values = [evaluate(a, point) for a in e.args]
    target = min(values) if isinstance(e, Min) else max(values)
    return affine_piece(e.args[values.index(target)], point)


def substitute(e: Expr, mapping: Mapping[str, object]) -> Expr:
    """Replace parameters by expressions or numbers, rebuilding through the smart constructors."""
    repl = {k: lift(v) for k, v in mapping.items()}
    if isinstance(e, Affine):
        out: Expr = const(e.const)
        for n, c in e.coeffs:
            out = add(out, scale(c, repl.get(n, param(n))))
        return out
    if isinstance(e, Sum):
        return add(substitute(e.affine, repl), *(substitute(t, repl) for t in e.terms))
    parts = [substitute(a, repl) for a in e.args]
    return min_(*parts) if isinstance(e, Min) else max_(*parts)


def rename(e: Expr, mapping: Mapping[str, str]) -> Expr:
    """Rename parameters (a simultaneous swap is fine: {'a': 'b', 'b': 'a'})."""
    return substitute(e, {old: param(new) for old, new in mapping.items()})


# ---------------------------------------------------------------------------------------------
# text form (the grammar of verifier.text.parse reads it back to the same tree)
# ---------------------------------------------------------------------------------------------

def format_number(q: Fraction) -> str:
    return str(q.numerator) if q.denominator == 1 else f"{q.numerator}/{q.denominator}"


def join_affine(a: Affine, term, number) -> str:
    """Signs and order of an affine form, shared by every printer: `1 - alpha/2`, `alpha - 2`.

    `term(name, magnitude)` and `number(magnitude)` render the unsigned pieces in the target notation.
    """
    parts = [("- " if c < 0 else "+ ") + term(name, abs(c)) for name, c in a.coeffs]
    if a.const > 0:
        parts.insert(0, "+ " + number(a.const))  # reads as the trade writes it: 1 - alpha
    elif a.const < 0 or not parts:
        parts.append(("- " if a.const < 0 else "+ ") + number(abs(a.const)))
    text = " ".join(parts)
    return ("-" + text[2:]) if text.startswith("- ") else text[2:]


def _text_term(name: str, mag: Fraction) -> str:
    if mag == 1:
        return name
    if mag.denominator == 1:
        return f"{mag.numerator}*{name}"
    if mag.numerator == 1:
        return f"{name}/{mag.denominator}"
    return f"{mag.numerator}*{name}/{mag.denominator}"


text_term = _text_term   # one term in the text syntax (`2*alpha`, `gamma/2`), for other printers


def _affine_text(a: Affine) -> str:
    return join_affine(a, _text_term, format_number)


def render(e: Expr, affine_text, positive_part, extremum) -> str:
    """One traversal for every notation: (x)^+ for max(x, 0), min/max lists, sums of terms."""
    def walk(node: Expr) -> str:
        if isinstance(node, Affine):
            return affine_text(node)
        if isinstance(node, Sum):
            pieces = [walk(t) for t in node.terms]
            if node.affine != ZERO_AFFINE:
                pieces.insert(0, affine_text(node.affine))
            return " + ".join(pieces)
        if isinstance(node, Max) and len(node.args) == 2 and const(0) in node.args:
            return positive_part(walk(node.args[0] if node.args[1] == const(0) else node.args[1]))
        if isinstance(node, (Min, Max)):
            return extremum("min" if isinstance(node, Min) else "max", [walk(a) for a in node.args])
        raise TypeError(f"unknown expression node {type(node).__name__}")
    return walk(e)


def to_text(e: Expr) -> str:
    """Plain-text form in the tool's input syntax: `min(1, alpha/2 + (1 - alpha)^+)`."""
    return render(e, _affine_text, lambda inner: f"({inner})^+",
                  lambda kind, args: f"{kind}(" + ", ".join(args) + ")")
