"""Case-file material from a network (bounds.fragment, bounds.casefile)."""

import re
import tomllib

import pytest

from bounds.casefile import network_outer_bounds
from bounds.cutset import message_cut_bounds
from bounds.fragment import case_fragment, identifier, named_outer_bounds
from bounds.interference import ic_network
from bounds.network import Link, Message, Network, relay_channel, to_expr
from verifier.core.errors import InputError, UnknownNameError
from verifier.text.parse import parse_expr

RELAY_TABLE = {"nodes": {"S": "transmitter", "R": "relay", "D": "receiver"},
               "links": [["S", "D", "sd"], ["S", "R", "sr"], ["R", "D", "rd"]],
               "messages": [["W", "S", "D"]]}


def test_fragment_is_valid_toml_and_reads_back_to_the_same_bounds():
    for network in (relay_channel(), ic_network("a11", "a12", "a21", "a22")):
        text = case_fragment(network)
        table = tomllib.loads(text)["outer"]   # reference library: Python's tomllib
        bounds = named_outer_bounds(network)
        assert list(table) == list(bounds)
        for key, value in table.items():
            assert re.fullmatch(r"[A-Za-z_][A-Za-z0-9_]*", key)
            assert parse_expr(value) == bounds[key][1]


def test_relay_fragment_names_both_cuts():
    text = case_fragment(relay_channel())
    assert "# cut {S} | {R,D}\ncut_S_to_R_D = " in text
    assert "cut_S_R_to_D" in text
    assert "GDoF of message W" in text


def test_identifiers():
    assert identifier("cut {S,R} | {D}") == "cut_S_R_to_D"
    assert identifier("sum of per-message cut-set bounds") == "sum_of_per_message_cut_set_bounds"
    assert identifier("cut {1a} | {b-c}") == "cut_1a_to_b_c"
    assert identifier("9 lives") == "b_9_lives"


def test_network_hook_for_the_case_reader():
    bounds = network_outer_bounds(RELAY_TABLE, ["sd", "sr", "rd"])
    readable = message_cut_bounds(relay_channel(), "W")
    assert bounds == {"cut_S_to_R_D": readable["cut {S} | {R,D}"], "cut_S_R_to_D": readable["cut {S,R} | {D}"]}
    with pytest.raises(UnknownNameError, match="links\\[0\\] exponent"):
        network_outer_bounds(RELAY_TABLE, ["sr", "rd"])
    with pytest.raises(InputError, match="target"):
        network_outer_bounds(dict(RELAY_TABLE, target="W"), ["sd", "sr", "rd"])


def test_target_chooses_the_messages():
    net = Network({"T1": "transmitter", "T2": "transmitter", "R": "receiver"},
                  [Link("T1", "R", to_expr("a")), Link("T2", "R", to_expr("b"))],
                  [Message("W1", "T1", "R"), Message("W2", "T2", "R")])
    both = named_outer_bounds(net)
    assert set(both) == {"cut_T1_T2_to_R", "sum_of_per_message_cut_set_bounds"}
    one = named_outer_bounds(net, ["W2"])
    assert set(one) == {"cut_T2_to_T1_R"}
