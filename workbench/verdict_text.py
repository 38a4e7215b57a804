"""Plain verdict output of `gdof check`: terminal text and JSON, both exact.

Numbers are printed as exact fractions everywhere (JSON carries them as strings "4/7"), because a
reader must be able to re-check a counterexample by hand.
"""

from __future__ import annotations

import json
from fractions import Fraction

from verifier.claims.one_shot import Verdict
from verifier.claims.witness import Counterexample
from verifier.expressions.expr import format_number
from verifier.solvers.smt import versions

from verifier.core.verdicts import CAUTION  # one wording everywhere: terminal, bundles, reports


def verdict_phrase(status: str, expect: str | None = None) -> str:
    """'proved', or 'refuted (declared proved)' when the case file declared another verdict."""
    return status + (f" (declared {expect})" if expect and expect != status else "")


def count(n: int, word: str) -> str:
    """'1 claim', '2 claims': a number with the right form of the noun (never 'claim(s)')."""
    return f"{n} {word if n == 1 else word + 's'}"


def fmt(q: Fraction) -> str:
    return format_number(Fraction(q))


def point_text(point) -> str:
    return ", ".join(f"{k} = {fmt(v)}" for k, v in point.items())


def solver_line(solver: str, timeout: float, cross: bool) -> str:
    v = versions()
    used = "z3 and cvc5 (cross-check)" if cross else solver
    have = ", ".join(f"{k} {val}" for k, val in v.items())
    return f"Solver: {used}; timeout {timeout:g} s per query ({have})"


def side_names(verdict: Verdict) -> tuple[str, str]:
    c = verdict.claim
    if c.kind == "monotone":
        return ("value at the first point", f"value at the second point ({c.param}' > {c.param})")
    if c.kind == "symmetric":
        return ("value", f"value with {c.swap[0]} and {c.swap[1]} swapped")
    if c.kind == "reduces-to":
        return (f"{c.lhs.text()} (fixed)", c.rhs.text())
    return (c.lhs.text(), c.rhs.text())


def counterexample_lines(verdict: Verdict, indent: str = "    ") -> list[str]:
    cex: Counterexample = verdict.counterexample
    where = "strictly inside the region" if cex.strictly_inside else "on the region's boundary"
    left, right = side_names(verdict)
    lines = [f"{indent}counterexample: {point_text(cex.point)}  ({where}; {cex.origin})"]
    lines.append(f"{indent}  {left} = {fmt(cex.lhs_value)}" + _active(cex.lhs_active))
    lines.append(f"{indent}  {right} = {fmt(cex.rhs_value)}" + _active(cex.rhs_active))
    lines.append(f"{indent}  difference = {fmt(cex.difference)}")
    return lines


def _active(names) -> str:
    return f"   [active: {', '.join(names)}]" if names else ""


def verdict_lines(verdict: Verdict, expect: str | None = None) -> list[str]:
    c = verdict.claim
    head = f"{c.name or 'claim'} -- {verdict_phrase(verdict.status, expect)}"
    lines = [head, f"    {c.text()}   ({verdict.seconds:.2f} s, {verdict.solver})"]
    if verdict.detail:
        lines.append(f"    note: {verdict.detail}")
    if verdict.counterexample is not None:
        lines += counterexample_lines(verdict)
    return lines


def outcome_lines(outcome) -> list[str]:
    """A case claim: its overall verdict, uncovered points, and the failing (or every) sub-claim."""
    cc = outcome.case_claim
    head = f"{cc.claim.name} -- {verdict_phrase(outcome.status, cc.expect)}"
    lines = [head, f"    {cc.claim.text()}   ({outcome.seconds:.2f} s)"]
    for name, point in outcome.uncovered:
        lines.append(f"    not covered: no regime of '{name}' contains {point_text(point)} "
                     "(a forgotten regime?)")
    lines += [f"    note: {n}" for n in outcome.notes if n]
    for label, v in outcome.verdicts:
        if label:
            lines.append(f"    part {label} -- {v.status}")
        if v.detail:
            lines.append(f"    note: {v.detail}")
        if v.counterexample is not None:
            lines += counterexample_lines(v, "      " if label else "    ")
    if getattr(outcome, "rate_witness", None) is not None:
        lines += ["    " + line for line in outcome.rate_witness.lines()]
    return lines


def outcome_json(outcome) -> dict:
    cc = outcome.case_claim
    return {"name": cc.claim.name, "statement": cc.statement, "kind": cc.claim.kind,
            "claim": cc.claim.text(), "region": cc.claim.region.text(), "status": outcome.status,
            "expected": cc.expect, "seconds": round(outcome.seconds, 4),
            "uncovered": [{"bound": n, "point": {k: fmt(v) for k, v in p.items()}}
                          for n, p in outcome.uncovered],
            "notes": list(outcome.notes),
            "parts": [dict(verdict_json(v), regime=label) for label, v in outcome.verdicts],
            "rate_witness": rate_witness_json(getattr(outcome, "rate_witness", None))}


def rate_witness_json(w) -> dict | None:
    """A rate-region refutation: the exponent point and the rate tuple, exact numbers as strings."""
    if w is None:
        return None
    return {"point": {k: fmt(v) for k, v in w.theta.items()}, "rates": {k: fmt(v) for k, v in w.rates.items()},
            "what": w.story, "strictly_inside": w.strictly_inside, "origin": w.origin}


def counterexample_json(cex: Counterexample) -> dict:
    return {"point": {k: fmt(v) for k, v in cex.point.items()},
            "lhs": fmt(cex.lhs_value), "rhs": fmt(cex.rhs_value), "difference": fmt(cex.difference),
            "lhs_active": list(cex.lhs_active), "rhs_active": list(cex.rhs_active),
            "strictly_inside": cex.strictly_inside, "origin": cex.origin}


def verdict_json(verdict: Verdict, statement: str = "", expect: str | None = None) -> dict:
    c = verdict.claim
    out = {"name": c.name, "statement": statement, "kind": c.kind, "claim": c.text(),
           "region": c.region.text(), "status": verdict.status, "solver": verdict.solver,
           "seconds": round(verdict.seconds, 4), "detail": verdict.detail,
           "answers": {a.solver: a.status for a in verdict.answers},
           "counterexample": counterexample_json(verdict.counterexample) if verdict.counterexample else None}
    if expect:
        out["expected"] = expect
    return out


def dumps(data) -> str:
    return json.dumps(data, indent=2, ensure_ascii=False)
