"""Region inclusion against a direct z3 encoding written here, independently of the engine.

The test builds random H-form regions over rates (d1, d2) and one exponent t in [0, 2] from its own
small tree of bounds (constants, t, min, max, (x)^+), states "exists t, d in A(t) with d outside B(t)"
with the z3 Python API (If-terms for min and max; no verifier code involved), and requires the engine's
verdict on "A subset B" to agree: proved exactly when z3 says unsat.  (Common practice: differential
testing against an independent encoding of the same question.)
"""

from __future__ import annotations

from fractions import Fraction as F

import z3
from hypothesis import given, settings, strategies as st

from verifier.expressions.expr import add, const, max_, min_, param, scale
from verifier.rates import claims as RC
from verifier.rates.decide import decide
from verifier.rates.region import HRegion, inequality
from verifier.text.parse import parse_region

RATES = ("d1", "d2")
REGION_TEXT = "t >= 0, t <= 2"

# a bound is ("c", q) | ("t", slope, offset) | ("min" | "max", b1, b2) | ("pos", b)
leaf = st.one_of(st.tuples(st.just("c"), st.fractions(0, 2, max_denominator=3)),
                 st.tuples(st.just("t"), st.sampled_from([F(-1), F(1, 2), F(1), F(2)]),
                           st.fractions(-1, 2, max_denominator=2)))
bounds = st.recursive(leaf, lambda inner: st.one_of(
    st.tuples(st.sampled_from(["min", "max"]), inner, inner), st.tuples(st.just("pos"), inner)), max_leaves=3)
coeffs = st.sampled_from([(1, 0), (0, 1), (1, 1), (2, 1), (1, 2), (1, -1)])
regions = st.lists(st.tuples(coeffs, bounds), min_size=1, max_size=3)


def to_expr(b):
    kind = b[0]
    if kind == "c":
        return const(b[1])
    if kind == "t":
        return add(scale(b[1], param("t")), const(b[2]))
    if kind == "pos":
        return max_(to_expr(b[1]), 0)
    return (min_ if kind == "min" else max_)(to_expr(b[1]), to_expr(b[2]))


def to_z3(b, t):
    kind = b[0]
    if kind == "c":
        return z3.RealVal(str(b[1]))
    if kind == "t":
        return z3.RealVal(str(b[1])) * t + z3.RealVal(str(b[2]))
    if kind == "pos":
        x = to_z3(b[1], t)
        return z3.If(x >= 0, x, z3.RealVal(0))
    x, y = to_z3(b[1], t), to_z3(b[2], t)
    return z3.If(x <= y, x, y) if kind == "min" else z3.If(x >= y, x, y)


def engine_region(name, rows, nonneg):
    return HRegion(name, RATES, tuple(inequality({"d1": c[0], "d2": c[1]}, to_expr(b)) for c, b in rows), nonneg)


def z3_inclusion_fails(a_rows, b_rows, a_nonneg, b_nonneg) -> bool:
    t, d1, d2 = z3.Reals("t d1 d2")
    s = z3.Solver()
    s.add(t >= 0, t <= 2)
    for (c1, c2), b in a_rows:
        s.add(c1 * d1 + c2 * d2 <= to_z3(b, t))
    if a_nonneg:
        s.add(d1 >= 0, d2 >= 0)
    outside = [c1 * d1 + c2 * d2 > to_z3(b, t) for (c1, c2), b in b_rows]
    if b_nonneg:
        outside += [d1 < 0, d2 < 0]
    s.add(z3.Or(outside))
    answer = s.check()
    assert answer != z3.unknown
    return answer == z3.sat


@settings(max_examples=max(15, settings.default.max_examples // 2))
@given(a=regions, b=regions, a_nonneg=st.booleans(), b_nonneg=st.booleans())
def test_inclusion_agrees_with_a_direct_z3_encoding(a, b, a_nonneg, b_nonneg):
    A, B = engine_region("A", a, a_nonneg), engine_region("B", b, b_nonneg)
    verdict = decide(RC.subset(A, B, parse_region(REGION_TEXT)), improve_witness=False)
    expected = "refuted" if z3_inclusion_fails(a, b, a_nonneg, b_nonneg) else "proved"
    assert verdict.status == expected
    if expected == "refuted":   # the printed pair is in A and outside B, by exact evaluation
        w = verdict.witness
        assert A.contains(w.theta, w.rates) and not B.contains(w.theta, w.rates)
