"""Finite-SNR rate expressions and their GDoF: log2(1 + SNR^a/(1 + SNR^b)) -> max(0, a - b) ... exactly.

Why: papers state bounds at finite SNR; the GDoF is the coefficient of log SNR as SNR grows.  For a log
of a positive combination of powers of SNR the limit is mechanical: the degree (exponent of the dominant
power) of a sum is the max of the degrees, of a product the sum, of a quotient the difference, of a
positive constant 0.  Subtraction inside a log is refused (cancellation would need the actual values).

Grammar in bounds.highsnr_parse (hand-written recursive descent, never eval); meaning in
bounds.highsnr_terms.  In short: sums and constant multiples of LOG(...) of positive combinations of
powers of SNR, with products, quotients and constants.  LOG is log, ln, log2 or log10 (one base per
expression, so the GDoF stays exact); SNR is the base name (default "SNR"); an alias stands for a power
of SNR (aliases={"INR": "alpha"} reads INR as SNR^alpha).  An exponent is a number, a name, or a
bracketed expression read by verifier.text.parse.parse_expr.

Numerics (mpmath) are only an independent check: `slope` is R(SNR) / log(SNR), which tends to the GDoF.
"""

from __future__ import annotations

from fractions import Fraction
from typing import Mapping

from verifier.expressions.expr import Expr

from .highsnr_parse import LOGS, _Parser
from .highsnr_terms import Inner, Rate

__all__ = ["LOGS", "Inner", "Rate", "parse_rate", "gdof_of"]


def parse_rate(text: str, base: str = "SNR", aliases: Mapping[str, object] | None = None,
               names=None) -> Rate:
    """Read a finite-SNR rate expression (see the module grammar)."""
    parser = _Parser(text, base, aliases or {}, names)
    logs, constant = parser.rate()
    if not parser.peek(kind="end"):
        raise parser.error("unexpected text after the expression")
    kept = tuple((Fraction(c), inner) for inner, c in logs.items() if c != 0)
    return Rate(kept, Fraction(constant), parser.log_base or "e")


def gdof_of(text: str, base: str = "SNR", aliases: Mapping[str, object] | None = None, names=None) -> Expr:
    """The GDoF (coefficient of log SNR) of a finite-SNR rate expression, as an exact Expr."""
    return parse_rate(text, base, aliases, names).gdof()
