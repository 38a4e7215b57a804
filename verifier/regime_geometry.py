"""How a regime is shown: irredundant constraints, a nice interior point, corners and rays.

Why merging needs care: cells with the same formulas form one regime, but their union need not be
convex.  We present the union as a single polyhedron only when that is exactly right: candidate
constraints are the cells' own irredundant atoms (strict if valid strictly on every cell, else
relaxed if valid), and the intersection Q of the valid ones is accepted only if Q minus the union of
the cells is empty (an exact set difference, lp_shape.difference).  Otherwise the regime stays a
union of its cells.  A convex union's facets lie on its cells' facets, so no convex union is missed
except one whose boundary is open on part of a facet and closed on another part (then no single
polyhedron, in our atom form, describes it).
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Sequence

from .lp_shape import difference, irredundant, nice_point, shape
from .lp_vertices import generators
from .region import Atom, Polyhedron

MAX_MERGE = 16  # above this many cells the exact convexity test is skipped (union kept as is)


@dataclass(frozen=True)
class Polytope:
    """A convex piece of a regime: irredundant constraints, dimension, a nice relative-interior
    point, and the vertices, extreme rays and lines of its closure (dicts name -> Fraction)."""

    polyhedron: Polyhedron
    point: dict
    dim: int
    vertices: tuple[dict, ...]
    rays: tuple[dict, ...]
    lines: tuple[dict, ...]

    @property
    def bounded(self) -> bool:
        return not self.rays and not self.lines


def polytope(atoms: Sequence[Atom], names: Sequence[str], kept=None) -> Polytope:
    if kept is None:
        kept, _ = irredundant(atoms, names)
    s = shape(kept, names)
    gens = generators(kept, names)
    return Polytope(Polyhedron(kept), nice_point(kept, names), s.dim,
                    gens.vertices, gens.rays, gens.lines)


def _value(form, point) -> Fraction:
    return form.const + sum((c * point[n] for n, c in form.coeffs), Fraction(0))


def _slope(form, direction) -> Fraction:
    return sum((c * direction[n] for n, c in form.coeffs), Fraction(0))


def valid_on(atom: Atom, p: Polytope) -> bool:
    """Does the polytope (with its strict atoms) lie in the half-space `atom`?  Read off the
    generators: the closure lies in {form >= 0} iff every vertex has form >= 0, every ray slope >= 0
    and every line slope 0; for form > 0 the face where form = 0 must also miss the polytope, i.e.
    be empty or lie where some strict atom of the polytope vanishes identically."""
    vals = [_value(atom.form, v) for v in p.vertices]
    slopes = [_slope(atom.form, r) for r in p.rays]
    if min(vals) < 0 or any(s < 0 for s in slopes) or any(_slope(atom.form, l) for l in p.lines):
        return False
    if not atom.strict:
        return True
    face_v = [v for v, x in zip(p.vertices, vals) if x == 0]
    face_r = [r for r, x in zip(p.rays, slopes) if x == 0]
    if not face_v:
        return True
    return any(all(_value(s.form, v) == 0 for v in face_v) and all(_slope(s.form, r) == 0 for r in face_r)
               and all(_slope(s.form, l) == 0 for l in p.lines)
               for s in p.polyhedron.atoms if s.strict)


def convex_union(pieces: Sequence[Polytope], names: Sequence[str]) -> tuple[Atom, ...] | None:
    """Atoms of a polyhedron equal to the union of the pieces, or None if there is none (or too
    many pieces to test)."""
    if len(pieces) == 1:
        return pieces[0].polyhedron.atoms
    if len(pieces) > MAX_MERGE:
        return None
    candidates: dict[Atom, None] = {}
    for p in pieces:
        for a in p.polyhedron.atoms:
            for version in ((a, a.relaxed()) if a.strict else (a,)):
                if all(valid_on(version, other) for other in pieces):
                    candidates.setdefault(version)
                    break
    q = tuple(candidates)
    if difference(q, [p.polyhedron.atoms for p in pieces], names):
        return None
    return irredundant(q, names)[0]


def region_is_convex(pieces: Sequence[Sequence[Atom]], names: Sequence[str]) -> bool:
    return convex_union([polytope(p, names) for p in pieces], names) is not None


def present(cells: Sequence[Sequence[Atom]], names: Sequence[str]) -> tuple[Polytope, ...]:
    """The regime's convex pieces: one when the union is convex, else one per cell."""
    pieces = tuple(polytope(c, names) for c in cells)
    merged = convex_union(pieces, names)
    if merged is not None and len(pieces) > 1:
        return (polytope(merged, names, merged),)
    return pieces
