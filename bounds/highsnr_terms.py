"""The meaning of a finite-SNR rate expression: its exact GDoF and its numeric value (mpmath).

Why apart from the grammar: the two interpretations of the same tree -- the degree in SNR (exact, an
Expr) and the value at a given SNR (mpmath, only an independent check) -- are the semantics; the
parser (bounds.highsnr_parse) only builds trees.  Degree rules: a positive constant has degree 0, SNR^e
degree e, a sum the max of its terms' degrees, a product the sum, a quotient the difference, a constant
power k times the degree.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Mapping

import mpmath

from verifier.expressions.expr import Expr, add, as_fraction, const, evaluate, max_, scale


@dataclass(frozen=True)
class Inner:
    """A positive function of SNR: `kind` is num, pow, add, mul, div or powc; `parts` its pieces."""

    kind: str
    parts: tuple
    exponent: Expr | None = None   # for pow
    value: Fraction | None = None  # for num and powc

    def degree(self) -> Expr:
        if self.kind == "num":
            return const(0)
        if self.kind == "pow":
            return self.exponent
        degs = [p.degree() for p in self.parts]
        if self.kind == "add":
            return max_(*degs)
        if self.kind == "mul":
            return add(*degs)
        if self.kind == "div":
            return add(degs[0], scale(-1, degs[1]))
        return scale(self.value, degs[0])

    def numeric(self, snr, point: Mapping[str, Fraction]):
        if self.kind == "num":
            return mpmath.mpf(self.value.numerator) / self.value.denominator
        if self.kind == "pow":
            e = evaluate(self.exponent, point)
            return snr ** (mpmath.mpf(e.numerator) / e.denominator)
        vals = [p.numeric(snr, point) for p in self.parts]
        if self.kind == "add":
            return mpmath.fsum(vals)
        if self.kind == "mul":
            return mpmath.fprod(vals)
        if self.kind == "div":
            return vals[0] / vals[1]
        return vals[0] ** (mpmath.mpf(self.value.numerator) / self.value.denominator)


@dataclass(frozen=True)
class Rate:
    """sum of coef * log_base(inner) plus a constant: the finite-SNR rate expression."""

    logs: tuple[tuple[Fraction, Inner], ...]
    constant: Fraction
    base: object  # "e", 2 or 10

    def gdof(self) -> Expr:
        """Coefficient of log SNR as SNR -> infinity, exactly."""
        return add(*(scale(c, inner.degree()) for c, inner in self.logs))

    def _log(self, x):
        return mpmath.log(x) if self.base == "e" else mpmath.log(x, self.base)

    def numeric(self, snr, point: Mapping[str, object] | None = None):
        pt = {k: as_fraction(v) for k, v in (point or {}).items()}
        total = mpmath.mpf(self.constant.numerator) / self.constant.denominator
        for c, inner in self.logs:
            total += mpmath.mpf(c.numerator) / c.denominator * self._log(inner.numeric(mpmath.mpf(snr), pt))
        return total

    def slope(self, snr, point: Mapping[str, object] | None = None):
        """R(SNR) / log(SNR) in the expression's own base: tends to the GDoF as SNR grows."""
        return self.numeric(snr, point) / self._log(mpmath.mpf(snr))
