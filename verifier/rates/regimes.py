"""Regime by regime: the irredundant inequalities and the corner points of an H-form rate region.

Method.  Every vertex of H(theta) = {A d <= b(theta)} is a basic solution x_S(theta) = A_S^-1 b_S(theta)
(vertices.py; S does not depend on theta), and x_S(theta) is a vertex exactly where every margin
m_{S,j}(theta) = b_j(theta) - A_j x_S(theta), j not in S, is >= 0.  The region-wise decomposition
(verifier.regimes.decompose) cuts the exponent region into cells on which every b_j and every
(m_{S,j})^+ is affine; (m)^+ affine on a convex cell means m keeps one weak sign there, so its sign at
a relative-interior point holds on the whole cell (m = 0 there means m = 0 on the cell).  On a cell:

- the corners are the x_S with every margin >= 0 (affine formulas: combinations of the b_j's forms);
- row i is redundant (removing it does not change the region) exactly when the maximum of A_i d over
  the other rows is at most b_i.  The other rows' polyhedron is pointed (checked; otherwise the row is
  'not shown'), so that maximum is +infinity along a recession direction (a theta-free LP) or is
  attained at one of its vertices, the x_S with i not in S and every margin but m_{S,i} >= 0;
  the row is redundant iff every such vertex has m_{S,i} >= 0 (or there is none: empty).

Cells with the same (statuses, facet right sides, corner formulas) are one regime; its pieces are
merged exactly (verifier.regimes.optimality.merged) and the thresholds between regimes come from
verifier.regimes.thresholds, each labelled with what changes across it.  Every printed corner and
status is re-checked at a relative-interior point of every cell with Fractions only: the corners
against an independent vertex enumeration at that point (verifier.geometry.vertices), the statuses
against an exact LP at that point.  Formulas are claimed on the relative interior of every cell,
i.e. on each regime except on lower-dimensional boundaries (thresholds, the edges of the exponent
region, boundaries between cells): there corners may coincide (merge) and a facet may degenerate.

Sizes: MAX_BASES (vertices.py), MAX_MARGINS targets, MAX_REGION_CELLS cells; beyond them TooLarge.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Sequence

from verifier.core.budget import Budget, TooLarge
from verifier.expressions.expr import Affine, add, affine, affine_piece, eval_affine, evaluate, pos, scale, to_text
from verifier.expressions.region import Atom, Region, atoms_of
from verifier.geometry.lp import maximize
from verifier.geometry.shape import nice_point, reduce_modulo, shape
from verifier.regimes.decompose import decompose
from verifier.regimes.optimality import merged
from verifier.regimes.polytope import polytope
from verifier.regimes.thresholds import thresholds

from verifier.rates.membership import vertices_at
from verifier.rates.region import HRegion, RateInequality
from verifier.rates.vertices import basic_solutions

MAX_MARGINS = 3000       # feasibility margins (bases x rows) handed to the decomposition
MAX_REGION_CELLS = 400   # cells merged into regimes (merging and thresholds are quadratic)
STAGE = "regimes of a rate region"


@dataclass(frozen=True)
class RegionRegime:
    """One regime: `pieces` (merged convex pieces of exponents), `point` (a relative-interior point
    of one of its cells, where everything was re-checked), the status of every constraint (index into
    region.constraints(): 'facet', 'redundant' or 'not shown'), every constraint's right side as an
    affine form on the regime (None for a row that is no facet there and whose right side is not one
    affine form on the whole regime), and the corners (affine formulas in the region's rate order)."""

    index: int
    pieces: tuple[tuple[Atom, ...], ...]
    point: dict
    status: tuple[str, ...]
    bounds: tuple[Affine | None, ...]
    corners: tuple[tuple[Affine, ...], ...]
    cells: int = 1
    dim: int = 0

    @property
    def facets(self) -> tuple[int, ...]:
        return tuple(i for i, s in enumerate(self.status) if s == "facet")

    @property
    def redundant(self) -> tuple[int, ...]:
        return tuple(i for i, s in enumerate(self.status) if s == "redundant")


@dataclass(frozen=True)
class RegionThreshold:
    """A hyperplane `text` between regimes `between` (0-based pairs) and what changes across it."""

    text: str
    between: tuple[tuple[int, int], ...]
    changes: tuple[str, ...]
    form: Affine | None = None


@dataclass(frozen=True)
class RegionRegimes:
    """The region-wise description of one H-form region over an exponent region."""

    region: HRegion
    names: tuple[str, ...]
    rows: tuple[RateInequality, ...]
    regimes: tuple[RegionRegime, ...]
    thresholds: tuple[RegionThreshold, ...]
    bounded: bool
    cells: int
    pointed: bool = True      # False: the region contains a line, it has no corners (none shown)

    def regime_at(self, point) -> RegionRegime | None:
        """The regime whose pieces contain the exponent point (None outside them all)."""
        return next((g for g in self.regimes if any(all(a.holds(point) for a in p) for p in g.pieces)), None)

    def row_label(self, i: int) -> str:
        return self.rows[i].label if i >= len(self.region.inequalities) else self.rows[i].text()


@dataclass(frozen=True)
class RegionNotShown:
    """A region whose regimes are not shown, and why (a size limit, the budget, a failed re-check)."""

    name: str
    reason: str
    see: str = ""        # shown already under this claim (the same region over the same exponents)


def row_text(rr: RegionRegimes, regime: RegionRegime, i: int) -> str:
    """Constraint i as it reads on the regime: 'd1 + d2 <= 2 - alpha' (non-negativity as 'd1 >= 0')."""
    q = rr.rows[i]
    if i >= len(rr.region.inequalities):
        return q.label
    if regime.bounds[i] is None:
        return q.text()
    return f"{q.lhs_text()} <= {to_text(regime.bounds[i])}"


def corner_text(corner: Sequence[Affine]) -> str:
    return "(" + ", ".join(to_text(f) for f in corner) + ")"


def _rank(matrix) -> int:
    rows = [[Fraction(v) for v in r] for r in matrix]
    rank = 0
    for c in range(len(rows[0]) if rows else 0):
        k = next((i for i in range(rank, len(rows)) if rows[i][c] != 0), None)
        if k is None:
            continue
        rows[rank], rows[k] = rows[k], rows[rank]
        for i in range(len(rows)):
            if i != rank and rows[i][c]:
                f = rows[i][c] / rows[rank][c]
                rows[i] = [a - f * b for a, b in zip(rows[i], rows[rank])]
        rank += 1
    return rank


def _unbounded_without(rows, rates, i: int) -> bool | None:
    """Is A_i r unbounded above on the recession cone {A_j r <= 0, j != i}?  None when those rows
    are not pointed (rank < K): the row's status is then not shown."""
    others = [q for j, q in enumerate(rows) if j != i]
    if not others or _rank([[q.coeff(r) for r in rates] for q in others]) < len(rates):
        return None
    atoms = [Atom(affine([(r, -c) for r, c in q.coeffs]), False) for q in others]
    return maximize(affine(rows[i].coeffs), atoms, list(rates)).status == "unbounded"


def _margins(rows, rates, bases):
    """m[s][j] = b_j - A_j x_S for every basis s and every row j outside it (PL expressions)."""
    out = []
    for subset, x in bases:
        inside = {id(q) for q in subset}
        lhs = lambda q: add(*(scale(q.coeff(r), e) for r, e in zip(rates, x) if q.coeff(r)))  # noqa: E731
        out.append({j: add(q.bound, scale(-1, lhs(q))) for j, q in enumerate(rows) if id(q) not in inside})
    return out


def _cell_facts(cell, names, rows, rates, bases, margins, unbounded):
    """(key, point, status, bounds, corners) of one cell, read at a relative-interior point."""
    point = nice_point(cell.atoms, names) or cell.point
    _require_relative_interior(cell, point, names)
    red = lambda e: reduce_modulo(affine_piece(e, point), cell.hull, names)  # noqa: E731
    sign = [{j: evaluate(m, point) >= 0 for j, m in ms.items()} for ms in margins]
    feasible = [all(sg.values()) for sg in sign]
    corners = frozenset(tuple(red(e) for e in bases[s][1]) for s in range(len(bases)) if feasible[s])
    status = []
    for i in range(len(rows)):
        if unbounded[i] is None:
            status.append("not shown")
            continue
        tops = [s for s in range(len(bases)) if i in sign[s]
                and all(ok for j, ok in sign[s].items() if j != i)]
        cuts = bool(tops) if unbounded[i] else any(not sign[s][i] for s in tops)
        status.append("facet" if cuts else "redundant")
    bounds = tuple(red(q.bound) for q in rows)
    facet_bounds = tuple((i, bounds[i]) for i, st in enumerate(status) if st == "facet")
    key = (tuple(status), facet_bounds, corners)
    return key, point, tuple(status), bounds, tuple(sorted(corners, key=corner_text))


def _require_relative_interior(cell, point, names) -> None:
    """The sign argument reads each margin at a relative-interior point of the cell: every atom that
    is not an implicit equality of the cell must hold strictly there (loud if not)."""
    for atom in cell.atoms:
        if eval_affine(atom.form, point) > 0:
            continue
        rest = reduce_modulo(atom.form, cell.hull, names)
        if rest.coeffs or rest.const != 0:
            raise AssertionError(f"the point {point} is not inside the cell ({atom.text()})")


def recheck(region: HRegion, rows, point, status, bounds, corners, pointed: bool = True) -> str:
    """'' when every printed fact holds exactly at `point`, else what failed (Fractions and exact
    LPs only; the corners against an independent vertex enumeration at the point)."""
    rates = list(region.rates)
    for q, f in zip(rows, bounds):
        if eval_affine(f, point) != evaluate(q.bound, point):
            return f"the right side of '{q.text()}' at {point}"
    values = {tuple(eval_affine(f, point) for f in c) for c in corners}
    got = vertices_at(region, point)
    truth = set() if got is None else {tuple(v[r] for r in rates) for v in got[0]}
    if pointed and values != truth:
        return f"the corners at {point}: formulas give {sorted(values)}, enumeration {sorted(truth)}"
    for i, st in enumerate(status):
        if st == "not shown":
            continue
        atoms = [a for j, q in enumerate(rows) if j != i
                 for a in atoms_of(affine(q.coeffs), "<=", evaluate(q.bound, point))]
        lp = maximize(affine(rows[i].coeffs), atoms, rates)
        cuts = lp.status == "unbounded" or (lp.status == "optimal" and lp.value > evaluate(rows[i].bound, point))
        if cuts != (st == "facet"):
            return f"the status of '{rows[i].text()}' at {point}"
    return ""


def region_regimes(region: HRegion, R: Region, budget: Budget | None = None) -> RegionRegimes:
    """Regimes of `region` over the exponent region R (see the module docstring).  Raises TooLarge
    beyond the size limits, OutOfBudget when the claim's clock runs out, AssertionError (loud) if an
    exact re-check ever disagrees with a formula."""
    budget = budget or Budget()
    rows = region.constraints()
    rates = region.rates
    names = tuple(sorted(region.exponents() | R.params()))
    bases = basic_solutions(region)
    margins = _margins(rows, rates, bases)
    count = sum(len(m) for m in margins)
    if count > MAX_MARGINS:
        raise TooLarge(STAGE + " (margins)", count, MAX_MARGINS)
    unbounded = [_unbounded_without(rows, rates, i) for i in range(len(rows))]
    targets = [q.bound for q in rows] + [pos(m) for ms in margins for m in ms.values()]
    cells = decompose(targets, R, names, budget=budget)
    if len(cells) > MAX_REGION_CELLS:
        raise TooLarge(STAGE + " (cells)", len(cells), MAX_REGION_CELLS)
    groups: dict = {}
    for cell in cells:
        budget.check(STAGE)
        key, point, status, bounds, corners = _cell_facts(cell, names, rows, rates, bases, margins, unbounded)
        bad = recheck(region, rows, point, status, bounds, corners, bool(bases))
        if bad:
            raise AssertionError(f"region '{region.name}': exact re-check failed for {bad}")
        groups.setdefault(key, []).append((cell, point, status, bounds, corners))
    regimes = []
    for members in sorted(groups.values(), key=lambda g: tuple(g[0][0].point[n] for n in names)):
        cell, point, status, bounds, corners = members[0]
        bounds = tuple(b if all(m[3][i] == b for m in members) else None for i, b in enumerate(bounds))
        pieces = tuple(merged([c.atoms for c, *_ in members], names, budget))
        regimes.append(RegionRegime(len(regimes), pieces, point, status, bounds, corners,
                                    len(members), cell.dim))
    bounded = _unbounded_all(rows, rates)
    return RegionRegimes(region, names, rows, tuple(regimes), _thresholds(regimes, names, rows, len(region.inequalities), budget),
                         not bounded, len(cells), bool(bases))


def _unbounded_all(rows, rates) -> bool:
    """Does the region have a recession direction (theta-free)?"""
    from verifier.geometry.vertices import generators
    atoms = [Atom(affine([(r, -c) for r, c in q.coeffs]), False) for q in rows]
    gens = generators(atoms, list(rates))
    return gens is None or not gens.bounded


class _Shown:
    def __init__(self, regime, names):
        self.polytopes = [polytope(p, names, shape(p, names).dim) for p in regime.pieces]


def _thresholds(regimes, names, rows, users, budget) -> tuple[RegionThreshold, ...]:
    if len(regimes) < 2 or not names:
        return ()
    out = []
    for t in thresholds([_Shown(r, names) for r in regimes], names, budget):
        changes = []
        for a, b in t.between:
            changes += _changes(regimes[a], regimes[b], rows, users)
        out.append(RegionThreshold(t.text, t.between, tuple(dict.fromkeys(changes)), t.form))
    return tuple(out)


def _article(status: str) -> str:
    return {"facet": "a facet"}.get(status, status)


def _changes(a: RegionRegime, b: RegionRegime, rows, users: int) -> list[str]:
    out = []
    for i in range(len(rows)):
        if a.status[i] != b.status[i]:
            name = f"({i + 1})" if i < users else rows[i].label
            out.append(f"{name} is {_article(a.status[i])} in regime {a.index}, {_article(b.status[i])} "
                       f"in regime {b.index}")
    for mine, other in ((a, b), (b, a)):
        for c in mine.corners:
            if c not in other.corners:
                out.append(f"corner {corner_text(c)} only in regime {mine.index}")
    return out
