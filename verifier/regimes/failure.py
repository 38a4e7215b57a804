"""Where exactly a refuted claim fails: a union of polyhedra, its size, and its best witnesses.

Why this is exact: on a cell every compared expression is affine, so each obligation of the claim
(regime_spec) is an affine inequality o >= 0 (or o > 0), and the claim fails on the cell exactly on
the polyhedron cell & {not o}.  For an equality claim that is the union of the two open half-cells
L > R and L < R.  The failure set is the union of these polyhedra over all cells; they are pairwise
disjoint because the cells are.

For each failing polyhedron we report its dimension (a full-dimensional failure is robust; a face, a
line or a point means the claim fails only on a boundary), a relative-interior point with small
denominators, and the point of largest violation (an exact LP over the closure, clipped to a user box
when unbounded; 'attained' says whether the maximiser itself violates, or it is only a supremum).
The smallest-denominator point of the whole failure set is verifier.claims.witness's search, run once per
claim (regime_witness), not per piece.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Mapping, Sequence

from verifier.expressions.region import Atom, Polyhedron, Region
from verifier.geometry.lp import maximize
from verifier.geometry.shape import irredundant, nice_point, shape
from verifier.geometry.volume import volume
from verifier.regimes.spec import Spec, obligations, violation_amount


@dataclass(frozen=True)
class FailurePiece:
    """One convex piece of the failure set, inside regime `regime`, failing obligation `obligation`.

    `worst_value` is the sup of the violation amount (None: unbounded), reached at `worst_point`
    (in the closure; `worst_attained` says whether that point itself violates)."""

    regime: int
    obligation: int
    polyhedron: Polyhedron
    dim: int
    full_dimensional: bool
    point: dict
    worst_value: Fraction | None
    worst_point: dict | None
    worst_attained: bool


@dataclass(frozen=True)
class FailureRegion:
    """The failure set; `share` = its volume / the region's volume when both are finite."""

    pieces: tuple[FailurePiece, ...]
    full_dimensional: bool
    share: Fraction | None
    share_note: str


def violations(spec: Spec, atoms: Sequence[Atom], forms, names) -> list[tuple[int, tuple[Atom, ...]]]:
    """(obligation index, polyhedron) for each obligation that fails somewhere on the cell."""
    from verifier.geometry.lp import feasible
    out = []
    for k, ob in enumerate(obligations(spec, tuple(forms))):
        neg = ob.negated()
        if not neg.form.coeffs:
            if neg.holds({}):
                out.append((k, tuple(atoms)))
            continue
        poly = tuple(atoms) + (neg,)
        if feasible(poly, names) is not None:
            out.append((k, poly))
    return out


def failure_piece(spec: Spec, regime: int, k: int, atoms, forms, names,
                  box: Mapping[str, tuple] | None = None) -> FailurePiece:
    """Describe one failing polyhedron (see the module docstring)."""
    from verifier.regimes.optimality import normalised_atom   # `alpha > 1/3`, not `3*alpha/2 > 1/2` (same half-space)
    kept = tuple(normalised_atom(a) for a in irredundant(atoms, names)[0])
    s = shape(kept, names)
    point = nice_point(kept, names)
    amount = violation_amount(obligations(spec, tuple(forms))[k])
    value, worst, attained = _worst(amount, kept, names, box)
    return FailurePiece(regime, k, Polyhedron(kept), s.dim, s.dim == len(names), point,
                        value, worst, attained)


def _worst(amount, atoms, names, box):
    if spec_free(amount):
        return amount.const, None, True
    res = maximize(amount, atoms, names)
    if res.status == "unbounded" and box:
        clip = list(atoms) + [a for n, (lo, hi) in box.items() for a in _box_atoms(n, lo, hi)]
        res = maximize(amount, clip, names)
    if res.status != "optimal":
        return None, None, False
    return res.value, res.point, Polyhedron(tuple(atoms)).contains(res.point)


def spec_free(form) -> bool:
    return not form.coeffs


def _box_atoms(name, lo, hi):
    from verifier.expressions.expr import param
    from verifier.expressions.region import atoms_of
    out = []
    if lo is not None:
        out += atoms_of(param(name), ">=", lo)
    if hi is not None:
        out += atoms_of(param(name), "<=", hi)
    return out


def denominator(point: Mapping[str, Fraction]) -> int:
    import math
    d = 1
    for v in point.values():
        d = d * Fraction(v).denominator // math.gcd(d, Fraction(v).denominator)
    return d


def failure_region(pieces: Sequence[FailurePiece], region_pieces: Sequence[Sequence[Atom]],
                   names: Sequence[str], max_dim: int = 4) -> FailureRegion:
    """Collect the pieces and, when the region is bounded and small enough, the exact share."""
    full = any(p.full_dimensional for p in pieces)
    if not pieces:
        return FailureRegion((), False, Fraction(0), "the claim holds everywhere")
    if len(names) > max_dim:
        return FailureRegion(tuple(pieces), full, None, f"not computed (more than {max_dim} parameters)")
    total = Fraction(0)
    for atoms in region_pieces:
        v = volume(atoms, names)
        if v is None:
            return FailureRegion(tuple(pieces), full, None, "not computed (the region is unbounded)")
        total += v
    if total == 0:
        return FailureRegion(tuple(pieces), full, None, "not computed (the region has no volume)")
    bad = sum((volume(p.polyhedron.atoms, names) for p in pieces if p.full_dimensional), Fraction(0))
    return FailureRegion(tuple(pieces), full, bad / total, "exact volume ratio")
