"""Two-user interference channel: genie-aided outer bounds, the simple Han-Kobayashi scheme, the W curve.

Why: the two-user IC is the benchmark every GDoF reviewer knows; its outer region and its symmetric
"W" curve are the reference claims the rest of the tool is tested on.

Index convention (that of Etkin-Tse-Wang 2008 and Bresler-Tse 2008): a_ij, n_ij is the exponent (number
of levels) of the link from TRANSMITTER i to RECEIVER j.  So a11, a22 are direct links, a21 is the
interference heard at receiver 1 and a12 the interference heard at receiver 2.  Exponents are assumed
nonnegative (a link below the noise floor is exponent 0).  Note that bounds.tin uses the opposite,
receiver-first order, as its paper does; `from_receiver_first` converts.

Outer region in GDoF form (Etkin, Tse, Wang, IEEE Trans. IT 54(12), 2008, bounds in the deterministic
form of Bresler, Tse, Eur. Trans. Telecommun. 19(4), 2008; from memory, REFERENCES.md #5):
  d1 <= a11;  d2 <= a22;
  d1 + d2 <= (a11 - a12)^+ + max(a22, a12);   d1 + d2 <= (a22 - a21)^+ + max(a11, a21);
  d1 + d2 <= max(a21, (a11 - a12)^+) + max(a12, (a22 - a21)^+);
  2 d1 + d2 <= max(a11, a21) + (a11 - a12)^+ + max(a12, (a22 - a21)^+);
  d1 + 2 d2 <= max(a22, a12) + (a22 - a21)^+ + max(a21, (a11 - a12)^+).
With integers it is the capacity region of the linear deterministic IC (Bresler-Tse).
"""

from __future__ import annotations

from fractions import Fraction
from typing import Sequence

from verifier.expressions.expr import Expr, add, max_, min_, pos, scale

from .network import Network, interference_channel, to_expr
from .projection import Inequality, eliminate, le, maximize


def _four(a11, a12, a21, a22) -> tuple[Expr, Expr, Expr, Expr]:
    return tuple(to_expr(x, name) for x, name in ((a11, "a11"), (a12, "a12"), (a21, "a21"), (a22, "a22")))


def ic_outer_bounds(a11, a12, a21, a22) -> dict[str, Inequality]:
    """The seven named outer bounds of the two-user IC (transmitter-first indices)."""
    a11, a12, a21, a22 = _four(a11, a12, a21, a22)
    p1, p2 = pos(add(a11, scale(-1, a12))), pos(add(a22, scale(-1, a21)))  # private levels
    y1, y2 = max_(a11, a21), max_(a22, a12)          # everything receiver 1, 2 hears
    s1, s2 = max_(a21, p1), max_(a12, p2)            # receiver j given its own common part
    return {
        "single-user d1": le(["d1"], a11),
        "single-user d2": le(["d2"], a22),
        "sum, genie at receiver 1 (Z)": le(["d1", "d2"], add(p1, y2)),
        "sum, genie at receiver 2 (Z)": le(["d1", "d2"], add(p2, y1)),
        "sum, genie at both receivers (ETW)": le(["d1", "d2"], add(s1, s2)),
        "2d1 + d2": le({"d1": 2, "d2": 1}, add(y1, p1, s2)),
        "d1 + 2d2": le({"d1": 1, "d2": 2}, add(y2, p2, s1)),
    }


def deterministic_ic_region(n11, n12, n21, n22) -> list[Inequality]:
    """Linear inequalities of the deterministic IC capacity region (Bresler-Tse), transmitter-first."""
    return list(ic_outer_bounds(n11, n12, n21, n22).values())


def ic_sum_gdof(a11, a12, a21, a22) -> Expr:
    """Largest d1 + d2 over the outer region, by Fourier-Motzkin projection."""
    return maximize(list(ic_outer_bounds(a11, a12, a21, a22).values()), {"d1": 1, "d2": 1}).value


def symmetric_rate(bounds: Sequence[Inequality]) -> Expr:
    """Largest d with (d, d) in the region given by inequalities in d1, d2."""
    rows = [le({"d": c.coeff("d1") + c.coeff("d2")}, c.rhs) for c in bounds]
    return maximize(rows, {"d": 1}).value


