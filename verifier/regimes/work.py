"""The verdict on each cell and on each regime: exact decisions, certificates, failure pieces.

Why per cell and exact: on a cell every compared expression is one affine form, so each obligation of
the claim is a single affine inequality.  Its Farkas certificate (from the cell's generators) is
re-checked once the whole proof is assembled (regime_proof: the standalone checker for a proved
claim, certificates.check_certificate for the proved regimes of any other), never taken on trust;
if no certificate exists,
the failure polyhedron cell & {not obligation} is non-empty by construction and the cell is refuted
there.  A cell where neither happens (it should not) is 'unknown' and goes to the SMT backend
restricted to it, as does every cell when SMT per regime is asked for.

`finish_cell` runs where the cell was found (a worker process, right after decomposition), so the
heaviest work is spread by the same dynamic scheduler; `assemble` builds a Regime in the main process.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from functools import cached_property
from typing import Mapping

from verifier.expressions.expr import Affine
from verifier.regimes.cell_proof import with_certificates
from verifier.regimes.certificates import Certificate, certify, pack, unpack
from verifier.regimes.decompose import Cell
from verifier.regimes.failure import FailurePiece, failure_piece, violations
from verifier.regimes.polytope import Polytope
from verifier.regimes.spec import Spec

PROVED, REFUTED, UNKNOWN = "proved", "refuted", "unknown"


@dataclass(frozen=True)
class Regime:
    """Cells sharing the same affine formulas and active named parts.

    `polytopes`: the regime as convex pieces (one per region piece when the union of its cells there
    is convex); `point`/`dim`: a nice relative-interior point and the dimension of the first piece;
    `forms`: affine formula of each compared expression (lhs, rhs; or f for monotone);
    `active`: per side, the named parts equal to that side on the whole regime;
    `status`: proved / refuted / unknown; `certified`: every cell was proved by a certificate that
    passed check_certificate; `certificates` (a property): one per proved cell; `failures`: where
    it fails;
    `smt_status`: the SMT backend's answer on the regime's cells when asked ('' otherwise);
    `detail`: loud notes (METHODS DISAGREE, decided by SMT)."""

    index: int
    polytopes: tuple[Polytope, ...]
    point: dict
    dim: int
    forms: tuple[Affine, ...]
    active: tuple[tuple[str, ...], ...]
    status: str
    certified: bool
    stored_certificates: tuple = field(repr=False, compare=False)
    failures: tuple[FailurePiece, ...]
    cells: tuple[Cell, ...]
    smt_status: str = ""
    detail: str = ""
    exprs: tuple = field(default=(), repr=False, compare=False)

    @cached_property
    def certificates(self) -> tuple[Certificate, ...]:
        """One Certificate per proved cell (unpacked on first use: those made in worker processes
        travel compactly, see received_certificate)."""
        return tuple(received_certificate(c, self.exprs) for c in self.stored_certificates)


@dataclass(frozen=True)
class CellVerdict:
    status: str
    certificate: Certificate | None
    failures: tuple[FailurePiece, ...]
    smt: str = ""
    detail: str = ""


def _verdict(spec: Spec, options: Mapping, atoms, forms, pieces) -> CellVerdict:
    names = spec.names
    cert = certify(spec, atoms, forms, pieces, names) if pieces is not None else None
    if cert is not None:   # re-checked once the proof is whole (regime_proof: standalone checker)
        return CellVerdict(PROVED, cert, ())
    bad = violations(spec, atoms, forms, names)
    if not bad:
        return CellVerdict(UNKNOWN, None, ())  # no certificate yet no violation: should not happen
    found = tuple(failure_piece(spec, -1, ob, poly, forms, names, options.get("box")) for ob, poly in bad)
    return CellVerdict(REFUTED, None, found)


def finish_cell(cell: Cell, spec: Spec, options: Mapping, index: tuple[int, ...], ship: bool) -> Cell:
    """Decide the claim on a fresh cell and attach the CellVerdict as `cell.extra`.

    `index[i]` is the target number of spec.exprs[i].  The uncertified proofs are dropped (the
    certificate holds the certified ones); with `ship` (the cell travels back from a worker) the
    certificate travels packed (see received_certificate)."""
    forms = tuple(cell.forms[i] for i in index)
    pieces, memo = [], {"numbers": _numbers(spec)}
    for e, i in zip(spec.exprs, index):
        got = with_certificates(e, cell.proofs[i], cell.atoms, spec.names, cell.cone, memo)
        if got is None:
            pieces = None
            break
        pieces.append(got[1])
    verdict = _verdict(spec, options, cell.atoms, forms, tuple(pieces) if pieces is not None else None)
    if options.get("smt_regimes") or verdict.status == UNKNOWN:
        verdict = _smt_cell(cell, spec, options, verdict)
    if ship and verdict.certificate is not None:
        c, memo = verdict.certificate, {}
        c = replace(c, exprs=(), pieces=tuple(pack(p, memo) for p in c.pieces),
                    farkas=tuple(pack(f, memo) for f in c.farkas))
        verdict = replace(verdict, certificate=c)
    return replace(cell, proofs=(), extra=verdict)


def _numbers(spec: Spec) -> dict:
    """number_nodes of the spec's expressions, computed once per spec (and per worker process)."""
    got = spec.__dict__.get("_numbers")
    if got is None:
        from verifier.regimes.cell_proof import number_nodes
        got = number_nodes(spec.exprs)
        object.__setattr__(spec, "_numbers", got)
    return got


