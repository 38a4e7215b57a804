"""Cut-set generator (bounds.cutset) against the linear deterministic models (bounds.deterministic)."""

import random
from fractions import Fraction

import pytest
from hypothesis import given, settings, strategies as st

from bounds.cutset import cut_value, cutset_gdof, message_cut_bounds, sum_cut_bounds, sum_cutset_bounds
from bounds.deterministic import DeterministicNetwork, min_cut_value, shift_matrix
from bounds.network import Link, Message, Network, interference_channel, relay_channel, to_expr
from verifier.core.errors import InputError
from verifier.expressions.expr import evaluate, max_, min_, param


def _relay_formula():
    sd, sr, rd = param("sd"), param("sr"), param("rd")
    # Avestimehr, Diggavi, Tse, IEEE Trans. IT 57(4), 2011 (from memory, REFERENCES.md #6):
    # single relay: min(max(n_sd, n_sr), max(n_sd, n_rd))
    return min_(max_(sd, sr), max_(sd, rd))


def test_relay_cuts_are_named_and_match_the_published_formula():
    bounds = message_cut_bounds(relay_channel(), "W")
    assert set(bounds) == {"cut {S} | {R,D}", "cut {S,R} | {D}"}
    generated = cutset_gdof(relay_channel(), "W")
    rng = random.Random(3)
    for _ in range(400):  # exact evaluation at random nonnegative rational points
        point = {k: Fraction(rng.randint(0, 60), rng.randint(1, 12)) for k in ("sd", "sr", "rd")}
        assert evaluate(generated, point) == evaluate(_relay_formula(), point)


@pytest.mark.parametrize("sd, sr, rd, expected", [
    # spot values, Avestimehr-Diggavi-Tse 2011 relay formula (REFERENCES.md #6, from memory)
    ("1", "2", "3/2", "3/2"), ("1", "1/2", "3", "1"), ("1/5", "1", "1", "1"), ("1/2", "2", "4/5", "4/5")])
def test_relay_spot_values(sd, sr, rd, expected):
    point = {"sd": Fraction(sd), "sr": Fraction(sr), "rd": Fraction(rd)}
    assert evaluate(cutset_gdof(relay_channel(), "W"), point) == Fraction(expected)


def test_relay_shift_model_min_cut_equals_formula_at_integer_points():
    # ADT 2011: capacity of a linear deterministic relay network = min over cuts of the GF(2) rank
    net = relay_channel()
    for sd in range(5):
        for sr in range(5):
            for rd in range(5):
                point = {"sd": sd, "sr": sr, "rd": rd}
                assert min_cut_value(net, "W", point, "shift") == evaluate(_relay_formula(), point)


def test_shift_matrix_has_rank_n():
    for q in range(1, 6):
        for n in range(q + 1):
            assert shift_matrix(n, q).rank() == n  # common practice: S^(q-n) keeps n levels


@st.composite
def small_networks(draw):
    """2 to 5 nodes: N0 sends W to the last node; the middle ones relay, or only send, or only listen
    (so the generator's placement of pure transmitters and receivers is exercised); exponents 0..6."""
    k = draw(st.integers(2, 5))
    names = [f"N{i}" for i in range(k)]
    roles = {n: draw(st.sampled_from(["relay", "relay", "transmitter", "receiver"])) for n in names[1:-1]}
    roles = {names[0]: "transmitter", **roles, names[-1]: "receiver"}
    links = []
    for a in names:
        for b in names:
            allowed = a != b and roles[a] != "receiver" and roles[b] != "transmitter"
            if allowed and draw(st.booleans()):
                links.append(Link(a, b, to_expr(draw(st.integers(0, 6)))))
    return Network(roles, links, [Message("W", names[0], names[-1])]), draw(st.integers(0, 10**6))


@settings(max_examples=120, deadline=None)
@given(small_networks())
def test_cut_values_equal_generic_ranks(case):
    # independent oracle: rank over GF(2^61 - 1) of the cut transfer matrix with random coefficients
    # (rank from python-flint), compared cut by cut and for the min-cut over *all* cuts
    net, seed = case
    model = DeterministicNetwork(net, {}, "generic", seed=seed)
    names = net.node_names()
    for mask in range(1 << len(names)):
        side = [n for i, n in enumerate(names) if mask >> i & 1]
        assert evaluate(cut_value(net, side), {}) == model.cut_rank(side)
    assert evaluate(cutset_gdof(net, "W"), {}) == model.min_cut("W")[0]


def test_two_user_ic_sum_cut_and_sum_of_single_cuts():
    ic = interference_channel({(1, 1): "a11", (1, 2): "a12", (2, 1): "a21", (2, 2): "a22"})
    joint = sum_cut_bounds(ic)
    assert list(joint) == ["cut {T1,T2} | {R1,R2}"]
    point = {"a11": 1, "a22": 2, "a12": 3, "a21": Fraction(1, 2)}
    assert evaluate(joint["cut {T1,T2} | {R1,R2}"], point) == Fraction(7, 2)  # max(1 + 2, 3 + 1/2)
    every = sum_cutset_bounds(ic)
    assert evaluate(every["sum of per-message cut-set bounds"], point) == 3


def test_sum_cut_refuses_a_node_that_is_source_and_destination():
    net = Network({"A": "relay", "B": "relay"}, [Link("A", "B", to_expr(1)), Link("B", "A", to_expr(1))],
                  [Message("X", "A", "B"), Message("Y", "B", "A")])
    with pytest.raises(InputError):
        sum_cut_bounds(net)
    assert list(sum_cutset_bounds(net)) == ["sum of per-message cut-set bounds"]


def test_deterministic_model_refuses_fractional_exponents():
    with pytest.raises(InputError, match="not an integer"):
        min_cut_value(relay_channel(), "W", {"sd": Fraction(1, 2), "sr": 1, "rd": 1})
