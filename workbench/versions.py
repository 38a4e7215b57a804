"""Versions of a converse (or of a scheme): several named sets of bounds in one case file.

A referee often holds two versions of the same converse, the submitted one and the revision, and asks
"is the revision never looser?" or "do they agree for alpha <= 1?".  In the case file:

    [outer]                      bounds written here are shared by every version (may be empty)
    single_user = "1"
    [outer.submitted]            one version: its own bounds
    genie = "(max(1, alpha) + (1 - alpha)^+)/2"
    [outer.revised]
    genie = "max(alpha, 1 - alpha)"

In a claim, a version's name stands for the min of the shared bounds and its own (the max, for
`[inner.NAME]` versions of a scheme): `revised <= submitted`, `revised == submitted` with
`where = "alpha <= 1"`.  Its bounds keep their own names as the parts of the side, so the regime table
shows which bound of each version is active.  Why a version's bounds are not claim names of their
own: two versions usually share a bound's name (that is what a revision changes), so a bare name
would be ambiguous; a claim about one bound goes through [formulas] or a version of its own.

A sub-table of [outer] is a version when it has its own header `[outer.NAME]` (see is_version).  Once
[outer] has versions, a bare `outer` would silently mean one of them: it is refused, naming them.
A version's own bound cannot be given regime by regime (its placeholder name would clash across
versions); give such a bound in the shared table or state each version as a min/max formula.
"""

from __future__ import annotations

import re

from verifier.expressions.expr import Expr, max_, min_

REGIME_KEYS = {"regimes"}


def is_version(kind: str, name: str, value, text: str) -> bool:
    """Is `[kind] name` a version?  Only a sub-table with a header of its own, `[outer.NAME]`, is: an
    inline table (`hk = { regimes = ... }`, or a misspelt `{ regimez = ... }`) stays a bound, so a typo
    in a regime-wise bound is still refused as an unknown key rather than read as a version."""
    if not isinstance(value, dict) or set(value) & REGIME_KEYS:
        return False
    head = re.compile(r"^[ \t]*\[[ \t]*" + re.escape(kind) + r"[ \t]*\.[ \t]*(?:" + re.escape(name) +
                      r"|\"" + re.escape(name) + r"\"|'" + re.escape(name) + r"')[ \t]*\]", re.M)
    return head.search(text) is not None


def split(kind: str, table: dict, text: str) -> tuple[dict, dict]:
    """(shared bounds, {version: its table}) of an [outer] or [inner] table, in file order."""
    shared = {k: v for k, v in table.items() if not is_version(kind, k, v, text)}
    found = {k: v for k, v in table.items() if is_version(kind, k, v, text)}
    return shared, found


def combine(kind: str, exprs) -> Expr:
    """The version's value: min of an outer version's bounds, max of an inner one's."""
    return (min_ if kind == "outer" else max_)(*exprs)


_CASES = re.compile(r"\\begin\s*\{\s*d?cases\s*\}")


def is_regime_wise(value) -> bool:
    """Is this bound value given regime by regime: a `regimes` table, a text with `if`, or LaTeX with a
    `cases` environment?  (One test, so [outer], [inner] and versions agree on what a value is.)"""
    if isinstance(value, dict):
        return True
    return isinstance(value, str) and (re.search(r"\bif\b", value) is not None or
                                       _CASES.search(value) is not None)
