"""GDoF claims as pytest assertions, for a researcher's own test suite.

    from workbench.assertions import assert_claim, assert_case

    def test_my_converse():
        assert_claim("min(1, alpha) <= 1 + alpha", where="alpha >= 0")
        assert_claim("w nondecreasing in alpha", where="alpha >= 1",
                     definitions={"w": "min(1, max(alpha/2, 1 - alpha/2), max(alpha, 1 - alpha))"})
        assert_claim("w == 1 - alpha", where="alpha <= 2/3", definitions=..., expect="refuted")
        assert_case("casebook/demo/cache_downlink_manuscript.toml")

Why an AssertionError carrying text, not a verdict object: pytest prints the message as the failure, so
the message holds what a reader needs to re-check the failure by hand: the exact point and both sides'
exact values.  Bad input (a typo in a name, an empty region) is not a failed claim: it raises the
engine's InputError, which pytest reports as an error rather than a failure.

Statements use the claim sentences of case files (workbench.statements): `A REL B`, `A within C of B`,
`A nondecreasing in p`, `A with p = v equals B`, `A symmetric in p, q`.
"""

from __future__ import annotations

from pathlib import Path
from typing import Iterable, Mapping

from verifier.claims import kinds as C
from verifier.claims.one_shot import Verdict, prove
from verifier.core.errors import CaseFileError, InputError, UnknownNameError
from verifier.expressions.expr import Expr, params, substitute
from verifier.expressions.region import Region
from verifier.text.parse import parse_expr, parse_region

from . import verdict_text as vt
from .casebook_cmd import CaseRun, run_case
from .casefile import VERDICTS
from .statements import Part, did_you_mean, explained, listing, parse_sentence, shifted


def assert_claim(statement_or_claim, region=None, names: Iterable[str] | None = None, *,
                 where: str | None = None, definitions: Mapping[str, object] | None = None,
                 expect: str = "proved", solver: str = "z3", timeout: float = 30.0,
                 cross_check: bool = False) -> Verdict:
    """Decide a claim and fail (AssertionError) unless its verdict is `expect`; returns the Verdict.

    `statement_or_claim`: a verifier.claims.kinds.Claim, or a claim sentence.  For a sentence, `region`
    (a Region or text) and `where` (text) both restrict the claim; `names` lists the parameters (default:
    those of the region, `where` and `definitions`; any other name is an error, never a new variable);
    `definitions` maps names to expressions (text or Expr) that the sentence may use, like the
    [formulas] of a case file.
    """
    if expect not in VERDICTS:
        raise InputError(f"expect must be one of {', '.join(VERDICTS)}, not '{expect}'")
    claim = _as_claim(statement_or_claim, region, names, where, definitions)
    verdict = prove(claim, solver, timeout, cross_check)
    if verdict.status != expect:
        raise AssertionError(failure_message(verdict, expect, solver, timeout))
    return verdict


def assert_case(path, solver: str = "z3", timeout: float = 30.0, cross_check: bool = False) -> CaseRun:
    """Fail unless every claim of a case file comes out as its declared `expect`; returns the run."""
    run = run_case(Path(path), solver, timeout, cross_check)
    if run.error:
        raise CaseFileError(run.error)
    if run.mismatches:
        n = len(run.mismatches)
        lines = [f"{vt.count(n, 'claim')} of {run.path} {'differs' if n == 1 else 'differ'} from the declared verdict:"]
        for cc, outcome in run.mismatches:
            declared = f"declared {cc.expect}" if cc.expect else "declares no expect"
            lines.append(f"{cc.key} '{cc.claim.name}': {declared}, came out {outcome.status}")
            lines += ["    " + line for line in vt.outcome_lines(outcome)]
        raise AssertionError("\n".join(lines))
    return run


def failure_message(verdict: Verdict, expect: str, solver: str, timeout: float) -> str:
    """What pytest shows: the claim, what went wrong, and the exact counterexample when there is one."""
    claim = verdict.claim
    if verdict.status == "refuted":
        lines = [f"GDoF claim refuted: {claim.text()}"] + counterexample_lines(verdict)
    elif verdict.status == "unknown":
        lines = [f"GDoF claim undecided (unknown; an unknown is never a proof): {claim.text()}",
                 f"    {verdict.solver}, timeout {timeout:g} s per query: {verdict.detail or 'no answer'}",
                 "    try a larger timeout, solver='cvc5', or a smaller region"]
    else:
        lines = [f"GDoF claim expected to be {expect}, but it is proved: {claim.text()}"]
    if expect != "proved":
        lines.append(f"    (expected {expect})")
    return "\n".join(lines)


def counterexample_lines(verdict: Verdict) -> list[str]:
    """The exact counterexample; for monotone and symmetric claims both points are spelled out, so a
    value is never printed next to a parameter name it could be mistaken for."""
    claim, cex = verdict.claim, verdict.counterexample
    if cex is None:
        return ["    (no counterexample was returned)"]
    if claim.kind not in ("monotone", "symmetric"):
        return vt.counterexample_lines(verdict)
    f = claim.lhs.text()
    first = dict(cex.point)
    if claim.kind == "monotone":
        p = claim.param
        moved = first.pop(C.primed(p))
        second = {k: (moved if k == p else v) for k, v in first.items()}
        trend = "smaller" if claim.increasing else "larger"
        why = f"a larger {p} gives a {trend} value"
    else:
        a, b = claim.swap
        second = {k: first[{a: b, b: a}.get(k, k)] for k in first}
        why = f"swapping {a} and {b} changes the value"
    where = "strictly inside the region" if cex.strictly_inside else "on the region's boundary"
    return [f"    counterexample ({where}; {cex.origin}):",
            f"      {f} at {vt.point_text(first)}:  {vt.fmt(cex.lhs_value)}",
            f"      {f} at {vt.point_text(second)}:  {vt.fmt(cex.rhs_value)}",
            f"      {why} (difference {vt.fmt(cex.difference)})"]


