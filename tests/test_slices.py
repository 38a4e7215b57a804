"""Claims on a slice (`... with beta = alpha`): every claim kind, proved and refuted, with
counterexamples that lie on the slice and in the region; `check` and `report` agree; bad
substitutions are one-line input errors with a position (exit 2).

Expected verdicts are hand derivations, stated beside each case.  Every counterexample is re-checked
here with Fractions by a direct evaluation written in this file (not the engine's evaluator).
"""

import json
import textwrap
from fractions import Fraction as F

import pytest

from verifier.claims.kinds import on_slice, reduces_to, relation, violated_at
from verifier.claims.one_shot import prove
from verifier.claims.slices import closed_substitution
from verifier.core.errors import InputError
from verifier.expressions.expr import max_, min_, param
from verifier.text.parse import parse_region
from workbench.cli import main

a, b, c = param("alpha"), param("beta"), param("gamma")

CASE = """
title = "slices"
[parameters]
alpha = "first exponent"
beta = "second exponent"
gamma = "third exponent"
[assume]
region = "0 <= alpha <= 2, 0 <= beta <= 2, 0 <= gamma <= 4"
[outer]
one = "max(alpha, beta)"
[inner]
x = "alpha"
[formulas]
f = "min(alpha + beta, 2)"
g = "max(alpha, beta) - min(alpha, beta)"
h = "min(alpha + gamma, 1 + beta)"
"""

# Direct evaluations of the case's names (independent of verifier.expressions.expr), for the re-checks below.
DIRECT = {
    "inner": lambda p: p["alpha"],
    "outer": lambda p: max(p["alpha"], p["beta"]),
    "f": lambda p: min(p["alpha"] + p["beta"], 2),
    "g": lambda p: abs(p["alpha"] - p["beta"]),
    "h": lambda p: min(p["alpha"] + p["gamma"], 1 + p["beta"]),
}


def in_assumed(p):
    return 0 <= p["alpha"] <= 2 and 0 <= p["beta"] <= 2 and 0 <= p["gamma"] <= 4


def write(tmp_path, claims: str):
    path = tmp_path / "case.toml"
    path.write_text(CASE + textwrap.dedent(claims))
    return str(path)


def run(capsys, *argv):
    code = main(list(argv))
    out, err = capsys.readouterr()
    return code, out, err


def claim(statement, where="", name="c"):
    where = f'where = "{where}"\n' if where else ""
    return f'[[claims]]\nname = "{name}"\nstatement = "{statement}"\n{where}'


def check_json(tmp_path, capsys, statement, where=""):
    code, out, err = run(capsys, "check", "--json", write(tmp_path, claim(statement, where)))
    assert code in (0, 1), err
    return code, json.loads(out)["claims"][0]


def point_of(entry):
    cex = entry["parts"][0]["counterexample"]
    return {k: F(v) for k, v in cex["point"].items()}


# --- every kind, proved and refuted ---------------------------------------------------------------

def test_relation_on_the_diagonal_is_proved(tmp_path, capsys):
    # hand derivation: with beta = alpha, max(alpha, beta) = alpha = inner
    code, entry = check_json(tmp_path, capsys, "inner == outer with beta = alpha")
    assert code == 0 and entry["status"] == "proved"
    assert "beta == alpha" in entry["region"]


def test_relation_on_a_shifted_slice_is_refuted_on_the_slice(tmp_path, capsys):
    # hand derivation: with beta = (1 + alpha)/2, outer = beta > alpha = inner whenever alpha < 1
    code, entry = check_json(tmp_path, capsys, "inner == outer with beta = alpha/2 + 1/2")
    assert code == 1 and entry["status"] == "refuted"
    p = point_of(entry)
    assert p["beta"] == p["alpha"] / 2 + F(1, 2) and in_assumed(p)
    assert DIRECT["inner"](p) != DIRECT["outer"](p) and p["alpha"] < 1


def test_within_on_a_slice(tmp_path, capsys):
    # hand derivation: beta = alpha, alpha <= 1: f = min(2 alpha, 2) = 2 alpha exactly
    code, entry = check_json(tmp_path, capsys, "f within 0 of 2*alpha with beta = alpha", "alpha <= 1")
    assert code == 0
    # beta = 2 - alpha: f = 2 while 2*alpha < 2 for alpha < 1; |2 - 2 alpha| > 1/2 iff alpha < 3/4
    code, entry = check_json(tmp_path, capsys, "f within 1/2 of 2*alpha with beta = 2 - alpha", "alpha <= 1")
    assert code == 1
    p = point_of(entry)
    assert p["beta"] == 2 - p["alpha"] and p["alpha"] <= 1 and in_assumed(p)
    assert abs(DIRECT["f"](p) - 2 * p["alpha"]) > F(1, 2)


