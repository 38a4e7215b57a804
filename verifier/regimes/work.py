"""The verdict on each cell and on each regime: exact decisions, certificates, failure pieces.

Why per cell and exact: on a cell every compared expression is one affine form, so each obligation of
the claim is a single affine inequality.  Its Farkas certificate (from the cell's generators) is
re-checked once the whole proof is assembled (regime_proof: the standalone checker for a proved
claim, certificates.check_certificate for the proved regimes of any other), never taken on trust;
if no certificate exists,
the failure polyhedron cell & {not obligation} is non-empty by construction and the cell is refuted
there.  A cell where neither happens (it should not) is 'unknown' and goes to the SMT backend
restricted to it, as does every cell when SMT per regime is asked for.

`finish_cell` runs where the cell was found (a worker process, right after decomposition) and
decides the cell exactly but cheaply: each obligation is a sign check on the cell's generators.  The
certificate of a proved cell is built later, once per REGIME POLYTOPE (`certify_regime`): when the
cells of a proved regime merge into one convex polytope Q (polytope.convex_union), one certificate on
Q proves the claim on all of them, and the coverage tree shows each cell (or a whole subtree of
cells) inside Q by Farkas multipliers (regimes.export).  This is what makes the proof grow with the
number of regimes rather than cells.  A polytope where no single proof exists (an argument of a
nested max that is active in different cells) falls back to one certificate per cell, and a cell
that cannot be certified at all goes to the SMT backend, restricted to it.  `assemble` builds a
Regime in the main process.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from functools import cached_property
from typing import Mapping

from verifier.expressions.expr import Affine
from verifier.geometry.vertices import Cone
from verifier.regimes.cell_proof import CellProver, NeedSplit, with_certificates
from verifier.regimes.certificates import Certificate, certify, pack, unpack
from verifier.regimes.decompose import Cell
from verifier.regimes.failure import FailurePiece, failure_piece, violations
from verifier.regimes.polytope import holds_on_cone, Polytope
from verifier.regimes.spec import obligations, Spec

PROVED, REFUTED, UNKNOWN = "proved", "refuted", "unknown"


@dataclass(frozen=True)
class Regime:
    """Cells sharing the same affine formulas and active named parts.

    `polytopes`: the regime as convex pieces (one per region piece when the union of its cells there
    is convex); `point`/`dim`: a nice relative-interior point and the dimension of the first piece;
    `forms`: affine formula of each compared expression (lhs, rhs; or f for monotone);
    `active`: per side, the named parts equal to that side on the whole regime;
    `status`: proved / refuted / unknown; `certified`: every cell lies in a polyhedron with a
    certificate (`cover[i]`: the index in `certificates` of the one holding cell i, None for a cell
    without); `certificates` (a property): one per certified polytope or cell; `failures`: where
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
    cover: tuple = field(default=(), repr=False, compare=False)

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
    pending: bool = False   # proved by the generators' signs; the certificate comes with the regime
    proofs: tuple = ()      # pending: the Piece proofs of spec.exprs (packed when shipped), for a
                            # certificate of the cell alone should its regime polytope get none


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

    `index[i]` is the target number of spec.exprs[i].  When every obligation holds on the cell's
    generators the cell is proved and its certificate is left to `certify_regime` (pending); else
    the cell is decided as before by exact LP (a certificate, or the failure polyhedra).  The proofs
    are dropped; with `ship` (the cell travels back from a worker) a certificate travels packed."""
    forms = tuple(cell.forms[i] for i in index)
    if cell.cone is not None and all(holds_on_cone(ob, cell.cone, cell.atoms) for ob in obligations(spec, forms)):
        proofs = tuple(cell.proofs[i] for i in index)
        verdict = CellVerdict(PROVED, None, (), pending=True, proofs=proofs)
        if ship:   # in a worker: certify the cell here, in parallel (its regime may still merge)
            cert = _cell_certificate(spec, replace(cell, extra=verdict))
            memo: dict = {}
            verdict = replace(verdict, certificate=cert,
                              proofs=() if cert is not None else tuple(pack(p, memo) for p in proofs))
    else:
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


def certify_on(spec: Spec, atoms, point, cone: Cone) -> Certificate | None:
    """A certificate of the claim on the polyhedron `atoms` (its generators `cone`, built from
    exactly these atoms; `point` in its relative interior), found afresh by the lazy prover; None
    when the expressions are not provably affine there or an obligation fails."""
    numbers = _numbers(spec)
    prover = CellProver(atoms, spec.names, point, {}, numbers, cone)
    try:
        got = [prover.piece(e) for e in spec.exprs]
    except NeedSplit:
        return None
    memo, forms, pieces = {"numbers": numbers}, [], []
    for e, (_, proof) in zip(spec.exprs, got):
        done = with_certificates(e, proof, atoms, spec.names, cone, memo)
        if done is None:
            return None
        forms.append(done[0])
        pieces.append(done[1])
    return certify(spec, atoms, forms, pieces, spec.names)


def _cell_certificate(spec: Spec, cell: Cell) -> Certificate | None:
    """The certificate of a pending cell alone, from the proofs the decomposition found (as the
    lazy prover would, without searching again); afresh when they are missing."""
    proofs = cell.extra.proofs
    if len(proofs) != len(spec.exprs):
        return certify_on(spec, cell.atoms, cell.point, cell.cone)
    memo, pieces = {"numbers": _numbers(spec)}, []
    unpacked: dict = {}
    forms = []
    for e, p in zip(spec.exprs, proofs):
        got = with_certificates(e, unpack(p, unpacked) if isinstance(p, tuple) else p, cell.atoms,
                                spec.names, cell.cone, memo)
        if got is None:
            return None
        forms.append(got[0])
        pieces.append(got[1])
    return certify(spec, cell.atoms, forms, pieces, spec.names)


def certify_regime(spec: Spec, options: Mapping, cells: list, shown) -> tuple[list, tuple, tuple]:
    """Certificates for one regime: (cells with final verdicts, certificates, cover).

    `shown` lists (polytope, member positions in `cells`).  When every cell of the regime is proved,
    a merged polytope of pending cells gets one certificate for all its members; every other cell
    keeps the certificate a worker made for it, or gets its own here.  A pending cell that cannot be
    certified is decided by SMT alone (loudly, in its detail).  When some cell is refuted or unknown
    the regime is not certified and its pending cells keep their exact (uncertified) verdict: the
    claim fails there anyway."""
    cells = list(cells)
    certs: list = []
    cover: list = [None] * len(cells)
    proved = all(c.extra.status == PROVED for c in cells)
    for poly, members in shown if proved else ():
        if len(members) > 1 and all(cells[k].extra.pending for k in members):
            atoms = tuple(poly.polyhedron.atoms)
            cert = certify_on(spec, atoms, poly.point, Cone.of(atoms, spec.names))
            if cert is not None:
                for k in members:
                    cover[k] = len(certs)
                certs.append(cert)
    for k, cell in enumerate(cells):
        v = cell.extra
        if cover[k] is None and v.certificate is not None:
            cover[k] = len(certs)
            certs.append(v.certificate)
        elif cover[k] is None and proved and v.pending:
            cert = _cell_certificate(spec, cell)
            if cert is not None:
                cover[k] = len(certs)
                certs.append(cert)
            else:
                v = _smt_cell(cell, spec, options, replace(v, status=UNKNOWN, pending=False))
        if v.proofs:
            v = replace(v, proofs=())
        if v is not cell.extra:
            cells[k] = replace(cell, extra=v)
    return cells, tuple(certs), tuple(cover)


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


def assemble(index: int, cells, polytopes, forms, active, exprs, certificates=None, cover=None) -> Regime:
    """A regime from its decided cells and presented polytopes; `certificates` and `cover` as made
    by certify_regime (without them: the cells' own certificates)."""
    verdicts = [c.extra for c in cells]
    if certificates is None:
        certificates, cover, n = [], [], 0
        for v in verdicts:
            cover.append(n if v.certificate is not None else None)
            if v.certificate is not None:
                certificates.append(v.certificate)
                n += 1
    failures = tuple(replace(p, regime=index) for v in verdicts for p in v.failures)
    smt = "/".join(sorted({v.smt for v in verdicts if v.smt}))
    detail = "; ".join(dict.fromkeys(f"regime {index}: {v.detail}" for v in verdicts if v.detail))
    certified = bool(cells) and all(k is not None for k in cover)
    return Regime(index, tuple(polytopes), polytopes[0].point, polytopes[0].dim, forms, active,
                  _status(v.status for v in verdicts), certified, tuple(certificates), failures,
                  tuple(cells), smt, detail, tuple(exprs), tuple(cover))
