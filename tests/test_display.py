"""The display form of constraints (verifier.expressions.display) and where the reports use it.

Expected strings are hand-written from the rules in the module docstring (one normal form per
hyperplane, chains, the claim's parameter order); the property tests check that every displayed text
parses back to the same set (exact set differences, verifier.geometry.shape), which is what makes a
reordered, rescaled, chained text safe to paste back in.
"""

from __future__ import annotations

import json
import random
from fractions import Fraction
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from tests.strategies import DEFAULT_NAMES, atoms as atom_strategy
from verifier.expressions.display import display_text, equation_display
from verifier.expressions.expr import param
from verifier.expressions.region import atoms_of, constraint_text as roundtrip_text
from verifier.geometry.shape import difference
from verifier.regimes.analysis import Gap, PartReport
from verifier.regimes.thresholds import equation_text
from verifier.report.build import constraint_text, gap_text
from verifier.report.latex import gap_latex
from verifier.report.latex_math import condition_latex, equation_latex
from verifier.text.latex_in import parse_latex_region
from verifier.text.parse import parse_region

NAMES = ("alpha", "beta", "gamma")
DEMO = Path(__file__).resolve().parent.parent / "casebook" / "demo" / "secure_uplink_three_exponents.toml"


def atoms(text: str):
    """The atoms of a one-piece region written in the text syntax."""
    (piece,) = parse_region(text).pieces
    return piece.atoms


def same_set(a, region, names) -> bool:
    """Exact: `a` (atoms) and `region` (a Region) are the same set (both set differences empty)."""
    pieces = [p.atoms for p in region.pieces]
    return not difference(list(a), pieces, names) and all(not difference(list(q), [tuple(a)], names)
                                                          for q in pieces)


# --- the display text parses back to the same set ------------------------------------------------

@settings(max_examples=150, deadline=None)
@given(st.lists(atom_strategy(), max_size=5), st.permutations(DEFAULT_NAMES))
def test_display_text_parses_back_to_the_same_set(items, order):
    text = display_text(items, order)
    assert same_set(items, parse_region(text), DEFAULT_NAMES), text


@settings(max_examples=60, deadline=None)
@given(st.lists(atom_strategy(), max_size=4))
def test_the_latex_display_parses_back_to_the_same_set(items):
    tex = condition_latex(items, NAMES)
    assert same_set(items, parse_latex_region(tex), DEFAULT_NAMES), tex


@settings(max_examples=100, deadline=None)
@given(st.lists(atom_strategy(), min_size=1, max_size=5), st.randoms(use_true_random=False))
def test_the_display_does_not_depend_on_the_order_of_the_atoms(items, rnd: random.Random):
    shuffled = list(items)
    rnd.shuffle(shuffled)
    assert display_text(items, NAMES) == display_text(shuffled, NAMES)


def test_the_round_trip_printer_is_unchanged():
    # constraint_text without reorder parses back to the very atoms in the very order (case files,
    # certificates): the display form never replaces it
    a = atoms("gamma > alpha, alpha > 1, 1 + gamma >= 2*alpha + beta")
    assert roundtrip_text(a) == "gamma > alpha, alpha > 1, 1 + gamma >= 2*alpha + beta"
    assert parse_region(roundtrip_text(a)).pieces[0].atoms == a


# --- (a) chains ---------------------------------------------------------------------------------

def test_a_lower_and_an_upper_bound_of_one_side_chain():
    # old display: "gamma > alpha, alpha > 1"
    assert constraint_text(atoms("gamma > alpha, alpha > 1"), NAMES) == "1 < alpha < gamma"
    assert constraint_text(atoms("alpha + beta > 1/2, 2*alpha + 2*beta < 3"), NAMES) == "1/2 < alpha + beta < 3/2"
    assert constraint_text(atoms("alpha > gamma - 1, alpha < gamma"), NAMES) == "gamma - 1 < alpha < gamma"


