"""Finite-SNR rate expressions (bounds.highsnr): exact GDoF extraction confirmed by mpmath slopes."""

from fractions import Fraction

import mpmath
import pytest
from hypothesis import given, settings, strategies as st

from bounds.highsnr import gdof_of, parse_rate
from bounds.interference import symmetric_bounds
from verifier.core.errors import InputError, NonlinearError, ParseError
from verifier.expressions.expr import evaluate, max_, param, pos, scale, to_text

SNRS = [mpmath.mpf(10) ** 20, mpmath.mpf(10) ** 40, mpmath.mpf(10) ** 80]


@pytest.fixture(autouse=True)
def _precision():
    old = mpmath.mp.dps
    mpmath.mp.dps = 60
    yield
    mpmath.mp.dps = old


def _affine_text(rnd):
    return "(" + " + ".join(f"{rnd.randint(-2, 2)}*{v}" for v in ("a", "b")) + f" + {rnd.randint(-4, 8)}/4)"


def _inner_text(rnd, depth=0):
    kind = rnd.randrange(6 if depth < 2 else 2)
    if kind == 0:
        return str(rnd.randint(1, 5))
    if kind == 1:
        return "SNR^" + _affine_text(rnd)
    left, right = _inner_text(rnd, depth + 1), _inner_text(rnd, depth + 1)
    return {2: f"{left} + {right}", 3: f"({left})*({right})", 4: f"({left})/({right})",
            5: f"(1 + {left})"}[kind]


@settings(max_examples=60, deadline=None)
@given(st.randoms(use_true_random=False))
def test_extracted_gdof_matches_mpmath_slopes(rnd):
    # reference library: mpmath, R(SNR)/log SNR at SNR = 10^20, 10^40, 10^80 tends to the GDoF, and the
    # slope between 10^40 and 10^80 matches closely (exponents are multiples of 1/4, so every correction
    # term is at most SNR^(-1/4))
    terms = [f"{rnd.choice(['', '2*', '-', '1/2*'])}log2({_inner_text(rnd)})" for _ in range(rnd.randint(1, 3))]
    text = " + ".join(terms).replace("+ -", "- ")
    rate = parse_rate(text)
    point = {"a": Fraction(rnd.randint(0, 12), 4), "b": Fraction(rnd.randint(0, 12), 4)}
    d = evaluate(rate.gdof(), point)
    errors = [abs(rate.slope(snr, point) - mpmath.mpf(d.numerator) / d.denominator) for snr in SNRS]
    assert errors[2] <= errors[0] + mpmath.mpf(10) ** -30, text
    # the SNR-free part of R (up to three terms, coefficients up to 2, constants such as log2(12) and
    # log2(5): under 25 bits) over log2(10^80) ~ 266 bits: the ratio is within 0.1 of the GDoF there
    assert errors[2] < 0.1, text
    rise = rate.numeric(SNRS[2], point) - rate.numeric(SNRS[1], point)
    run = mpmath.log(SNRS[2], 2) - mpmath.log(SNRS[1], 2)
    assert abs(rise / run - mpmath.mpf(d.numerator) / d.denominator) < 1e-6, text


def test_the_two_log_example():
    text = "log2(1 + SNR) + log2(1 + SNR^a/(1 + SNR^b))"
    expr = gdof_of(text)
    for a in range(0, 9):
        for b in range(0, 9):
            point = {"a": Fraction(a, 4), "b": Fraction(b, 4)}
            assert evaluate(expr, point) == 1 + max(0, Fraction(a - b, 4))  # common practice (high-SNR limit)


def test_etw_finite_snr_symmetric_bounds_extract_to_their_gdof_form():
    # Etkin, Tse, Wang, IEEE Trans. IT 54(12), 2008: symmetric sum-rate bounds at finite SNR with INR =
    # SNR^alpha (finite-SNR forms from memory; their GDoF forms are REFERENCES.md #1)
    inr = {"INR": "alpha"}
    z = gdof_of("log2(1 + SNR + INR) + log2(1 + SNR/(1 + INR))", aliases=inr)
    etw = gdof_of("2*log2(1 + INR + SNR/(1 + INR))", aliases=inr)
    two_one = gdof_of("log2(1 + SNR + INR) + log2(1 + INR + SNR/(1 + INR)) + log2(1 + SNR/(1 + INR))",
                      aliases=inr)
    per_user = symmetric_bounds()
    for k in range(0, 61):
        point = {"alpha": Fraction(k, 12)}
        assert evaluate(z, point) / 2 == evaluate(per_user["sum (Z)"], point)
        assert evaluate(etw, point) / 2 == evaluate(per_user["sum (ETW)"], point)
        assert evaluate(two_one, point) / 3 == evaluate(per_user["2d1 + d2"], point)
    rate = parse_rate("2*log2(1 + INR + SNR/(1 + INR))", aliases=inr)
    slope = rate.slope(SNRS[2], {"alpha": Fraction(1, 3)})
    assert abs(slope - mpmath.mpf(4) / 3) < 0.01  # 2 max(1/3, 2/3); reference library: mpmath


def test_constants_scalings_and_bases():
    assert gdof_of("log(1 + SNR)/2 - 3") == scale(Fraction(1, 2), 1)
    assert gdof_of("3*(log10(1 + SNR^a) - log10(2))") == pos(scale(3, param("a")))
    assert gdof_of("log((1 + SNR)^2)") == 2 * gdof_of("ln(1 + SNR)")
    assert gdof_of("log2(1 + P^a)", base="P") == pos(param("a"))
    assert to_text(gdof_of("log(1 + SNR^{max(a, b)} + SNR^-c)")) == to_text(max_(0, param("a"), param("b"), -param("c")))


@pytest.mark.parametrize("text, error, column", [
    ("log(1 - SNR)", ParseError, 7),
    ("log(SNR) * log(SNR)", NonlinearError, 12),
    ("log2(1 + SNR) + ln(SNR)", ParseError, 17),
    ("log(1 + x)", ParseError, 9),
    ("log(1 + SNR", ParseError, 12),
    ("log(1 + SNR^(a +))", ParseError, 17),
    ("log(1 + (1 + SNR)^a)", NonlinearError, 19),
    ("log(0 + SNR)", ParseError, 5),
    ("log(1 + SNR) / 0", ParseError, 16),
    ("log(1 + SNR) $", ParseError, 14),
])
def test_errors_name_the_column(text, error, column):
    with pytest.raises(error) as info:
        gdof_of(text)
    assert isinstance(info.value, InputError)
    assert info.value.column == column
