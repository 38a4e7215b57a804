"""A Gaussian network described by its nodes, its links and their SNR exponents, and its messages.

Why a small home-grown description: every generator in bounds/ (cut-set bounds, deterministic models,
case fragments) needs the same three facts -- who may send, who may listen, and how strong each link
is as a power of SNR -- and nothing else.  A link exponent is an `Expr` (a parameter such as alpha, a
number, or any piecewise-linear form of parameters); a missing link means no link at all.

Roles: a transmitter only sends, a receiver only listens, a relay does both.  Validation happens in the
constructor so that a mistake in a case file surfaces once, with the node or link named.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Iterable, Mapping

from verifier.core.errors import InputError
from verifier.expressions.expr import Expr, lift, params as expr_params

ROLES = ("transmitter", "receiver", "relay")
# Largest number of nodes: GDoF networks in papers have a handful, and every cut costs a matrix of
# (senders x listeners) look-ups, so thousands of nodes would take minutes per bound for nothing.
# (Relays are limited far more tightly by bounds.cutset.MAX_CUTS: each one doubles the cuts.)
MAX_NODES = 256


def to_expr(value, what: str = "exponent", names: Iterable[str] | None = None) -> Expr:
    """An Expr from an Expr, an exact number, or text (read by verifier.text.parse.parse_expr).

    `names`, when given, are the only parameter names text may use (as in a case file).
    """
    if isinstance(value, Expr):
        return value
    if isinstance(value, (int, Fraction)) and not isinstance(value, bool):
        return lift(value)
    if isinstance(value, float):
        return lift(value)
    if isinstance(value, str):
        return _text_to_expr(value, what, names)
    raise InputError(f"{what} {value!r} is neither a number, an expression nor text")


def _text_to_expr(text: str, what: str, names: Iterable[str] | None) -> Expr:
    from verifier.text.parse import parse_expr
    try:
        return parse_expr(text, names)
    except InputError as err:
        raise type(err)(f"{what}: {err.message}", err.source, err.position) from None


@dataclass(frozen=True)
class Link:
    """A directed link: transmitter `tx` is heard at receiver `rx` with strength SNR^exponent."""

    tx: str
    rx: str
    exponent: Expr


@dataclass(frozen=True)
class Message:
    """An independent message `name` from node `source` to node `destination`."""

    name: str
    source: str
    destination: str


class Network:
    """Nodes with roles, directed links with exponents, and messages; validated on construction."""

    def __init__(self, nodes: Mapping[str, str], links: Iterable[Link], messages: Iterable[Message] = ()):
        self.nodes: dict[str, str] = dict(nodes)
        self.links: tuple[Link, ...] = tuple(links)
        self.messages: tuple[Message, ...] = tuple(messages)
        self._check_nodes()
        self._gain: dict[tuple[str, str], Expr] = {}
        for link in self.links:
            self._check_link(link)
            self._gain[(link.tx, link.rx)] = link.exponent
        self._check_messages()

    # --- validation -------------------------------------------------------------------------
    def _check_nodes(self) -> None:
        if not self.nodes:
            raise InputError("a network needs at least one node")
        if len(self.nodes) > MAX_NODES:
            raise InputError(f"the network has {len(self.nodes)} nodes (limit {MAX_NODES})")
        for name, role in self.nodes.items():
            if not isinstance(name, str) or not name:
                raise InputError(f"node name {name!r} must be a non-empty string")
            if role not in ROLES:
                raise InputError(f"node '{name}' has role {role!r}; expected one of {', '.join(ROLES)}")

    def _check_link(self, link: Link) -> None:
        label = f"link {link.tx} -> {link.rx}"
        for end in (link.tx, link.rx):
            if end not in self.nodes:
                raise InputError(f"{label}: unknown node '{end}'")
        if link.tx == link.rx:
            raise InputError(f"{label}: a node cannot link to itself")
        if self.nodes[link.tx] == "receiver":
            raise InputError(f"{label}: '{link.tx}' is a receiver and cannot send")
        if self.nodes[link.rx] == "transmitter":
            raise InputError(f"{label}: '{link.rx}' is a transmitter and cannot listen")
        if not isinstance(link.exponent, Expr):
            raise InputError(f"{label}: exponent {link.exponent!r} is not an expression")
        if (link.tx, link.rx) in self._gain:
            raise InputError(f"{label}: given twice")

    def _check_messages(self) -> None:
        seen: set[str] = set()
        for m in self.messages:
            label = f"message '{m.name}'"
            if m.name in seen:
                raise InputError(f"{label}: name used twice")
            seen.add(m.name)
            for end in (m.source, m.destination):
                if end not in self.nodes:
                    raise InputError(f"{label}: unknown node '{end}'")
            if m.source == m.destination:
                raise InputError(f"{label}: source and destination are the same node '{m.source}'")
            if not self.can_send(m.source):
                raise InputError(f"{label}: source '{m.source}' is a receiver and cannot send")
            if not self.can_listen(m.destination):
                raise InputError(f"{label}: destination '{m.destination}' is a transmitter and cannot listen")

    # --- queries ----------------------------------------------------------------------------
    def can_send(self, node: str) -> bool:
        return self.nodes[node] in ("transmitter", "relay")

    def can_listen(self, node: str) -> bool:
        return self.nodes[node] in ("receiver", "relay")

    def exponent(self, tx: str, rx: str) -> Expr | None:
        """The link exponent from `tx` to `rx`, or None when there is no link."""
        return self._gain.get((tx, rx))

    def node_names(self) -> list[str]:
        return list(self.nodes)

    def message(self, name: str) -> Message:
        for m in self.messages:
            if m.name == name:
                return m
        raise InputError(f"no message named '{name}'")

    def params(self) -> frozenset[str]:
        out: frozenset[str] = frozenset()
        for link in self.links:
            out |= expr_params(link.exponent)
        return out

    def __repr__(self) -> str:
        return f"Network(nodes={self.nodes!r}, links={len(self.links)}, messages={len(self.messages)})"


# ---------------------------------------------------------------------------------------------
# loading from a case-file table
# ---------------------------------------------------------------------------------------------

NETWORK_KEYS = ("nodes", "links", "messages")
MESSAGE_KEYS = ("name", "source", "destination")


def _kind(value) -> str:
    """How a message names a TOML value's type."""
    if isinstance(value, bool):
        return "a boolean"
    if isinstance(value, (int, float, Fraction)):
        return "a number"
    return {str: "a string", list: "an array", tuple: "an array", dict: "a table"}.get(type(value),
                                                                                      type(value).__name__)


