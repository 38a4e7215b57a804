"""The exact holds / fails sets (verifier.regimes.optimality): normalisation, exact merging, hand-derived
sets, and a property test that re-checks the printed sets of random small piecewise-linear claims by
sampling exact rational points inside each piece and on both sides of every printed boundary,
evaluating the claim with Fractions by a direct evaluator written in this file.
"""

import json
import textwrap
from fractions import Fraction as F

from hypothesis import given
from hypothesis import strategies as st

from verifier.claims.kinds import relation
from verifier.expressions.expr import max_, min_, param
from verifier.expressions.region import constraint_text
from verifier.regimes.optimality import contains, merged, normalised_atom, ordered, union_if_convex, union_text
from verifier.regimes.proof import prove_by_regimes
from verifier.text.parse import parse_region
from workbench.cli import main

a, g = param("alpha"), param("gamma")
NAMES = ("alpha", "gamma")


def atom(text):
    (got,) = parse_region(text).pieces[0].atoms
    return got


def atoms(text):
    return parse_region(text).pieces[0].atoms


# --- normalised constraints (the convention is documented in verifier/regimes/optimality.py) -------------

def test_several_parameters_get_coprime_integer_coefficients():
    assert normalised_atom(atom("gamma/2 > 1/2 + alpha/2")).text() == "gamma > 1 + alpha"
    assert normalised_atom(atom("gamma > 1/2 + alpha/2")).text() == "2*gamma > 1 + alpha"
    assert normalised_atom(atom("4*alpha + 6*gamma >= 2")).text() == "2*alpha + 3*gamma >= 1"
    assert normalised_atom(atom("3*alpha <= 3*gamma")).text() == "gamma >= alpha"


def test_one_parameter_gets_coefficient_one_and_strictness_is_kept():
    assert normalised_atom(atom("2*alpha < 1")).text() == "alpha < 1/2"
    assert normalised_atom(atom("3*alpha >= 2")).text() == "alpha >= 2/3"
    assert normalised_atom(atom("-2*alpha > -4")).text() == "alpha < 2"
    assert normalised_atom(atom("alpha/3 > 1")).strict


def test_normalising_keeps_the_half_space():
    # positive scaling only: the same points satisfy both (checked on a grid of exact points)
    for text in ("gamma/2 > 1/2 + alpha/2", "-4*alpha + 6*gamma >= 2/3", "2*alpha < 1"):
        before = atom(text)
        after = normalised_atom(before)
        for x in range(-6, 7):
            for y in range(-6, 7):
                p = {"alpha": F(x, 3), "gamma": F(y, 3)}
                assert before.holds(p) == after.holds(p)


def test_bounds_chain_and_equalities_print_as_equations():
    shown = ordered(atoms("alpha < 2, gamma >= alpha, 2*alpha > 2"), NAMES)
    assert constraint_text(shown, reorder=True) == "1 < alpha < 2, gamma >= alpha"
    eq = ordered(atoms("gamma/2 == 1/2 + alpha/2"), NAMES)
    assert constraint_text(eq, reorder=True) == "gamma == 1 + alpha"


# --- exact merging ---------------------------------------------------------------------------------

def test_union_of_adjacent_intervals_is_merged_with_exact_strictness():
    assert union_if_convex(atoms("0 <= alpha < 1"), atoms("1 <= alpha <= 2"), NAMES) is not None
    merged = union_if_convex(atoms("0 <= alpha < 1"), atoms("1 <= alpha <= 2"), NAMES)
    assert constraint_text(ordered(merged, NAMES), reorder=True) == "0 <= alpha <= 2"
    # the point alpha = 1 is missing from the union: never merged into one interval
    assert union_if_convex(atoms("0 <= alpha < 1"), atoms("1 < alpha <= 2"), NAMES) is None


def test_non_convex_unions_are_not_merged():
    square = "0 <= alpha <= 1, 0 <= gamma <= 1"
    right = "1 <= alpha <= 2, 0 <= gamma <= 1"
    top = "0 <= alpha <= 1, 1 <= gamma <= 2"
    assert union_if_convex(atoms(square), atoms(right), NAMES) is not None
    assert union_if_convex(atoms(right), atoms(top), NAMES) is None      # two corner squares
    # the halves of a square cut along its diagonal merge back into the square
    lower = atoms(square + ", gamma <= alpha")
    upper = atoms(square + ", gamma > alpha")
    merged = union_if_convex(lower, upper, NAMES)
    assert constraint_text(ordered(merged, NAMES), reorder=True) == "0 <= alpha <= 1, 0 <= gamma <= 1"


