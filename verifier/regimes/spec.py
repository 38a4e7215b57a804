"""What the region-wise prover decides for each claim kind, stated once.

Why a separate spec: decomposition, verdicts, certificates and failure sets all need the same three
facts about a claim -- which expressions must be affine on a cell, over which region and parameters,
and which affine inequalities ("obligations") must hold on a cell once those expressions are affine.
Kinds map as follows:
- relation `L rel R`:            obligations on D = L - R (D >= 0, D > 0, -D >= 0, -D > 0, or both);
- within c:                      c - D >= 0 and c + D >= 0;
- reduces-to, symmetric:         the compared pair (claims.compared_exprs) as an equality over
                                 claims.witness_region;
- monotone in p:                 one expression f over the claim's own region; on a cell the
                                 obligation is the constant (coefficient of p in f's piece) >= 0
                                 (<= 0 when non-increasing).  Why slopes suffice is argued in
                                 regime_proof (convex region, continuity).
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction

from verifier.claims.kinds import (compared_exprs, own_region, primed, substitution, witness_names,
    witness_region, Claim)
from verifier.expressions.expr import add, const, rename, scale, substitute, Affine, Expr
from verifier.expressions.region import Atom, Region


@dataclass(frozen=True)
class Spec:
    kind: str                      # 'compare' or 'monotone'
    names: tuple[str, ...]         # parameters of the space the regimes live in (sorted)
    region: Region
    exprs: tuple[Expr, ...]        # (L, R) for 'compare', (f,) for 'monotone'
    labels: tuple[str, ...]        # how each expression is called in reports
    rel: str = "=="                # 'compare': L rel R
    gap: Fraction | None = None    # 'compare' from a within claim: |L - R| <= gap
    param: str = ""                # 'monotone'
    increasing: bool = True
    parts: tuple[tuple[int, str, Expr], ...] = ()  # (side index, part name, expression)

    def __getstate__(self):
        """Pickle without per-process caches (regime_work keeps node numbers keyed by object id)."""
        return {k: v for k, v in self.__dict__.items() if not k.startswith("_")}


def spec_of(claim: Claim) -> Spec:
    left, right = compared_exprs(claim)
    fixed = substitution(claim)   # a slice claim's parts, like its sides, in the remaining names
    lhs_parts = [(n, substitute(e, fixed) if fixed else e) for n, e in claim.lhs.parts]
    if claim.kind == "monotone":
        names = tuple(n for n in witness_names(claim) if n != primed(claim.param))
        return Spec("monotone", names, own_region(claim), (left,), (claim.lhs.text(),),
                    param=claim.param, increasing=claim.increasing,
                    parts=tuple((0, n, e) for n, e in lhs_parts))
    names = tuple(witness_names(claim))
    labels = (claim.lhs.text(), claim.rhs.text() if claim.rhs is not None else _swapped_label(claim))
    parts = [(0, n, e) for n, e in lhs_parts]
    if claim.kind == "symmetric":
        p, q = claim.swap
        parts += [(1, n, rename(e, {p: q, q: p})) for n, e in lhs_parts]
    elif claim.rhs is not None:
        parts += [(1, n, substitute(e, fixed) if fixed else e) for n, e in claim.rhs.parts]
    rel = claim.rel if claim.kind == "relation" else "=="
    gap = claim.gap if claim.kind == "within" else None
    return Spec("compare", names, witness_region(claim), (left, right), labels, rel, gap,
                parts=tuple(parts))


def _swapped_label(claim: Claim) -> str:
    p, q = claim.swap
    return f"{claim.lhs.text()} with {p} and {q} swapped"


def targets(spec: Spec) -> tuple[Expr, ...]:
    """Every expression the cells must make affine: the compared ones, then each named part."""
    out = {e.key: e for e in spec.exprs}
    for _, _, e in spec.parts:
        out.setdefault(e.key, e)
    return tuple(out.values())


def obligations(spec: Spec, forms: tuple[Affine, ...]) -> tuple[Atom, ...]:
    """Affine facts that, all holding on a cell where the expressions equal `forms`, prove the claim
    there.  Each fails on the cell exactly where its negation (Atom.negated) is satisfiable."""
    if spec.kind == "monotone":
        slope = forms[0].coeff(spec.param)
        return (Atom(const(slope if spec.increasing else -slope), False),)
    d = add(forms[0], scale(-1, forms[1]))
    neg = scale(-1, d)
    if spec.gap is not None:
        return (Atom(add(const(spec.gap), neg), False), Atom(add(const(spec.gap), d), False))
    table = {"<=": ((neg, False),), "<": ((neg, True),), ">=": ((d, False),), ">": ((d, True),),
             "==": ((d, False), (neg, False))}
    return tuple(Atom(f, s) for f, s in table[spec.rel])


def violation_amount(ob: Atom) -> Affine:
    """How badly an obligation fails at a point: the negated form (positive where it fails)."""
    return scale(-1, ob.form)
