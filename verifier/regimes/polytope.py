"""How a regime is shown: irredundant constraints, a nice interior point, corners and rays.

Why merging needs care: cells with the same formulas form one regime, but their union need not be
convex.  We present the union of a regime's cells inside one region piece as a single polyhedron Q
only when that is exactly right.  Candidate constraints are the cells' own facets (strict if valid
strictly on every cell, else relaxed if valid), Q is their intersection, so every cell lies in Q.
Because the cells of all regimes partition the region piece P, Q equals the union exactly when Q
lies in P and meets no cell of another regime; both are exact tests on generators (a cell lies on
the far side of one of Q's atoms), with an LP only when no atom separates.  A convex union's facets
lie on its cells' facets, so no convex union is missed, except one whose boundary is open on part
of a facet and closed on another part (then no single polyhedron in atom form describes it).
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from typing import Sequence

from verifier.expressions.region import Atom, Polyhedron
from verifier.geometry.lp import feasible
from verifier.geometry.shape import difference, irredundant, nice_point
from verifier.geometry.vertices import Cone, _dot, facet_atoms


@dataclass(frozen=True)
class Polytope:
    """A convex piece of a regime: irredundant constraints, dimension, a relative-interior point
    (small denominators once `nice` is applied), and the vertices, extreme rays and lines of its
    closure (dicts name -> Fraction)."""

    polyhedron: Polyhedron
    point: dict
    dim: int
    vertices: tuple[dict, ...]
    rays: tuple[dict, ...]
    lines: tuple[dict, ...]
    cone: Cone | None = field(default=None, repr=False, compare=False)

    @property
    def bounded(self) -> bool:
        return not self.rays and not self.lines


def _from_cone(atoms, cone: Cone, dim: int, point: dict) -> Polytope:
    gens = cone.generators()
    return Polytope(Polyhedron(facet_atoms(tuple(atoms), cone)), point, dim,
                    gens.vertices, gens.rays, gens.lines, cone)


def cell_polytope(cell) -> Polytope:
    """A decomposition cell as a Polytope, without any LP (its cone is already known)."""
    return _from_cone(cell.atoms, cell.cone, cell.dim, cell.point)


def polytope(atoms: Sequence[Atom], names: Sequence[str], dim: int) -> Polytope:
    cone = Cone.of(atoms, names)
    return _from_cone(atoms, cone, dim, cone.interior_point())


def nice(p: Polytope, names: Sequence[str]) -> Polytope:
    """The same polytope with a small-denominator relative-interior point (one LP)."""
    return replace(p, point=nice_point(p.polyhedron.atoms, names))


def valid_on(atom: Atom, p: Polytope) -> bool:
    """Does the polytope (with its strict atoms) lie in the half-space `atom`?  (holds_on_cone)"""
    cone = p.cone if p.cone is not None else Cone.of(p.polyhedron.atoms, tuple(p.point))
    return holds_on_cone(atom, cone, p.polyhedron.atoms)


def holds_on_cone(atom: Atom, cone: Cone, atoms: Sequence[Atom]) -> bool:
    """Does the polyhedron `atoms` (whose closure has the generators `cone`) lie in the half-space
    `atom`?  Read off the generators: form >= 0 on the closure iff it is >= 0 on every generator
    (and 0 on lines); for form > 0 the face where form = 0 must also miss the polyhedron, i.e. have
    no vertex or lie where some strict atom vanishes identically.  Exact, and sufficient only: a
    False for a strict atom may still hold (callers that must know decide by LP then)."""
    h = cone.vector(atom.form)
    vals = [_dot(h, r) for r, _ in cone.rays]
    if any(v < 0 for v in vals) or any(_dot(h, l) for l in cone.lines):
        return False
    if not atom.strict:
        return True
    face = [r for (r, _), v in zip(cone.rays, vals) if v == 0]
    if not any(r[-1] > 0 for r in face):
        return True
    for s in atoms:
        if s.strict:
            hs = cone.vector(s.form)
            if all(_dot(hs, r) == 0 for r in face) and not any(_dot(hs, l) for l in cone.lines):
                return True
    return False


def _disjoint(atoms: Sequence[Atom], p: Polytope, names) -> bool:
    if any(valid_on(a.negated(), p) for a in atoms):
        return True
    return feasible(list(atoms) + list(p.polyhedron.atoms), names) is None


def convex_union(group: Sequence[Polytope], others: Sequence[Polytope], piece: Sequence[Atom],
                 names: Sequence[str]) -> Polytope | None:
    """The polytope equal to the union of `group` (cells of one regime inside the region piece
    `piece`, whose other cells are `others`), or None when the union is not one polyhedron."""
    if len(group) == 1:
        return group[0]
    candidates: dict[Atom, None] = {}
    tested: set[Atom] = set()
    for p in group:
        for a in p.polyhedron.atoms:
            if a in tested:
                continue
            tested.add(a)
            for version in ((a, a.relaxed()) if a.strict else (a,)):
                if all(valid_on(version, other) for other in group):
                    candidates.setdefault(version)
                    break
    q = polytope(tuple(candidates), names, group[0].dim)
    if not all(valid_on(a, q) for a in piece if a.form.coeffs):
        return None
    if any(not _disjoint(q.polyhedron.atoms, o, names) for o in others):
        return None
    return q


def region_is_convex(pieces: Sequence[Sequence[Atom]], names: Sequence[str]) -> bool:
    """Is the union of (few) polyhedra one polyhedron?  Exact set difference, LP-based."""
    if len(pieces) == 1:
        return True
    kept = [irredundant(p, names)[0] for p in pieces]
    cand = [a for p in kept for a in p
            if all(feasible(list(o) + [a.negated()], names) is None for o in pieces)]
    return not difference(cand, [tuple(p) for p in pieces], names)
