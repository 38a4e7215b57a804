"""Network description: validation messages and the case-file loader (bounds.network)."""

from fractions import Fraction

import pytest

from bounds.network import Link, Message, Network, from_mapping, interference_channel, relay_channel, to_expr
from verifier.core.errors import InputError
from verifier.expressions.expr import const, param


def _nodes():
    return {"S": "transmitter", "R": "relay", "D": "receiver"}


def test_relay_channel_is_valid_and_reports_its_parameters():
    net = relay_channel()
    assert net.params() == {"sd", "sr", "rd"}
    assert net.exponent("S", "R") == param("sr")
    assert net.exponent("D", "S") is None


@pytest.mark.parametrize("links, messages, fragment", [
    ([Link("S", "X", const(1))], [], "unknown node 'X'"),
    ([Link("D", "S", const(1))], [], "'D' is a receiver and cannot send"),
    ([Link("R", "S", const(1))], [], "'S' is a transmitter and cannot listen"),
    ([Link("R", "R", const(1))], [], "cannot link to itself"),
    ([Link("S", "D", const(1)), Link("S", "D", const(2))], [], "given twice"),
    ([], [Message("W", "D", "S")], "source 'D' is a receiver"),
    ([], [Message("W", "S", "S")], "same node"),
    ([], [Message("W", "S", "D"), Message("W", "S", "R")], "name used twice"),
    ([], [Message("W", "S", "Q")], "unknown node 'Q'"),
])
def test_constructor_names_the_offending_piece(links, messages, fragment):
    with pytest.raises(InputError, match=fragment):
        Network(_nodes(), links, messages)


def test_unknown_role_is_refused():
    with pytest.raises(InputError, match="role 'sender'"):
        Network({"S": "sender"}, [])


def test_from_mapping_reads_a_case_table():
    table = {"nodes": _nodes(),
             "links": [["S", "D", "alpha"], ["S", "R", 2], ["R", "D", "3/2"]],
             "messages": [["W", "S", "D"]]}
    net = from_mapping(table)
    assert net.exponent("S", "D") == param("alpha")
    assert net.exponent("S", "R") == const(2)
    assert net.exponent("R", "D") == const(Fraction(3, 2))
    assert net.message("W").destination == "D"


def test_from_mapping_accepts_message_tables_and_reports_bad_rows():
    table = {"nodes": _nodes(), "links": [["S", "D", 1]],
             "messages": [{"name": "W", "source": "S", "destination": "D"}]}
    assert from_mapping(table).messages == (Message("W", "S", "D"),)
    with pytest.raises(InputError, match=r"links\[0\]"):
        from_mapping({"nodes": _nodes(), "links": [["S", "D"]]})
    with pytest.raises(InputError, match=r"messages\[0\]: missing destination"):
        from_mapping({"nodes": _nodes(), "links": [], "messages": [{"name": "W", "source": "S"}]})
    with pytest.raises(InputError, match="unknown key"):
        from_mapping({"nodes": _nodes(), "edges": []})


def test_to_expr_refuses_booleans_and_odd_objects():
    with pytest.raises(InputError):
        to_expr(True)
    with pytest.raises(InputError):
        to_expr([1])


def test_interference_channel_uses_transmitter_then_receiver_indices():
    net = interference_channel({(1, 1): 1, (1, 2): "a12", (2, 2): 1})
    assert net.exponent("T1", "R2") == param("a12")   # (i, j): from transmitter i to receiver j
    assert net.exponent("T2", "R1") is None
    assert [m.name for m in net.messages] == ["W1", "W2"]
