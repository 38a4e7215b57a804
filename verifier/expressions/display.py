"""Constraints as a theorist reads them, for display only: one normal form per hyperplane, bounds
chained, everything in the claim's parameter order.

Why a printer of its own: `region.constraint_text(atoms)` must print text that parses back to the
very same atoms in the same order (case files, certificates, round-trip tests), so it may not
reorder, rescale or join anything.  A regime row, a failure piece, a threshold or a holds set is read
by a person comparing rows, and there the same hyperplane must read the same way wherever it appears.
The rules (`names` is the claim's parameter order; other names follow alphabetically):

1. Scale: the coefficients (not the constant) become coprime integers with the first parameter
   positive: `2*alpha + beta > 1 + gamma`, `2*alpha > gamma`; one parameter gets coefficient 1
   (`alpha < 1/2`).  A positive multiple of a constraint is the same half-space.
2. Sides: the terms with positive coefficients on the left, the others and the constant on the right,
   each side in parameter order.  So one hyperplane has one left and one right side wherever it is
   printed, and only the relation says on which side a row lies (`2*alpha + beta <= 1 + gamma`).
   An equality reads `2*alpha = gamma` (`=` parses as `==`).
3. Chains, upwards (`<`, `<=`): a lower and an upper bound of the same left side read
   `1 < alpha < gamma`, `0 <= beta <= 1`; a chain continues through an expression that is the left
   side of one of the two constraints it joins (`alpha < beta` and `beta < 1`: `alpha < beta < 1`),
   never through a mere right side (`1 < alpha < gamma` and `2*alpha > gamma` stay apart).
4. Order: equalities first, then by the first parameter in `names` (all of alpha's constraints, then
   beta's), then by the number of parameters, lower bounds before upper ones; a chain stands where
   its first constraint would.
The text parses (verifier.text.parse) to the same set: every step rescales by a positive number,
reorders a conjunction or writes two constraints as the chain that parses to them (tests check it).
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from math import gcd
from typing import Iterable, Sequence

from verifier.expressions.expr import Affine, join_affine, text_term, to_text
from verifier.expressions.region import Atom, Notation

DISPLAY = Notation(rel=lambda r: "=" if r == "==" else r, atom=lambda a: a.text(), affine=to_text,
                   term=text_term)
_FLIP = {">": "<", ">=": "<=", "<": ">", "<=": ">=", "==": "=="}


@dataclass(frozen=True)
class Side:
    """One side of a displayed constraint: terms in display order (join_affine reads it)."""

    coeffs: tuple[tuple[str, Fraction], ...]
    const: Fraction


@dataclass(frozen=True)
class Normal:
    """`left rel right` in normal form (rules 1 and 2); `key` sorts it (rule 4)."""

    left: Side
    rel: str
    right: Side
    key: tuple

    @property
    def edge(self) -> tuple[Side, str, Side]:
        """(lower, '<' or '<=', upper): the constraint read upwards, as a chain reads it."""
        if self.rel in (">", ">="):
            return self.right, _FLIP[self.rel], self.left
        return self.left, self.rel, self.right


def _ranker(names: Sequence[str]):
    rank = {n: i for i, n in enumerate(names)}
    return lambda n: (rank.get(n, len(rank)), n)


def normal(form: Affine, rel: str, names: Sequence[str] = ()) -> Normal | None:
    """`form rel 0` in normal form, or None for a constant form (nothing to normalise)."""
    if not form.coeffs:
        return None
    rank = _ranker(names)
    terms = sorted(form.coeffs, key=lambda t: rank(t[0]))
    den = 1
    for _, c in terms:
        den = den * c.denominator // gcd(den, c.denominator)
    common = 0
    for _, c in terms:
        common = gcd(common, int(c * den))
    k = Fraction(den, common) * (1 if terms[0][1] > 0 else -1)
    scaled = [(n, c * k) for n, c in terms]
    rel = rel if k > 0 else _FLIP[rel]
    left = Side(tuple((n, c) for n, c in scaled if c > 0), Fraction(0))
    right = Side(tuple((n, -c) for n, c in scaled if c < 0), -form.const * k)
    key = (rank(terms[0][0])[0], len(terms), tuple((rank(n), c) for n, c in scaled),
           rel not in (">", ">=", "=="), right.const)
    return Normal(left, rel, right, key)


def _side(s: Side, nt: Notation) -> str:
    if nt.term is not None:
        return join_affine(s, nt.term, nt.number)
    from verifier.expressions.expr import affine
    return (nt.affine or to_text)(affine(list(s.coeffs), s.const))


def _normals(atoms: Iterable[Atom], names) -> tuple[list[Normal], list[Atom]]:
    """Distinct normal forms (an equality's two halves as one `==`) and the constant atoms."""
    seen: dict[tuple, Normal] = {}
    constants = []
    for a in atoms:
        n = normal(a.form, ">" if a.strict else ">=", names)
        if n is None:
            constants.append(a)
            continue
        seen.setdefault((n.left, n.right, n.rel), n)
    out = []
    for (left, right, rel), n in seen.items():
        if rel in (">=", "<=") and (left, right, _FLIP[rel]) in seen:
            if rel == ">=":
                out.append(Normal(left, "==", right, (0,) + n.key))
            continue
        out.append(Normal(n.left, n.rel, n.right, (1,) + n.key))
    return sorted(out, key=lambda n: n.key), constants


def _chains(normals: list[Normal]) -> list[list[Normal]]:
    """Rule 3: each normal in exactly one chain (most are chains of one), seeds in key order."""
    used, out = set(), []
    for i, seed in enumerate(normals):
        if i in used:
            continue
        used.add(i)
        chain = [seed]
        if seed.rel != "==":
            for up in (True, False):
                while True:
                    end = chain[-1] if up else chain[0]
                    j = next((j for j, n in enumerate(normals) if j not in used and n.rel != "=="
                              and _links(end, n, up)), None)
                    if j is None:
                        break
                    used.add(j)
                    if up:
                        chain.append(normals[j])
                    else:
                        chain.insert(0, normals[j])
        out.append(chain)
    return out


def _links(end: Normal, n: Normal, up: bool) -> bool:
    """Does `n` continue the chain past `end` (upwards when `up`, else downwards)?  The middle must
    be the left side of one of the two constraints (rule 3)."""
    low, high = (end, n) if up else (n, end)
    middle = low.edge[2]
    return middle == high.edge[0] and (middle == low.left or middle == high.left)


def display_parts(atoms: Iterable[Atom], names: Sequence[str] = (), notation: Notation = DISPLAY) -> list[str]:
    """The displayed constraints, one string per chain, equality or constant atom."""
    nt = notation
    normals, constants = _normals(atoms, names)
    out = []
    for chain in _chains(normals):
        if len(chain) == 1:
            n = chain[0]
            out.append(f"{_side(n.left, nt)} {nt.rel(n.rel)} {_side(n.right, nt)}")
            continue
        text = _side(chain[0].edge[0], nt)
        for n in chain:
            low, rel, high = n.edge
            text += f" {nt.rel(rel)} {_side(high, nt)}"
        out.append(text)
    for a in sorted(set(constants), key=lambda a: (a.form.const, a.strict)):
        out.append(f"{nt.number(a.form.const)} {nt.rel('>' if a.strict else '>=')} {nt.number(Fraction(0))}")
    return out


def display_text(atoms: Iterable[Atom], names: Sequence[str] = (), notation: Notation = DISPLAY) -> str:
    """'1 < alpha < gamma, 0 <= beta <= 1, 2*alpha + beta > 1 + gamma'; `everywhere` with no atom."""
    return notation.joiner.join(display_parts(atoms, names, notation)) or notation.everywhere


def equation_display(form: Affine, names: Sequence[str] = (), notation: Notation = DISPLAY) -> str:
    """The hyperplane form = 0 in the normal form of rules 1 and 2: `2*alpha + beta = 1 + gamma`."""
    n = normal(form, "==", names)
    if n is None:
        return f"{notation.number(form.const)} {notation.rel('==')} {notation.number(Fraction(0))}"
    return f"{_side(n.left, notation)} {notation.rel('==')} {_side(n.right, notation)}"
