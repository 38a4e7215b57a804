"""The affine piece of an expression on a cell, with a proof; or the hyperplane that must split the cell.

Why lazy: min(1, max(a, b)) is the constant 1 wherever max(a, b) >= 1, whatever the sign of a - b,
so splitting the cell along a = b there would only multiply cells.  We therefore never ask "which
argument of every min/max is active" but "what must hold for the expression to equal one affine form
here", and prove only that:
- min(args) equals arg_j on the cell when arg_j has an affine piece g and every other argument is
  >= g on the cell (max: <= g);
- "e >= g" for a max needs one argument >= g, for a min all of them; for an affine e it is the
  affine fact e - g >= 0 on the cell, decided exactly by a sign check on the cell's generators
  (lp_vertices.Cone) while splitting, and certified by Farkas multipliers once the cell is final
  (with_certificates).
The argument chosen is the one active at the cell's interior point z (ties: each tied candidate is
tried).  When a needed fact fails, the difference d = e - g is >= 0 at z and < 0 somewhere in the
cell, so d takes both signs on the cell's relative interior: splitting by d = 0 leaves two non-empty
cells of the same dimension, and d never splits a descendant again (termination).

Proofs are plain frozen dataclasses referring to atoms by index; a child cell keeps its parent's
atoms as a prefix, so proofs found on a parent stay valid on its children (the memo is inherited,
keyed by node numbers that are the same in every process).
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Sequence

from verifier.expressions.expr import Affine, Expr, Max, Min, Sum, children, evaluate
from verifier.expressions.region import Atom
from verifier.geometry.farkas import Farkas, farkas, farkas_by_cone, remember, reused
from verifier.geometry.lp import ONE, combine


@dataclass(frozen=True)
class Piece:
    """Proof that an expression equals an affine form on the cell.

    kind 'affine': the expression is affine.  'sum': `subs` are the pieces of the Sum's terms.
    'extremum': argument `index` is the min/max on the cell; `subs` = (its piece,), `bounds` = one
    Bound per other argument (in argument order) showing it is >= (min) or <= (max) that piece."""

    kind: str
    subs: tuple = ()
    index: int = -1
    bounds: tuple = ()


@dataclass(frozen=True)
class Bound:
    """Proof that an expression is >= g (min context) or <= g (max context) on the cell.

    kind 'farkas': `piece` proves the expression equals an affine form f, and `cert` proves
    f - g >= 0 (or g - f >= 0).  'one': argument `index` alone suffices (max for >=, min for <=),
    proved by subs[0].  'all': every argument satisfies it (min for >=, max for <=), subs per argument."""

    kind: str
    subs: tuple = ()
    index: int = -1
    piece: Piece | None = None
    cert: Farkas | None = None


class NeedSplit(Exception):
    """The cell must be cut by `form = 0` before the requested proof can exist."""

    def __init__(self, form: Affine):
        super().__init__(str(form))
        self.form = form


def number_nodes(exprs: Sequence[Expr]) -> dict[int, int]:
    """id(node) -> a number shared by structurally equal nodes, the same in every process that
    numbers the same expressions (memo keys must survive pickling; ids and big hashes do not)."""
    by_key: dict = {}
    ids: dict[int, int] = {}
    stack = list(reversed(exprs))
    while stack:
        e = stack.pop()
        if id(e) in ids:
            continue
        ids[id(e)] = by_key.setdefault(e.key, len(by_key))
        stack.extend(reversed(children(e)))
    return ids


class CellProver:
    """Builds Piece proofs on one cell, sharing a memo with ancestors.

    With `cone` (the cell's generators, lp_vertices.Cone) each "d >= 0 on the cell" is a sign check
    per generator and bounds carry no certificate yet (cert=None): that is how cells are split.
    Without it each is an LP whose dual is the Farkas certificate: that is how final cells are
    certified (see with_certificates for re-using a known proof structure)."""

    def __init__(self, atoms: Sequence[Atom], names: Sequence[str], point: dict, memo: dict | None = None,
                 numbers: dict | None = None, cone=None):
        self.atoms = list(atoms)
        self.names = tuple(names)
        self.point = point
        self.memo = memo if memo is not None else {}
        self.numbers = numbers if numbers is not None else {}
        self.cone = cone
        self.values: dict = {}
        self.failed: dict = {}  # checks that failed on this cell (not inherited: children differ)

    def num(self, e: Expr):
        n = self.numbers.get(id(e))
        return n if n is not None else e.key

    def value(self, e: Expr) -> Fraction:
        k = self.num(e)
        if k not in self.values:
            self.values[k] = evaluate(e, self.point)
        return self.values[k]

    # --- pieces -------------------------------------------------------------------------
    def piece(self, e: Expr) -> tuple[Affine, Piece]:
        key = ("p", self.num(e))
        if key not in self.memo:
            self.memo[key] = self._piece(e)
        return self.memo[key]

    def _piece(self, e: Expr):
        if isinstance(e, Affine):
            return e, Piece("affine")
        if isinstance(e, Sum):
            got = [self.piece(t) for t in e.terms]
            total = e.affine
            for f, _ in got:
                total = combine(total, f)
            return total, Piece("sum", tuple(p for _, p in got))
        ge = isinstance(e, Min)
        vals = [self.value(a) for a in e.args]
        best = min(vals) if ge else max(vals)
        first_failure = None
        for j in [k for k, v in enumerate(vals) if v == best]:
            try:
                g, sub = self.piece(e.args[j])
                bounds = tuple(self.bound(a, g, ge) for i, a in enumerate(e.args) if i != j)
                return g, Piece("extremum", (sub,), j, bounds)
            except NeedSplit as exc:
                first_failure = first_failure or exc
        raise first_failure

    # --- bounds -------------------------------------------------------------------------
    def bound(self, e: Expr, g: Affine, ge: bool) -> Bound:
        key = ("b", self.num(e), g, ge)
        if key not in self.memo:
            self.memo[key] = self._bound(e, g, ge)
        return self.memo[key]

    def _bound(self, e: Expr, g: Affine, ge: bool) -> Bound:
        if isinstance(e, (Min, Max)):
            one = isinstance(e, Max) == ge
            if not one:
                return Bound("all", tuple(self.bound(a, g, ge) for a in e.args))
            gv = g.const + sum((c * self.point[n] for n, c in g.coeffs), Fraction(0))
            vals = [self.value(a) for a in e.args]
            order = sorted((k for k, v in enumerate(vals) if (v >= gv if ge else v <= gv)),
                           key=lambda k: (-vals[k] if ge else vals[k], k))
            first_failure = None
            for k in order:
                try:
                    return Bound("one", (self.bound(e.args[k], g, ge),), k)
                except NeedSplit as exc:
                    first_failure = first_failure or exc
            raise first_failure
        f, piece = self.piece(e)
        diff = combine(f, g, -ONE) if ge else combine(g, f, -ONE)
        return Bound("farkas", piece=piece, cert=self._nonneg(diff))

    def _nonneg(self, diff: Affine) -> Farkas | None:
        if not diff.coeffs:
            if diff.const >= 0:
                return Farkas(diff.const, ())
            raise AssertionError("a constant difference is negative at an interior point")
        if diff in self.failed:
            raise self.failed[diff]
        if self.cone is not None:
            if self.cone.nonneg(diff):
                return None
            cert = None
        else:
            cert = farkas(diff, self.atoms, self.names, strict=False)
        if cert is None:
            self.failed[diff] = NeedSplit(diff)
            raise self.failed[diff]
        return cert


def affine_pieces(exprs: Sequence[Expr], atoms: Sequence[Atom], names: Sequence[str], point: dict,
                  memo: dict | None = None, numbers: dict | None = None, cone=None):
    """Affine forms and proofs of all `exprs` on the cell, or NeedSplit."""
    prover = CellProver(atoms, names, point, memo, numbers, cone)
    got = [prover.piece(e) for e in exprs]
    return tuple(f for f, _ in got), tuple(p for _, p in got)


def with_certificates(e: Expr, piece: Piece, atoms: Sequence[Atom], names: Sequence[str], cone=None,
                      memo: dict | None = None):
    """(form, the same proof with every Farkas certificate filled in) or None if one fails.

    With the cell's `cone` (built from exactly `atoms`) certificates come from its generators
    (lp_farkas.farkas_by_cone), else from a full LP.  `memo` (one per cell) certifies a shared
    subproof once: the prover's memo makes equal subexpressions share one Piece object, and
    memo["numbers"] (number_nodes of the expressions, when given) identifies equal subexpressions."""
    memo = {} if memo is None else memo
    numbers = memo.get("numbers", {})
    key = ("p", numbers.get(id(e), id(e)), id(piece))
    if key not in memo:
        memo[key] = _with_certificates(e, piece, atoms, names, cone, memo)
    return memo[key]


def _with_certificates(e, piece, atoms, names, cone, memo):
    if piece.kind == "affine":
        return e, piece
    if piece.kind == "sum":
        total, subs = e.affine, []
        for t, sub in zip(e.terms, piece.subs):
            got = with_certificates(t, sub, atoms, names, cone, memo)
            if got is None:
                return None
            total = combine(total, got[0])
            subs.append(got[1])
        return total, Piece("sum", tuple(subs))
    got = with_certificates(e.args[piece.index], piece.subs[0], atoms, names, cone, memo)
    if got is None:
        return None
    g, sub = got
    others = [a for i, a in enumerate(e.args) if i != piece.index]
    bounds = [_bound_certified(a, g, isinstance(e, Min), b, atoms, names, cone, memo)
              for a, b in zip(others, piece.bounds)]
    if any(b is None for b in bounds):
        return None
    return g, Piece("extremum", (sub,), piece.index, tuple(bounds))


def _bound_certified(e, g, ge, b: Bound, atoms, names, cone, memo):
    key = ("b", memo.get("numbers", {}).get(id(e), id(e)), id(b), g, ge)
    if key not in memo:
        memo[key] = _bound_certified_once(e, g, ge, b, atoms, names, cone, memo)
    return memo[key]


def _bound_certified_once(e, g, ge, b: Bound, atoms, names, cone, memo):
    if b.kind == "one":
        sub = _bound_certified(e.args[b.index], g, ge, b.subs[0], atoms, names, cone, memo)
        return None if sub is None else Bound("one", (sub,), b.index)
    if b.kind == "all":
        subs = [_bound_certified(a, g, ge, s, atoms, names, cone, memo) for a, s in zip(e.args, b.subs)]
        return None if any(s is None for s in subs) else Bound("all", tuple(subs))
    got = with_certificates(e, b.piece, atoms, names, cone, memo)
    if got is None:
        return None
    f, piece = got
    diff = combine(f, g, -ONE) if ge else combine(g, f, -ONE)
    reuse = b.cert is not None and not b.cert.mult  # a constant certificate holds on any cell
    if reuse:
        cert = b.cert
    elif ("f", diff) in memo:
        cert = memo[("f", diff)]
    else:
        cert = reused(diff, atoms)
        if cert is None:
            cert = farkas_by_cone(diff, atoms, cone) if cone is not None else farkas(diff, atoms, names, strict=False)
            remember(diff, atoms, cert)
        memo[("f", diff)] = cert
    return None if cert is None else Bound("farkas", piece=piece, cert=cert)

