"""Text forms of rate regions: inequalities, corner points, weighted sums.  Never eval.

    'd1 + 2*d2 <= max(alpha, 1 - alpha) + (beta - 1)^+'     an inequality (or >=, rates on the right)
    '(1 - alpha/2, alpha)'                                    a corner (one coordinate per rate, in order)
    'd1 + d2'                                                 the weights of a weighted sum

Why stricter than the scalar grammar: a rate side must be a linear form in the rates alone (constant
coefficients), the other side a piecewise-linear expression of the exponents alone; anything else
(d1*d2, max(d1, ...), an exponent next to the rates, an unknown name) is refused with its column,
because a region written that way is not what the engine decides.
"""

from __future__ import annotations

import re
from fractions import Fraction
from typing import Sequence

from verifier.core.errors import InputError, NonlinearError, ParseError, UnknownNameError
from verifier.expressions.expr import Affine, Expr, add, affine, params, scale
from verifier.text.parse import parse_expr

from verifier.rates.region import HRegion, RateInequality, VRegion

RELATION = re.compile(r"<=|>=|≤|≥|==|=|<|>")


def _depth0(text: str, pattern: re.Pattern) -> list[re.Match]:
    depth, out = 0, []
    marks = []
    for ch in text:
        depth += ch in "([{"
        depth -= ch in ")]}"
        marks.append(depth)
    for m in pattern.finditer(text):
        if marks[m.start()] == 0:
            out.append(m)
    return out


def _listing(names) -> str:
    return ", ".join(names) or "none"


def _parse(text: str, start: int, source: str, rates, exponents) -> Expr:
    """parse_expr of source[start:start+len(text)], errors re-positioned in `source` and unknown
    names explained with the declared rates and exponents."""
    try:
        return parse_expr(text, list(rates) + list(exponents))
    except InputError as err:
        pos = start + (err.position or 0)
        m = re.match(r"unknown parameter '([^']*)'", err.message)
        if isinstance(err, UnknownNameError) and m:
            raise UnknownNameError(f"unknown name '{m[1]}' (rates: {_listing(rates)}; exponents and named formulas: "
                                   f"{_listing(exponents)})", source, pos) from None
        raise type(err)(err.message, source, pos) from None


def _name_at(text: str, names, offset: int = 0) -> int:
    """Column (0-based, in the whole text) of the first use of any of `names` in text."""
    hits = [m.start() for n in names for m in [re.search(rf"(?<![A-Za-z0-9_]){re.escape(n)}(?![A-Za-z0-9_'])", text)] if m]
    return offset + (min(hits) if hits else 0)


def _rate_form(e: Expr, text: str, start: int, source: str, rates) -> Affine:
    """The rate side as an affine form in the rates; refuses exponents and non-linear uses."""
    used = params(e)
    if not isinstance(e, Affine):
        inside = set()
        for t in getattr(e, "terms", None) or (e,):
            inside |= params(t) & set(rates)
        if inside:
            raise NonlinearError(f"rate '{sorted(inside)[0]}' used inside min/max/(x)^+/|x|: the rate side "
                                 "must be linear in the rates", source, _name_at(text, sorted(inside), start))
    stray = sorted(used - set(rates))
    if stray:
        raise InputError(f"exponent '{stray[0]}' on the rate side: write the rates alone on one side and "
                         "the exponents on the other", source, _name_at(text, stray, start))
    return e


