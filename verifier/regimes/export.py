"""Export a region-wise proof as a JSON certificate that anyone can re-check without this project.

Why: a referee or an editor should not have to trust (or install) our LP, decomposition and SMT code
to accept a proved claim.  `export_proof` writes down everything that the standalone checker
(verifier/standalone/check_certificates.py, standard library only) needs to recompute the proof:

- the claim, in words and as data: kind, relation, gap, monotone parameter and direction, and the
  compared expression trees (regime_spec.spec_of: for reduces-to the expressions and region with the
  fixed parameters substituted away, which is the space the cells live in);
- the region as a list of polyhedra (the claim's region pieces, possibly overlapping);
- every certified polyhedron (listed as `cells`: a regime polytope that holds several decomposition
  cells, or a single cell) with its certificate (verifier.regimes.certificates: Piece proofs that
  each expression equals one affine form there, Farkas multipliers for each obligation);
- per region piece k a COVERAGE TREE proving that those polyhedra cover piece k: `split` nodes on an
  atom a (children: path + [a] where a holds, path + [not a] where it fails), and leaves `cell` (a
  certified polyhedron each of whose atoms is on the path or, listed in `farkas`, implied by the
  path's atoms), `empty` (Farkas multipliers proving '0 > 0' on the path's atoms, i.e. that the
  path is empty) and `inside` (an earlier piece j < k whose atoms are all on the path).

The tree is rebuilt from the decomposition cells' atom sequences: every cell's atoms are its region
piece's atoms followed by the atoms appended by lp_shape.difference (making pieces disjoint) and by
regimes.cut, so grouping cells by the atom at each position recovers the splits; a side without
cells is what difference dropped (empty, or inside an earlier piece), proved so here.  A subtree
whose cells all lie in one certified regime polytope Q is closed as soon as its path implies Q's
atoms (one LP per atom of Q not on the path): the union of its cells is the path's polyhedron, which
then lies in Q, so the tree grows with the regimes, not the cells.

A proof that is not fully certified (a refuted or unknown claim, a cell decided by SMT without a
certificate, a monotone claim over several polyhedra) is exported anyway, marked incomplete with the
reason: the checker then says NOT certified.  Exact numbers are strings "p/q", never floats.
"""

from __future__ import annotations

from verifier.expressions.expr import to_text

import json
from fractions import Fraction
from typing import Sequence

from verifier.expressions.expr import Affine, Expr, Max, Min, Sum, ZERO_AFFINE, format_number
from verifier.expressions.region import Atom
from verifier.geometry.farkas import Farkas, check_farkas, farkas
from verifier.geometry.lp import ONE, ZERO, rows_of, solve_standard
from verifier.geometry.shape import difference
from verifier.regimes.cell_proof import Bound, Piece
from verifier.regimes.spec import spec_of

FORMAT = "gdof-workbench-certificate"
VERSION = 2   # 2: cell leaves may prove containment (`farkas`); version 1 files read the same
CAUTION = ("GDoF statements are asymptotic in SNR: a certificate proves the claim exactly as encoded "
           "here and nothing about rates at any finite SNR.")


class ExportError(Exception):
    """The coverage tree cannot be built (the proof object is not what the exporter expects)."""


# ---------------------------------------------------------------------------------------------
# data of expressions, atoms and proofs
# ---------------------------------------------------------------------------------------------

def num(q) -> str:
    if type(q) is not Fraction:    # ints and the like; a Fraction is printed as it is
        q = Fraction(q)
    return format_number(q)


def affine_data(a: Affine) -> dict:
    return {"coeffs": {n: num(c) for n, c in a.coeffs}, "const": num(a.const)}


def atom_data(a: Atom) -> dict:
    return {"form": affine_data(a.form), "strict": a.strict}


def expr_data(e: Expr) -> dict:
    if isinstance(e, Affine):
        return {"op": "affine", **affine_data(e)}
    if isinstance(e, Sum):
        return {"op": "sum", "affine": affine_data(e.affine), "terms": [expr_data(t) for t in e.terms]}
    if isinstance(e, (Min, Max)):
        return {"op": "min" if isinstance(e, Min) else "max", "args": [expr_data(x) for x in e.args]}
    raise TypeError(f"unknown expression node {type(e).__name__}")


def farkas_data(f: Farkas) -> dict:
    return {"const": num(f.const), "mult": [[i, num(y)] for i, y in f.mult]}


def piece_data(p: Piece) -> dict:
    if p.kind == "affine":
        return {"kind": "affine"}
    if p.kind == "sum":
        return {"kind": "sum", "subs": [piece_data(s) for s in p.subs]}
    return {"kind": "extremum", "index": p.index, "active": piece_data(p.subs[0]),
            "bounds": [bound_data(b) for b in p.bounds]}


