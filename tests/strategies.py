"""Shared hypothesis strategies: random rationals, points, affine forms, expression trees and regions.

Why shared: every stage (parser, SMT encoding, regimes, certificates) is tested on the same kind of
random piecewise-linear trees, so the generators live in one place.  Everything is built through the
smart constructors of verifier.expressions.expr / verifier.expressions.region, so generated objects are canonical.

    from tests.strategies import exprs, rationals, points
    @given(exprs(names=("alpha", "beta")), points(("alpha", "beta")))
"""

from __future__ import annotations

from fractions import Fraction
from typing import Sequence

from hypothesis import strategies as st

from verifier.expressions.expr import abs_, add, affine, max_, min_, pos, scale
from verifier.expressions.region import Atom, Region

DEFAULT_NAMES = ("alpha", "beta", "gamma")


def rationals(min_value=-4, max_value=4, max_denominator: int = 6, nonzero: bool = False):
    """Exact Fractions in [min_value, max_value] with small denominators (readable counterexamples)."""
    base = st.fractions(min_value=Fraction(min_value), max_value=Fraction(max_value),
                        max_denominator=max_denominator)
    return base.filter(lambda q: q != 0) if nonzero else base


def points(names: Sequence[str] = DEFAULT_NAMES, min_value=-3, max_value=3, max_denominator: int = 8):
    """A dict name -> Fraction: a random rational point of parameter space."""
    return st.fixed_dictionaries({n: rationals(min_value, max_value, max_denominator) for n in names})


def affines(names: Sequence[str] = DEFAULT_NAMES, max_denominator: int = 4):
    """Affine forms with small rational coefficients; some coefficients are zero (sparse forms)."""
    coeff = st.one_of(st.just(Fraction(0)), rationals(-3, 3, max_denominator))
    return st.builds(lambda cs, c: affine(dict(zip(names, cs)), c),
                     st.tuples(*(coeff for _ in names)), rationals(-3, 3, max_denominator))


def _extend(children):
    group = st.lists(children, min_size=2, max_size=3)
    return st.one_of(
        group.map(lambda xs: min_(*xs)),
        group.map(lambda xs: max_(*xs)),
        group.map(lambda xs: add(*xs)),
        st.tuples(rationals(-3, 3, 4, nonzero=True), children).map(lambda t: scale(t[0], t[1])),
        children.map(pos),
        children.map(abs_),
    )


def exprs(names: Sequence[str] = DEFAULT_NAMES, max_leaves: int = 8, max_denominator: int = 4):
    """Random canonical expression trees: affine leaves under min, max, +, constant multiples,
    positive part and absolute value."""
    return st.recursive(affines(names, max_denominator), _extend, max_leaves=max_leaves)


def atoms(names: Sequence[str] = DEFAULT_NAMES, max_denominator: int = 4):
    """Random linear constraints `form > 0` or `form >= 0`."""
    return st.builds(Atom, affines(names, max_denominator), st.booleans())


def polyhedra(names: Sequence[str] = DEFAULT_NAMES, max_atoms: int = 3):
    return st.lists(atoms(names), min_size=0, max_size=max_atoms).map(
        lambda xs: Region.of(*xs).pieces[0])


def regions(names: Sequence[str] = DEFAULT_NAMES, max_pieces: int = 2, max_atoms: int = 3):
    """Unions of up to `max_pieces` polyhedra (possibly none: the empty region)."""
    return st.lists(polyhedra(names, max_atoms), min_size=0, max_size=max_pieces).map(
        lambda ps: Region(tuple(ps)))