def test_monotone_on_a_slice_moves_both_points_along_it(tmp_path, capsys):
    # hand derivation: g restricted to beta = 1 - alpha is |2 alpha - 1|: decreasing on [0, 1/2]
    code, entry = check_json(tmp_path, capsys, "g nondecreasing in alpha with beta = 1 - alpha", "alpha <= 1")
    assert code == 1
    p = point_of(entry)
    first = {"alpha": p["alpha"], "beta": p["beta"], "gamma": p["gamma"]}
    second = {"alpha": p["alpha'"], "beta": p["beta'"], "gamma": p["gamma"]}
    for q in (first, second):
        assert q["beta"] == 1 - q["alpha"] and q["alpha"] <= 1 and in_assumed(q)
    assert second["alpha"] > first["alpha"] and DIRECT["g"](second) < DIRECT["g"](first)
    # and on beta = 0 it is alpha itself: non-decreasing
    code, _ = check_json(tmp_path, capsys, "g nondecreasing in alpha with beta = 0", "alpha <= 1")
    assert code == 0


def test_symmetric_on_a_slice(tmp_path, capsys):
    # hand derivation: h with beta = 1 is min(alpha + gamma, 2): symmetric in alpha, gamma
    code, _ = check_json(tmp_path, capsys, "h symmetric in alpha, gamma with beta = 1", "gamma <= 2")
    assert code == 0
    # with beta = alpha it is min(alpha + gamma, 1 + alpha), whose swap min(alpha + gamma, 1 + gamma)
    # differs when alpha != gamma and 1 + min(alpha, gamma) < alpha + gamma
    code, entry = check_json(tmp_path, capsys, "h symmetric in alpha, gamma with beta = alpha", "gamma <= 2")
    assert code == 1
    p = point_of(entry)
    assert p["beta"] == p["alpha"] and p["gamma"] <= 2 and in_assumed(p)
    swapped = {"alpha": p["gamma"], "beta": p["gamma"], "gamma": p["alpha"]}   # g(x) = h(x, beta = alpha)
    assert DIRECT["h"](p) != DIRECT["h"](swapped)


def test_reduces_to_with_expressions_and_a_chain(tmp_path, capsys):
    # hand derivation: beta = gamma = 2 alpha gives f = min(3 alpha, 2)
    code, _ = check_json(tmp_path, capsys, "f with beta = gamma, gamma = 2*alpha equals min(3*alpha, 2)")
    assert code == 0
    code, entry = check_json(tmp_path, capsys, "f with beta = alpha equals min(3*alpha, 2)")
    assert code == 1
    p = point_of(entry)
    assert p["beta"] == p["alpha"] and in_assumed(p)
    assert DIRECT["f"](p) != min(3 * p["alpha"], 2)


def test_check_and_report_print_the_same_counterexample(tmp_path, capsys):
    path = write(tmp_path, claim("inner == outer with beta = alpha/2 + 1/2"))
    code, out, _ = run(capsys, "check", "--json", path)
    first = json.loads(out)["claims"][0]["parts"][0]["counterexample"]["point"]
    code2, out2, _ = run(capsys, "report", "--format", "json", path)
    assert code == code2 == 1
    section = json.loads(out2)["claims"][0]["parts"][0]
    assert section["counterexamples"][0]["point"] == first
    assert "beta == 1/2 + alpha/2" in section["statement"]


# --- the engine API ---------------------------------------------------------------------------------

def test_api_slice_region_and_recheck():
    region = parse_region("0 <= alpha <= 2, 0 <= beta <= 2")
    cl = on_slice(relation(a, "==", max_(a, b), region), {"beta": a / 2 + F(1, 2)})
    v = prove(cl)
    assert v.status == "refuted"
    p = dict(v.counterexample.point)
    assert p["beta"] == p["alpha"] / 2 + F(1, 2)
    assert violated_at(cl, {"alpha": p["alpha"]})
    # a point off the slice never counts, even though it violates the unsliced claim
    assert not violated_at(cl, {"alpha": F(0), "beta": F(1)})
    assert relation(a, "==", max_(a, b), region).region != cl.region   # the slice is in the region


def test_chains_are_closed_and_cycles_refused():
    assert dict(closed_substitution({"beta": c, "gamma": 2 * a})) == {"beta": 2 * a, "gamma": 2 * a}
    with pytest.raises(InputError, match="circular substitution: beta -> gamma -> beta"):
        closed_substitution({"beta": c, "gamma": b + 1})
    with pytest.raises(InputError, match="uses 'beta' itself"):
        closed_substitution({"beta": b / 2 + a})
    with pytest.raises(InputError, match="must be an affine expression"):
        closed_substitution({"beta": min_(a, 1)})


def test_reduces_to_with_a_number_is_unchanged():
    # the old form: a number stays in `values`, the region keeps no equality (as before)
    region = parse_region("alpha >= 0, beta >= 0")
    cl = reduces_to(a + b, {"beta": 0}, a, region)
    assert cl.values == (("beta", F(0)),) and cl.subst == () and cl.region == region
    assert prove(cl).status == "proved"


