"""Grammar of finite-SNR rate expressions: hand-written tokenizer and recursive descent, never eval.

    rate    := rterm (('+' | '-') rterm)*
    rterm   := ['-'] rfactor (('*' | '/') rfactor)*      (at most one factor may carry logs)
    rfactor := NUMBER | LOG '(' inner ')' | '(' rate ')'
    inner   := iterm ('+' iterm)*
    iterm   := ipow (('*' | '/') ipow)*
    ipow    := iatom ['^' EXPONENT]
    iatom   := NUMBER | SNR | ALIAS | '(' inner ')'

Errors are ParseError / NonlinearError with the column of the offending token.
"""

from __future__ import annotations

import re
from fractions import Fraction
from typing import Mapping

from verifier.core.errors import NonlinearError, ParseError
from verifier.expressions.expr import Expr, const, scale

from .highsnr_terms import Inner
from .network import to_expr

LOGS = {"log": "e", "ln": "e", "log2": 2, "log10": 10}
_TOKEN = re.compile(r"\s*(?:(?P<num>\d+(?:\.\d+)?|\.\d+)|(?P<name>[A-Za-z_][A-Za-z_0-9]*)|(?P<op>[-+*/^(){},]))")


def _tokenize(text: str) -> list[tuple[str, str, int]]:
    out, pos = [], 0
    while pos < len(text):
        m = _TOKEN.match(text, pos)
        if not m or m.end() == pos:
            if text[pos:].strip() == "":
                break
            bad = pos + len(text[pos:]) - len(text[pos:].lstrip())
            raise ParseError(f"unexpected character '{text[bad]}'", text, bad)
        kind = m.lastgroup
        out.append((kind, m.group(kind), m.start(kind)))
        pos = m.end()
    out.append(("end", "", len(text)))
    return out


