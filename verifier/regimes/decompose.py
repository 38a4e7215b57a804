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

Parallelism: each pending cell is an independent task (`refine`, for a bounded time at a time) that
any worker of a process pool can run; the set of cells does not depend on who runs what, and cells
are finally sorted by their interior points, so the output is the same for any number of workers.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Callable, Sequence

from verifier.expressions.expr import Affine, Expr, affine
from verifier.expressions.region import Atom, Region
from verifier.geometry.shape import difference, shape
from verifier.geometry.vertices import Cone
from verifier.regimes.cell_proof import NeedSplit, Piece, affine_pieces, number_nodes

MAX_CELLS = 50_000   # each cell keeps its cone generators: beyond this, memory rather than time runs out


@dataclass(frozen=True)
class Cell:
    """A convex piece of the region (raw atoms: region piece + cuts) where every target is affine.

    `forms[i]` is the affine form of target i on the cell, `proofs[i]` its Piece proof, without
    Farkas certificates yet (cell_proof.with_certificates adds them); `hull` the equations of the
    region piece's affine hull; `cone` the generators of the closure; `piece` the index of the
    (disjoint) region piece the cell lies in; `extra` what a `finish` hook attached (the verdict)."""

    atoms: tuple[Atom, ...]
    point: dict
    dim: int
    forms: tuple[Affine, ...]
    proofs: tuple[Piece, ...]
    hull: tuple[Affine, ...] = ()
    cone: Cone | None = None
    piece: int = 0
    extra: object = None

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
    """A cell still to be refined, with its generators (a Cone) and the proofs inherited from its
    ancestors (valid on the cell: its atoms extend the ancestors' atoms)."""

    atoms: tuple[Atom, ...]
    point: dict
    dim: int
    hull: tuple[Affine, ...]
    memo: dict
    cone: Cone
    piece: int = 0


def _step(task: Task, targets: Sequence[Expr], names: Sequence[str], numbers: dict):
    """Either a finished Cell or the two child Tasks of the cut the proof asked for."""
    memo = dict(task.memo)
    try:
        forms, proofs = affine_pieces(targets, task.atoms, names, task.point, memo, numbers, task.cone)
        return Cell(task.atoms, task.point, task.dim, forms, proofs, task.hull, task.cone, task.piece)
    except NeedSplit as need:
        kids = []
        for atoms in cut(task.atoms, need.form):
            cone = task.cone.add(atoms[-1].form)
            if cone.empty:  # cannot happen (see cell_proof); be loud
                raise AssertionError(f"cut {need.form} did not split the cell properly")
            kids.append(Task(atoms, cone.interior_point(), task.dim, task.hull, memo, cone, task.piece))
        return kids


def refine(tasks, targets: Sequence[Expr], names: Sequence[str], seconds: float | None = None,
           finish: Callable | None = None, budget=None):
    """Final cells below the given task(s), depth first (h >= 0 side first), each passed through
    `finish`.  With a time slice in `seconds`, stops after it and also returns the tasks still
    pending, so a scheduler can hand them to idle workers: returns (cells, pending) then.
    `budget` (verifier.core.budget.Budget): the claim's clock, checked before every step."""
    import time
    numbers = number_nodes(targets)
    stack = list(reversed(tasks)) if isinstance(tasks, list) else [tasks]
    cells, start = [], time.perf_counter()
    while stack and (seconds is None or time.perf_counter() - start < seconds):
        if budget is not None:
            budget.check("regime decomposition")
        if len(cells) + len(stack) > MAX_CELLS:
            from verifier.core.budget import TooLarge
            raise TooLarge("regime decomposition (cells)", len(cells) + len(stack), MAX_CELLS)
        got = _step(stack.pop(), targets, names, numbers)
        if isinstance(got, Cell):
            cells.append(finish(got) if finish is not None else got)
        else:
            stack.extend(reversed(got))
    return cells if seconds is None else (cells, stack[::-1])


def initial_tasks(region: Region, names: Sequence[str]) -> list[Task]:
    tasks = []
    for k, atoms in enumerate(disjoint_pieces(region, names)):
        s = shape(atoms, names)
        if s is not None:
            tasks.append(Task(tuple(atoms), s.point, s.dim, s.hull, {}, Cone.of(atoms, names), k))
    return tasks


_WORKER: dict = {}


def worker_setup(targets: Sequence[Expr], names: Sequence[str], finish: Callable | None = None,
                 budget=None) -> None:
    """Process-pool initializer: the targets (and the finish hook, the budget) travel once per worker."""
    _WORKER.update(targets=tuple(targets), names=tuple(names), finish=finish, budget=budget)


def refine_in_worker(tasks: list, seconds: float):
    return refine(tasks, _WORKER["targets"], _WORKER["names"], seconds, _WORKER["finish"],
                  _WORKER.get("budget"))


def decompose(targets: Sequence[Expr], region: Region, names: Sequence[str], pool=None,
              progress: Callable | None = None, seconds: float = 0.5, finish: Callable | None = None,
              budget=None) -> list[Cell]:
    """Cells covering `region` on which every target is affine, sorted by interior point.

    With a process `pool` (concurrent.futures, initialised by worker_setup with the same targets,
    names and finish hook) workers refine batches of pending cells for about `seconds` each and
    send back what is left, which is split again among idle workers (dynamic load balancing).  The
    set of cells does not depend on the schedule.  progress('cells', found, found + batches left)."""
    names, targets = tuple(names), tuple(targets)
    tasks = initial_tasks(region, names)
    if pool is None:
        cells = []
        for t in tasks:
            cells += refine([t], targets, names, finish=finish, budget=budget)
            if len(cells) > MAX_CELLS:
                from verifier.core.budget import TooLarge
                raise TooLarge("regime decomposition (cells)", len(cells), MAX_CELLS)
            if progress:
                progress("cells", len(cells), len(cells))
        return sorted(cells, key=lambda c: c.key_point(names))
    from concurrent.futures import FIRST_COMPLETED, wait
    n = pool._max_workers
    cells: list[Cell] = []
    queue = [tasks[k::n] for k in range(n) if tasks[k::n]]
    running: set = set()
    while queue or running:
        while queue and len(running) < n:
            running.add(pool.submit(refine_in_worker, queue.pop(0), seconds))
        done, running = wait(running, return_when=FIRST_COMPLETED)
        if budget is not None:
            budget.check("regime decomposition")
        if len(cells) > MAX_CELLS:
            from verifier.core.budget import TooLarge
            raise TooLarge("regime decomposition (cells)", len(cells), MAX_CELLS)
        for fut in done:
            got, pending = fut.result()
            cells += got
            parts = n if not queue else 1  # split leftovers only while workers would idle
            queue += [pending[k::parts] for k in range(parts) if pending[k::parts]]
        if progress:
            progress("cells", len(cells), len(cells) + len(running) + len(queue))
    if progress:
        progress("cells", len(cells), len(cells))
    return sorted(cells, key=lambda c: c.key_point(names))


def point_key(point: dict, names: Sequence[str]) -> tuple[Fraction, ...]:
    return tuple(point[n] for n in names)
