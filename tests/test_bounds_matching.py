"""Maximum-weight matching of exponent matrices (bounds.matching), checked against scipy and mpmath."""

import random
from fractions import Fraction

import mpmath
import numpy as np
from hypothesis import given, settings, strategies as st
from scipy.optimize import linear_sum_assignment

from bounds.matching import matching_gdof, matching_value
from verifier.expressions.expr import affine, const, evaluate, param, to_text


def _scipy_value(matrix):
    """Exact weight of the assignment scipy picks on the float matrix (max(0, a), 0 for no link)."""
    exact = [[Fraction(0) if e is None else max(Fraction(0), e) for e in row] for row in matrix]
    rows, cols = linear_sum_assignment(np.array(exact, dtype=float), maximize=True)
    return sum((exact[i][j] for i, j in zip(rows, cols)), Fraction(0))


entry = st.one_of(st.none(), st.fractions(min_value=-3, max_value=6, max_denominator=6))
matrices = st.integers(1, 4).flatmap(
    lambda m: st.integers(1, 4).flatmap(lambda n: st.lists(st.lists(entry, min_size=n, max_size=n),
                                                           min_size=m, max_size=m)))


@settings(max_examples=150, deadline=None)
@given(matrices)
def test_numeric_matching_equals_scipy_assignment(matrix):
    # reference library: scipy.optimize.linear_sum_assignment (rectangular, maximize=True)
    assert matching_value(matrix) == _scipy_value(matrix)


@settings(max_examples=60, deadline=None)
@given(st.integers(1, 3), st.integers(1, 3), st.randoms(use_true_random=False))
def test_symbolic_matching_agrees_with_scipy_at_random_points(m, n, rnd):
    names = ["alpha", "beta"]
    sym = [[None if rnd.random() < 0.2 else
            affine({v: rnd.randint(-2, 2) for v in names}, Fraction(rnd.randint(-4, 8), 2))
            for _ in range(n)] for _ in range(m)]
    expr = matching_gdof(sym)
    for _ in range(8):
        point = {v: Fraction(rnd.randint(0, 30), rnd.randint(1, 6)) for v in names}
        numeric = [[None if e is None else evaluate(e, point) for e in row] for row in sym]
        # reference library: scipy.optimize.linear_sum_assignment
        assert evaluate(expr, point) == _scipy_value(numeric) == matching_value(numeric)


def test_symbolic_form_of_a_two_by_two_cut():
    a, b = param("a"), param("b")
    expr = matching_gdof([[a, 1], [const(1), b]])
    assert to_text(expr) == "max(2, (a)^+ + (b)^+)"
    assert matching_gdof([[None, None]]) == const(0)


def _logdet_slope(exps, snr_lo, snr_hi, rng):
    """Finite-difference slope of log det(I + H H^*) in log SNR, |h_ij|^2 = SNR^a_ij, random phases."""
    def logdet(snr):
        h = mpmath.matrix(len(exps), len(exps[0]))
        for i, row in enumerate(exps):
            for j, a in enumerate(row):
                if a is not None:
                    h[i, j] = mpmath.mpf(snr) ** (mpmath.mpf(a.numerator) / a.denominator / 2) * mpmath.expj(phases[i][j])
        g = mpmath.eye(len(exps)) + h * h.transpose_conj()
        return mpmath.log(mpmath.re(mpmath.det(g)))
    phases = [[mpmath.mpf(rng.random()) * 2 * mpmath.pi for _ in row] for row in exps]
    return (logdet(snr_hi) - logdet(snr_lo)) / (mpmath.log(snr_hi) - mpmath.log(snr_lo))


def test_matching_is_the_high_snr_slope_of_log_det():
    # GDoF of a MIMO link with generic gains = max-weight matching of (max(0, a_ij)): common practice in
    # GDoF converses (from memory, REFERENCES.md #8); confirmed here with mpmath at SNR 10^40 .. 10^80.
    rng = random.Random(7)
    mpmath.mp.dps = 400
    try:
        for _ in range(6):
            m, n = rng.randint(1, 3), rng.randint(1, 3)
            exps = [[None if rng.random() < 0.2 else Fraction(rng.randint(-2, 8), 2) for _ in range(n)]
                    for _ in range(m)]
            slope = _logdet_slope(exps, mpmath.mpf(10) ** 40, mpmath.mpf(10) ** 80, rng)
            assert abs(slope - float(matching_value(exps))) < 1e-3
    finally:
        mpmath.mp.dps = 15
