"""Cut-set bounds of any network in GDoF form, one named bound per cut.

Why named: a reviewer comparing a paper's converse with the cut-set bound wants to see which cut is
active in which regime, so the generators return {"cut {S,R} | {D}": Expr, ...} rather than one min.

For a cut (S, S^c) the rate of every message with its source in S and destination in S^c is at most
I(X_S; Y_{S^c} | X_{S^c}) (cut-set bound, Cover-Thomas ch. 15); with generic gains its GDoF is the
maximum-weight matching of the exponents from the sending nodes of S to the listening nodes of S^c
(bounds.matching).  Nodes other than the message ends are free to sit on either side; a node that only
transmits is best placed in S^c and one that only receives in S (an extra row or column can only raise
a matching), so only relays are enumerated.
"""

from __future__ import annotations

from itertools import combinations
from typing import Iterable

from verifier.errors import InputError
from verifier.expr import Expr, add, min_

from .matching import matching_gdof
from .network import Message, Network


def cut_matrix(network: Network, side: Iterable[str]) -> list[list[Expr | None]]:
    """Exponents from the sending nodes in `side` (columns) to the listening nodes outside it (rows)."""
    inside = set(side)
    tx = [n for n in network.node_names() if n in inside and network.can_send(n)]
    rx = [n for n in network.node_names() if n not in inside and network.can_listen(n)]
    return [[network.exponent(t, r) for t in tx] for r in rx]


def cut_value(network: Network, side: Iterable[str]) -> Expr:
    """GDoF of the MIMO channel across the cut (side | rest)."""
    return matching_gdof(cut_matrix(network, side))


def cut_name(network: Network, side: Iterable[str]) -> str:
    inside = set(side)
    left = [n for n in network.node_names() if n in inside]
    right = [n for n in network.node_names() if n not in inside]
    return "cut {" + ",".join(left) + "} | {" + ",".join(right) + "}"


def _cuts(network: Network, sources: set[str], destinations: set[str]) -> list[frozenset[str]]:
    """Every side S containing all sources and no destination, relays free, others placed best."""
    if sources & destinations:
        raise InputError(f"no cut separates {sorted(sources & destinations)} from itself")
    fixed_in = set(sources)
    free = []
    for n in network.node_names():
        if n in sources or n in destinations:
            continue
        if network.nodes[n] == "relay":
            free.append(n)
        elif network.nodes[n] == "receiver":
            fixed_in.add(n)  # a pure receiver inside S adds no row to the cut
    out = []
    for k in range(len(free) + 1):
        for extra in combinations(free, k):
            out.append(frozenset(fixed_in | set(extra)))
    return out


def message_cut_bounds(network: Network, message: str | Message) -> dict[str, Expr]:
    """Named cut-set bounds on the GDoF of one message: {cut name: matching GDoF of that cut}."""
    m = message if isinstance(message, Message) else network.message(message)
    return {cut_name(network, s): cut_value(network, s) for s in _cuts(network, {m.source}, {m.destination})}


def sum_cut_bounds(network: Network, messages: Iterable[str] | None = None) -> dict[str, Expr]:
    """Named cut-set bounds on the sum-GDoF of `messages` (all messages by default).

    A cut counts when it has every chosen source on its left and every chosen destination on its right;
    other messages crossing it only add nonnegative rates to the left-hand side.
    """
    chosen = _chosen(network, messages)
    sources = {m.source for m in chosen}
    destinations = {m.destination for m in chosen}
    return {cut_name(network, s): cut_value(network, s) for s in _cuts(network, sources, destinations)}


def _chosen(network: Network, messages: Iterable[str] | None) -> list[Message]:
    if messages is None:
        if not network.messages:
            raise InputError("the network has no messages to bound")
        return list(network.messages)
    chosen = [network.message(name) for name in messages]
    if not chosen:
        raise InputError("choose at least one message")
    return chosen


def cutset_gdof(network: Network, message: str | Message) -> Expr:
    """The cut-set bound on one message: min over its cuts."""
    return min_(*message_cut_bounds(network, message).values())


def sum_cutset_bounds(network: Network, messages: Iterable[str] | None = None) -> dict[str, Expr]:
    """Every named outer bound on the sum-GDoF that cut-set reasoning gives.

    The joint cuts of `sum_cut_bounds`, plus (when more than one message is chosen) the sum of the
    single-message cut-set bounds under the name "sum of per-message cut-set bounds".
    """
    chosen = _chosen(network, messages)
    try:
        out = sum_cut_bounds(network, [m.name for m in chosen])
    except InputError:
        out = {}  # a node is both a chosen source and a chosen destination: no joint cut
    if len(chosen) > 1:
        out["sum of per-message cut-set bounds"] = add(*(cutset_gdof(network, m) for m in chosen))
    return out
