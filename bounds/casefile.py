"""The hook the case-file reader calls for a `[network]` table: its cut-set bounds as named outer bounds.

Why a separate module: workbench/ reads case files and must not know how bounds are generated; it hands
the raw table over and receives {identifier: Expr}.  The table is the network description of
bounds.network.from_mapping, plus an optional `target = ["W1", ...]` choosing the messages whose
(sum-)GDoF the bounds are about (all messages by default).
"""

from __future__ import annotations

from typing import Iterable, Mapping

from verifier.core.errors import InputError
from verifier.expressions.expr import Expr

from .fragment import named_outer_bounds
from .network import NETWORK_KEYS, check_keys, from_mapping


def network_outer_bounds(table: Mapping, parameter_names: Iterable[str] | None = None) -> dict[str, Expr]:
    """{identifier: Expr} of the cut-set bounds of the network described by `table`."""
    if not isinstance(table, Mapping):
        raise InputError("[network] must be a table with nodes, links and messages")
    check_keys(table, NETWORK_KEYS + ("target",))
    body = {k: v for k, v in table.items() if k != "target"}
    target = table.get("target")
    if target is not None and (not isinstance(target, list) or not all(isinstance(t, str) for t in target)):
        raise InputError("target: expected an array of message names in quotes")
    network = from_mapping(body, parameter_names)
    return {key: expr for key, (_, expr) in named_outer_bounds(network, target).items()}