def test_merging_skips_pairs_without_a_common_facet_but_still_merges_tilings():
    """Four unit squares tiling [0, 2]^2, listed with the two diagonal ones first (they share no
    facet, so they are never tested), merge into the square; so do two segments on the line
    gamma == alpha (the common facet is read on that line)."""
    tiles = ["0 <= alpha <= 1, 0 <= gamma <= 1", "1 < alpha <= 2, 1 < gamma <= 2",
             "1 < alpha <= 2, 0 <= gamma <= 1", "0 <= alpha <= 1, 1 < gamma <= 2"]
    (whole,) = merged([atoms(t) for t in tiles], NAMES)
    assert constraint_text(ordered(whole, NAMES), reorder=True) == "0 <= alpha <= 2, 0 <= gamma <= 2"
    line = [atoms("0 <= alpha <= 1, gamma == alpha"), atoms("1 < alpha <= 2, gamma == alpha")]
    (segment,) = merged(line, NAMES)
    inside = [{"alpha": F(k, 4), "gamma": F(k, 4)} for k in range(0, 9)]
    outside = [{"alpha": F(9, 4), "gamma": F(9, 4)}, {"alpha": F(1), "gamma": F(1, 2)}]
    assert all(all(x.holds(p) for x in segment) for p in inside)
    assert not any(all(x.holds(p) for x in segment) for p in outside)
    # two corner squares touching at a point stay apart
    assert len(merged([atoms(tiles[0]), atoms(tiles[1])], NAMES)) == 2


# --- hand-derived sets ------------------------------------------------------------------------------

def exact_sets(lhs, rel, rhs, region):
    proof = prove_by_regimes(relation(lhs, rel, rhs, parse_region(region)), smt="none", improve_witness=False)
    assert proof.optimality is not None, proof.detail
    return proof.optimality


def test_tin_meets_the_w_curve_exactly_for_alpha_up_to_one_half():
    # hand derivation (W curve of Etkin, Tse and Wang, IEEE Trans. IT 2008, from memory):
    # W = min(1, max(a/2, 1 - a/2), max(a, 1 - a)) equals 1 - a for a <= 1/2 and a > 1 - a above
    w = min_(1, max_(a / 2, 1 - a / 2), max_(a, 1 - a))
    op = exact_sets(1 - a, "==", w, "0 <= alpha <= 3/5")
    assert union_text(op.holds) == "alpha <= 1/2" and union_text(op.fails) == "alpha > 1/2"
    assert constraint_text(op.within, reorder=True) == "0 <= alpha <= 3/5"


def test_a_holds_set_with_a_lower_dimensional_piece():
    # hand derivation: min(gamma, 1) == min(gamma, 1 + alpha) iff gamma <= 1 or alpha = 0 (alpha >= 0)
    op = exact_sets(min_(g, 1), "==", min_(g, 1 + a), "0 <= alpha <= 2, 0 <= gamma <= 3")
    assert union_text(op.holds) == "alpha = 0 or gamma <= 1"
    assert union_text(op.fails) == "alpha > 0, gamma > 1"


def test_the_boundary_where_the_sides_meet_belongs_to_the_holds_set():
    # hand derivation: max(alpha, 1 - alpha) <= 1/2 + gamma exactly when |alpha - 1/2| <= gamma
    op = exact_sets(max_(a, 1 - a), "<=", F(1, 2) + g, "0 <= alpha <= 1, 0 <= gamma <= 1")
    on_boundary = {"alpha": F(3, 4), "gamma": F(1, 4)}
    assert contains(op.holds, op.within, on_boundary) and not contains(op.fails, op.within, on_boundary)
    strict = exact_sets(max_(a, 1 - a), "<", F(1, 2) + g, "0 <= alpha <= 1, 0 <= gamma <= 1")
    assert contains(strict.fails, strict.within, on_boundary)


def test_a_proved_claim_holds_everywhere():
    op = exact_sets(min_(a, 1), "<=", 1 + a, "alpha >= 0")
    assert op.fails == () and op.holds == ((),)


# --- the property: printed sets re-checked at exact points ---------------------------------------

def terms():
    num = st.integers(-3, 3)
    return st.tuples(st.integers(-2, 2), st.integers(-2, 2), num, st.sampled_from([1, 2]))