def bound_data(b: Bound) -> dict:
    if b.kind == "farkas":
        return {"kind": "farkas", "piece": piece_data(b.piece), "farkas": farkas_data(b.cert)}
    if b.kind == "one":
        return {"kind": "one", "index": b.index, "bound": bound_data(b.subs[0])}
    return {"kind": "all", "bounds": [bound_data(s) for s in b.subs]}


def certificate_data(cert) -> dict:
    return {"pieces": [piece_data(p) for p in cert.pieces],
            "obligations": [farkas_data(f) for f in cert.farkas]}


# ---------------------------------------------------------------------------------------------
# emptiness certificates and the coverage tree
# ---------------------------------------------------------------------------------------------

def empty_certificate(atoms: Sequence[Atom]) -> Farkas | None:
    """A Farkas certificate of '0 > 0' on the polyhedron `atoms` (so it is empty), or None.

    0 == const + sum y_i atoms_i identically with const, y >= 0 and const + (y on strict atoms) = 1:
    then sum y_i atoms_i is the constant -const <= 0, negative or with weight on a strict atom, which
    no point satisfies (Motzkin: such y exist exactly when the polyhedron is empty).  One LP."""
    names = sorted({n for a in atoms for n, _ in a.form.coeffs})
    rows = rows_of([a.form for a in atoms], names)
    m = len(rows)
    M = [[rows[i][0][k] for i in range(m)] + [ZERO] for k in range(len(names))]
    M.append([rows[i][1] for i in range(m)] + [ONE])
    M.append([ONE if a.strict else ZERO for a in atoms] + [ONE])
    res = solve_standard([ZERO] * (m + 1), M, [ZERO] * (len(names) + 1) + [ONE])
    if res.status != "optimal":
        return None
    cert = Farkas(res.y[m], tuple((i, y) for i, y in enumerate(res.y[:m]) if y))
    return cert if check_farkas(ZERO_AFFINE, atoms, cert, True) else None


class _Coverage:
    """Builds the coverage tree of each region piece from the cells' atom sequences.

    `held[i]`: the index of the exported polyhedron that holds decomposition cell i; `own[i]`:
    whether that polyhedron is the cell itself (its atoms are then all on the cell's path)."""

    def __init__(self, pieces: Sequence[tuple[Atom, ...]], cells: Sequence[tuple[Atom, ...]],
                 held: Sequence[int], own: Sequence[bool], exported: Sequence[tuple[Atom, ...]],
                 names: Sequence[str]):
        self.pieces = [tuple(p) for p in pieces]
        self.cells = cells
        self.held, self.own, self.exported, self.names = held, own, exported, tuple(names)

    def tree(self, k: int, members: list[int]) -> dict:
        root = self.pieces[k]
        for i in members:
            if self.cells[i][:len(root)] != root:
                raise ExportError(f"cell {i} does not start with the atoms of region piece {k}")
        return self._build(root, members, k)

    def _build(self, path: tuple[Atom, ...], members: list[int], k: int) -> dict:
        if not members:
            return self._missing(path, k)
        d = len(path)
        leaf = self._within(path, members)
        if leaf is not None:
            return leaf
        done = next((i for i in members if len(self.cells[i]) == d), None)
        if done is not None:
            return {"node": "cell", "cell": self.held[done]}
        groups: dict[Atom, list[int]] = {}
        for i in members:
            groups.setdefault(self.cells[i][d], []).append(i)
        first = next(iter(groups))
        if len(groups) > 2 or (len(groups) == 2 and set(groups) != {first, first.negated()}):
            raise ExportError("cells do not split by one atom and its negation at position "
                              f"{d} of region piece {k}")
        return self._split(path, first, groups.get(first, []), groups.get(first.negated(), []), k)

    def _within(self, path, members) -> dict | None:
        """A `cell` leaf with containment multipliers when every member lies in one merged polytope
        whose atoms the path implies; None otherwise (the caller splits further)."""
        target = self.held[members[0]]
        if self.own[members[0]] or any(self.held[i] != target for i in members):
            return None
        have, proofs = set(path), []
        for a in self.exported[target]:
            if a in have:
                proofs.append(None)
                continue
            cert = farkas(a.form, path, self.names, a.strict)
            if cert is None:
                return None
            proofs.append(farkas_data(cert))
        if all(x is None for x in proofs):
            return {"node": "cell", "cell": target}
        return {"node": "cell", "cell": target, "farkas": proofs}

    def _split(self, path, a: Atom, yes: list[int], no: list[int], k: int) -> dict:
        return {"node": "split", "atom": atom_data(a), "holds": self._build(path + (a,), yes, k),
                "fails": self._build(path + (a.negated(),), no, k)}

    def _missing(self, path: tuple[Atom, ...], k: int) -> dict:
        """A part of piece k without cells: inside an earlier piece, empty, or (as in
        lp_shape.difference) split by the atoms of earlier pieces until it is."""
        have = set(path)
        for j in range(k):
            if set(self.pieces[j]) <= have:
                return {"node": "inside", "piece": j}
        cert = empty_certificate(path)
        if cert is not None:
            return {"node": "empty", "farkas": farkas_data(cert)}
        for j in range(k):
            if not any(q.negated() in have for q in self.pieces[j]):
                q = next(q for q in self.pieces[j] if q not in have)
                return self._split(path, q, [], [], k)
        raise ExportError(f"part of region piece {k} is covered by no cell: "
                          + ", ".join(a.text() for a in path))