# --- errors: one line, a position, exit 2 ---------------------------------------------------------

# positions are file columns: the statement's text starts at column 14 of its line (`statement = "`)
@pytest.mark.parametrize("statement, message", [
    ("inner == outer with beta = min(alpha, 1)", r"must be an affine expression.*line \d+, column 34"),
    ("inner == outer with beta = beta/2", r"uses 'beta' itself.*line \d+, column 34"),
    ("inner == outer with beta = gamma, gamma = beta", r"circular substitution: beta -> gamma -> beta.*column 34"),
    ("inner == outer with delta = alpha", r"unknown parameter 'delta' .*column 34"),
    ("inner == outer with beta = alpah", r"unknown parameter 'alpah'.*did you mean 'alpha'.*column 41"),
    ("inner == outer with beta = alpha*gamma", r"nonlinear term 'alpha\*gamma' .*column 41"),
    ("inner == outer with beta = outer", r"'outer' is a bound or formula; a substituted value may use only"),
    ("g nondecreasing in alpha with alpha = beta", r"moves 'alpha', which is substituted .*column 44"),
    ("h symmetric in alpha, gamma with gamma = 1", r"swaps 'gamma', which is substituted"),
    ("inner == outer with beta = alpha, beta = 1", r"'beta' is given a value twice"),
    ("inner == outer with beta", r"expected 'name = value'"),
    ("inner == outer with beta = alpha + 3", r"the claim's region .* is empty"),
])
def test_bad_substitutions_are_input_errors(tmp_path, capsys, statement, message):
    code, out, err = run(capsys, "check", write(tmp_path, claim(statement)))
    assert code == 2 and out == ""
    lines = err.strip().splitlines()
    assert len(lines) == 1 and "Traceback" not in err
    import re
    assert re.search(message, lines[0]), lines[0]


def test_the_pytest_helper_reads_the_slice_too():
    # hand derivation: min(alpha, beta) = alpha on beta = alpha + 1; on beta = alpha/2 it is alpha/2
    from workbench.assertions import assert_claim
    assert_claim("min(alpha, beta) == alpha with beta = alpha + 1", where="alpha >= 0")
    with pytest.raises(AssertionError, match="beta == alpha/2"):
        assert_claim("min(alpha, beta) == alpha with beta = alpha/2", where="alpha >= 0")


# --- the property: a slice claim is the claim with the substitution done by hand ----------------

from hypothesis import given, strategies as st  # noqa: E402

SLICE_BOX = "0 <= alpha <= 2, 0 <= beta <= 2, 0 <= gamma <= 2"


def _terms():
    return st.lists(st.tuples(st.integers(-2, 2), st.integers(-2, 2), st.integers(-2, 2), st.integers(-3, 3)),
                    min_size=1, max_size=3)


def _build(kind, ts):
    exprs = [x * a + y * b + z * c + F(k, 2) for x, y, z, k in ts]
    return (min_ if kind == "min" else max_)(*exprs)


def _direct(kind, ts, p):
    values = [x * p["alpha"] + y * p["beta"] + z * p["gamma"] + F(k, 2) for x, y, z, k in ts]
    return min(values) if kind == "min" else max(values)


@given(st.sampled_from(["min", "max"]), _terms(), st.sampled_from(["==", "<=", "<"]),
       st.sampled_from(["min", "max"]), _terms(),
       st.tuples(st.integers(-1, 1), st.integers(-1, 1), st.integers(0, 2)))
def test_slice_claims_agree_with_substituting_by_hand(lk, lt, rel, rk, rt, sub):
    from verifier.expressions.expr import substitute
    x, z, k = sub
    value = x * a + z * c + F(k, 2)
    region = parse_region(SLICE_BOX)
    sliced = on_slice(relation(_build(lk, lt), rel, _build(rk, rt), region), {"beta": value})
    by_hand = relation(substitute(_build(lk, lt), {"beta": value}), rel, substitute(_build(rk, rt), {"beta": value}),
                       region.substitute({"beta": value}))
    try:
        v1 = prove(sliced, improve_witness=False)
    except InputError:          # an empty slice of the box: by hand it is empty too
        with pytest.raises(InputError):
            prove(by_hand)
        return
    v2 = prove(by_hand, improve_witness=False)
    assert v1.status == v2.status
    holds = {"==": lambda u, w: u == w, "<=": lambda u, w: u <= w, "<": lambda u, w: u < w}[rel]
    if v1.status == "refuted":   # re-checked here: on the slice, in the box, violating
        p = dict(v1.counterexample.point)
        assert p["beta"] == x * p["alpha"] + z * p["gamma"] + F(k, 2)
        assert all(0 <= p[n] <= 2 for n in ("alpha", "beta", "gamma"))
        assert not holds(_direct(lk, lt, p), _direct(rk, rt, p))
