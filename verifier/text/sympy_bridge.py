"""Conversion between engine expressions and sympy, for users who already hold formulas in sympy and
for tests that use sympy as an independent reference evaluator.

Why a bridge rather than sympy inside the engine: sympy's Min/Max simplify eagerly and its canonical
form is not ours, so the engine keeps its own tree (verifier.expressions.expr) and crosses over only here.

`from_sympy` accepts Add, Mul with at most one non-constant factor, Min, Max, Abs, Integer, Rational,
Float (read through its decimal string, so Float('0.1') is 1/10 -- a Float that is already an
approximation, such as Float(1)/3, stays that approximation), Symbol, Pow of numbers, and the simple
Piecewise below.  Anything else is an InputError naming it.

Piecewise limitation: only the two-piece form `Piecewise((a, L rel 0), (b, True))` with `a`, `b` affine
and one linear inequality as condition is converted, and only when it is continuous in the precise
sense that `a - b = k*L` for a constant k: then the value is max(a, b) if k > 0, min(a, b) if k < 0
(for a `>`/`>=` condition; flipped for `<`/`<=`), a sound identity at every point including L = 0.
Other Piecewise objects (more pieces, And/Or conditions, discontinuous jumps) raise an InputError;
state them with verifier.text.parse.parse_piecewise instead.
"""

from __future__ import annotations

from fractions import Fraction
from typing import Mapping

import sympy

from verifier.core.errors import InputError, NonlinearError
from verifier.expressions.expr import (Affine, Expr, Max, Min, Sum, abs_, add, affine, as_fraction, const, constant_value,
                   is_constant, max_, min_, param, scale)
from verifier.text.lexer import normalize_name

_IDENT_START = set("ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz_")
_IDENT_CHARS = _IDENT_START | set("0123456789")


def _rational(q: Fraction) -> sympy.Rational:
    return sympy.Rational(q.numerator, q.denominator)


def to_sympy(e: Expr, symbols: Mapping[str, sympy.Symbol] | None = None) -> sympy.Expr:
    """sympy form with Min/Max/Rational; parameters become Symbol(name, real=True) unless given."""
    symbols = dict(symbols or {})

    def sym(name: str) -> sympy.Symbol:
        if name not in symbols:
            symbols[name] = sympy.Symbol(name, real=True)
        return symbols[name]

    def walk(node: Expr) -> sympy.Expr:
        if isinstance(node, Affine):
            return sympy.Add(_rational(node.const), *(_rational(c) * sym(n) for n, c in node.coeffs))
        if isinstance(node, Sum):
            return sympy.Add(walk(node.affine), *(walk(t) for t in node.terms))
        if isinstance(node, Min):
            return sympy.Min(*(walk(a) for a in node.args))
        if isinstance(node, Max):
            return sympy.Max(*(walk(a) for a in node.args))
        raise TypeError(f"unknown expression node {type(node).__name__}")

    return walk(e)


def region_to_sympy(atoms, symbols: Mapping[str, sympy.Symbol] | None = None):
    """A conjunction of atoms as a sympy boolean (And of exact relationals)."""
    symbols = dict(symbols or {})
    rels = [(sympy.StrictGreaterThan if a.strict else sympy.GreaterThan)(to_sympy(a.form, symbols), 0)
            for a in atoms]
    return sympy.And(*rels) if rels else sympy.true


def piecewise_to_sympy(pieces, symbols: Mapping[str, sympy.Symbol] | None = None) -> sympy.Piecewise:
    """sympy Piecewise from (expression, [conjunctions of atoms]) pairs, e.g. a regime report's
    formulas; the regimes are disjoint, so the order of the pieces does not matter."""
    symbols = dict(symbols or {})
    args = []
    for expr, conjunctions in pieces:
        cond = sympy.Or(*(region_to_sympy(atoms, symbols) for atoms in conjunctions))
        args.append((to_sympy(expr, symbols), cond))
    return sympy.Piecewise(*args)


def _describe(x) -> str:
    return f"'{x}' ({type(x).__name__})"


def _symbol(x: sympy.Symbol) -> Expr:
    name = normalize_name(x.name)
    if not name or name[0] not in _IDENT_START or not all(c in _IDENT_CHARS for c in name):
        raise InputError(f"sympy symbol name '{x.name}' is not a valid parameter name")
    return param(name)


