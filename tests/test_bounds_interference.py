"""Two-user IC (bounds.interference, bounds.ic_schemes): outer region, W curve, HK scheme, GF(2) corners."""

import itertools
import random
from fractions import Fraction

import numpy as np
import pytest
from scipy.optimize import linprog

from bounds.cutset import sum_cut_bounds
from bounds.ic_schemes import ShiftIC, achieve, vertices_2d
from bounds.interference import (deterministic_ic_region, from_receiver_first, hk_region, ic_network,
                                 ic_outer_bounds, ic_sum_gdof, symmetric_bounds, symmetric_rate,
                                 symmetric_sum_gdof, w_curve)
from verifier.expressions.expr import evaluate, min_

ALPHA_POINTS = sorted({Fraction(k, d) for d in (1, 2, 3, 4, 5, 6, 7, 12) for k in range(0, 5 * d + 1)})


def test_asymmetric_bounds_specialise_to_the_w_curve():
    # Etkin, Tse, Wang, IEEE Trans. IT 54(12), 2008: symmetric GDoF per user
    # d(alpha) = min(1, max(alpha/2, 1 - alpha/2), max(alpha, 1 - alpha))  (from memory, REFERENCES.md #1)
    sym = symmetric_rate(list(ic_outer_bounds(1, "alpha", "alpha", 1).values()))
    total = ic_sum_gdof(1, "alpha", "alpha", 1)
    listed = min_(*symmetric_bounds().values())
    for alpha in ALPHA_POINTS:
        point = {"alpha": alpha}
        expected = evaluate(w_curve(), point)
        assert evaluate(sym, point) == expected
        assert evaluate(total, point) == 2 * expected == evaluate(symmetric_sum_gdof(), point)
        assert evaluate(listed, point) == expected


@pytest.mark.parametrize("alpha, d", [("1/4", "3/4"), ("1/2", "1/2"), ("3/5", "3/5"), ("4/5", "3/5"),
                                      ("1", "1/2"), ("3/2", "3/4"), ("3", "1")])
def test_w_curve_spot_values(alpha, d):
    # spot values of the W curve, Etkin-Tse-Wang 2008 (REFERENCES.md #1, from memory)
    assert evaluate(w_curve(), {"alpha": Fraction(alpha)}) == Fraction(d)


@pytest.mark.parametrize("m, per_user", [(3, 7), (6, 6), (10, 5), (15, Fraction(15, 2)), (25, 10)])
def test_bresler_tse_symmetric_rates(m, per_user):
    # Bresler, Tse, Eur. Trans. Telecommun. 19(4), 2008: symmetric rate n W(m/n) (REFERENCES.md #5, from memory)
    rows = deterministic_ic_region(10, m, m, 10)
    assert evaluate(symmetric_rate(rows), {}) == per_user
    # reference library: scipy.optimize.linprog, max d1 subject to d1 = d2 and the region
    a = [[float(r.coeff("d1")), float(r.coeff("d2"))] for r in rows]
    b = [float(evaluate(r.rhs, {})) for r in rows]
    res = linprog([-1, 0], A_ub=np.array(a), b_ub=np.array(b), A_eq=np.array([[1, -1]]), b_eq=[0],
                  bounds=[(0, None)] * 2, method="highs")
    assert res.status == 0 and abs(-res.fun - float(per_user)) < 1e-9


def _random_point(rng):
    return {k: Fraction(rng.randint(0, 24), rng.randint(1, 6)) for k in ("a11", "a12", "a21", "a22")}


def test_simple_hk_scheme_meets_the_outer_region():
    # Etkin-Tse-Wang 2008: a simple Han-Kobayashi scheme (private power at the other receiver's noise
    # floor) is within one bit of the outer bound, hence the same GDoF region (from memory).  Checked by
    # exact vertex enumeration at random rational points.
    outer = deterministic_ic_region("a11", "a12", "a21", "a22")
    inner = hk_region("a11", "a12", "a21", "a22")
    rng = random.Random(11)
    for _ in range(150):
        point = _random_point(rng)
        assert vertices_2d(inner, point) == vertices_2d(outer, point)


def test_sum_gdof_never_exceeds_the_cut_set_bound():
    total = ic_sum_gdof("a11", "a12", "a21", "a22")
    (cut,) = sum_cut_bounds(ic_network("a11", "a12", "a21", "a22")).values()
    rng = random.Random(5)
    for _ in range(300):
        point = _random_point(rng)
        assert evaluate(total, point) <= evaluate(cut, point)


SMALL_POINTS = [(1, 2, 2, 2), (2, 1, 1, 2), (3, 1, 2, 2), (2, 0, 3, 3), (3, 2, 0, 2), (1, 2, 3, 2),
                (3, 3, 1, 2), (2, 3, 3, 2), (3, 1, 1, 3), (2, 2, 2, 2), (3, 2, 3, 1), (1, 3, 3, 3)]


@pytest.mark.parametrize("levels", SMALL_POINTS)
def test_every_corner_is_achieved_by_a_gf2_linear_scheme(levels):
    # achievability on the shift-matrix model over GF(2) (Avestimehr-Diggavi-Tse 2011), checked by ranks
    for corner in vertices_2d(deterministic_ic_region(*levels)):
        scheme = achieve(*levels, *corner)
        assert scheme is not None, (levels, corner)
        uses, v1, v2 = scheme
        assert ShiftIC(*levels, uses).decodable(v1, v2)
        assert (len(v1), len(v2)) == (corner[0] * uses, corner[1] * uses)


def test_half_integer_symmetric_point_needs_two_uses():
    # n = 2, m = 3: alpha = 3/2, symmetric rate 2 * W(3/2) = 3/2 (REFERENCES.md #5)
    assert evaluate(symmetric_rate(deterministic_ic_region(2, 3, 3, 2)), {}) == Fraction(3, 2)
    uses, _, _ = achieve(2, 3, 3, 2, Fraction(3, 2), Fraction(3, 2))
    assert uses == 2


def test_points_outside_the_region_are_never_achieved():
    # the outer bounds are a converse: no linear scheme may beat them
    for levels in [(2, 1, 1, 2), (1, 2, 3, 2), (2, 3, 3, 2), (3, 1, 2, 2)]:
        rows = deterministic_ic_region(*levels)
        for d1, d2 in itertools.product(range(4), repeat=2):
            outside = any(r.coeff("d1") * d1 + r.coeff("d2") * d2 > evaluate(r.rhs, {}) for r in rows)
            if outside:
                assert achieve(*levels, d1, d2, max_uses=1) is None, (levels, d1, d2)


def test_region_is_unchanged_when_the_cross_links_swap():
    # observed reciprocity: swapping a12 and a21 leaves the region unchanged (checked exactly here), so
    # only the names of the individual sum bounds depend on the index convention
    for levels in itertools.product(range(4), repeat=4):
        n11, n12, n21, n22 = levels
        assert vertices_2d(deterministic_ic_region(*levels)) == \
            vertices_2d(deterministic_ic_region(n11, n21, n12, n22))


def test_index_conversion_from_receiver_first():
    a = [["a11", "a21"], ["a12", "a22"]]  # A[rx][tx]: receiver 1 hears transmitter 2 at a21
    assert from_receiver_first(a) == ("a11", "a12", "a21", "a22")
    names = ic_outer_bounds(1, 0, 2, 1)
    assert evaluate(names["sum, genie at receiver 1 (Z)"].rhs, {}) == 2   # (1-0)^+ + max(1, 0)
