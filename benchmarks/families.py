"""Deterministic families of claims for the speed benchmark (invented stress tests, no source).

Every claim is built from a fixed linear congruential sequence, so a run on any machine measures the
same work.  Families:
- `bounds(p, k)`: p exponents in [0, 2], the min of k GDoF-style bounds, each an affine part with
  small coefficients plus a max(.) and a (.)^+ term, claimed <= its first bound (true: a min is at
  most each of its members), so the whole region must be split wherever the minimum changes hands;
- `nested(depth)`: two exponents, min and max alternating `depth` levels deep, claimed equal to the
  same expression with the arguments of every node reversed (true);
- `thin_band(offset, scale)`: min(2a, a + b - offset, 2b) == 2 min(a, b) on a, b >= 0, false exactly
  on the band |a - b| < offset, with every coefficient multiplied by `scale`;
- `chain(n)`: |x1 - x2| + ... + |x_{n-1} - x_n| <= n - 1 on [0, 1]^n (true).
"""

from __future__ import annotations

from fractions import Fraction as F

from verifier.claims.kinds import Side, relation
from verifier.expressions.expr import abs_, add, max_, min_, param, pos, scale
from verifier.expressions.region import Region, atoms_of


class Sequence:
    """A linear congruential generator: the same numbers everywhere, no `random` state involved."""

    def __init__(self, start: int):
        self.state = start

    def next(self, modulus: int) -> int:
        self.state = (1103515245 * self.state + 12345) % 2 ** 31
        return (self.state >> 8) % modulus


def box(names, lo=0, hi=2) -> Region:
    atoms = []
    for n in names:
        atoms += list(atoms_of(param(n), ">=", lo)) + list(atoms_of(param(n), "<=", hi))
    return Region.of(*atoms)


def bounds(p: int, k: int):
    names = [f"x{i}" for i in range(1, p + 1)]
    xs = [param(n) for n in names]
    seq = Sequence(1000 * p + k)
    parts = []
    for j in range(k):
        lin = add(*(scale(F(1 + seq.next(3)), xs[seq.next(p)]) for _ in range(2)), F(seq.next(4), 2))
        a, b, c = (xs[seq.next(p)] for _ in range(3))
        term = max_(a, b - F(seq.next(5), 4)) + pos(c - F(seq.next(7), 4))
        parts.append((f"b{j}", scale(F(1, 2 + seq.next(3)), add(lin, term))))
    side = Side(min_(*(e for _, e in parts)), "outer", tuple(parts))
    return relation(side, "<=", parts[0][1], box(names))


def nested(depth: int):
    a, b = param("alpha"), param("beta")
    seq = Sequence(depth)
    left, right = a, a
    for level in range(depth):
        other = add(scale(F(1 + seq.next(3), 2), b), F(seq.next(5), 3))
        make = min_ if level % 2 == 0 else max_
        left, right = make(left, other), make(other, right)
    return relation(left, "==", right, box(["alpha", "beta"], 0, 4))


def thin_band(offset=F(1, 10), factor=1):
    a, b = param("alpha"), param("beta")
    c = F(factor)
    lhs = min_(scale(2 * c, a), add(scale(c, a), scale(c, b), -offset * c), scale(2 * c, b))
    rhs = scale(2 * c, min_(a, b))
    region = Region.of(*atoms_of(a, ">=", 0), *atoms_of(b, ">=", 0))
    return relation(lhs, "==", rhs, region)


def chain(n: int):
    xs = [param(f"x{i}") for i in range(1, n + 1)]
    f = add(*(abs_(u - v) for u, v in zip(xs, xs[1:])))
    return relation(f, "<=", n - 1, box([f"x{i}" for i in range(1, n + 1)], 0, 1))


FAMILIES = {
    "bounds 1x2": lambda: bounds(1, 2),
    "bounds 2x8": lambda: bounds(2, 8),
    "bounds 3x16": lambda: bounds(3, 16),
    "bounds 3x64": lambda: bounds(3, 64),
    "bounds 4x8": lambda: bounds(4, 8),
    "bounds 5x4": lambda: bounds(5, 4),
    "bounds 6x4": lambda: bounds(6, 4),
    "nested depth 4": lambda: nested(4),
    "nested depth 16": lambda: nested(16),
    "thin band 1/10": lambda: thin_band(F(1, 10)),
    "thin band 1/999983": lambda: thin_band(F(1, 999983)),
    "thin band x10^9": lambda: thin_band(F(1, 10), 10 ** 9),
    "chain 6": lambda: chain(6),
}