def received_certificate(c: Certificate, exprs) -> Certificate:
    """A certificate shipped from a worker (packed proofs, no expressions) made whole again."""
    if c.exprs:
        return c
    memo: dict = {}
    return replace(c, exprs=tuple(exprs), pieces=tuple(unpack(p, memo) for p in c.pieces),
                   farkas=tuple(unpack(f, memo) for f in c.farkas))


def _smt_cell(cell: Cell, spec: Spec, options: Mapping, verdict: CellVerdict) -> CellVerdict:
    """Ask the SMT backend about this cell alone; disagreement is loud and makes it unknown."""
    from verifier.claims.kinds import violation_query
    from verifier.expressions.region import Polyhedron, Region
    from verifier.solvers.smt import check
    from verifier.core.budget import Budget
    from verifier.claims.kinds import violated_at
    from verifier.core.verdicts import methods
    claim = options.get("claim")
    if claim is None or spec.kind != "compare":
        return replace(verdict, smt="n/a")
    budget = options.get("budget") or Budget()
    answer = check(violation_query(claim, Region((Polyhedron(cell.atoms),))), options.get("solver", "z3"),
                   budget.timeout("SMT per cell"))
    said = {"unsat": PROVED, "sat": REFUTED}.get(answer.status, UNKNOWN)
    if said == REFUTED and not violated_at(claim, answer.model):
        said = UNKNOWN
    if verdict.status == UNKNOWN:
        if said == REFUTED:   # no failure polyhedron to show: keep the solver's (re-checked) point
            return replace(verdict, status=UNKNOWN, smt=said,
                           detail=f"{answer.solver} refutes this cell but no exact failure set was found")
        return replace(verdict, status=said, smt=said, detail=f"decided by {answer.solver} (no certificate)")
    status, note = methods(("the cell's certificate", verdict.status), (answer.solver, said), True)
    return replace(verdict, status=status, smt=said, detail=note)


def _status(statuses) -> str:
    from verifier.core.verdicts import overall
    return overall(statuses)


def assemble(index: int, cells, polytopes, forms, active, exprs) -> Regime:
    """A regime from its decided cells and presented polytopes."""
    verdicts = [c.extra for c in cells]
    certs = tuple(v.certificate for v in verdicts if v.certificate is not None)
    failures = tuple(replace(p, regime=index) for v in verdicts for p in v.failures)
    smt = "/".join(sorted({v.smt for v in verdicts if v.smt}))
    detail = "; ".join(dict.fromkeys(f"regime {index}: {v.detail}" for v in verdicts if v.detail))
    return Regime(index, tuple(polytopes), polytopes[0].point, polytopes[0].dim, forms, active,
                  _status(v.status for v in verdicts), len(certs) == len(verdicts), certs, failures,
                  tuple(cells), smt, detail, tuple(exprs))
