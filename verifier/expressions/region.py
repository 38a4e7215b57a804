"""Regions of parameter space: finite unions of polyhedra given by linear constraints, strict or not.

A region is kept in disjunctive normal form because that is how papers state assumptions
("gamma > alpha > 1", "alpha <= 1/2 or alpha >= 2") and because every later stage (SMT encoding,
regime splitting, certificates) works one polyhedron at a time.  Every atom is normalised to
`form >= 0` or `form > 0` with `form` affine, so membership is one exact evaluation.

Because `and` distributes over `or`, a region can have exponentially many polyhedra: Region.meet
drops the trivially empty products and refuses a region of more than MAX_POLYHEDRA polyhedra (and,
before building anything, a product of more than MAX_PRODUCT_PAIRS pairs).
"""

from __future__ import annotations

import threading
from dataclasses import dataclass
from fractions import Fraction
from functools import cached_property
from typing import Iterable, Mapping

from verifier.core.errors import InputError, RegionError
from verifier.expressions.expr import (Affine, Expr, affine, eval_affine, lift, scale, add, to_text, format_number,
                                      text_term)

RELATIONS = ("<", "<=", "==", ">=", ">")

# Largest number of polyhedra a region may have.  `and` distributes over `or`, so n groups of two
# alternatives expand into 2^n polyhedra, and every later stage (SMT encoding, regime splitting,
# certificates) works one polyhedron at a time: 2^16 of them took minutes and gigabytes before a
# single query was asked.  Papers' assumptions have a handful; 4096 = 2^12 leaves ample room.
MAX_POLYHEDRA = 4096
# Largest product Region.meet examines, checked before anything is built.  Between MAX_POLYHEDRA and
# this, the products are generated lazily with the trivially empty ones dropped and refused only when
# more than MAX_POLYHEDRA survive: two schemes of 64 alpha-slices each meet in 4489 pairs of which
# about 130 are non-empty.  16 pairs per allowed polyhedron: a fraction of a second of exact checks.
MAX_PRODUCT_PAIRS = 16 * MAX_POLYHEDRA
# Largest number of atoms over all the polyhedra of a region: every product copies its factors'
# atoms, so 1024 polyhedra met with 1400 more constraints held 1.4 million atoms and took seconds to
# build (and far longer in every later stage).  2^18 is 64 atoms in each of 4096 polyhedra.
MAX_REGION_ATOMS = 1 << 18


class TooManyPolyhedra(RegionError):
    """A region over MAX_POLYHEDRA polyhedra or MAX_REGION_ATOMS atoms (see too_many_polyhedra);
    `atoms` is the atom count in the second case, else None."""

    atoms: int | None = None


def count_text(n: int) -> str:
    """An exact count, or its order of magnitude once it has more digits than anyone reads."""
    return str(n) if n < 10 ** 15 else f"more than 10^{len(str(n)) - 1}"


def too_many_polyhedra(n: int, source: str | None = None, position: int | None = None,
                       atoms: int | None = None) -> TooManyPolyhedra:
    """The one message for a region over MAX_POLYHEDRA (the caller raises it); `n` is the number of
    polyhedra the distribution produces before empty ones are dropped.  With `atoms`: the region is
    over MAX_REGION_ATOMS instead, with `n` polyhedra holding that many atoms."""
    if atoms is not None:
        err = TooManyPolyhedra(f"the region expands into {count_text(n)} polyhedra with {count_text(atoms)} "
                               f"constraints in all (limit {MAX_REGION_ATOMS}); state fewer 'or' "
                               "alternatives or fewer constraints", source, position)
        err.atoms = atoms
        return err
    return TooManyPolyhedra(f"the region expands into {count_text(n)} polyhedra (limit {MAX_POLYHEDRA}); "
                            "state fewer 'or' alternatives", source, position)


@dataclass(frozen=True)
class Atom:
    """The constraint `form > 0` (strict) or `form >= 0` (non-strict)."""

    form: Affine
    strict: bool

    def holds(self, point: Mapping[str, Fraction]) -> bool:
        value = eval_affine(self.form, point)
        return value > 0 if self.strict else value >= 0

    def __hash__(self) -> int:  # cached: deduplicating long conjunctions hashes every atom often
        got = self.__dict__.get("_hash")
        if got is None:
            got = self.__dict__["_hash"] = hash((self.form, self.strict))
        return got

    def __getstate__(self) -> dict:
        """The fields only: the caches (hash, direction id) are valid in this process alone (string
        hashes are salted per process, direction ids are numbered as met), so a pickled atom sent
        to a worker process must recompute them there."""
        return {"form": self.form, "strict": self.strict}

    def relaxed(self) -> "Atom":
        return Atom(self.form, False)

    def tightened(self) -> "Atom":
        return Atom(self.form, True)

    def negated(self) -> "Atom":
        """not (f > 0) is -f >= 0; not (f >= 0) is -f > 0."""
        return Atom(_neg(self.form), not self.strict)

    def text(self) -> str:
        return atom_text(self.form, ">" if self.strict else ">=")

    @cached_property
    def direction(self) -> tuple[tuple, Fraction, bool]:
        """See the module function `direction` (cached: the pruning of Region.meet asks often)."""
        scale_by = abs(self.form.coeffs[0][1])
        coeffs = tuple((n, c / scale_by) for n, c in self.form.coeffs)
        return coeffs, self.form.const / scale_by, self.strict

    @cached_property
    def direction_id(self) -> int:
        """A small integer naming the direction (see direction_id); the opposite one is
        OPPOSITE[direction_id]."""
        return direction_id(self.direction[0])

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

    @cached_property
    def bounds(self) -> dict | None:
        """bound_summary of the atoms (cached; do not mutate the dict)."""
        return bound_summary(self.atoms)

    def __getstate__(self) -> dict:
        """The fields only (see Atom.__getstate__: the cached summary uses this process's ids)."""
        return {"atoms": self.atoms}