def _origins(spec) -> list[int]:
    """For each disjoint piece (regimes.disjoint_pieces order) the region piece it comes from."""
    out, done = [], []
    for k, piece in enumerate(spec.region.pieces):
        out += [k] * len(difference(piece.atoms, done, spec.names))
        done.append(piece.atoms)
    return out


# ---------------------------------------------------------------------------------------------
# the export
# ---------------------------------------------------------------------------------------------

def claim_data(proof, spec) -> dict:
    c = proof.claim
    return {"text": c.text(), "name": c.name, "kind": c.kind, "relation": spec.rel,
            "gap": None if spec.gap is None else num(spec.gap),
            "param": spec.param, "increasing": spec.increasing,
            "values": {n: num(v) for n, v in c.values},
            "subst": {n: to_text(e) for n, e in c.subst}, "swap": list(c.swap) if c.kind == "symmetric" else [],
            "labels": list(spec.labels), "exprs": [expr_data(e) for e in spec.exprs]}


def export_proof(proof) -> dict:
    """The proof (a verifier.regimes.proof.RegimeProof, which imports this module) as JSON-ready data (see the module docstring); never raises for an incomplete
    proof, which is marked `complete: false` with the reasons in `incomplete`."""
    spec = spec_of(proof.claim)
    reasons = []
    if proof.status != "proved":
        reasons.append(f"the claim is {proof.status}, not proved" + (f" ({proof.detail})" if proof.detail else ""))
    if spec.kind == "monotone" and len(spec.region.pieces) != 1:
        reasons.append(f"a monotone claim over {len(spec.region.pieces)} polyhedra: the slope argument "
                       "needs the region to be one (convex) polyhedron")
    cells, atoms, held, own, exported, origin_piece = [], [], [], [], [], []
    for regime in proof.regimes:
        certs = regime.certificates
        first = len(cells)
        for cert in certs:
            exported.append(tuple(cert.atoms))
            cells.append({"regime": regime.index, "status": "proved",
                          "atoms": [atom_data(a) for a in cert.atoms], "certificate": certificate_data(cert)})
        cover = regime.cover or (None,) * len(regime.cells)
        for cell, k in zip(regime.cells, cover):
            atoms.append(tuple(cell.atoms))
            origin_piece.append(cell.piece)
            if k is None:
                held.append(len(cells))
                own.append(True)
                exported.append(tuple(cell.atoms))
                cells.append({"regime": regime.index, "status": getattr(cell.extra, "status", "unknown"),
                              "atoms": [atom_data(a) for a in cell.atoms], "certificate": None})
            else:
                held.append(first + k)
                own.append(exported[first + k] == tuple(cell.atoms))
    missing = sum(c["certificate"] is None for c in cells)
    if not cells:
        reasons.append("the proof has no cells")
    elif missing:
        reasons.append(f"{missing} of {len(atoms)} cells have no certificate (refuted, or decided by SMT)")
    coverage = []
    try:
        origin = _origins(spec)
        builder = _Coverage([p.atoms for p in spec.region.pieces], atoms, held, own, exported, spec.names)
        for k in range(len(spec.region.pieces)):
            members = [i for i in range(len(atoms)) if origin[origin_piece[i]] == k]
            coverage.append(builder.tree(k, members))
    except (ExportError, IndexError) as exc:
        reasons.append(f"coverage tree not built: {exc}")
        coverage = []
    return {"format": FORMAT, "version": VERSION, "complete": not reasons, "incomplete": "; ".join(reasons),
            "claim": claim_data(proof, spec), "names": list(spec.names),
            "region": [[atom_data(a) for a in p.atoms] for p in spec.region.pieces],
            "cells": cells, "coverage": coverage, "caution": CAUTION}


def export_json(proof) -> str:
    """export_proof as JSON text (compact: coverage trees can be deep)."""
    return json.dumps(export_proof(proof), ensure_ascii=False, separators=(",", ":")) + "\n"
