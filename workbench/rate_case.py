"""Rate regions in case files: the `rates` declaration, `[region.NAME]` tables and region claims.

    [rates]                                  (or: rates = ["d1", "d2"])
    d1 = "GDoF of user 1"
    d2 = "GDoF of user 2"

    [region.outer]                           an H-form: one inequality per string
    inequalities = ["d1 <= 1", "d2 <= 1", "d1 + d2 <= max(alpha, 1 - alpha) + (1 - alpha)^+"]
    nonnegative = true                       (default: the rates are >= 0)

    [region.scheme]                          a V-form: corners in the order of [rates], time sharing
    corners = ["(1, 0)", "(1 - alpha, alpha)", "(0, 1)"]
    free_disposal = true                     (default false: the convex hull only)

Right sides and corner coordinates use the parameters and the names of [outer], [inner] and
[formulas] (not a bound given regime by regime: write it with min/max).  Claim sentences (the first
word is a region name, or the sentence starts with `max ... over`):

    A subset B                 A(theta) inside B(theta) for every theta of the claim's region
    A == B                     equality (both inclusions)
    A == B for all weights     equal support functions for every w >= 0 (down-closed H-forms)
    A contains (x1, ..., xK)   the point lies in A(theta)
    max d1 + d2 over A == F    the largest weighted sum compared with F by == <= >= < >
    A facet 3 is redundant     the third inequality of A is implied by the others

Errors name the file, the key and the column, like every case-file error.
"""

from __future__ import annotations

import re

from verifier.core.errors import InputError
from verifier.expressions.expr import params
from verifier.rates import claims as RC
from verifier.rates.region import HRegion, RateInequality, VRegion
from verifier.rates.text import RELATION, parse_corner, parse_inequality, parse_weights

from .names import NAME_RE, NOT_NAMES
from .statements import did_you_mean, listing

REGION_KEYS = {"inequalities", "nonnegative", "corners", "free_disposal"}
MAX_RE = re.compile(r"^\s*max\s+(?!\()(?P<w>.+?)\s+over\s+(?P<name>[A-Za-z_][A-Za-z0-9_]*)\s*")
HEAD_RE = re.compile(r"^\s*(?P<a>[A-Za-z_][A-Za-z0-9_]*)\s*")


def load(rd, data: dict, case) -> None:
    """Read `rates` and `[region.*]` into case.rates / case.regions (nothing when absent)."""
    raw_rates = data.get("rates")
    if raw_rates is None:
        if "region" in data:
            raise rd.fail("region", "declare the rates first: rates = [\"d1\", \"d2\"] or a [rates] table")
        return
    case.rates = _rates(rd, raw_rates, case)
    tables = rd.table("region", data.get("region", {}), "[region.NAME] inequalities = [...]")
    for name, spec in tables.items():
        case.regions[name] = _region(rd, name, spec, case)


def _rates(rd, value, case) -> dict:
    if isinstance(value, list):
        value = {v: "" for v in value} if all(isinstance(v, str) for v in value) else None
    if not isinstance(value, dict) or not value:
        raise rd.fail("rates", "expected rates = [\"d1\", \"d2\"] or a [rates] table of name = \"meaning\"")
    taken = set(case.parameters) | set(case.named())
    for name in value:
        if not NAME_RE.fullmatch(name) or name in NOT_NAMES:
            raise rd.fail(f"rates.{name}", f"'{name}' cannot be a rate name")
        if name in taken:
            raise rd.fail(f"rates.{name}", f"'{name}' is already a parameter or bound name")
    return dict(value)


def _names(case) -> list[str]:
    """Names a right side may use: parameters, then bounds and formulas (resolved afterwards)."""
    return list(case.parameters) + list(case.named())


def _resolved(rd, key: str, expr, case, text: str):
    placeholders = sorted(params(case.resolve(expr)) & set(case.piecewise))
    if placeholders:
        raise rd.fail(key, f"'{placeholders[0]}' is given regime by regime; a rate region needs one "
                           "formula (write it with min/max)")
    return case.resolve(expr)


def _region(rd, name: str, spec, case):
    key = f"region.{name}"
    taken = set(case.parameters) | set(case.named()) | set(case.rates)
    if not NAME_RE.fullmatch(name) or name in NOT_NAMES or name in taken or name == "max":
        raise rd.fail(key, f"'{name}' cannot name a region (it is taken or not a plain name)")
    spec = rd.table(key, spec, "inequalities = [...] or corners = [...]")
    rd.keys(spec, REGION_KEYS, [("region", None), (name, None)], "a region")
    has_h, has_v = "inequalities" in spec, "corners" in spec
    if has_h == has_v:
        raise rd.fail(key, "give either inequalities = [...] or corners = [...]")
    rates = tuple(case.rates)
    if has_h:
        if "free_disposal" in spec:
            raise rd.fail(f"{key}.free_disposal", "free disposal is for regions given by corners")
        rows = []
        for i, text in enumerate(_strings(rd, f"{key}.inequalities", spec["inequalities"])):
            k = f"{key}.inequalities[{i}]"
            q = _parsed(rd, k, text, lambda t: parse_inequality(t, rates, _names(case)))
            rows.append(RateInequality(q.coeffs, _resolved(rd, k, q.bound, case, text), q.label))
        nonneg = _flag(rd, f"{key}.nonnegative", spec.get("nonnegative", True))
        return _built(rd, key, lambda: HRegion(name, rates, tuple(rows), nonneg))
    if "nonnegative" in spec:
        raise rd.fail(f"{key}.nonnegative", "nonnegative is for regions given by inequalities "
                                            "(corners: free_disposal = true)")
    corners = []
    for i, text in enumerate(_strings(rd, f"{key}.corners", spec["corners"])):
        k = f"{key}.corners[{i}]"
        c = _parsed(rd, k, text, lambda t: parse_corner(t, rates, _names(case)))
        corners.append(tuple(_resolved(rd, k, e, case, text) for e in c))
    dispose = _flag(rd, f"{key}.free_disposal", spec.get("free_disposal", False))
    return _built(rd, key, lambda: VRegion(name, rates, tuple(corners), dispose))


