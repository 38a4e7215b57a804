"""The verdict on one regime: exact per-cell decisions, certificates, failure pieces, geometry.

Why per cell and exact: on a cell every compared expression is one affine form, so each obligation of
the claim is a single affine inequality and "does it hold on the cell" is one LP.  The LP's dual is
the Farkas certificate, re-checked by the independent checker before the cell counts as certified; if
no certificate exists the failure polyhedron cell & {not obligation} is non-empty by construction and
the regime is refuted there.  A cell where neither happens (it should not) is 'unknown' and, when
asked, goes to the SMT backend restricted to that regime.

This module is what worker processes run, one regime per task; everything it returns is picklable.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from fractions import Fraction
from typing import Mapping, Sequence

from .certificates import Certificate, certify, check_certificate
from .expr import Affine
from .failure import FailurePiece, denominator, failure_piece, smallest_denominator, violations
from .regime_geometry import Polytope, present
from .regime_spec import Spec
from .regimes import Cell

PROVED, REFUTED, UNKNOWN = "proved", "refuted", "unknown"


@dataclass(frozen=True)
class Regime:
    """Cells sharing the same affine formulas and active named parts.

    `polytopes`: the regime as convex pieces (one when the union of its cells is convex);
    `point`/`dim`: a nice relative-interior point and the dimension of the first piece;
    `forms`: affine formula of each compared expression (lhs, rhs; or f for monotone);
    `active`: per side, the named parts equal to that side on the whole regime;
    `status`: proved / refuted / unknown; `certified`: every cell has a certificate that passed
    check_certificate; `certificates`: one per cell (proved cells only); `failures`: where it fails;
    `smt_status`: the SMT backend's answer on this regime when asked ('' otherwise)."""

    index: int
    polytopes: tuple[Polytope, ...]
    point: dict
    dim: int
    forms: tuple[Affine, ...]
    active: tuple[tuple[str, ...], ...]
    status: str
    certified: bool
    certificates: tuple[Certificate, ...]
    failures: tuple[FailurePiece, ...]
    cells: tuple[Cell, ...]
    smt_status: str = ""
    detail: str = ""


@dataclass(frozen=True)
class Job:
    spec: Spec
    index: int
    cells: tuple[Cell, ...]
    forms: tuple[tuple[Affine, ...], ...]     # per cell: forms of spec.exprs
    pieces: tuple[tuple, ...]                 # per cell: Piece proofs of spec.exprs
    active: tuple[tuple[str, ...], ...]
    options: Mapping = field(default_factory=dict)


def _cell_verdict(job: Job, k: int):
    spec, cell, names = job.spec, job.cells[k], job.spec.names
    cert = certify(spec, cell.atoms, job.forms[k], job.pieces[k], names)
    if cert is not None and check_certificate(cert):
        return PROVED, cert, []
    bad = violations(spec, cell.atoms, job.forms[k], names)
    if not bad:
        return UNKNOWN, None, []
    opts = job.options
    pieces = []
    for ob, atoms in bad:
        piece = failure_piece(spec, job.index, ob, atoms, job.forms[k], names, opts.get("box"))
        if opts.get("improve_witness") and spec.kind == "compare":
            bound = denominator(piece.point)
            small = smallest_denominator(piece.polyhedron.atoms, names, bound, opts.get("solver", "z3"),
                                         opts.get("timeout", 10.0)) if bound > 1 else None
            piece = _with_small(piece, small)
        pieces.append(piece)
    return REFUTED, None, pieces


def _with_small(piece: FailurePiece, small) -> FailurePiece:
    from dataclasses import replace
    return replace(piece, small_point=small)


def analyse_regime(job: Job) -> Regime:
    """Decide, certify and describe one regime (see the module docstring)."""
    verdicts = [_cell_verdict(job, k) for k in range(len(job.cells))]
    certs = tuple(c for _, c, _ in verdicts if c is not None)
    failures = tuple(p for _, _, ps in verdicts for p in ps)
    statuses = {s for s, _, _ in verdicts}
    status = REFUTED if REFUTED in statuses else (PROVED if statuses == {PROVED} else UNKNOWN)
    polytopes = present([c.atoms for c in job.cells], job.spec.names)
    regime = Regime(job.index, polytopes, polytopes[0].point, polytopes[0].dim, job.forms[0],
                    job.active, status, len(certs) == len(job.cells), certs, failures, job.cells)
    if job.options.get("smt_regimes") or status == UNKNOWN:
        regime = _smt_regime(job, regime)
    return regime


def _smt_regime(job: Job, regime: Regime) -> Regime:
    """Ask the SMT backend about this regime alone; disagreement is loud and makes it unknown."""
    from dataclasses import replace
    from .claims import violation_query
    from .region import Polyhedron, Region
    from .smt import check
    claim = job.options.get("claim")
    if claim is None or job.spec.kind != "compare":
        return replace(regime, smt_status="n/a")
    region = Region(tuple(Polyhedron(c.atoms) for c in job.cells))
    answer = check(violation_query(claim, region), job.options.get("solver", "z3"),
                   job.options.get("timeout", 30.0))
    said = {"unsat": PROVED, "sat": REFUTED}.get(answer.status, UNKNOWN)
    if regime.status == UNKNOWN:
        return replace(regime, status=said, smt_status=said,
                       detail=f"decided by {answer.solver} (no certificate)")
    if said != UNKNOWN and said != regime.status:
        return replace(regime, status=UNKNOWN, smt_status=said,
                       detail=f"METHODS DISAGREE on regime {regime.index}: regimes say {regime.status}, "
                              f"{answer.solver} says {said}")
    return replace(regime, smt_status=said)