def test_a_chain_continues_through_a_left_side_only():
    assert constraint_text(atoms("alpha < beta, beta < 1, alpha >= 0"), NAMES) == "0 <= alpha < beta < 1"
    assert constraint_text(atoms("0 <= beta <= alpha, alpha <= 1"), NAMES) == "0 <= beta <= alpha <= 1"
    # gamma is a right side of both: `1 < alpha < gamma < 2*alpha` would be a chain nobody writes
    assert constraint_text(atoms("gamma > alpha, alpha > 1, alpha > gamma/2"), NAMES) == \
        "1 < alpha < gamma, 2*alpha > gamma"


# --- (b) one normal form per hyperplane -----------------------------------------------------------

def test_one_hyperplane_reads_with_the_same_sides_in_every_row():
    # old display: "2*alpha + beta > 1 + gamma" in one row, "1 + gamma >= 2*alpha + beta" in the next
    above = constraint_text(atoms("alpha > 1, 2*alpha + beta > 1 + gamma"), NAMES)
    below = constraint_text(atoms("alpha > 1, 1 + gamma >= 2*alpha + beta"), NAMES)
    assert above == "alpha > 1, 2*alpha + beta > 1 + gamma"
    assert below == "alpha > 1, 2*alpha + beta <= 1 + gamma"
    assert constraint_text(atoms("alpha + beta/2 < 1/2 + gamma/2"), NAMES) == "2*alpha + beta < 1 + gamma"


def test_thresholds_and_equalities_use_the_same_normal_form():
    # old threshold text: "alpha + beta/2 = 1/2 + gamma/2"; old holds text: "gamma == 2*alpha"
    h = atoms("alpha + beta/2 >= 1/2 + gamma/2")[0]
    assert equation_text(h.form, NAMES) == "2*alpha + beta = 1 + gamma"
    assert equation_latex(h.form, NAMES) == r"2\alpha + \beta = 1 + \gamma"
    assert constraint_text(atoms("gamma == 2*alpha"), NAMES) == "2*alpha = gamma"
    assert equation_display(atoms("gamma >= 2*alpha")[0].form, NAMES) == "2*alpha = gamma"


# --- (c) one variable order ------------------------------------------------------------------------

def test_the_claims_parameter_order_orders_the_constraints_and_their_sides():
    a = atoms("gamma >= 0, beta >= 0, gamma > alpha")
    assert constraint_text(a, ("alpha", "beta", "gamma")) == "alpha < gamma, beta >= 0, gamma >= 0"
    # in the order gamma, beta, alpha the same constraints read gamma first, on the left
    assert constraint_text(a, ("gamma", "beta", "alpha")) == "gamma >= 0, gamma > alpha, beta >= 0"


def test_constraints_follow_their_first_parameter_then_their_size():
    # old display kept the stored order: "beta >= 1, 2*alpha > gamma, alpha > 1"
    assert constraint_text(atoms("beta >= 1, 2*alpha > gamma, alpha > 1"), NAMES) == \
        "alpha > 1, 2*alpha > gamma, beta >= 1"
    assert constraint_text(atoms("gamma >= 0, alpha >= 2 + gamma"), ("alpha", "gamma")) == "alpha >= 2 + gamma, gamma >= 0"


# --- (d) wording ---------------------------------------------------------------------------------

def test_redundant_bounds_read_without_nested_parentheses_and_with_the_right_plural():
    assert PartReport(1, "uplink_sum", True, (3,), ()).note == "only tied: active in regime 3"
    assert PartReport(1, "uplink_sum", True, (2, 5), ()).note == "only tied: active in regimes 2, 5"
    assert PartReport(1, "cut", True, (), ()).note == "never active"
    assert PartReport(0, "w", False, (0,), (0,)).note == "active in regime 0"


# --- (e) max only when attained ----------------------------------------------------------------------

def test_a_supremum_that_is_not_attained_is_called_sup():
    near = {"alpha": Fraction(1), "gamma": Fraction(1)}
    assert gap_text(Gap("lhs - rhs", Fraction(0), near, False, 0)) == \
        "sup(lhs - rhs) = 0, approached near alpha = 1, gamma = 1 (not attained)"
    assert gap_text(Gap("lhs - rhs", Fraction(1, 2), near, True, 0)) == "max(lhs - rhs) = 1/2 at alpha = 1, gamma = 1"
    assert gap_latex(Gap("rhs - lhs", Fraction(0), near, False, 0)).startswith(r"$\sup(\mathrm{rhs-lhs}) = 0$, approached")
    assert gap_latex(Gap("rhs - lhs", Fraction(2), near, True, 0)).startswith(r"$\max(\mathrm{rhs-lhs}) = 2$ at")
    assert gap_latex(Gap("rhs - lhs", None, near, False, 0)) == r"$\sup(\mathrm{rhs-lhs})$ is unbounded."


