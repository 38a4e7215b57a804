"""Tokens of the input grammar, and the tokenizer for the plain-text syntax.

Why a separate module: the text syntax (`min(2*alpha, gamma/2 + (1-alpha)^+)`) and the LaTeX subset
(`\\min\\{2\\alpha, \\frac{\\gamma}{2}+(1-\\alpha)^+\\}`) are read by one recursive-descent core
(verifier.text.parse).  Each syntax only needs its own tokenizer producing the `Token`s defined here, so the
two can never drift apart in what they accept.

Token kinds:
    num    value: Fraction (decimals are exact: 0.1 is 1/10)
    name   value: ASCII identifier (Greek letters already spelled out: alpha, beta, ...)
    op     value: + - * / ^ , ; |
    open   value: ( [ {        close  value: ) ] }
    gopen  gclose              LaTeX grouping braces { } (not set braces)
    rel    value: < <= == >= > !=
    kw     value: and or if for otherwise true everywhere false nowhere
    bad    value: a character outside the grammar (the parser reports it when it gets there)
    func   value: min max abs pos   (LaTeX \\min, \\max; in text a function is a name before a bracket)
    frac   LaTeX \\frac, \\tfrac, \\dfrac
    end    end of input
"""

from __future__ import annotations

import re

from dataclasses import dataclass
from fractions import Fraction

from verifier.core.errors import ParseError

MAX_INPUT_CHARS = 20000
MAX_LITERAL_DIGITS = 60

KEYWORDS = frozenset({"and", "or", "if", "for", "otherwise", "true", "everywhere", "false", "nowhere"})

GREEK = {
    "α": "alpha", "β": "beta", "γ": "gamma", "δ": "delta", "ε": "epsilon", "ϵ": "epsilon",
    "ζ": "zeta", "η": "eta", "θ": "theta", "ϑ": "theta", "ι": "iota", "κ": "kappa", "λ": "lambda",
    "μ": "mu", "ν": "nu", "ξ": "xi", "ο": "omicron", "π": "pi", "ρ": "rho", "ϱ": "rho", "σ": "sigma",
    "ς": "sigma", "τ": "tau", "υ": "upsilon", "φ": "phi", "ϕ": "phi", "χ": "chi", "ψ": "psi",
    "ω": "omega",
    "Γ": "Gamma", "Δ": "Delta", "Θ": "Theta", "Λ": "Lambda", "Ξ": "Xi", "Π": "Pi", "Σ": "Sigma",
    "Υ": "Upsilon", "Φ": "Phi", "Ψ": "Psi", "Ω": "Omega",
}

# characters pasted from PDFs and word processors that mean an ASCII operator
UNICODE_OPS = {"−": "-", "–": "-", "·": "*", "×": "*", "⋅": "*", "÷": "/"}
UNICODE_RELS = {"≤": "<=", "≥": ">=", "⩽": "<=", "⩾": ">=", "≠": "!="}

_ID_START = set("ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz_")
_ID_CHARS = _ID_START | set("0123456789")
_DIGITS = set("0123456789")


@dataclass(frozen=True)
class Token:
    kind: str
    value: object
    pos: int  # 0-based offset of the first character in the source
    end: int  # offset just past the last character

    def describe(self) -> str:
        """How an error message names this token."""
        if self.kind == "end":
            return "end of input"
        if self.kind == "num":
            return f"number '{self.value}'"
        if self.kind == "bad":
            return f"character {self.value!r}"
        return f"'\\{self.value}'" if self.kind == "frac" else f"'{self.value}'"


def normalize_name(name: str) -> str:
    """Greek letters spelled out (α_1 -> alpha_1), so declared names and parsed names agree."""
    return "".join(GREEK.get(ch, ch) for ch in name)


def check_length(source: str) -> None:
    if not isinstance(source, str):
        raise ParseError(f"expected text, got {type(source).__name__}")
    if len(source) > MAX_INPUT_CHARS:
        raise ParseError(f"input too long ({len(source)} characters, limit {MAX_INPUT_CHARS})",
                         source, MAX_INPUT_CHARS)


def read_number(source: str, i: int) -> tuple[Token, int]:
    """An integer or decimal literal at `i` (the caller saw a digit or '.' followed by a digit)."""
    j = i
    while j < len(source) and source[j] in _DIGITS:
        j += 1
    if j < len(source) and source[j] == "." and j + 1 <= len(source):
        k = j + 1
        while k < len(source) and source[k] in _DIGITS:
            k += 1
        if k > j + 1 or j > i:
            j = k
    literal = source[i:j]
    if sum(ch in _DIGITS for ch in literal) > MAX_LITERAL_DIGITS:
        raise ParseError(f"number too large ({literal[:12]}...)", source, i)
    if literal == ".":
        raise ParseError("unexpected character '.'", source, i)
    return Token("num", Fraction(literal), i, j), j