def _number(x) -> Expr:
    if x.is_Rational:
        return const(Fraction(int(x.p), int(x.q)))
    if x.is_Float:
        if not x.is_finite:
            raise InputError(f"not a finite number: {_describe(x)}")
        return const(as_fraction(str(x)))
    raise InputError(f"unsupported sympy number {_describe(x)}")


def _product(x) -> Expr:
    out: Expr = const(1)
    for factor in x.args:
        f = from_sympy(factor)
        if is_constant(out):
            out = scale(constant_value(out), f)
        elif is_constant(f):
            out = scale(constant_value(f), out)
        else:
            raise NonlinearError(f"nonlinear term '{x}' in sympy expression")
    return out


def _power(x) -> Expr:
    base, exp = x.args
    if base.is_Number and exp.is_Integer:
        return const(as_fraction(_number(base).const) ** int(exp))
    raise NonlinearError(f"nonlinear term '{x}' in sympy expression")


def _condition_form(cond) -> tuple[Affine, bool]:
    """`lhs rel rhs` -> (L, upward): the condition is L > 0 / L >= 0 when upward, L < 0 / L <= 0 else."""
    if not isinstance(cond, (sympy.GreaterThan, sympy.StrictGreaterThan, sympy.LessThan,
                             sympy.StrictLessThan)):
        raise InputError(f"unsupported Piecewise condition '{cond}' (only one linear inequality)")
    diff = add(from_sympy(cond.lhs), scale(-1, from_sympy(cond.rhs)))
    if not isinstance(diff, Affine):
        raise InputError(f"unsupported Piecewise condition '{cond}' (not linear)")
    upward = isinstance(cond, (sympy.GreaterThan, sympy.StrictGreaterThan))
    return diff, upward


def _piecewise(x) -> Expr:
    pieces = x.args
    if len(pieces) != 2 or pieces[1].cond != sympy.true:
        raise InputError(f"unsupported Piecewise '{x}': only (a, condition), (b, True) is converted")
    a, b = from_sympy(pieces[0].expr), from_sympy(pieces[1].expr)
    if not (isinstance(a, Affine) and isinstance(b, Affine)):
        raise InputError(f"unsupported Piecewise '{x}': both branches must be affine")
    form, upward = _condition_form(pieces[0].cond)
    gap = add(a, scale(-1, b))  # a - b
    if is_constant(gap) and constant_value(gap) == 0:
        return a
    k = _ratio(gap, form)
    if k is None:
        raise InputError(f"unsupported Piecewise '{x}': the branches do not meet where the condition "
                         "switches, so it is not a min or max")
    chooses_max = (k > 0) == upward
    return max_(a, b) if chooses_max else min_(a, b)


def _ratio(gap: Affine, form: Affine) -> Fraction | None:
    """k with gap == k*form, or None."""
    if not form.coeffs:
        return None
    name, c = form.coeffs[0]
    k = dict(gap.coeffs).get(name, Fraction(0)) / c
    scaled = affine([(n, k * v) for n, v in form.coeffs], k * form.const)
    return k if k != 0 and scaled == gap else None


def from_sympy(x) -> Expr:
    """Engine expression from a sympy expression (see the module docstring for what is accepted)."""
    if not isinstance(x, sympy.Basic):  # never sympify: on a string that would eval it
        if isinstance(x, (int, float, Fraction)) and not isinstance(x, bool):
            return const(as_fraction(x))
        raise InputError(f"not a sympy expression: {x!r}")
    if x.is_Number:
        return _number(x)
    if x.is_Symbol:
        return _symbol(x)
    if x.is_Add:
        return add(*(from_sympy(a) for a in x.args))
    if x.is_Mul:
        return _product(x)
    if x.is_Pow:
        return _power(x)
    if isinstance(x, sympy.Min):
        return min_(*(from_sympy(a) for a in x.args))
    if isinstance(x, sympy.Max):
        return max_(*(from_sympy(a) for a in x.args))
    if isinstance(x, sympy.Abs):
        return abs_(from_sympy(x.args[0]))
    if isinstance(x, sympy.Piecewise):
        return _piecewise(x)
    raise InputError(f"unsupported sympy expression {_describe(x)}: only numbers, symbols, +, "
                     "constant multiples, Min, Max, Abs and simple Piecewise are accepted")
