"""Cut-set bounds of any network in GDoF form, one named bound per cut.

Why named: a reviewer comparing a paper's converse with the cut-set bound wants to see which cut is
active in which regime, so the generators return {"cut {S,R} | {D}": Expr, ...} rather than one min.

For a cut (S, S^c) the rate of every message with its source in S and destination in S^c is at most
I(X_S; Y_{S^c} | X_{S^c}) (cut-set bound, Cover-Thomas ch. 15); with generic gains its GDoF is the
maximum-weight matching of the exponents from the sending nodes of S to the listening nodes of S^c
(bounds.matching).  Nodes other than the message ends are free to sit on either side; a node that only
transmits is best placed in S^c and one that only receives in S (an extra row or column can only raise
a matching), so only relays are enumerated: 2^relays cuts, hence MAX_CUTS.
"""

from __future__ import annotations

from itertools import combinations
from typing import Iterable

from verifier.core.errors import InputError
from verifier.expressions.expr import Expr, add, min_
from verifier.expressions.region import count_text

from .matching import MAX_MATCHINGS, MatchingLimit, matching_gdof, matching_gdof_counted
from .network import Message, Network

# Largest number of cuts enumerated for one bound (2^12: a chain of 12 relays).  Every relay doubles
# the cuts, and each cut becomes one named outer bound that every later stage (report, SMT query,
# regime splitting) carries: 24 relays meant 16777216 cuts and about 5 GB before anything was asked.
MAX_CUTS = 1 << 12
# Largest number of maximal matchings summed over all the cuts of one bound (see bounds.matching):
# sparse cuts have one or a few each, a complete 8 x 8 cut alone has 40320; a few seconds at most.
MAX_CUT_MATCHINGS = 1 << 16


class TooManyCuts(InputError):
    """The cut enumeration or its matchings would exceed MAX_CUTS / MAX_CUT_MATCHINGS."""


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


def _cuts(network: Network, sources: set[str], destinations: set[str],
          what: str = "per message") -> list[frozenset[str]]:
    """Every side S containing all sources and no destination, relays free, others placed best;
    TooManyCuts, before anything is enumerated, when there would be more than MAX_CUTS."""
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
    if len(free) > MAX_CUTS.bit_length() - 1:
        raise TooManyCuts(f"the network has {len(free)} relays: {count_text(2 ** len(free))} cuts {what} "
                          f"(limit {MAX_CUTS}, that is {MAX_CUTS.bit_length() - 1} relays); "
                          "state the cut-set bounds in [outer] instead")
    out = []
    for k in range(len(free) + 1):
        for extra in combinations(free, k):
            out.append(frozenset(fixed_in | set(extra)))
    return out


def _named_values(network: Network, cuts: list[frozenset[str]]) -> dict[str, Expr]:
    """{cut name: matching GDoF} with at most MAX_CUT_MATCHINGS maximal matchings over all cuts."""
    out, left = {}, MAX_CUT_MATCHINGS
    for k, side in enumerate(cuts, 1):
        limit = min(MAX_MATCHINGS, left)
        try:
            value, used = matching_gdof_counted(cut_matrix(network, side), limit)
        except MatchingLimit as err:
            if limit == MAX_MATCHINGS:
                raise TooManyCuts(f"{cut_name(network, side)}: {err.message}") from None
            raise TooManyCuts(f"the cut-set bounds need more than {MAX_CUT_MATCHINGS} maximal matchings "
                              f"(limit {MAX_CUT_MATCHINGS}; reached at cut {k} of {len(cuts)}); "
                              "state the cut-set bounds in [outer] instead") from None
        left -= used
        out[cut_name(network, side)] = value
    return out


def message_cut_bounds(network: Network, message: str | Message) -> dict[str, Expr]:
    """Named cut-set bounds on the GDoF of one message: {cut name: matching GDoF of that cut}."""
    m = message if isinstance(message, Message) else network.message(message)
    return _named_values(network, _cuts(network, {m.source}, {m.destination}))


def sum_cut_bounds(network: Network, messages: Iterable[str] | None = None) -> dict[str, Expr]:
    """Named cut-set bounds on the sum-GDoF of `messages` (all messages by default).

    A cut counts when it has every chosen source on its left and every chosen destination on its right;
    other messages crossing it only add nonnegative rates to the left-hand side.
    """
    chosen = _chosen(network, messages)
    sources = {m.source for m in chosen}
    destinations = {m.destination for m in chosen}
    return _named_values(network, _cuts(network, sources, destinations, "for the chosen messages"))


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
    if {m.source for m in chosen} & {m.destination for m in chosen}:
        out = {}  # a node is both a chosen source and a chosen destination: no joint cut
    else:  # (size limits are raised, never swallowed)
        out = sum_cut_bounds(network, [m.name for m in chosen])
    if len(chosen) > 1:
        out["sum of per-message cut-set bounds"] = add(*(cutset_gdof(network, m) for m in chosen))
    return out