def read_identifier(source: str, i: int) -> tuple[str, int]:
    """[A-Za-z_][A-Za-z0-9_]* with Greek letters spelled out, plus a text-mode `_{sd}` subscript."""
    out: list[str] = []
    j = i
    while j < len(source) and (source[j] in _ID_CHARS or source[j] in GREEK):
        out.append(GREEK.get(source[j], source[j]))
        j += 1
        if source[j - 1] == "_" and j < len(source) and source[j] == "{":
            close = source.find("}", j)
            inner = source[j + 1:close] if close >= 0 else ""
            if close < 0 or not inner or not all(c in _ID_CHARS or c in GREEK for c in inner):
                raise ParseError("malformed subscript (expected letters and digits inside _{...})",
                                 source, j)
            out.append(normalize_name(inner))
            j = close + 1
    return "".join(out), j


_TWO_CHAR = {"**": ("op", "^"), "<=": ("rel", "<="), ">=": ("rel", ">="), "==": ("rel", "=="),
             "!=": ("rel", "!="), "=<": ("rel", "<="), "=>": ("rel", ">="), "&&": ("kw", "and")}
_ONE_CHAR = {"+": ("op", "+"), "-": ("op", "-"), "*": ("op", "*"), "/": ("op", "/"), "^": ("op", "^"),
             ",": ("op", ","), ";": ("op", ";"), "|": ("op", "|"), "(": ("open", "("), "[": ("open", "["),
             "{": ("open", "{"), ")": ("close", ")"), "]": ("close", "]"), "}": ("close", "}"),
             "<": ("rel", "<"), ">": ("rel", ">"), "=": ("rel", "==")}


def tokenize(source: str) -> list[Token]:
    """Tokens of the plain-text syntax, ending with an `end` token; never evaluates anything."""
    check_length(source)
    tokens: list[Token] = []
    i, n = 0, len(source)
    while i < n:
        ch = source[i]
        if ch.isspace():
            i += 1
        elif ch in _DIGITS or (ch == "." and i + 1 < n and source[i + 1] in _DIGITS):
            tok, i = read_number(source, i)
            tokens.append(tok)
        elif ch in _ID_START or ch in GREEK:
            name, j = read_identifier(source, i)
            kind = "kw" if name in KEYWORDS else "name"
            tokens.append(Token(kind, name, i, j))
            i = j
        elif source[i:i + 2] in _TWO_CHAR:
            kind, value = _TWO_CHAR[source[i:i + 2]]
            tokens.append(Token(kind, value, i, i + 2))
            i += 2
        elif ch in _ONE_CHAR or ch in UNICODE_OPS or ch in UNICODE_RELS:
            kind, value = _ONE_CHAR.get(ch) or (("op", UNICODE_OPS[ch]) if ch in UNICODE_OPS
                                                else ("rel", UNICODE_RELS[ch]))
            tokens.append(Token(kind, value, i, i + 1))
            i += 1
        else:  # reported by the parser when reached, so earlier errors (unknown function) win
            tokens.append(Token("bad", ch, i, i + 1))
            i += 1
    tokens.append(Token("end", None, n, n))
    _refuse_scientific(source, tokens)
    return tokens


_EXPONENT_LIKE = re.compile(r"[eE][0-9]*")


def _scientific_end(tok: Token, rest) -> int | None:
    """End of `e5` after `1`, or of `e-7` after `1` (a glued sign and digits); else None."""
    if not _EXPONENT_LIKE.fullmatch(tok.value):
        return None
    if tok.value[1:]:
        return tok.end
    sign, digits = rest[0], rest[1] if len(rest) > 1 else None
    if (sign.kind == "op" and sign.value in "+-" and sign.pos == tok.end and digits is not None
            and digits.kind == "num" and digits.pos == sign.end):
        return digits.end
    return None


def _refuse_scientific(source: str, tokens) -> None:
    """Refuse `1e-7`: the grammar reads juxtaposition as a product, so it would silently mean
    1*e - 7 when a parameter is called e (a false claim was once proved that way)."""
    for k in range(1, len(tokens)):
        tok, before = tokens[k], tokens[k - 1]
        if tok.kind != "name" or before.kind != "num" or before.end != tok.pos:
            continue
        end = _scientific_end(tok, tokens[k + 1:])
        if end is not None:
            raise ParseError(f"'{source[before.pos:end]}' is scientific notation, which expressions do "
                             "not read: write it as a fraction (in a case file also unquoted, as a TOML "
                             "number); for a product write 2*e", source, before.pos)