def check_keys(table: Mapping, allowed, where: str = "") -> None:
    """Refuse keys a table does not have, suggesting the closest one (a typo must not be ignored)."""
    import difflib
    for key in table:
        if key not in allowed:
            close = difflib.get_close_matches(str(key), allowed, n=1)
            hint = f"did you mean '{close[0]}'?" if close else f"allowed: {', '.join(allowed)}"
            raise InputError(f"{where}{key}: unknown key ({hint})")


def from_mapping(table: Mapping, names: Iterable[str] | None = None) -> Network:
    """Network from {nodes = {S = "transmitter", ...}, links = [["S", "D", "alpha"], ...], messages = [...]}.

    A message is ["W", "S", "D"] or {name = "W", source = "S", destination = "D"}.  Exponents are numbers
    or text in the tool's expression syntax; `names` restricts the parameters text may use.  Every value
    is type-checked here, so a wrong shape in a case file is an error naming the key, never a crash.
    """
    if not isinstance(table, Mapping):
        raise InputError("a network table must be a mapping with keys nodes, links, messages")
    check_keys(table, NETWORK_KEYS, "")
    nodes = table.get("nodes")
    if not isinstance(nodes, Mapping):
        raise InputError(f"nodes: expected a table of name = role, found {_kind(nodes)}"
                         if nodes is not None else "nodes: missing (a table of name = role)")
    for name, role in nodes.items():
        if not isinstance(role, str):
            raise InputError(f"nodes.{name}: expected a role in quotes ({', '.join(ROLES)}), "
                             f"found {_kind(role)}")
    links, messages = table.get("links", []), table.get("messages", [])
    for key, value, shape in (("links", links, "[tx, rx, exponent]"),
                              ("messages", messages, "[name, source, destination]")):
        if not isinstance(value, (list, tuple)):
            raise InputError(f"{key}: expected an array of {shape}, found {_kind(value)}")
    links = [_link_from(i, item, names) for i, item in enumerate(links)]
    messages = [_message_from(i, item) for i, item in enumerate(messages)]
    return Network(nodes, links, messages)