def _dedupe(atoms: Iterable[Atom]) -> tuple[Atom, ...]:
    out: dict[Atom, None] = {}
    for a in atoms:
        out.setdefault(a)
    return tuple(out)


def direction(atom: Atom) -> tuple[tuple, Fraction, bool]:
    """(coefficients scaled so the first has magnitude 1, constant scaled alike, strict): parallel
    atoms share their first entry, and the atom reads `L + k > 0` (or `>= 0`) with L that direction."""
    return atom.direction


# Directions as small integers, so that bound summaries are keyed by ints (hashing tuples of Fractions
# dominated long conjunctions).  Ids come in opposite pairs; the table only grows, by one entry per
# direction ever seen, and a lock keeps it consistent if threads share it.
_DIRECTION_IDS: dict[tuple, int] = {}
OPPOSITE: list[int] = []
_IDS_LOCK = threading.Lock()


def direction_id(coeffs: tuple) -> int:
    """The id of a normalised direction (first coefficient +-1, as `direction` gives)."""
    got = _DIRECTION_IDS.get(coeffs)
    if got is None:
        with _IDS_LOCK:
            got = _DIRECTION_IDS.get(coeffs)
            if got is None:
                got = len(OPPOSITE)
                OPPOSITE.extend((got + 1, got))
                _DIRECTION_IDS[tuple((n, -c) for n, c in coeffs)] = got + 1
                _DIRECTION_IDS[coeffs] = got
    return got


def _tighter(a, b):
    """The stronger of two bounds (k, strict) on one direction (`L + k > 0` / `>= 0`); None is none."""
    if a is None or b is None:
        return a if b is None else b
    return a if a[0] < b[0] or (a[0] == b[0] and a[1]) else b


def _excluded(lo, hi) -> bool:
    """L + k >= 0 (lo) and -L + k2 >= 0 (hi), i.e. -k <= L <= k2, has no solution."""
    return lo is not None and hi is not None and (-lo[0] > hi[0] or (-lo[0] == hi[0] and (lo[1] or hi[1])))


def bound_summary(atoms: Iterable[Atom]) -> dict | None:
    """direction id -> tightest (k, strict) over `atoms`, or None when they are trivially empty."""
    tightest: dict[int, tuple[Fraction, bool]] = {}
    for atom in atoms:
        if not atom.form.coeffs:
            if not atom.holds({}):
                return None
            continue
        _, k, strict = atom.direction
        key = atom.direction_id
        tightest[key] = _tighter(tightest.get(key), (k, strict))
    for key, bound in tightest.items():
        if _excluded(bound, tightest.get(OPPOSITE[key])):
            return None
    return tightest


def trivially_empty(atoms: Iterable[Atom]) -> bool:
    """True when the conjunction is empty for a syntactic reason: a false constant atom, or two
    opposite parallel atoms that exclude each other (`alpha > 1` and `alpha < 1`, `a - b >= 2` and
    `b - a > -2`).  Exact (Fractions) and linear in the number of atoms; False proves nothing (an
    LP may still find the polyhedron empty)."""
    return bound_summary(atoms) is None


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
        """The intersection, distributed into polyhedra, with the trivially empty products dropped;
        TooManyPolyhedra beyond the limits (see Product)."""
        product = Product(self)
        product.meet(other)
        return product.region()

    def join(self, other: "Region") -> "Region":
        size = len(self.pieces) + len(other.pieces)
        if size > MAX_POLYHEDRA:
            raise too_many_polyhedra(size)
        return Region(self.pieces + other.pieces)

    def interior(self) -> "Region":
        return Region(tuple(p.interior() for p in self.pieces))

    def closure(self) -> "Region":
        return Region(tuple(p.closure() for p in self.pieces))

    def relative_interior(self) -> "Region":
        return Region(tuple(p.relative_interior() for p in self.pieces))

    def substitute(self, values: Mapping[str, Fraction]) -> "Region":
        """Fix some parameters to numbers; atoms that become constant are kept only when false."""
        from verifier.expressions.expr import substitute as subst
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


