"""Fourier-Motzkin projection (bounds.projection) against scipy.optimize.linprog at random points."""

import random
from fractions import Fraction

import numpy as np
import pytest
from hypothesis import given, settings, strategies as st
from scipy.optimize import linprog

from bounds.projection import collect_terms, dominates, eliminate, le, max_sum, maximize, obviously_nonnegative
from verifier.core.errors import InputError
from verifier.expressions.expr import add, affine, evaluate, max_, min_, param, pos, to_text

NAMES = ("alpha", "beta")


def _random_rhs(rnd):
    def aff():
        return affine({v: rnd.randint(-2, 2) for v in NAMES}, Fraction(rnd.randint(-2, 6), 2))
    kind = rnd.randrange(4)
    if kind == 0:
        return aff()
    if kind == 1:
        return pos(aff())
    if kind == 2:
        return max_(aff(), aff())
    return add(min_(aff(), aff()), pos(aff()))


def _random_system(rnd, rates, aux):
    """Upper bounds on every rate (so the sum is bounded) plus mixed rows that use the auxiliaries."""
    cons = [le([r], _random_rhs(rnd)) for r in rates]
    variables = rates + aux
    for _ in range(rnd.randint(1, 5)):
        coeffs = {v: rnd.randint(-1, 2) for v in variables if rnd.random() < 0.6}
        if coeffs:
            cons.append(le(coeffs, _random_rhs(rnd)))
    for a in aux:  # an auxiliary must be bounded too, or a row may be slackened without limit
        cons.append(le({a: 1}, _random_rhs(rnd)))
    return cons


def _linprog(cons, weights, point, variables):
    """Reference optimum: scipy.optimize.linprog (HiGHS) on the numeric system, all variables >= 0."""
    a = [[float(c.coeff(v)) for v in variables] for c in cons]
    b = [float(evaluate(c.rhs, point)) for c in cons]
    cost = [-float(weights.get(v, 0)) for v in variables]
    res = linprog(cost, A_ub=np.array(a), b_ub=np.array(b), bounds=[(0, None)] * len(variables), method="highs")
    return res


@settings(max_examples=80, deadline=None)
@given(st.randoms(use_true_random=False))
def test_maximize_equals_linprog_at_random_points(rnd):
    rates, aux = ["d1", "d2", "d3"][: rnd.randint(1, 3)], ["u", "v"][: rnd.randint(0, 2)]
    cons = _random_system(rnd, rates, aux)
    weights = {r: rnd.randint(1, 3) for r in rates}
    try:
        proj = maximize(cons, weights)
    except InputError:
        return  # the sum is unbounded only if a rate escapes its own upper bound: cannot happen here
    for _ in range(6):
        point = {v: Fraction(rnd.randint(-6, 30), rnd.randint(1, 6)) for v in NAMES}
        feasible = all(evaluate(f, point) >= 0 for f in proj.feasibility)
        res = _linprog(cons, weights, point, rates + aux)
        # reference library: scipy.optimize.linprog
        assert feasible == (res.status == 0), (to_text(proj.value), point, res.message)
        if feasible:
            assert abs(float(evaluate(proj.value, point)) + res.fun) < 1e-7


@settings(max_examples=60, deadline=None)
@given(st.randoms(use_true_random=False))
def test_eliminate_gives_the_shadow_of_the_region(rnd):
    rates, aux = ["d1", "d2"], ["u", "v"]
    cons = _random_system(rnd, rates, aux)
    shadow = eliminate(cons, aux, nonnegative=True)
    point = {v: Fraction(rnd.randint(0, 20), rnd.randint(1, 4)) for v in NAMES}
    for _ in range(8):
        rate = {r: Fraction(rnd.randint(0, 12), rnd.randint(1, 3)) for r in rates}
        inside = all(sum(c * rate.get(v, 0) for v, c in s.coeffs) <= evaluate(s.rhs, point)
                     for s in shadow if set(v for v, _ in s.coeffs) <= set(rates))
        fixed = cons + [le({r: 1}, rate[r]) for r in rates] + [le({r: -1}, -rate[r]) for r in rates]
        res = _linprog(fixed, {}, point, rates + aux)
        # reference library: scipy.optimize.linprog as a feasibility oracle
        assert inside == (res.status == 0)


def test_mac_and_symmetric_ic_sums():
    a1, a2 = param("a1"), param("a2")
    mac = [le(["d1"], pos(a1)), le(["d2"], pos(a2)), le(["d1", "d2"], max_(pos(a1), pos(a2)))]
    assert to_text(max_sum(mac, ["d1", "d2"])) == "min(max(0, a1, a2), (a1)^+ + (a2)^+)"
    assert maximize(mac, {"d1": 1, "d2": 1}).feasibility == ()


def test_unbounded_sum_is_reported():
    with pytest.raises(InputError, match="unbounded"):
        maximize([le({"d1": 1, "d2": -1}, 1)], {"d1": 1})


def test_syntactic_helpers():
    alpha = param("alpha")
    assert obviously_nonnegative(max_(alpha, 1 - alpha))       # alpha + (1 - alpha) = 1
    assert not obviously_nonnegative(max_(alpha, 2 * alpha))
    assert dominates(add(pos(alpha), max_(alpha, 1 - alpha), 1), add(pos(alpha), 1))
    assert not dominates(add(pos(alpha), 1), add(pos(alpha), 2))
    assert collect_terms(add(pos(alpha), pos(alpha))) == pos(2 * alpha)