def _strings(rd, key, value) -> list[str]:
    if not isinstance(value, list) or not value or not all(isinstance(v, str) for v in value):
        raise rd.fail(key, "expected a non-empty array of strings")
    return value


def _flag(rd, key, value) -> bool:
    if not isinstance(value, bool):
        raise rd.fail(key, "expected true or false")
    return value


def _parsed(rd, key, text, parse):
    try:
        return parse(text)
    except InputError as err:
        raise rd.fail(key, err, text) from None


def _built(rd, key, make):
    try:
        return make()
    except InputError as err:
        raise rd.fail(key, err.message) from None


# ---------------------------------------------------------------------------------------------
# claim sentences
# ---------------------------------------------------------------------------------------------

def is_region_sentence(text: str, case) -> bool:
    if not case.regions:
        return False
    m = MAX_RE.match(text)
    if m is not None:
        return True
    head = HEAD_RE.match(text)
    return head is not None and head["a"] in case.regions


def _region_named(rd, key, name: str, case, text: str):
    if name not in case.regions:
        raise rd.fail(key, f"unknown region '{name}'{did_you_mean(name, case.regions)} "
                           f"(regions: {listing(case.regions)})", text)
    return case.regions[name]


def rate_claim(rd, key: str, text: str, region, name: str, case) -> RC.RateClaim:
    """The RateClaim of a region sentence (module docstring)."""
    try:
        return _rate_claim(rd, key, text, region, name, case)
    except InputError as err:
        if err.message.startswith(rd.shown):
            raise
        raise rd.fail(key, err, text) from None


def _rate_claim(rd, key, text, region, name, case):
    from verifier.core.errors import ParseError
    from verifier.text.parse import parse_expr
    m = MAX_RE.match(text)
    if m is not None:
        a = _region_named(rd, key, m["name"], case, text)
        weights = _offset(lambda: parse_weights(m["w"], a.rates, _names(case)), text, m.start("w"))
        rel = RELATION.match(text, m.end())
        if rel is None:
            raise ParseError("expected a relation (==, <=, >=, <, >) after the region's name", text, m.end())
        formula_text = text[rel.end():]
        formula = _offset(lambda: parse_expr(formula_text, _names(case)), text, rel.end())
        formula = _resolved(rd, key, formula, case, text)
        op = {"=": "==", "≤": "<=", "≥": ">="}.get(rel.group(), rel.group())
        claim = RC.max_of(a, weights, op, formula, region, name)
        _bounded(claim)
        return claim
    head = HEAD_RE.match(text)
    a = _region_named(rd, key, head["a"], case, text)
    rest = text[head.end():]
    facet = re.match(r"facet\s+(\d+)\s+(is\s+)?redundant\s*$", rest)
    if facet is not None:
        claim = RC.redundant(a, int(facet[1]) - 1, region, name)
        _bounded(RC.without_facet(claim))
        return claim
    if rest.startswith("contains"):
        start = head.end() + len("contains")
        point = _offset(lambda: parse_corner(text[start:], a.rates, _names(case)), text, start)
        point = tuple(_resolved(rd, key, e, case, text) for e in point)
        return RC.contains(a, point, region, name)
    form = re.match(r"(subset|⊆|==|=)\s*([A-Za-z_][A-Za-z0-9_]*)\s*(for\s+all\s+weights)?\s*$", rest)
    if form is None:
        raise ParseError("a region claim reads 'A subset B', 'A == B', 'A == B for all weights', "
                         "'A contains (x, y)', 'A facet 3 is redundant' or 'max d1 + d2 over A == F'",
                         text, head.end())
    b = _region_named(rd, key, form[2], case, text)
    if form[3]:
        if form[1] in ("subset", "⊆"):
            raise ParseError("'for all weights' goes with ==", text, head.end())
        return RC.same_support(a, b, region, name)
    if form[1] in ("subset", "⊆"):
        return RC.subset(a, b, region, name)
    return RC.equal(a, b, region, name)


def _bounded(claim) -> None:
    """An unbounded weighted sum (no facet caps it) is bad input, said when the file is read; a dual
    too large to enumerate is left to the verdict (unknown, naming the size limit)."""
    from verifier.core.budget import OutOfBudget
    from verifier.rates.support import support_expr
    try:
        support_expr(claim.first, claim.weights)
    except OutOfBudget:
        pass


def _offset(parse, text: str, start: int):
    """Run a parser on a slice of the sentence; its error position is moved into the sentence."""
    try:
        return parse()
    except InputError as err:
        raise type(err)(err.message, text, start + (err.position or 0)) from None
