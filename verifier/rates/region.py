"""Rate regions whose shape moves with the channel exponents theta.

Why two forms: converses are written as inequalities (H-form), achievable schemes as corner points
with time sharing (V-form).  Both are kept exactly as written: constant rational coefficients on the
rates, piecewise-linear verifier expressions of the exponents on the right sides and in the corners.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Mapping, Sequence

from verifier.core.errors import InputError
from verifier.expressions.expr import Expr, affine, as_fraction, evaluate, format_number, lift, params, to_text

Point = Mapping[str, Fraction]


@dataclass(frozen=True)
class RateInequality:
    """sum_k coeffs[k] * d_k <= bound(theta); `label` names it in reports (a paper's equation)."""

    coeffs: tuple[tuple[str, Fraction], ...]
    bound: Expr
    label: str = ""

    def coeff(self, rate: str) -> Fraction:
        return dict(self.coeffs).get(rate, Fraction(0))

    def lhs_value(self, rates: Point) -> Fraction:
        return sum((c * Fraction(rates[r]) for r, c in self.coeffs), Fraction(0))

    def holds(self, theta: Point, rates: Point) -> bool:
        return self.lhs_value(rates) <= evaluate(self.bound, theta)

    def lhs_text(self) -> str:
        return to_text(affine(self.coeffs))

    def text(self) -> str:
        return f"{self.lhs_text()} <= {to_text(self.bound)}"


def inequality(coeffs: Mapping[str, object], bound, label: str = "") -> RateInequality:
    """The canonical inequality (sorted rates, zero coefficients dropped)."""
    kept = tuple(sorted((r, as_fraction(c)) for r, c in coeffs.items() if as_fraction(c) != 0))
    if not kept:
        raise InputError(f"an inequality of a rate region needs a rate on its left side: '{label or to_text(lift(bound))}'")
    return RateInequality(kept, lift(bound), label)


def _check_rates(rates: Sequence[str], name: str) -> tuple[str, ...]:
    rates = tuple(rates)
    if not rates or len(set(rates)) != len(rates):
        raise InputError(f"region '{name}': the rates must be distinct and at least one")
    return rates


@dataclass(frozen=True)
class HRegion:
    """{d : every inequality holds (and d >= 0 when `nonnegative`)} at each exponent point."""

    name: str
    rates: tuple[str, ...]
    inequalities: tuple[RateInequality, ...]
    nonnegative: bool = True

    def __post_init__(self):
        _check_rates(self.rates, self.name)
        for q in self.inequalities:
            stray = {r for r, _ in q.coeffs} - set(self.rates)
            if stray:
                raise InputError(f"region '{self.name}': unknown rate '{sorted(stray)[0]}' in '{q.text()}'")
            clash = params(q.bound) & set(self.rates)
            if clash:
                raise InputError(f"region '{self.name}': rate '{sorted(clash)[0]}' on the right side of '{q.text()}'")

    def constraints(self) -> tuple[RateInequality, ...]:
        """Every constraint as a `<=` row, the non-negativity of the rates included."""
        rows = self.inequalities
        if self.nonnegative:
            rows += tuple(RateInequality(((r, Fraction(-1)),), lift(0), f"{r} >= 0") for r in self.rates)
        return rows

    def contains(self, theta: Point, rates: Point) -> bool:
        return all(q.holds(theta, rates) for q in self.constraints())

    def down_closed_reason(self) -> str:
        """'' when the region is down-closed in the orthant (d >= 0 and every coefficient >= 0),
        else why not: the property 'for all non-negative weights' and free disposal rely on."""
        if not self.nonnegative:
            return f"region '{self.name}' does not require the rates to be non-negative"
        for q in self.inequalities:
            for r, c in q.coeffs:
                if c < 0:
                    return f"region '{self.name}' has the negative coefficient {format_number(c)} of {r} in '{q.text()}'"
        return ""

    def exponents(self) -> frozenset[str]:
        out: frozenset[str] = frozenset()
        for q in self.inequalities:
            out |= params(q.bound)
        return out

    def text(self) -> str:
        rows = [q.text() for q in self.inequalities]
        if self.nonnegative:
            rows.append(", ".join(self.rates) + " >= 0")
        return "{" + "; ".join(rows) + "}"


@dataclass(frozen=True)
class VRegion:
    """The convex hull of the corners (time sharing); with `free_disposal` also every d >= 0 below
    a point of the hull (a user may always send less)."""

    name: str
    rates: tuple[str, ...]
    corners: tuple[tuple[Expr, ...], ...]
    free_disposal: bool = False

    def __post_init__(self):
        _check_rates(self.rates, self.name)
        if not self.corners:
            raise InputError(f"region '{self.name}': give at least one corner")
        for c in self.corners:
            if len(c) != len(self.rates):
                raise InputError(f"region '{self.name}': a corner has {len(c)} coordinates for "
                                 f"{len(self.rates)} rates")
            for e in c:
                if params(e) & set(self.rates):
                    raise InputError(f"region '{self.name}': a corner coordinate uses a rate: '{to_text(e)}'")

    def corner_at(self, index: int, theta: Point) -> dict[str, Fraction]:
        return {r: evaluate(e, theta) for r, e in zip(self.rates, self.corners[index])}

    def exponents(self) -> frozenset[str]:
        out: frozenset[str] = frozenset()
        for c in self.corners:
            for e in c:
                out |= params(e)
        return out

    def corner_text(self, index: int) -> str:
        return "(" + ", ".join(to_text(e) for e in self.corners[index]) + ")"

    def text(self) -> str:
        hull = "conv{" + ", ".join(self.corner_text(i) for i in range(len(self.corners))) + "}"
        return hull + (" with free disposal" if self.free_disposal else "")


RateRegion = HRegion | VRegion


def same_rates(a: RateRegion, b: RateRegion) -> None:
    """Two regions compared must speak of the same rates (order may differ)."""
    if set(a.rates) != set(b.rates):
        raise InputError(f"regions '{a.name}' and '{b.name}' have different rates "
                         f"({', '.join(a.rates)} vs {', '.join(b.rates)})")
