"""Which inequality of an H-form region is a facet where: exactly, over a whole exponent region.

Why through the scalar engine: facet j is redundant at theta exactly when the largest value of its left
side over the other constraints is at most its right side (support.py turns that maximum into an
ordinary PL expression), so "facet j is redundant on R" is an ordinary scalar claim.  Decided by the
region-wise prover, its failure set is the exact set of exponents where facet j cuts the region, and
its thresholds are where the facet appears or vanishes.  The decider is passed in (the workbench
uses verifier.regimes.proof.prove_by_regimes; the default one-shot prover only says whether).
"""

from __future__ import annotations

from dataclasses import dataclass

from verifier.core.budget import Budget, OutOfBudget
from verifier.core.errors import InputError
from verifier.expressions.region import Region

from verifier.rates.claims import redundant, without_facet
from verifier.rates.region import HRegion, RateInequality

MAX_FACETS = 24   # facets examined per region (each is a region-wise proof of its own)


@dataclass(frozen=True)
class FacetActivity:
    """status: 'redundant' (implied everywhere on R), 'facet' (cuts the region somewhere: `where`
    lists the exact pieces, `thresholds` the hyperplanes between regimes) or 'unknown' (`where` says why)."""

    index: int
    inequality: RateInequality
    status: str
    where: tuple[str, ...] = ()
    thresholds: tuple[str, ...] = ()
    note: str = ""


def facet_activity(region: HRegion, R: Region, decide_scalar, budget: Budget) -> list[FacetActivity]:
    """One FacetActivity per inequality (at most MAX_FACETS); `decide_scalar(claim, budget)` returns
    a Verdict or RegimeProof (its `failure` and `thresholds`, when present, are reported)."""
    from verifier.rates.decide import scalar_claim
    out = []
    for j, q in enumerate(region.inequalities[:MAX_FACETS]):
        try:
            budget.check("facets of a region")
            result = decide_scalar(scalar_claim(without_facet(redundant(region, j, R))), budget)
        except InputError as err:          # the facet's left side is unbounded without it: a facet
            out.append(FacetActivity(j, q, "facet", note=f"wherever the region is not empty: without it "
                                     f"its left side is unbounded ({err.message})"))
            continue
        except OutOfBudget as exc:
            out.append(FacetActivity(j, q, "unknown", (str(exc),)))
            continue
        out.append(_activity(j, q, result))
    return out


def _activity(j: int, q: RateInequality, result) -> FacetActivity:
    if result.status == "proved":
        return FacetActivity(j, q, "redundant")
    if result.status != "refuted":
        return FacetActivity(j, q, "unknown", (result.detail or "undecided",))
    failure = getattr(result, "failure", None)
    pieces = [p.polyhedron for p in failure.pieces] if failure is not None else []
    order = tuple(getattr(result, "names", ()))
    where = _intervals(pieces) or tuple(_tidy(p, order, several=len(pieces) > 1) for p in pieces)
    cuts = tuple(t.text for t in getattr(result, "thresholds", ()))
    return FacetActivity(j, q, "facet", where, cuts)


def _tidy(poly, order=(), several: bool = False) -> str:
    """A piece as short text: implied constraints dropped (exact Farkas test), then shown in the
    display form of verifier.expressions.display (one normal form per hyperplane, chains, the
    parameters in `order`); in parentheses when it is one of several pieces and has several parts."""
    from verifier.expressions.display import display_parts
    from verifier.geometry.shape import irredundant
    names = sorted(poly.params())
    kept, _ = irredundant(poly.atoms, names) if poly.atoms else ((), ())
    parts = display_parts(kept, order)
    text = ", ".join(parts) or "everywhere"
    return f"({text})" if several and len(parts) > 1 else text


def _later(a, b):
    """The upper bound further right ((None, _) is +infinity; at one value a closed end is later)."""
    if a[0] is None or b[0] is None:
        return (None, False)
    if a[0] != b[0]:
        return a if a[0] > b[0] else b
    return a if not a[1] else b


def _intervals(pieces) -> tuple[str, ...]:
    """Pieces in one parameter merged into maximal intervals, as text (() when not one parameter)."""
    from verifier.expressions.expr import format_number as fmt
    names = set().union(*(p.params() for p in pieces)) if pieces else set()
    if len(names) != 1:
        return ()
    (x,) = names
    spans = []
    for p in pieces:
        lo, hi = (None, False), (None, False)          # (value, open)
        for a in p.atoms:
            c, k = a.form.coeff(x), a.form.const
            if c > 0 and (lo[0] is None or -k / c > lo[0] or (-k / c == lo[0] and a.strict)):
                lo = (-k / c, a.strict)
            elif c < 0 and (hi[0] is None or k / -c < hi[0] or (k / -c == hi[0] and a.strict)):
                hi = (k / -c, a.strict)
        spans.append((lo, hi))
    spans.sort(key=lambda s: (s[0][0] is not None, s[0][0] or 0, s[0][1]))
    merged = [spans[0]]
    for lo, hi in spans[1:]:
        plo, phi = merged[-1]
        touching = phi[0] is None or lo[0] is None or lo[0] < phi[0] or (lo[0] == phi[0] and not (lo[1] and phi[1]))
        if touching:
            merged[-1] = (plo, _later(phi, hi))
        else:
            merged.append((lo, hi))

    def text(lo, hi):
        left = f"{fmt(lo[0])} {'<' if lo[1] else '<='} " if lo[0] is not None else ""
        right = f" {'<' if hi[1] else '<='} {fmt(hi[0])}" if hi[0] is not None else ""
        if not left and not right:
            return f"every {x}"
        if not left:
            return f"{x}{right}"
        if not right:
            return f"{x} {'>' if lo[1] else '>='} {fmt(lo[0])}"
        return f"{left}{x}{right}"
    return tuple(text(lo, hi) for lo, hi in merged)


def activity_lines(region: HRegion, activities) -> list[str]:
    """Plain lines for reports: one per inequality, saying where it is a facet."""
    lines = [f"facets of {region.name}:"]
    for a in activities:
        head = f"  {a.index + 1}. {a.inequality.text()}: "
        if a.status == "redundant":
            lines.append(head + "redundant on the whole claim region")
        elif a.status == "facet" and a.note:
            lines.append(head + "a facet " + a.note)
        elif a.status == "facet":
            lines.append(head + "a facet where " + (" or ".join(a.where) if a.where else "somewhere (see the claim)"))
        else:
            lines.append(head + "undecided (" + "; ".join(a.where) + ")")
    if len(region.inequalities) > MAX_FACETS:
        lines.append(f"  ... {len(region.inequalities) - MAX_FACETS} more inequalities not examined "
                     f"(limit {MAX_FACETS})")
    return lines