# ---------------------------------------------------------------------------------------------
# a claim sentence -> Claim
# ---------------------------------------------------------------------------------------------

def _as_claim(item, region, names, where, definitions) -> C.Claim:
    if isinstance(item, C.Claim):
        if any(x is not None for x in (region, names, where, definitions)):
            raise InputError("a Claim carries its own region and names; pass region, where, names or "
                             "definitions only with a claim sentence")
        return item
    if not isinstance(item, str):
        raise InputError(f"expected a claim sentence or a verifier.claims.kinds.Claim, not {type(item).__name__}")
    return claim_from_text(item, region, names, where, definitions)


def claim_from_text(text: str, region=None, names: Iterable[str] | None = None, where: str | None = None,
                    definitions: Mapping[str, object] | None = None, name: str = "") -> C.Claim:
    """The Claim that a sentence states over `region` (and `where`), with `definitions` substituted."""
    names = None if names is None else list(names)
    area = _region(region, where, names)
    s = parse_sentence(text)
    stated = [p for p in [s.param, *s.swap, *(n for n, _ in s.values), *(n for n, _ in s.subst)] if p]
    definitions = definitions or {}
    if names is None:   # undeclared: the names of the region, the sentence and the definitions only
        declared = set(area.params()) | set(definitions)
        for value in definitions.values():
            declared |= params(value) if isinstance(value, Expr) else set()
        defs = _definitions(definitions, sorted(declared | set(stated)), True)
        known = sorted(declared | set(stated))
    else:
        defs = _definitions(definitions, names)
        declared, known = set(names), names + list(defs)
    unknown = _unknown(known, names is None)

    def side(part: Part) -> C.Side:
        try:
            expr = parse_expr(part.text, known)
        except InputError as err:
            raise shifted(explained(err, unknown), part, text) from None
        return C.Side(_resolve(expr, defs), part.text if part.text in defs else "")

    _check_names(s, names, text)
    if names is None:   # 'nondecreasing in alhpa': a name only the sentence mentions must occur in it
        _check_stated(s, stated, declared, side, text)
    claim = _plain_claim(s, side, area, name)
    if s.subst:   # `... with beta = alpha`: the claim on that slice (verifier.claims.slices)
        claim = C.on_slice(claim, {n: side(v).expr for n, v in s.subst})
    return claim


def _plain_claim(s, side, area, name) -> C.Claim:
    if s.kind == "relation":
        return C.relation(side(s.lhs), s.rel, side(s.rhs), area, name)
    if s.kind == "within":
        return C.within(side(s.lhs), side(s.rhs), side(s.gap).expr, area, name)
    if s.kind == "monotone":
        return C.monotone(side(s.lhs), s.param, area, s.increasing, name)
    if s.kind == "symmetric":
        return C.symmetric(side(s.lhs), s.swap[0], s.swap[1], area, name)
    values = {n: side(v).expr for n, v in s.values}
    return C.reduces_to(side(s.lhs), values, side(s.rhs), area, name)


def _unknown(known, undeclared: bool):
    """explain() for a name outside `known`: a typo is not a new free variable (it would be refuted)."""
    def explain(name: str) -> str:
        how = ("declare the parameters with names=[...] or give them a region or where"
               if undeclared else f"known: {listing(known)}")
        close = did_you_mean(name, known).strip(" ()")
        return f"unknown parameter '{name}' ({how}" + (f"; {close})" if close else ")")
    return explain


def _check_stated(s, stated, declared, side, text) -> None:
    """A parameter named only by the sentence (`in p`, `with p = v`) must occur in its expressions."""
    parts = [p for p in (s.lhs, s.rhs) if p is not None]
    used = set()
    for part in parts:
        used |= params(side(part).expr)
    for p in stated:
        if p not in declared and p not in used:
            close = did_you_mean(p, sorted(declared | used)).strip(" ()")
            raise UnknownNameError(f"'{p}' occurs nowhere in the claim or its region"
                                   + (f" ({close})" if close else ""), text, text.find(p))


def _check_names(s, names, text) -> None:
    if names is None:
        return
    for p in [s.param, *s.swap, *(n for n, _ in s.values), *(n for n, _ in s.subst)]:
        if p and p not in names:
            raise InputError(f"unknown parameter '{p}' in '{text}' (known: {', '.join(names)})")


def _region(region, where, names) -> Region:
    out = Region.everywhere()
    if isinstance(region, Region):
        out = region
    elif isinstance(region, str):
        out = parse_region(region, names)
    elif region is not None:
        raise InputError(f"region must be a Region or a text, not {type(region).__name__}")
    if where is not None:
        out = out.meet(parse_region(where, names))
    return out


def _definitions(definitions: Mapping[str, object], names, undeclared: bool = False) -> dict[str, Expr]:
    known = None if names is None else list(names) + list(definitions)
    out = {}
    for key, value in definitions.items():
        if isinstance(value, Expr):
            out[key] = value
            continue
        try:
            out[key] = parse_expr(str(value), known)
        except InputError as err:
            err = explained(err, _unknown(known, undeclared)) if known is not None else err
            raise type(err)(f"definitions['{key}']: {err.message}", err.source, err.position) from None
    return out


def _resolve(expr: Expr, defs: Mapping[str, Expr]) -> Expr:
    for _ in range(len(defs) + 2):
        if not (params(expr) & set(defs)):
            return expr
        expr = substitute(expr, defs)
    raise InputError("definitions refer to each other in a cycle")


__all__ = ["assert_claim", "assert_case", "claim_from_text", "failure_message"]