def side():
    return st.tuples(st.sampled_from(["min", "max"]), st.lists(terms(), min_size=1, max_size=3))


def build(s):
    kind, ts = s
    exprs = [ca * a + cg * g + F(c0, d) for ca, cg, c0, d in ts]
    return (min_ if kind == "min" else max_)(*exprs)


def direct(s, p):
    kind, ts = s
    values = [ca * p["alpha"] + cg * p["gamma"] + F(c0, d) for ca, cg, c0, d in ts]
    return min(values) if kind == "min" else max(values)


HOLDS = {"==": lambda x, y: x == y, "<=": lambda x, y: x <= y, "<": lambda x, y: x < y}
BOX = "0 <= alpha <= 2, 0 <= gamma <= 2"


def samples(op):
    """Grid points, the re-check points, and points on and beside every printed boundary line."""
    pts = [{"alpha": F(i, 3), "gamma": F(j, 3)} for i in range(7) for j in range(7)]
    pts += list(op.holds_points) + list(op.fails_points)
    eps = F(1, 101)
    for piece in list(op.holds) + list(op.fails) + [op.within or ()]:
        for at in piece:
            ca, cg, c0 = at.form.coeff("alpha"), at.form.coeff("gamma"), at.form.const
            for k in range(9):
                t = F(k, 4)
                if cg != 0:
                    base = {"alpha": t, "gamma": -(ca * t + c0) / cg}
                    pts += [base, dict(base, gamma=base["gamma"] + eps), dict(base, gamma=base["gamma"] - eps)]
                elif ca != 0:
                    base = {"alpha": -(c0 / ca), "gamma": t}
                    pts += [base, dict(base, alpha=base["alpha"] + eps), dict(base, alpha=base["alpha"] - eps)]
    return pts


@given(side(), st.sampled_from(["==", "<=", "<"]), side())
def test_printed_sets_agree_with_direct_evaluation(left, rel, right):
    op = exact_sets(build(left), rel, build(right), BOX)
    region = parse_region(BOX)
    for p in samples(op):
        if not region.contains(p):
            continue
        truth = HOLDS[rel](direct(left, p), direct(right, p))
        assert contains(op.holds, op.within, p) == truth, (p, union_text(op.holds))
        assert contains(op.fails, op.within, p) == (not truth), (p, union_text(op.fails))
    for p in op.holds_points:
        assert HOLDS[rel](direct(left, p), direct(right, p))
    for p in op.fails_points:
        assert not HOLDS[rel](direct(left, p), direct(right, p))


# --- the report and the bundle ----------------------------------------------------------------------

CASE = """
title = "where the scheme is optimal"
[parameters]
alpha = "cross link"
gamma = "cache"
[assume]
region = "0 <= alpha <= 2, 0 <= gamma <= 3"
[outer]
cut = "min(gamma, 1 + alpha)"
[inner]
plain = "min(gamma, 1)"
[[claims]]
name = "optimal"
statement = "inner == outer"
"""


def test_report_shows_the_sets_in_every_format(tmp_path, capsys):
    path = tmp_path / "case.toml"
    path.write_text(textwrap.dedent(CASE))
    assert main(["report", str(path)]) == 1
    out = capsys.readouterr().out
    assert "Holds exactly when: alpha = 0 or gamma <= 1   (within 0 <= alpha <= 2, 0 <= gamma <= 3)" in out
    assert "Fails exactly when: alpha > 0, gamma > 1" in out
    assert main(["report", "--format", "latex", str(path)]) == 1
    out = capsys.readouterr().out
    assert (r"The claim holds exactly when $\alpha = 0$ or $\gamma \le 1$ (for $0 \le \alpha \le 2,\ "
            r"0 \le \gamma \le 3$), and fails exactly when $\alpha > 0,\ \gamma > 1$.") in out
    assert main(["report", "--format", "json", str(path)]) == 1
    sets = json.loads(capsys.readouterr().out)["claims"][0]["parts"][0]["exact_sets"]
    assert sets["holds_text"] == "alpha = 0 or gamma <= 1" and len(sets["fails"]) == 1
    assert sets["within_text"] == "0 <= alpha <= 2, 0 <= gamma <= 3"
    assert main(["bundle", str(path), str(tmp_path / "out")]) == 1
    assert (tmp_path / "out" / "plots" / "claim01_exact.png").exists()
