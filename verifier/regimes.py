"""Regime decomposition: cut a region into polyhedral cells on which given expressions are affine.

Why incremental splitting rather than enumerating every combination of min/max choices: a cell is cut
only when a proof of "this expression is affine here" needs it (cell_proof), and only cells that
contain points are ever built, so the work grows with the number of cells produced, not with
2^(number of choices).

Boundary convention (documented because every point must land in exactly one cell): a cut by the
hyperplane h = 0 is normalised so that the coefficient of the alphabetically first parameter in h is
+1; the boundary goes to the side h >= 0, the other side gets h < 0.  In one dimension every
breakpoint therefore belongs to the interval on its right.  Overlapping region pieces are first made
disjoint (a later piece loses what earlier pieces already cover).

Parallelism: `frontier` expands the first few cuts breadth-first; each pending cell is an independent
task (`refine`) that a process pool can run; the result does not depend on who runs what, and cells
are finally sorted by their interior points, so the output is the same for any number of workers.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Callable, Sequence

from .expr import Affine, Expr, affine
from .cell_proof import NeedSplit, Piece, affine_pieces
from .lp_shape import difference, shape
from .region import Atom, Region


@dataclass(frozen=True)
class Cell:
    """A convex piece of the region (raw atoms: region piece + cuts) where every target is affine.

    `forms[i]` is the affine form of target i on the cell, `proofs[i]` its Piece proof (atoms are
    referred to by index into `atoms`); `hull` the equations of the region piece's affine hull."""

    atoms: tuple[Atom, ...]
    point: dict
    dim: int
    forms: tuple[Affine, ...]
    proofs: tuple[Piece, ...]
    hull: tuple[Affine, ...] = ()

    def key_point(self, names: Sequence[str]) -> tuple:
        return tuple(self.point[n] for n in names)


def normalise(h: Affine) -> Affine:
    """The cut h = 0 scaled so that its first coefficient (alphabetical order) is +1."""
    lead = h.coeffs[0][1]
    return affine([(n, c / lead) for n, c in h.coeffs], h.const / lead)


def cut(atoms: tuple[Atom, ...], h: Affine) -> tuple[tuple[Atom, ...], tuple[Atom, ...]]:
    """The two sides of a cut, boundary on the h >= 0 side (see the module docstring)."""
    h = normalise(h)
    return atoms + (Atom(h, False),), atoms + (Atom(h, False).negated(),)


def disjoint_pieces(region: Region, names: Sequence[str]) -> list[tuple[Atom, ...]]:
    """The region's pieces made pairwise disjoint, empty ones dropped, in the given order."""
    out: list[tuple[Atom, ...]] = []
    done: list[tuple[Atom, ...]] = []
    for piece in region.pieces:
        out += difference(piece.atoms, done, names)
        done.append(piece.atoms)
    return out


@dataclass(frozen=True)
class Task:
    """A cell still to be refined, with the proofs inherited from its ancestors."""

    atoms: tuple[Atom, ...]
    point: dict
    dim: int
    hull: tuple[Affine, ...]
    memo: dict


def _step(task: Task, targets: Sequence[Expr], names: Sequence[str]):
    """Either a finished Cell or the two child Tasks of the cut the proof asked for."""
    memo = dict(task.memo)
    try:
        forms, proofs = affine_pieces(targets, task.atoms, names, task.point, memo)
        return Cell(task.atoms, task.point, task.dim, forms, proofs, task.hull)
    except NeedSplit as need:
        kids = []
        for atoms in cut(task.atoms, need.form):
            s = shape(atoms, names)
            if s is None or s.dim != task.dim:  # cannot happen (see cell_proof); be loud
                raise AssertionError(f"cut {need.form} did not split the cell properly")
            kids.append(Task(atoms, s.point, s.dim, task.hull, memo))
        return kids


def refine(task: Task, targets: Sequence[Expr], names: Sequence[str]) -> list[Cell]:
    """All final cells below one task, depth first (h >= 0 side first)."""
    stack, cells = [task], []
    while stack:
        got = _step(stack.pop(), targets, names)
        if isinstance(got, Cell):
            cells.append(got)
        else:
            stack.extend(reversed(got))
    return cells


def initial_tasks(region: Region, names: Sequence[str]) -> list[Task]:
    tasks = []
    for atoms in disjoint_pieces(region, names):
        s = shape(atoms, names)
        if s is not None:
            tasks.append(Task(tuple(atoms), s.point, s.dim, s.hull, {}))
    return tasks


def frontier(region: Region, targets, names, want: int) -> tuple[list[Cell], list[Task]]:
    """Breadth-first expansion until at least `want` tasks are pending (or all cells are final)."""
    cells, queue = [], initial_tasks(region, names)
    while queue and len(queue) < want:
        got = _step(queue.pop(0), targets, names)
        if isinstance(got, Cell):
            cells.append(got)
        else:
            queue.extend(got)
    return cells, queue


def decompose(targets: Sequence[Expr], region: Region, names: Sequence[str],
              mapper: Callable | None = None, want: int = 1) -> list[Cell]:
    """Cells covering `region` on which every target is affine, sorted by interior point.

    `mapper(fn, tasks)` may run `refine` on the pending tasks elsewhere (a process pool); `want` is
    how many tasks to prepare for it."""
    names = tuple(names)
    targets = tuple(targets)
    cells, tasks = frontier(region, targets, names, want)
    if mapper is None:
        for t in tasks:
            cells += refine(t, targets, names)
    else:
        for got in mapper(_refine_packed, [(t, targets, names) for t in tasks]):
            cells += got
    return sorted(cells, key=lambda c: c.key_point(names))


def _refine_packed(args) -> list[Cell]:
    return refine(*args)


def point_key(point: dict, names: Sequence[str]) -> tuple[Fraction, ...]:
    return tuple(point[n] for n in names)
