"""Regions of parameter space: finite unions of polyhedra given by linear constraints, strict or not.

A region is kept in disjunctive normal form because that is how papers state assumptions
("gamma > alpha > 1", "alpha <= 1/2 or alpha >= 2") and because every later stage (SMT encoding,
regime splitting, certificates) works one polyhedron at a time.  Every atom is normalised to
`form >= 0` or `form > 0` with `form` affine, so membership is one exact evaluation.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Iterable, Mapping

from .errors import InputError, RegionError
from .expr import Affine, Expr, affine, eval_affine, lift, scale, add, to_text, format_number

RELATIONS = ("<", "<=", "==", ">=", ">")


@dataclass(frozen=True)
class Atom:
    """The constraint `form > 0` (strict) or `form >= 0` (non-strict)."""

    form: Affine
    strict: bool

    def holds(self, point: Mapping[str, Fraction]) -> bool:
        value = eval_affine(self.form, point)
        return value > 0 if self.strict else value >= 0

    def relaxed(self) -> "Atom":
        return Atom(self.form, False)

    def tightened(self) -> "Atom":
        return Atom(self.form, True)

    def negated(self) -> "Atom":
        """not (f > 0) is -f >= 0; not (f >= 0) is -f > 0."""
        return Atom(_neg(self.form), not self.strict)

    def text(self) -> str:
        return atom_text(self.form, ">" if self.strict else ">=")

    def __str__(self) -> str:
        return self.text()


def _neg(a: Affine) -> Affine:
    return affine([(n, -c) for n, c in a.coeffs], -a.const)


def atom_text(form: Affine, rel: str) -> str:
    """Readable `lhs rel rhs` with positive coefficients on each side: `gamma > 2*alpha`."""
    left = affine([(n, c) for n, c in form.coeffs if c > 0], max(form.const, 0))
    right = affine([(n, -c) for n, c in form.coeffs if c < 0], max(-form.const, 0))
    def terms(a: Affine) -> int:
        return len(a.coeffs) + (a.const != 0)
    # the shorter side on the left reads as papers write it: alpha < 1, alpha <= 1 + gamma/2
    if (not left.coeffs and right.coeffs) or (right.coeffs and terms(right) < terms(left)):
        flipped = {">": "<", ">=": "<=", "<": ">", "<=": ">=", "==": "=="}[rel]
        return f"{to_text(right)} {flipped} {to_text(left)}"
    return f"{to_text(left)} {rel} {to_text(right)}"


def atoms_of(lhs, rel: str, rhs) -> tuple[Atom, ...]:
    """Atoms equivalent to `lhs rel rhs`; both sides must differ by an affine expression."""
    if rel not in RELATIONS:
        raise InputError(f"unknown relation '{rel}'")
    diff = add(lift(lhs), scale(-1, lift(rhs)))
    if not isinstance(diff, Affine):
        raise RegionError(f"region constraint '{to_text(lift(lhs))} {rel} {to_text(lift(rhs))}' is not "
                          "linear; state min/max conditions as separate linear constraints")
    if rel == ">":
        return (Atom(diff, True),)
    if rel == ">=":
        return (Atom(diff, False),)
    if rel == "<":
        return (Atom(_neg(diff), True),)
    if rel == "<=":
        return (Atom(_neg(diff), False),)
    return (Atom(diff, False), Atom(_neg(diff), False))


@dataclass(frozen=True)
class Polyhedron:
    """Conjunction of atoms; the empty conjunction is the whole space."""

    atoms: tuple[Atom, ...] = ()

    def contains(self, point: Mapping[str, Fraction]) -> bool:
        return all(a.holds(point) for a in self.atoms)

    def params(self) -> frozenset[str]:
        return frozenset(n for a in self.atoms for n, _ in a.form.coeffs)

    def meet(self, other: "Polyhedron") -> "Polyhedron":
        return Polyhedron(_dedupe(self.atoms + other.atoms))

    def interior(self) -> "Polyhedron":
        """Every constraint made strict (equalities make this empty, as they should)."""
        return Polyhedron(tuple(a.tightened() for a in self.atoms))

    def closure(self) -> "Polyhedron":
        return Polyhedron(tuple(a.relaxed() for a in self.atoms))

    def relative_interior(self) -> "Polyhedron":
        """Strict everywhere except explicit equalities (f >= 0 and -f >= 0 both present), which stay:
        a region like `alpha == 1` then still has points "inside" it."""
        forms = {a.form for a in self.atoms if not a.strict}
        return Polyhedron(tuple(a if (not a.strict and _neg(a.form) in forms) else a.tightened()
                                for a in self.atoms))

    def text(self) -> str:
        return constraint_text(self.atoms)


def _dedupe(atoms: Iterable[Atom]) -> tuple[Atom, ...]:
    out: dict[Atom, None] = {}
    for a in atoms:
        out.setdefault(a)
    return tuple(out)


@dataclass(frozen=True)
class Region:
    """Union of polyhedra.  `Region(())` is empty; `Region.everywhere()` is the whole space."""

    pieces: tuple[Polyhedron, ...]

    @staticmethod
    def everywhere() -> "Region":
        return Region((Polyhedron(()),))

    @staticmethod
    def of(*atoms: Atom) -> "Region":
        return Region((Polyhedron(_dedupe(atoms)),))

    def contains(self, point: Mapping[str, Fraction]) -> bool:
        return any(p.contains(point) for p in self.pieces)

    def params(self) -> frozenset[str]:
        out: frozenset[str] = frozenset()
        for p in self.pieces:
            out |= p.params()
        return out

    def meet(self, other: "Region") -> "Region":
        return Region(tuple(p.meet(q) for p in self.pieces for q in other.pieces))

    def join(self, other: "Region") -> "Region":
        return Region(self.pieces + other.pieces)

    def interior(self) -> "Region":
        return Region(tuple(p.interior() for p in self.pieces))

    def closure(self) -> "Region":
        return Region(tuple(p.closure() for p in self.pieces))

    def relative_interior(self) -> "Region":
        return Region(tuple(p.relative_interior() for p in self.pieces))

    def substitute(self, values: Mapping[str, Fraction]) -> "Region":
        """Fix some parameters to numbers; atoms that become constant are kept only when false."""
        from .expr import substitute as subst
        pieces = []
        for p in self.pieces:
            atoms, feasible = [], True
            for a in p.atoms:
                form = subst(a.form, values)
                if not form.coeffs:
                    feasible = feasible and (form.const > 0 if a.strict else form.const >= 0)
                else:
                    atoms.append(Atom(form, a.strict))
            if feasible:
                pieces.append(Polyhedron(_dedupe(atoms)))
        return Region(tuple(pieces))

    def text(self) -> str:
        if not self.pieces:
            return "nowhere"
        if len(self.pieces) == 1:
            return self.pieces[0].text()
        return " or ".join(f"({p.text()})" for p in self.pieces)

    def __str__(self) -> str:
        return self.text()


# ---------------------------------------------------------------------------------------------
# constraints as papers write them: 1/2 <= alpha < 2/3, alpha == 1, gamma > alpha
# ---------------------------------------------------------------------------------------------

@dataclass(frozen=True)
class Notation:
    """How to print names, numbers and relations; TEXT here, LaTeX in latex_out."""

    name: object = str
    number: object = format_number
    rel: object = None          # rel(symbol) -> str, symbol one of < <= == >= >
    atom: object = None         # atom(Atom) -> str for constraints in several parameters
    joiner: str = ", "
    everywhere: str = "everywhere"


TEXT = Notation(rel=lambda r: r, atom=lambda a: a.text())


def _single(atom: Atom):
    """(name, bound, is_lower) for an atom `name REL number` with coefficient +-1, else None."""
    if len(atom.form.coeffs) != 1 or abs(atom.form.coeffs[0][1]) != 1:
        return None
    name, c = atom.form.coeffs[0]
    return name, -atom.form.const / c, c > 0


def _pairs_adjacent(atoms: list) -> list:
    """Move the upper bound of a parameter right after its lower bound when each is unique, so that
    `alpha < 1, alpha >= 2/3` displays as `2/3 <= alpha < 1` (display only: order changes)."""
    bounds: dict[str, list] = {}
    for a in atoms:
        got = _single(a)
        if got:
            bounds.setdefault(got[0], []).append((got[2], a))
    out, placed = [], set()
    for a in atoms:
        if a in placed:
            continue
        got = _single(a)
        pair = bounds.get(got[0], []) if got else []
        if len(pair) == 2 and pair[0][0] != pair[1][0]:
            lo = pair[0][1] if pair[0][0] else pair[1][1]
            hi = pair[1][1] if lo is pair[0][1] else pair[0][1]
            out += [lo, hi]
            placed.update((lo, hi))
        else:
            out.append(a)
            placed.add(a)
    return out


def chain_items(atoms, reorder: bool = False) -> list[tuple]:
    """('eq', name, v) / ('chain', name, lo, lo_strict, hi, hi_strict) / ('atom', atom), in order.

    Only a lower bound directly followed by an upper bound on the same parameter becomes one chain
    (that is what `1/2 <= alpha < 2/3` and `alpha == 1` parse to), so the printed text parses back to
    the very same atoms in the same order, and nothing is ever hidden or merged.
    """
    atoms, items, i = list(atoms), [], 0
    if reorder:
        atoms = _pairs_adjacent(atoms)
    while i < len(atoms):
        got = _single(atoms[i])
        nxt = _single(atoms[i + 1]) if i + 1 < len(atoms) else None
        if got and got[2] and nxt and not nxt[2] and nxt[0] == got[0]:
            lo, hi = atoms[i], atoms[i + 1]
            if got[1] == nxt[1] and not lo.strict and not hi.strict:
                items.append(("eq", got[0], got[1]))
            else:
                items.append(("chain", got[0], got[1], lo.strict, nxt[1], hi.strict))
            i += 2
            continue
        if got:
            items.append(("chain", got[0], got[1] if got[2] else None, atoms[i].strict,
                          None if got[2] else got[1], atoms[i].strict))
        else:
            items.append(("atom", atoms[i]))
        i += 1
    return items


def constraint_text(atoms, notation: Notation = TEXT, reorder: bool = False) -> str:
    """'1/2 <= alpha < 2/3, gamma > alpha' in the given notation; `everywhere` with no atom.

    `reorder` lets displays pair a parameter's bounds wherever they stand; without it the text parses
    back to the same atoms in the same order."""
    nt, out = notation, []
    for item in chain_items(atoms, reorder):
        if item[0] == "atom":
            out.append(nt.atom(item[1]))
        elif item[0] == "eq":
            out.append(f"{nt.name(item[1])} {nt.rel('==')} {nt.number(item[2])}")
        else:
            _, n, lo, lo_strict, hi, hi_strict = item
            text = nt.name(n)
            if hi is None:  # a lone lower bound reads better as alpha >= 0
                out.append(f"{text} {nt.rel('>' if lo_strict else '>=')} {nt.number(lo)}")
                continue
            if lo is None:
                out.append(f"{text} {nt.rel('<' if hi_strict else '<=')} {nt.number(hi)}")
                continue
            if lo is not None:
                text = f"{nt.number(lo)} {nt.rel('<' if lo_strict else '<=')} {text}"
            out.append(f"{text} {nt.rel('<' if hi_strict else '<=')} {nt.number(hi)}")
    return nt.joiner.join(out) or nt.everywhere