def parse_inequality(text: str, rates: Sequence[str], exponents: Sequence[str], label: str = "") -> RateInequality:
    """One inequality of an H-form region (see the module docstring)."""
    rels = _depth0(text, RELATION)
    if not rels:
        raise ParseError("an inequality needs <= or >=", text, 0)
    if len(rels) > 1:
        raise ParseError("one relation per inequality; write chained bounds as separate inequalities", text,
                         rels[1].start())
    m = rels[0]
    rel = {"≤": "<=", "≥": ">="}.get(m.group(), m.group())
    if rel in ("<", ">"):
        raise ParseError("a GDoF region is closed: use <= or >=, not a strict inequality", text, m.start())
    if rel in ("=", "=="):
        raise ParseError("an equality is not a facet of a region: write it as two inequalities", text, m.start())
    left_text, right_text = text[:m.start()], text[m.end():]
    if not left_text.strip() or not right_text.strip():
        raise ParseError("missing side of the inequality", text, m.start())
    left = _parse(left_text, 0, text, rates, exponents)
    right = _parse(right_text, m.end(), text, rates, exponents)
    left_rates, right_rates = params(left) & set(rates), params(right) & set(rates)
    if not left_rates and not right_rates:
        raise InputError(f"no rate in the inequality (rates: {_listing(rates)})", text, 0)
    if left_rates and right_rates:   # d1 <= d2: both sides linear in the rates alone
        diff = add(_rate_form(left, left_text, 0, text, rates),
                   scale(-1, _rate_form(right, right_text, m.end(), text, rates)))
        form, bound, sign = diff, affine(), 1 if rel == "<=" else -1
    elif left_rates:
        form = _rate_form(left, left_text, 0, text, rates)
        bound, sign = right, 1 if rel == "<=" else -1
    else:
        form = _rate_form(right, right_text, m.end(), text, rates)
        bound, sign = left, 1 if rel == ">=" else -1
    stray = sorted(params(bound) & set(rates))
    if stray:   # unreachable after the checks above; kept as the statement of the invariant
        raise InputError(f"rate '{stray[0]}' on the exponent side", text, 0)
    # sign * (form - c) <= sign * (bound - c): constants on the rate side move to the bound
    bound = add(bound, scale(-1, form.const))
    coeffs = tuple(sorted((r, sign * c) for r, c in form.coeffs))
    return RateInequality(coeffs, scale(sign, bound), label)


def parse_corner(text: str, rates: Sequence[str], exponents: Sequence[str]) -> tuple[Expr, ...]:
    """'(x1, ..., xK)': one piecewise-linear expression of the exponents per rate, in rate order."""
    stripped = text.strip()
    lead = len(text) - len(text.lstrip())
    if not (stripped.startswith("(") and stripped.endswith(")")):
        raise ParseError("a corner is written (x1, ..., xK) with one coordinate per rate", text, lead)
    body_start = lead + 1
    body = stripped[1:-1]
    cuts = [m.start() for m in _depth0(body, re.compile(","))]
    pieces, begin = [], 0
    for cut in cuts + [len(body)]:
        pieces.append((body[begin:cut], body_start + begin))
        begin = cut + 1
    if len(pieces) != len(rates):
        raise ParseError(f"a corner needs {len(rates)} coordinates ({_listing(rates)}), found {len(pieces)}",
                         text, lead)
    out = []
    for piece, start in pieces:
        if not piece.strip():
            raise ParseError("empty coordinate", text, start)
        e = _parse(piece, start, text, rates, exponents)
        used = sorted(params(e) & set(rates))
        if used:
            raise InputError(f"rate '{used[0]}' in a corner: coordinates are expressions of the exponents",
                             text, _name_at(piece, used, start))
        out.append(e)
    return tuple(out)


def parse_weights(text: str, rates: Sequence[str], exponents: Sequence[str]) -> tuple[tuple[str, Fraction], ...]:
    """'d1 + 2*d2': constant weights on the rates (the objective of a weighted-sum claim)."""
    e = _parse(text, 0, text, rates, exponents)
    form = _rate_form(e, text, 0, text, rates)
    if form.const != 0:
        raise InputError("a weighted sum of rates has no constant term", text, 0)
    if not form.coeffs:
        raise InputError(f"a weighted sum needs at least one rate ({_listing(rates)})", text, 0)
    return form.coeffs


def h_region(name: str, rates: Sequence[str], exponents: Sequence[str], inequalities: Sequence[str],
             nonnegative: bool = True) -> HRegion:
    """An H-form from texts, for notebooks and tests: h_region("MAC", ["d1", "d2"], ["a1", "a2"],
    ["d1 <= a1", "d2 <= a2", "d1 + d2 <= max(a1, a2)"])."""
    rows = tuple(parse_inequality(t, rates, exponents) for t in inequalities)
    return HRegion(name, tuple(rates), rows, nonnegative)


def v_region(name: str, rates: Sequence[str], exponents: Sequence[str], corners: Sequence[str],
             free_disposal: bool = False) -> VRegion:
    """A V-form from texts: v_region("SD", ["d1", "d2"], ["a1", "a2"], ["(a1, 0)", "(0, a2)"], True)."""
    return VRegion(name, tuple(rates), tuple(parse_corner(t, rates, exponents) for t in corners), free_disposal)