# ---------------------------------------------------------------------------------------------
# symmetric channel: a11 = a22 = 1, a12 = a21 = alpha
# ---------------------------------------------------------------------------------------------

def w_curve(alpha="alpha") -> Expr:
    """Per-user GDoF of the symmetric IC (Etkin-Tse-Wang 2008, REFERENCES.md #1, from memory):
    min(1, max(alpha/2, 1 - alpha/2), max(alpha, 1 - alpha))."""
    a = to_expr(alpha)
    return min_(1, max_(scale(Fraction(1, 2), a), add(1, scale(Fraction(-1, 2), a))), max_(a, add(1, scale(-1, a))))


def symmetric_sum_gdof(alpha="alpha") -> Expr:
    """Sum-GDoF of the symmetric IC: twice the W curve."""
    return scale(2, w_curve(alpha))


def symmetric_bounds(alpha="alpha") -> dict[str, Expr]:
    """Per-user outer bounds of the symmetric IC as upper bounds on d (REFERENCES.md #1)."""
    a = to_expr(alpha)
    z = add(max_(1, a), pos(add(1, scale(-1, a))))
    e = scale(2, max_(a, add(1, scale(-1, a))))
    return {"single-user": to_expr(1), "sum (Z)": scale(Fraction(1, 2), z), "sum (ETW)": scale(Fraction(1, 2), e),
            "2d1 + d2": scale(Fraction(1, 3), add(z, scale(Fraction(1, 2), e)))}


# ---------------------------------------------------------------------------------------------
# the simple Han-Kobayashi scheme of Etkin-Tse-Wang, in GDoF form
# ---------------------------------------------------------------------------------------------

def hk_rows(a11, a12, a21, a22) -> list[Inequality]:
    """Rates of the common/private split with auxiliaries c1, p1, c2, p2 (d_i = c_i + p_i).

    Each private part is sent at the power that makes it arrive at the noise floor at the other receiver
    (so it is heard at level (a_ii - a_ij)^+ at its own), and receiver 1 decodes (c1, p1, c2) treating
    p2 as noise; the other common message is decoded non-uniquely, so subsets made of it alone impose
    nothing.  GDoF of each decoding event is the top level of the signals it involves.
    """
    a11, a12, a21, a22 = _four(a11, a12, a21, a22)
    rows = [le({"d1": 1, "c1": -1, "p1": -1}, 0), le({"c1": 1, "p1": 1, "d1": -1}, 0),
            le({"d2": 1, "c2": -1, "p2": -1}, 0), le({"c2": 1, "p2": 1, "d2": -1}, 0)]
    for (own_c, own_p, other_c, direct, cross_in, cross_out) in (("c1", "p1", "c2", a11, a21, a12),
                                                                 ("c2", "p2", "c1", a22, a12, a21)):
        private = pos(add(direct, scale(-1, cross_out)))
        rows += [le([own_c], direct), le([own_p], private), le([own_c, own_p], direct),
                 le([own_c, other_c], max_(direct, cross_in)), le([own_p, other_c], max_(private, cross_in)),
                 le([own_c, own_p, other_c], max_(direct, cross_in))]
    return rows


def hk_region(a11, a12, a21, a22) -> list[Inequality]:
    """The simple HK scheme's GDoF region in (d1, d2): the split rates eliminated by Fourier-Motzkin."""
    shadow = eliminate(hk_rows(a11, a12, a21, a22), ["c1", "p1", "c2", "p2"], nonnegative=True)
    return [row for row in shadow if row.coeffs]


def ic_network(a11, a12, a21, a22) -> Network:
    """The same channel as a Network (T1, T2, R1, R2), for the cut-set and deterministic generators."""
    return interference_channel({(1, 1): a11, (1, 2): a12, (2, 1): a21, (2, 2): a22})


def from_receiver_first(a: Sequence[Sequence[object]]) -> tuple[object, object, object, object]:
    """(a11, a12, a21, a22) in this module's order from a receiver-first matrix A[rx][tx] (as in tin)."""
    return a[0][0], a[1][0], a[0][1], a[1][1]
