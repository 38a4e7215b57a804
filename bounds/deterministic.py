"""Linear deterministic models of a network at integer exponents: an oracle independent of matching.

Why: the cut-set generator computes a maximum-weight matching of exponents symbolically.  A second,
unrelated computation of the same quantity is the rank of a cut's transfer matrix in a linear
deterministic model (Avestimehr, Diggavi, Tse, IEEE Trans. IT 57(4), 2011): every node sends and receives
q levels, and a link of integer strength n carries the top n levels of the sender.

Two models:
- "shift": the paper's model over GF(2); a link is the down-shift S^(q-n), level c of the sender arriving
  at level c + q - n of the receiver.  Its min-cut is the capacity of the deterministic relay network.
- "generic": the same staircase with independent random coefficients over a large prime field; level c
  may reach every receiver level at or below c + q - n, as carries of a real multiplication do.  Generic
  coefficients mirror generic Gaussian gains, so its cut ranks equal the matching values.

Finite-field ranks come from python-flint (flint.nmod_mat.rank), never from hand-written elimination.
"""

from __future__ import annotations

import random
from fractions import Fraction
from itertools import combinations
from typing import Iterable, Mapping

import flint

from verifier.core.errors import InputError
from verifier.expressions.expr import evaluate

from .network import Message, Network

GENERIC_PRIME = 2**61 - 1
MODELS = ("shift", "generic")


def integer_levels(network: Network, point: Mapping[str, object] | None = None) -> dict[tuple[str, str], int]:
    """Link levels max(0, exponent) at `point`; each must be an integer."""
    out = {}
    for link in network.links:
        value = evaluate(link.exponent, point or {})
        if value.denominator != 1:
            raise InputError(f"link {link.tx} -> {link.rx}: exponent {value} is not an integer at this point")
        out[(link.tx, link.rx)] = max(0, int(value))
    return out


class DeterministicNetwork:
    """A network's link blocks in one linear deterministic model, fixed once (one draw of coefficients)."""

    def __init__(self, network: Network, point: Mapping[str, object] | None = None, model: str = "shift",
                 q: int | None = None, seed: int = 0, prime: int = GENERIC_PRIME):
        if model not in MODELS:
            raise InputError(f"unknown deterministic model '{model}'; expected one of {', '.join(MODELS)}")
        self.network = network
        self.model = model
        self.levels = integer_levels(network, point)
        self.q = max([1, *self.levels.values()]) if q is None else q
        if any(n > self.q for n in self.levels.values()):
            raise InputError(f"q = {self.q} is below a link level {max(self.levels.values())}")
        self.modulus = 2 if model == "shift" else prime
        rng = random.Random(seed)
        self.blocks = {pair: self._block(n, rng) for pair, n in self.levels.items()}

    def _block(self, n: int, rng: random.Random) -> list[list[int]]:
        """q x q block of one link: rows are receiver levels, columns sender levels (0 = most significant)."""
        q, shift = self.q, self.q - n
        if self.model == "shift":
            return [[1 if r - c == shift else 0 for c in range(q)] for r in range(q)]
        return [[rng.randrange(1, self.modulus) if r - c >= shift else 0 for c in range(q)] for r in range(q)]

    def transfer_matrix(self, side: Iterable[str]) -> flint.nmod_mat:
        """Map from the sending nodes in `side` to the listening nodes outside it (stacked q-level blocks)."""
        inside = set(side)
        tx = [n for n in self.network.node_names() if n in inside and self.network.can_send(n)]
        rx = [n for n in self.network.node_names() if n not in inside and self.network.can_listen(n)]
        q, zero = self.q, [[0] * self.q for _ in range(self.q)]
        entries: list[int] = []
        for r_node in rx:
            for r in range(q):
                for t_node in tx:
                    entries.extend(self.blocks.get((t_node, r_node), zero)[r])
        rows, cols = len(rx) * q, len(tx) * q
        if rows == 0 or cols == 0:
            return flint.nmod_mat(max(rows, 1), max(cols, 1), self.modulus)
        return flint.nmod_mat(rows, cols, entries, self.modulus)

    def cut_rank(self, side: Iterable[str]) -> int:
        return int(self.transfer_matrix(side).rank())

    def min_cut(self, message: str | Message) -> tuple[int, frozenset[str]]:
        """Smallest cut rank over every side holding the source and not the destination, and that side.

        All other nodes are enumerated on both sides (no placement shortcut), so that this stays an
        independent check of the cut-set generator.
        """
        m = message if isinstance(message, Message) else self.network.message(message)
        others = [n for n in self.network.node_names() if n not in (m.source, m.destination)]
        best = None
        for k in range(len(others) + 1):
            for extra in combinations(others, k):
                side = frozenset({m.source, *extra})
                value = self.cut_rank(side)
                if best is None or value < best[0]:
                    best = (value, side)
        return best


def min_cut_value(network: Network, message: str | Message, point: Mapping[str, object] | None = None,
                  model: str = "shift", seed: int = 0) -> Fraction:
    """Min-cut rank of one message at an integer point: the capacity of the deterministic network
    in the shift model (Avestimehr, Diggavi, Tse 2011)."""
    return Fraction(DeterministicNetwork(network, point, model, seed=seed).min_cut(message)[0])


def shift_matrix(n: int, q: int, modulus: int = 2) -> flint.nmod_mat:
    """S^(q-n) as a flint matrix: the top n of q levels arrive at the bottom n levels."""
    if not 0 <= n <= q:
        raise InputError(f"level {n} outside 0..{q}")
    return flint.nmod_mat(q, q, [1 if r - c == q - n else 0 for r in range(q) for c in range(q)], modulus)