class Product:
    """The intersection of regions met one after the other, distributed into polyhedra whose atoms
    come in the order the regions were given (what repeated Polyhedron.meet gives).

    Kept lazily, so that long conjunctions stay linear: each polyhedron of the partial product is a
    summary of its tightest bounds (see bound_summary; updated in place when a region has a single
    polyhedron) and a linked list of the atom tuples met so far, joined only by `region()`.  A product
    that is trivially empty (see trivially_empty) is dropped; when every product is, the first is kept,
    so that the result still reads as the contradiction that was written (`1 < alpha < 0`) and callers
    report an empty region rather than 'nowhere'.

    `meet` raises TooManyPolyhedra, naming the number of products of that step, when the step has
    more than MAX_PRODUCT_PAIRS of them (before anything is built), when more than MAX_POLYHEDRA of
    them survive (as they are built), or when the atoms would exceed MAX_REGION_ATOMS (counted before
    each step); the product is then unusable."""

    def __init__(self, first: Region):
        # one entry per polyhedron: [summary or None (contradictory), summary owned?, chain, atoms]
        self.parts = [[p.bounds, False, (p.atoms, None), len(p.atoms)] for p in first.pieces]

    def meet(self, region: Region) -> None:
        size = len(self.parts) * len(region.pieces)
        if size > MAX_PRODUCT_PAIRS:
            raise too_many_polyhedra(size)
        fewest = min((len(q.atoms) for q in region.pieces), default=0)
        atoms = sum(part[3] for part in self.parts) + len(self.parts) * fewest
        if atoms > MAX_REGION_ATOMS:
            raise too_many_polyhedra(size, atoms=atoms)
        if not self.parts or not region.pieces:
            self.parts = []
            return
        out = []
        for part in self.parts:
            summary, owned, chain, count = part
            alive = [] if summary is None else \
                [q for q in region.pieces if q.bounds is not None and not _conflict(summary, q.bounds)]
            if len(out) + len(alive) > MAX_POLYHEDRA:
                raise too_many_polyhedra(size)
            for k, q in enumerate(alive):
                if k == len(alive) - 1 and owned:
                    mine = summary
                else:
                    mine = dict(summary)
                for key, bound in q.bounds.items():
                    mine[key] = _tighter(mine.get(key), bound)
                out.append([mine, True, (q.atoms, chain), count + len(q.atoms)])
        if not out:  # every product is empty: keep the first, marked contradictory
            first = self.parts[0]
            out = [[None, False, (region.pieces[0].atoms, first[2]), first[3] + len(region.pieces[0].atoms)]]
        self.parts = out

    def region(self) -> Region:
        pieces = []
        for summary, _, chain, _ in self.parts:
            chunks = []
            while chain is not None:
                chunks.append(chain[0])
                chain = chain[1]
            atoms: dict[Atom, None] = {}
            for chunk in reversed(chunks):
                for a in chunk:
                    atoms.setdefault(a)
            piece = Polyhedron(tuple(atoms))
            piece.__dict__["bounds"] = summary  # the cache bound_summary would fill
            pieces.append(piece)
        return Region(tuple(pieces))


def _conflict(p: dict, q: dict) -> bool:
    """Would the atoms of summaries p and q (each consistent) together be trivially empty?  Only q's
    directions can create a new conflict: one look-up per direction of q."""
    for key, bound in q.items():
        opposite = OPPOSITE[key]
        other = p.get(opposite)
        if other is None and len(q) > 1:
            other = q.get(opposite)
        if other is not None and _excluded(_tighter(p.get(key), bound), _tighter(other, q.get(opposite))):
            return True
    return False


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
    affine: object = None       # affine(Affine) -> str, for equalities in several parameters
    term: object = None         # term(name, magnitude) -> str: one term of a side (display.py)


TEXT = Notation(rel=lambda r: r, atom=lambda a: a.text(), affine=to_text, term=text_term)


def equation_sides(form: Affine) -> tuple[Affine, Affine]:
    """(left, right) with left - right == form, for printing the equality form == 0 so that it parses
    back to the same two atoms in the same order: `beta == alpha`, `gamma == 1 + 2*alpha` (a name with
    coefficient 1 alone on the left when there is one, as substitutions read)."""
    lead = next((n for n, c in reversed(form.coeffs) if c == 1), None)
    if lead is not None:
        return affine([(lead, 1)]), affine([(n, -c) for n, c in form.coeffs if n != lead], -form.const)
    return (affine([(n, c) for n, c in form.coeffs if c > 0], max(form.const, 0)),
            affine([(n, -c) for n, c in form.coeffs if c < 0], max(-form.const, 0)))


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
    """('eq', name, v) / ('chain', name, lo, lo_strict, hi, hi_strict) / ('equation', form) /
    ('atom', atom), in order.

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
        if not got and nxt is None and i + 1 < len(atoms) and not atoms[i].strict and \
                not atoms[i + 1].strict and atoms[i + 1].form == _neg(atoms[i].form):
            items.append(("equation", atoms[i].form))   # what `beta == alpha` parses to
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
        elif item[0] == "equation":
            left, right = equation_sides(item[1])
            show = nt.affine or to_text
            out.append(f"{show(left)} {nt.rel('==')} {show(right)}")
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