class _Parser:
    def __init__(self, text: str, base: str, aliases: Mapping[str, object], names):
        self.text, self.toks, self.i = text, _tokenize(text), 0
        self.snr, self.names = base, names
        self.aliases = {k: to_expr(v, f"alias {k}") for k, v in aliases.items()}
        self.log_base = None

    def peek(self, value: str | None = None, kind: str | None = None) -> bool:
        k, v, _ = self.toks[self.i]
        return (value is None or v == value) and (kind is None or k == kind)

    def take(self, value: str | None = None, what: str = "") -> tuple[str, str, int]:
        tok = self.toks[self.i]
        if value is not None and tok[1] != value:
            raise self.error(f"expected '{value}'{what}")
        self.i += 1
        return tok

    def error(self, message: str) -> ParseError:
        _, v, pos = self.toks[self.i]
        found = f", found '{v}'" if v else ", found end of input"
        return ParseError(message + found, self.text, pos)

    # rate level: a linear combination of logs -> (dict inner -> coef, constant)
    def rate(self):
        logs, constant = self.rterm()
        while self.peek("+") or self.peek("-"):
            sign = 1 if self.take()[1] == "+" else -1
            more, c = self.rterm()
            logs, constant = _merge(logs, more, sign), constant + sign * c
        return logs, constant

    def rterm(self):
        sign = -1 if self.peek("-") and self.take() else 1
        logs, constant = self.rfactor()
        while self.peek("*") or self.peek("/"):
            op, start = self.take()[1], self.toks[self.i][2]
            other, c = self.rfactor()
            if op == "*" and logs and other:
                raise NonlinearError("a product of two logarithms", self.text, start)
            if op == "*":
                factor = c if logs else constant
                logs, constant = (logs if logs else other), (constant * c)
            else:
                if other:
                    raise NonlinearError("a division by a logarithm", self.text, start)
                if c == 0:
                    raise ParseError("division by zero", self.text, start)
                factor = 1 / c
                constant = constant / c
            logs = {k: v * factor for k, v in logs.items()}
        return {k: sign * v for k, v in logs.items()}, sign * constant

    def rfactor(self):
        kind, value, pos = self.toks[self.i]
        if kind == "num":
            self.take()
            return {}, Fraction(value)
        if kind == "name" and value in LOGS:
            return self.logcall()
        if value == "(":
            self.take()
            out = self.rate()
            self.take(")")
            return out
        raise self.error("expected a number, a log(...) or '('")

    def logcall(self):
        _, name, pos = self.take()
        if self.log_base is not None and self.log_base != LOGS[name]:
            raise ParseError(f"'{name}' mixes logarithm bases; use one base throughout", self.text, pos)
        self.log_base = LOGS[name]
        self.take("(", f" after {name}")
        inner = self.inner()
        self.take(")", f" to close {name}(")
        return {inner: Fraction(1)}, Fraction(0)

    # inside a log: positive combinations only
    def inner(self) -> Inner:
        terms = [self.iterm()]
        while self.peek("+") or self.peek("-"):
            if self.peek("-"):
                raise self.error("subtraction inside a log is not supported (the GDoF would depend on "
                                 "cancellation)")
            self.take()
            terms.append(self.iterm())
        return terms[0] if len(terms) == 1 else Inner("add", tuple(terms))

    def iterm(self) -> Inner:
        node = self.ipow()
        while self.peek("*") or self.peek("/"):
            op = self.take()[1]
            right = self.ipow()
            node = Inner("mul", (node, right)) if op == "*" else Inner("div", (node, right))
        return node

    def ipow(self) -> Inner:
        kind, value, pos = self.toks[self.i]
        if kind == "name" and (value == self.snr or value in self.aliases):
            self.take()
            unit = self.aliases.get(value, const(1))
            exponent = self.exponent() if self.peek("^") and self.take() else const(1)
            return Inner("pow", (), exponent=_product(unit, exponent, self.text, pos))
        atom = self.iatom()
        if self.peek("^"):
            self.take()
            start = self.toks[self.i][2]
            k = self.exponent()
            if k.coeffs:
                raise NonlinearError("only SNR (or an alias) may be raised to a symbolic power", self.text, start)
            return Inner("powc", (atom,), value=k.const)
        return atom

    def iatom(self) -> Inner:
        kind, value, pos = self.toks[self.i]
        if kind == "num":
            self.take()
            if Fraction(value) <= 0:
                raise ParseError("constants inside a log must be positive", self.text, pos)
            return Inner("num", (), value=Fraction(value))
        if value == "(":
            self.take()
            node = self.inner()
            self.take(")")
            return node
        if kind == "name":
            raise ParseError(f"unknown name '{value}' inside a log (the SNR is '{self.snr}'; declare others "
                             "as aliases)", self.text, pos)
        raise self.error("expected a number, the SNR or '('")

    def exponent(self) -> Expr:
        kind, value, pos = self.toks[self.i]
        if value == "-":
            self.take()
            return scale(-1, self.exponent())
        if kind in ("num", "name"):
            self.take()
            return to_expr(value, "exponent")
        if value in ("(", "{"):
            return self.bracketed()
        raise self.error("expected an exponent")

    def bracketed(self) -> Expr:
        opener, start = self.take()[1], self.toks[self.i - 1][2]
        closer, depth = {"(": ")", "{": "}"}[opener], 1
        while depth:
            if self.peek(kind="end"):
                raise self.error(f"unclosed '{opener}' in an exponent")
            v = self.take()[1]
            depth += (v == opener) - (v == closer)
        body = self.text[start + 1:self.toks[self.i - 1][2]]
        from verifier.text.parse import parse_expr
        try:
            return parse_expr(body, self.names)
        except ParseError as err:
            offset = start + 1 + (err.position or 0)
            raise ParseError(f"in exponent: {err.message}", self.text, offset) from None


def _merge(a: dict, b: dict, sign: int) -> dict:
    out = dict(a)
    for k, v in b.items():
        out[k] = out.get(k, 0) + sign * v
    return out


def _product(unit: Expr, exponent: Expr, text: str, pos: int) -> Expr:
    """Exponent of ALIAS^k: k times the alias's exponent; one side must be a number."""
    try:
        return unit * exponent
    except NonlinearError:
        raise NonlinearError("an alias raised to a symbolic power is not linear", text, pos) from None
