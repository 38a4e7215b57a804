"""Solver-free certificates that a claim holds on one cell, and their independent checker.

Why: an SMT 'unsat' must be taken on trust; a certificate can be re-checked by anyone with rational
arithmetic.  A certificate for a cell (a conjunction of atoms a_i >= 0 / a_i > 0) holds
1. for each compared expression a Piece proof (cell_proof): which argument of each min/max is the
   active one, and Farkas multipliers showing every other argument is on the right side of it --
   so the expression provably equals one affine form on the cell;
2. for each obligation o of the claim (regime_spec: e.g. R - L >= 0 for L <= R) Farkas multipliers
   y >= 0, c >= 0 with o == c + sum y_i a_i identically; for o > 0 also c > 0 or y_i > 0 on a
   strict atom.  Then o >= 0 (> 0) at every point of the cell.
`check_certificate` recomputes everything from the expression trees with its own small affine
arithmetic over Fractions; it imports nothing from the LP, decomposition or SMT code, so a bug there
cannot make a wrong certificate pass.  Any malformed or tampered field makes it return False.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Sequence

from verifier.expressions.expr import Affine, Expr, Max, Min, Sum
from verifier.expressions.region import Atom
from verifier.geometry.farkas import Farkas, farkas, remember, reused
from verifier.regimes.cell_proof import Bound, Piece
from verifier.regimes.spec import Spec, obligations


@dataclass(frozen=True)
class Certificate:
    """Everything needed to re-check 'the claim holds on the polyhedron `atoms`' by hand."""

    kind: str                      # 'compare' | 'monotone'
    atoms: tuple[Atom, ...]
    exprs: tuple[Expr, ...]        # (L, R) or (f,)
    pieces: tuple[Piece, ...]      # one per expression
    farkas: tuple[Farkas, ...]     # one per obligation, in order
    rel: str = "=="
    gap: Fraction | None = None
    param: str = ""
    increasing: bool = True


def certify(spec: Spec, atoms: Sequence[Atom], forms, pieces, names) -> Certificate | None:
    """The certificate of the claim on a cell where spec.exprs have these forms and proofs, or
    None when some obligation is not implied by the cell (the claim fails somewhere in it)."""
    certs = []
    for ob in obligations(spec, tuple(forms)):
        key = ("obligation", ob.form, ob.strict)
        cert = reused(key, atoms)
        if cert is None:
            cert = farkas(ob.form, atoms, names, ob.strict)
            remember(key, atoms, cert)
        if cert is None:
            return None
        certs.append(cert)
    return Certificate(spec.kind, tuple(atoms), tuple(spec.exprs), tuple(pieces), tuple(certs),
                       spec.rel, spec.gap, spec.param, spec.increasing)


# ---------------------------------------------------------------------------------------------
# the independent checker: affine forms are (dict name -> Fraction, constant)
# ---------------------------------------------------------------------------------------------

def _lin(e: Affine):
    return {n: Fraction(c) for n, c in e.coeffs}, Fraction(e.const)


def _plus(f, g, k=Fraction(1)):
    out = dict(f[0])
    for n, c in g[0].items():
        out[n] = out.get(n, 0) + k * c
    return {n: c for n, c in out.items() if c != 0}, f[1] + k * g[1]


def _farkas_ok(target, atoms, cert, strict: bool) -> bool:
    if not isinstance(cert, Farkas) or cert.const < 0:
        return False
    coeffs: dict = {}
    const = Fraction(cert.const)
    for i, y in cert.mult:
        if not (isinstance(i, int) and 0 <= i < len(atoms)) or y <= 0:
            return False
        for n, c in atoms[i].form.coeffs:
            coeffs[n] = coeffs.get(n, 0) + y * c
        const += y * atoms[i].form.const
    if {n: c for n, c in coeffs.items() if c != 0} != {n: c for n, c in target[0].items() if c != 0} \
            or const != target[1]:
        return False
    return not strict or cert.const > 0 or any(atoms[i].strict for i, _ in cert.mult)


def _piece_form(e: Expr, p: Piece, atoms):
    """The affine form `e` provably equals on the cell, or None."""
    if not isinstance(p, Piece):
        return None
    if p.kind == "affine":
        return _lin(e) if isinstance(e, Affine) else None
    if p.kind == "sum":
        if not isinstance(e, Sum) or len(p.subs) != len(e.terms):
            return None
        total = _lin(e.affine)
        for t, sub in zip(e.terms, p.subs):
            f = _piece_form(t, sub, atoms)
            if f is None:
                return None
            total = _plus(total, f)
        return total
    if p.kind != "extremum" or not isinstance(e, (Min, Max)) or not 0 <= p.index < len(e.args):
        return None
    if len(p.subs) != 1 or len(p.bounds) != len(e.args) - 1:
        return None
    g = _piece_form(e.args[p.index], p.subs[0], atoms)
    if g is None:
        return None
    others = [a for i, a in enumerate(e.args) if i != p.index]
    ok = all(_bound_ok(a, g, isinstance(e, Min), b, atoms) for a, b in zip(others, p.bounds))
    return g if ok else None


def _bound_ok(e: Expr, g, ge: bool, b: Bound, atoms) -> bool:
    """Does `b` prove e >= g (ge) or e <= g on the cell?"""
    if not isinstance(b, Bound):
        return False
    if b.kind == "farkas":
        f = _piece_form(e, b.piece, atoms)
        if f is None:
            return False
        diff = _plus(f, g, Fraction(-1)) if ge else _plus(g, f, Fraction(-1))
        return _farkas_ok(diff, atoms, b.cert, False)
    one_kind = Max if ge else Min
    all_kind = Min if ge else Max
    if b.kind == "one" and isinstance(e, one_kind):
        return 0 <= b.index < len(e.args) and len(b.subs) == 1 and \
            _bound_ok(e.args[b.index], g, ge, b.subs[0], atoms)
    if b.kind == "all" and isinstance(e, all_kind):
        return len(b.subs) == len(e.args) and \
            all(_bound_ok(a, g, ge, s, atoms) for a, s in zip(e.args, b.subs))
    return False


def _obligations(cert: Certificate, forms):
    """(target form, strict) per obligation, recomputed here without regime_spec."""
    if cert.kind == "monotone":
        slope = forms[0][0].get(cert.param, Fraction(0))
        return [(({}, slope if cert.increasing else -slope), False)]
    d = _plus(forms[0], forms[1], Fraction(-1))
    neg = _plus(({}, Fraction(0)), d, Fraction(-1))
    if cert.gap is not None:
        c = ({}, Fraction(cert.gap))
        return [(_plus(c, neg), False), (_plus(c, d), False)]
    table = {"<=": [(neg, False)], "<": [(neg, True)], ">=": [(d, False)], ">": [(d, True)],
             "==": [(d, False), (neg, False)]}
    return table[cert.rel]


def check_certificate(cert: Certificate) -> bool:
    """True iff the certificate proves its claim on its cell, by plain Fraction arithmetic."""
    try:
        expected = 1 if cert.kind == "monotone" else 2
        if cert.kind not in ("compare", "monotone") or len(cert.exprs) != expected \
                or len(cert.pieces) != expected:
            return False
        if cert.kind == "compare" and cert.gap is None and cert.rel not in ("<=", "<", ">=", ">", "=="):
            return False
        atoms = cert.atoms
        forms = [_piece_form(e, p, atoms) for e, p in zip(cert.exprs, cert.pieces)]
        if any(f is None for f in forms):
            return False
        obs = _obligations(cert, forms)
        return len(obs) == len(cert.farkas) and \
            all(_farkas_ok(t, atoms, c, s) for (t, s), c in zip(obs, cert.farkas))
    except (TypeError, ValueError, AttributeError, IndexError, KeyError):
        return False


# ---------------------------------------------------------------------------------------------
# compact transport between processes (plain tuples of ints unpickle an order of magnitude faster
# than trees of dataclasses holding Fractions)
# ---------------------------------------------------------------------------------------------

def pack(x, memo=None):
    """A Piece / Bound / Farkas tree as nested tuples of str and int (shared subtrees once)."""
    memo = {} if memo is None else memo
    if x is None:
        return None
    if id(x) in memo:
        return memo[id(x)]
    if isinstance(x, Farkas):
        out = (2, x.const.numerator, x.const.denominator, tuple((i, y.numerator, y.denominator) for i, y in x.mult))
    elif isinstance(x, Piece):
        out = (0, x.kind, tuple(pack(s, memo) for s in x.subs), x.index, tuple(pack(b, memo) for b in x.bounds))
    else:
        out = (1, x.kind, tuple(pack(s, memo) for s in x.subs), x.index, pack(x.piece, memo), pack(x.cert, memo))
    memo[id(x)] = out
    return out


def unpack(t, memo=None):
    """Inverse of pack."""
    memo = {} if memo is None else memo
    if t is None:
        return None
    if id(t) in memo:
        return memo[id(t)]
    if t[0] == 2:
        out = Farkas(Fraction(t[1], t[2]), tuple((i, Fraction(n, d)) for i, n, d in t[3]))
    elif t[0] == 0:
        out = Piece(t[1], tuple(unpack(s, memo) for s in t[2]), t[3], tuple(unpack(b, memo) for b in t[4]))
    else:
        out = Bound(t[1], tuple(unpack(s, memo) for s in t[2]), t[3], unpack(t[4], memo), unpack(t[5], memo))
    memo[id(t)] = out
    return out
