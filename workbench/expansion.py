"""Claims that mention a bound given regime by regime.

A regime-wise name is a placeholder parameter inside the claim's sides.  If its regimes form one
continuous function (verified min/max form exists) the placeholder is replaced by that form: one claim,
and the regime report sees ordinary min/max.  Otherwise the claim splits into one sub-claim per
combination of regimes, each over the claim's region intersected with those regimes: exact for
discontinuous schemes too.  In both cases the claim records which regime sets must cover its region,
since a claim about a scheme is unsupported where the scheme says nothing (a forgotten regime).
"""

from __future__ import annotations

from dataclasses import replace
from itertools import product

from verifier.claims.kinds import Claim, Side
from verifier.core.errors import InputError
from verifier.expressions.expr import params, substitute
from verifier.expressions.region import Region


def _mentioned(claim: Claim) -> set[str]:
    names = set()
    for side in (claim.lhs, claim.rhs):
        if side is not None:
            names |= params(side.expr)
            for _, e in side.parts:
                names |= params(e)
    return names


def _subst_side(side: Side | None, mapping) -> Side | None:
    if side is None:
        return None
    return Side(substitute(side.expr, mapping), side.label,
                tuple((n, substitute(e, mapping)) for n, e in side.parts))


def substitute_claim(claim: Claim, mapping, region: Region | None = None) -> Claim:
    """The claim with names replaced in both sides (and parts), optionally over a smaller region."""
    out = replace(claim, lhs=_subst_side(claim.lhs, mapping), rhs=_subst_side(claim.rhs, mapping))
    if region is not None:
        out = replace(out, region=region)
    names = set(out.params) - set(mapping)
    return replace(out, params=tuple(sorted(names | set(out.region.params()))))


def expand(case_claim, case) -> None:
    """Fill case_claim.subclaims and case_claim.coverage (see the module docstring)."""
    claim = case_claim.claim
    used = sorted(_mentioned(claim) & set(case.piecewise))
    case_claim.coverage = [(n, Region(tuple(p for piece in case.piecewise[n].pieces
                                           for p in piece.where.pieces))) for n in used]
    smooth = {n: case.piecewise[n].expr for n in used if case.piecewise[n].expr is not None}
    rough = [n for n in used if n not in smooth]
    covered = claim.region
    for n in smooth:  # never judge a value the scheme does not define: stay inside its regimes
        covered = covered.meet(dict(case_claim.coverage)[n])
    claim = substitute_claim(claim, smooth, covered if smooth else None)
    case_claim.blocked = ""
    if not rough:
        case_claim.subclaims = [("", claim)]
        return
    if claim.kind in ("monotone", "symmetric"):
        check = case.piecewise[rough[0]]
        if check.form == "unknown":   # undecided is no input error: the claim stays unknown
            case_claim.subclaims = []
            case_claim.blocked = (f"'{rough[0]}' is given regime by regime and {check.detail}; a "
                                  f"{claim.kind} claim needs one formula")
            return
        raise InputError(f"'{rough[0]}' is given regime by regime and is not one continuous function "
                         f"({check.detail}); a {claim.kind} claim needs one formula")
    subclaims = []
    for combo in product(*(list(enumerate(case.piecewise[n].pieces, 1)) for n in rough)):
        region = claim.region
        for _, piece in combo:
            region = region.meet(piece.where)
        label = "; ".join(f"{n}: regime {k} ({piece.where.text()})" for n, (k, piece) in zip(rough, combo))
        mapping = {n: piece.formula for n, (_, piece) in zip(rough, combo)}
        subclaims.append((label, substitute_claim(claim, mapping, region)))
    case_claim.subclaims = subclaims