def _node_name(value, where: str, role: str = "node") -> str:
    if not isinstance(value, str):
        what = "a message name" if role == "name" else "a node name"
        raise InputError(f"{where}: expected {what} in quotes, found {_kind(value)}")
    return value


def _link_from(index: int, item, names) -> Link:
    if not isinstance(item, (list, tuple)) or len(item) != 3:
        found = f"an array of {len(item)}" if isinstance(item, (list, tuple)) else _kind(item)
        raise InputError(f"links[{index}]: expected [tx, rx, exponent], found {found}")
    tx, rx, exp = item
    if isinstance(exp, bool) or not isinstance(exp, (str, int, Fraction, float, Expr)):
        raise InputError(f"links[{index}]: the exponent must be a number or an expression in quotes, "
                         f"found {_kind(exp)}")
    return Link(_node_name(tx, f"links[{index}][0]"), _node_name(rx, f"links[{index}][1]"),
                to_expr(exp, f"links[{index}] exponent", names))


def _message_from(index: int, item) -> Message:
    where = f"messages[{index}]"
    if isinstance(item, Mapping):
        check_keys(item, MESSAGE_KEYS, f"{where}.")
        missing = [k for k in MESSAGE_KEYS if k not in item]
        if missing:
            raise InputError(f"{where}: missing {', '.join(missing)}")
        return Message(*(_node_name(item[k], f"{where}.{k}", k) for k in MESSAGE_KEYS))
    if isinstance(item, (list, tuple)) and len(item) == 3:
        return Message(*(_node_name(x, f"{where}[{k}]", MESSAGE_KEYS[k]) for k, x in enumerate(item)))
    found = f"an array of {len(item)}" if isinstance(item, (list, tuple)) else _kind(item)
    raise InputError(f"{where}: expected [name, source, destination] or a table with name, source and "
                     f"destination, found {found}")


# ---------------------------------------------------------------------------------------------
# common networks, so tests and case files need not spell them out
# ---------------------------------------------------------------------------------------------

def relay_channel(sd="sd", sr="sr", rd="rd") -> Network:
    """Source S, relay R, destination D; exponents default to parameters sd, sr, rd."""
    return Network({"S": "transmitter", "R": "relay", "D": "receiver"},
                   [Link("S", "D", to_expr(sd)), Link("S", "R", to_expr(sr)), Link("R", "D", to_expr(rd))],
                   [Message("W", "S", "D")])


def interference_channel(gains: Mapping[tuple[int, int], object]) -> Network:
    """K-user interference channel; gains[(i, j)] is the exponent from transmitter Ti to receiver Rj.

    Messages Wi go from Ti to Ri.  Pairs left out have no link.
    """
    users = sorted({i for pair in gains for i in pair})
    nodes = {f"T{i}": "transmitter" for i in users} | {f"R{i}": "receiver" for i in users}
    links = [Link(f"T{i}", f"R{j}", to_expr(e)) for (i, j), e in sorted(gains.items())]
    return Network(nodes, links, [Message(f"W{i}", f"T{i}", f"R{i}") for i in users])
