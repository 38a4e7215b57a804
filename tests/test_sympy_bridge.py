"""sympy <-> engine expressions: exact agreement at random rational points, and clear refusals."""

from fractions import Fraction

import pytest
import sympy
from hypothesis import given, settings, strategies as st

from tests.strategies import exprs, points
from verifier.core.errors import InputError, NonlinearError
from verifier.expressions.expr import evaluate
from verifier.text.parse import parse_expr
from verifier.text.sympy_bridge import from_sympy, to_sympy

NAMES = ("alpha", "beta", "gamma")
a, b, g = sympy.symbols("alpha beta gamma", real=True)


def _sympy_value(x, point):
    value = x.subs({sympy.Symbol(n, real=True): sympy.Rational(v.numerator, v.denominator)
                    for n, v in point.items()})
    assert value.is_Rational
    return Fraction(int(value.p), int(value.q))


@settings(max_examples=50, deadline=None)
@given(exprs(NAMES, max_leaves=8), st.lists(points(NAMES), min_size=1, max_size=4))
def test_to_sympy_evaluates_the_same(e, pts):
    # reference library: sympy's exact evaluation of Min/Max/Rational
    x = to_sympy(e)
    for p in pts:
        assert evaluate(e, p) == _sympy_value(x, p)


@settings(max_examples=60, deadline=None)
@given(exprs(NAMES, max_leaves=8), st.lists(points(NAMES), min_size=5, max_size=15))
def test_from_sympy_of_to_sympy_is_equivalent(e, pts):
    # sympy may rewrite Min/Max, so compare values, not trees
    back = from_sympy(to_sympy(e))
    for p in pts:
        assert evaluate(back, p) == evaluate(e, p)


def test_symbols_can_be_supplied():
    mine = {"alpha": sympy.Symbol("alpha", positive=True)}
    x = to_sympy(parse_expr("alpha + beta"), mine)
    assert mine["alpha"] in x.free_symbols
    assert sympy.Symbol("beta", real=True) in x.free_symbols


def test_from_sympy_node_kinds():
    assert from_sympy(sympy.Min(2 * a, g / 2 + sympy.Max(1 - a, 0))) == \
        parse_expr("min(2*alpha, gamma/2 + (1-alpha)^+)")
    assert from_sympy(sympy.Abs(a - 1)) == parse_expr("|alpha - 1|")
    assert from_sympy(sympy.Float("0.1") * a) == parse_expr("alpha/10")  # via the decimal string
    assert from_sympy(sympy.Rational(2, 3) - b) == parse_expr("2/3 - beta")
    assert from_sympy(sympy.Integer(2) ** 3 * a) == parse_expr("8 alpha")
    assert from_sympy(-sympy.Max(a, b)) == parse_expr("min(-alpha, -beta)")
    assert from_sympy(sympy.Symbol("α")) == parse_expr("alpha")
    assert from_sympy(3) == parse_expr("3") and from_sympy(Fraction(1, 2)) == parse_expr("1/2")


def test_simple_piecewise_becomes_min_or_max():
    # (x)^+ written as a Piecewise; checked against the definition, common practice
    assert from_sympy(sympy.Piecewise((a, a > 0), (0, True))) == parse_expr("(alpha)^+")
    assert from_sympy(sympy.Piecewise((1 - a, a < 1), (0, True))) == parse_expr("(1 - alpha)^+")
    half = sympy.Rational(1, 2)
    assert from_sympy(sympy.Piecewise((1 - a, a <= half), (a, True))) == parse_expr("max(1-alpha, alpha)")
    assert from_sympy(sympy.Piecewise((a, a <= half), (1 - a, True))) == parse_expr("min(alpha, 1-alpha)")
    assert from_sympy(sympy.Piecewise((a + 1, b > 0), (a + 1, True))) == parse_expr("alpha + 1")


@pytest.mark.parametrize("x,cls,pattern", [
    (a * b, NonlinearError, r"nonlinear term 'alpha\*beta'"),
    (2 ** a, NonlinearError, r"nonlinear term '2\*\*alpha'"),
    (1 / a, NonlinearError, r"nonlinear term '1/alpha'"),
    (sympy.log(a), InputError, r"unsupported sympy expression 'log\(alpha\)' \(log\)"),
    (sympy.pi * a, InputError, r"unsupported sympy expression 'pi' \(Pi\)"),
    (sympy.Piecewise((a, a > 0), (1, True)), InputError, r"do not meet where the condition switches"),
    (sympy.Piecewise((a, (a > 0) & (b > 0)), (0, True)), InputError, r"only one linear inequality"),
    (sympy.Piecewise((a, a > 0), (0, a < 0)), InputError, r"only \(a, condition\), \(b, True\)"),
    (sympy.Piecewise((sympy.Max(a, b), a > 0), (0, True)), InputError, r"both branches must be affine"),
    (sympy.Symbol("x{1}"), InputError, r"'x\{1\}' is not a valid parameter name"),
    ("alpha + 1", InputError, r"not a sympy expression"),  # strings are never sympified (no eval)
])
def test_from_sympy_refusals(x, cls, pattern):
    with pytest.raises(cls, match=pattern):
        from_sympy(x)


def test_regime_report_as_sympy_piecewise_agrees_with_exact_evaluation():
    # Reference library: sympy evaluates the exported Piecewise; the curve is the symmetric two-user IC
    # curve of Etkin, Tse, Wang, IEEE Trans. IT 54(12), 2008 (from memory).
    from verifier.claims.kinds import relation
    from verifier.expressions.expr import param
    from verifier.regimes.proof import prove_by_regimes
    from verifier.report.build import claim_report
    from verifier.expressions.region import Region, atoms_of
    alpha = param("alpha")
    w = parse_expr("min(1, max(alpha/2, 1 - alpha/2), max(alpha, 1 - alpha))")
    section = claim_report(prove_by_regimes(relation(w, "<=", 1, Region.of(*atoms_of(alpha, ">=", 0)))))
    pw = section.to_sympy(0)
    x = sympy.Symbol("alpha", real=True)
    for k in range(0, 41):
        q = sympy.Rational(k, 8)
        exact = evaluate(w, {"alpha": Fraction(k, 8)})
        assert pw.subs(x, q) == sympy.Rational(exact.numerator, exact.denominator)