# --- the demo case in every format ----------------------------------------------------------------

@pytest.fixture(scope="module")
def demo_outputs():
    from workbench.cli import main
    import contextlib
    import io
    out = {}
    for fmt in ("text", "latex", "json"):
        buf = io.StringIO()
        with contextlib.redirect_stdout(buf):
            main(["report", "--format", fmt, str(DEMO)])
        out[fmt] = buf.getvalue()
    return out


def test_the_demo_rows_thresholds_and_sets_read_alike(demo_outputs):
    text = demo_outputs["text"]
    assert "0       1 < alpha < gamma, 2*alpha + beta > 1 + gamma, 0 <= beta <= 1  " in text
    assert "1       alpha > 1, 2*alpha + beta <= 1 + gamma, 0 <= beta <= 1  " in text
    assert "Thresholds: 2*alpha + beta = 1 + gamma; beta = 1; 2*alpha = gamma" in text
    assert "Holds exactly when: 2*alpha = gamma   (within 1 < alpha < gamma, 2*alpha >= gamma, beta >= 1)" in text
    assert "Fails exactly when: 2*alpha > gamma" in text
    assert "regime 0: 1 < alpha < gamma, 2*alpha > gamma, beta >= 1 (dimension 3)" in text
    assert "Redundant bounds: uplink_sum (only tied: active in regime 3)" in text
    assert "(redundant" not in text and "regimes 3)" not in text and "(s)" not in text
    assert "sup(lhs - rhs) = 0, approached near alpha = 1, beta = 0, gamma = 1 (not attained)" in text
    assert "supremum" not in text


def test_the_demo_latex_and_json_say_the_same(demo_outputs):
    tex = demo_outputs["latex"]
    assert r"Thresholds: $2\alpha + \beta = 1 + \gamma$, $\beta = 1$, $2\alpha = \gamma$." in tex
    assert r"The claim holds exactly when $2\alpha = \gamma$ (for $1 < \alpha < \gamma,\ 2\alpha \ge \gamma,\ \beta \ge 1$)" in tex
    assert r"$\sup(\mathrm{lhs-rhs}) = 0$, approached near $\alpha = 1$" in tex and r"\max(" not in tex
    data = json.loads(demo_outputs["json"])
    parts = [p for c in data["claims"] for p in c["parts"]]
    first = parts[0]
    assert first["regimes"][0]["constraints"] == "1 < alpha < gamma, 2*alpha + beta > 1 + gamma, 0 <= beta <= 1"
    assert [t["text"] for t in first["thresholds"]] == ["2*alpha + beta = 1 + gamma", "beta = 1", "2*alpha = gamma"]
    assert all(g["attained"] is False for g in first["gaps"])
    wrong = next(p for p in parts if p["exact_sets"] and p["exact_sets"]["fails"])
    assert wrong["exact_sets"]["holds_text"] == "2*alpha = gamma"
    assert wrong["failure"]["pieces"][0]["display"] == "1 < alpha < gamma, 2*alpha > gamma, beta >= 1"


def test_where_a_facet_cuts_reads_in_the_display_form():
    from verifier.expressions.region import Polyhedron
    from verifier.rates.facets import _tidy
    # old text: "a2 > a1, a1 >= 0"
    assert _tidy(Polyhedron(atoms("a2 > a1, a1 >= 0")), ("a1", "a2")) == "0 <= a1 < a2"
    assert _tidy(Polyhedron(atoms("a2 > a1, a1 > 1")), ("a1", "a2"), several=True) == "1 < a1 < a2"
    assert _tidy(Polyhedron(atoms("a2 > a1, 2*a1 > 1 + a2")), ("a1", "a2"), several=True) == "(a1 < a2, 2*a1 > 1 + a2)"
