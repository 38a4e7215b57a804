"""Reading the LaTeX a reviewer pastes from a manuscript: `\\min\\left\\{2\\alpha, \\frac{\\gamma}{2}\\right\\}`.

Why a tokenizer only: LaTeX is turned into the same tokens as the plain-text syntax and read by the
same recursive-descent core (verifier.text.parse.Parser), so the two syntaxes accept the same language and
build the same canonical trees.  Grouping braces `{...}` become `gopen`/`gclose` tokens (read like
parentheses), escaped braces `\\{ \\}` become set braces (the brackets of `\\min\\{...\\}`).

Supported: numbers, letters and Greek macros with subscripts (`a_{sd}` -> a_sd, `\\alpha_1` -> alpha_1,
and leniently `a_12` -> a_12), `\\mathrm{snr}` / `\\operatorname{max}`, `+ - \\cdot \\times /`,
`\\frac \\tfrac \\dfrac` (also `\\frac12`), `\\min \\max`, `|x|`, `\\lvert x \\rvert`, `(x)^+`, `(x)^{+}`,
sizing (`\\left \\right \\big \\Bigl ...`, `\\left.`), spacing (`\\, \\; \\! \\quad ~`, `&`, `\\\\`),
relations `< > = \\le \\leq \\leqslant \\ge \\geq \\geqslant`, connectives `,`, `\\text{and}`, `\\text{or}`,
`\\land`, `\\lor`, `\\wedge`, `\\vee`, paired `$` delimiters, and a `cases` / `dcases` environment as
a whole regime-wise value (rows `value & condition`, also with `\\text{if }` or `\\text{for }`; the rules
are in verifier.text.latex_cases).  Any other macro is an UnknownNameError naming it, with its column
in the fragment.
"""

from __future__ import annotations

from typing import Iterable

from verifier.core.errors import ParseError, UnknownNameError
from verifier.expressions.expr import Expr
from verifier.expressions.region import Region
from verifier.text.latex_cases import CasesTracker, blank_dollars
from verifier.text.lexer import GREEK, UNICODE_OPS, UNICODE_RELS, Token, check_length, read_number
from verifier.text.parse import Parser, Piecewise

GREEK_MACROS = {name: name for name in (
    "alpha beta gamma delta epsilon zeta eta theta iota kappa lambda mu nu xi pi rho sigma tau upsilon "
    "phi chi psi omega Gamma Delta Theta Lambda Xi Pi Sigma Upsilon Phi Psi Omega").split()}
GREEK_MACROS.update({"varepsilon": "epsilon", "vartheta": "theta", "varpi": "pi", "varrho": "rho",
                     "varsigma": "sigma", "varphi": "phi"})

IGNORED = set("quad qquad displaystyle textstyle scriptstyle nonumber notag".split()) | set(",;:! >")
SIZING = set("left right middle big Big bigg Bigg bigl bigr Bigl Bigr biggl biggr Biggl Biggr bigm "
             "Bigm".split())
SIMPLE = {
    "{": ("open", "{"), "}": ("close", "}"), "lbrace": ("open", "{"), "rbrace": ("close", "}"),
    "lbrack": ("open", "["), "rbrack": ("close", "]"), "lvert": ("op", "|"), "rvert": ("op", "|"),
    "vert": ("op", "|"), "min": ("func", "min"), "max": ("func", "max"), "frac": ("frac", "frac"),
    "tfrac": ("frac", "tfrac"), "dfrac": ("frac", "dfrac"), "cdot": ("op", "*"),
    "times": ("op", "*"), "ast": ("op", "*"), "leq": ("rel", "<="), "le": ("rel", "<="),
    "leqslant": ("rel", "<="), "geq": ("rel", ">="), "ge": ("rel", ">="), "geqslant": ("rel", ">="),
    "lt": ("rel", "<"), "gt": ("rel", ">"), "neq": ("rel", "!="), "ne": ("rel", "!="),
    "land": ("kw", "and"), "wedge": ("kw", "and"), "lor": ("kw", "or"), "vee": ("kw", "or"),
    "emptyset": ("kw", "false"), "varnothing": ("kw", "false"),
}
PROSE_MACROS = {"text", "textrm", "mbox", "textnormal"}           # only connectives: \text{ and }
NAME_MACROS = {"mathrm", "operatorname", "mathit"}                 # names and function names
TEXT_MACROS = PROSE_MACROS | NAME_MACROS
TEXT_WORDS = {"and", "or", "if", "for", "otherwise", "everywhere", "true", "false", "nowhere"}
FUNCTION_WORDS = {"min", "max"}
_ONE = {"+": ("op", "+"), "-": ("op", "-"), "*": ("op", "*"), "/": ("op", "/"), "^": ("op", "^"),
        ",": ("op", ","), ";": ("op", ";"), "|": ("op", "|"), "(": ("open", "("), ")": ("close", ")"),
        "[": ("open", "["), "]": ("close", "]"), "{": ("gopen", "{"), "}": ("gclose", "}"),
        "<": ("rel", "<"), ">": ("rel", ">"), "=": ("rel", "==")}
_ALNUM = set("ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789")
_LETTERS = set("ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz")


class _FracArgs:
    """Bookkeeping for one \\frac: how many arguments are still to come, at which brace depth."""

    def __init__(self, depth: int):
        self.remaining = 2
        self.depth = depth


class LatexLexer:
    """Turns a LaTeX fragment into verifier.text.lexer Tokens (positions are offsets in the fragment)."""

    def __init__(self, source: str):
        check_length(source)
        self.source = source
        self.text = blank_dollars(source)  # same length, so columns stay those of the fragment
        self.i = 0
        self.tokens: list[Token] = []
        self.braces = 0  # depth of grouping braces
        self.fracs: list[_FracArgs] = []
        self.cases = CasesTracker(source, self.tokens)  # inside: '&' means 'if' and '\\' ends a piece

    def fail(self, message: str, position: int, cls=ParseError):
        raise cls(message, self.source, position)

    def emit(self, kind: str, value, pos: int, end: int) -> None:
        last = self.tokens[-1] if self.tokens else None
        if kind == "kw" and value in ("if", "for") and last is not None and last.kind == "kw" and \
                last.value == "if":
            return  # `& \text{if }` in a cases row is one 'if'
        self.tokens.append(Token(kind, value, pos, end))

    def row_mark(self, ch: str, pos: int, end: int) -> None:
        """'&' (-> if) or '\\' (-> ;) in a cases environment; a comma just before it is punctuation."""
        if self.tokens and self.tokens[-1].kind == "op" and self.tokens[-1].value == ",":
            self.tokens.pop()
        if ch == "&":
            self.cases.ampersand(pos)
            self.emit("kw", "if", pos, end)
        else:
            self.cases.end_row(pos)
            self.emit("op", ";", pos, end)
            self.cases.next_row()

    def run(self) -> list[Token]:
        while self.skip_space() < len(self.text):
            if self.fracs and self.fracs[-1].depth == self.braces and self.fracs[-1].remaining:
                self.frac_argument()
            else:
                self.token()
            self.cases.check()
        self.cases.finish()
        if self.fracs:
            self.fail("\\frac needs two arguments", len(self.text))
        self.emit("end", None, len(self.text), len(self.text))
        return self.tokens

    def skip_space(self) -> int:
        t = self.text
        while self.i < len(t):
            if t[self.i].isspace() or t[self.i] == "~" or (t[self.i] == "&" and not self.cases.inside):
                self.i += 1
            elif t.startswith("\\\\", self.i) and not self.cases.inside:
                self.i += 2
            else:
                break
        return self.i

    # --- \frac arguments: {group} or one character / macro --------------------------------------
    def frac_argument(self) -> None:
        top = self.fracs[-1]
        ch, start = self.text[self.i], self.i
        if ch == "{":
            self.token()  # the group; its closing brace counts the argument (see close_group)
            return
        if ch in _ALNUM:
            self.emit("gopen", "{", start, start)
            if ch in _LETTERS:
                self.emit("name", ch, start, start + 1)
            else:
                self.emit("num", int(ch), start, start + 1)
            self.i += 1
            self.emit("gclose", "}", self.i, self.i)
        elif ch == "\\" or ch in GREEK:
            self.emit("gopen", "{", start, start)
            before = len(self.tokens)
            self.token()
            if len(self.tokens) != before + 1 or self.tokens[-1].kind != "name":
                self.fail("a \\frac argument without braces must be one digit, letter or Greek letter",
                          start)
            self.emit("gclose", "}", self.i, self.i)
        else:
            self.fail("expected '{' after \\frac", start)
        self.count_frac_argument(top)

    def count_frac_argument(self, top: _FracArgs) -> None:
        top.remaining -= 1
        if not top.remaining:
            self.fracs.pop()

    def close_group(self) -> None:
        self.braces -= 1
        if self.fracs and self.fracs[-1].depth == self.braces and self.fracs[-1].remaining:
            self.count_frac_argument(self.fracs[-1])

    # --- one token ---------------------------------------------------------------------------
    def token(self) -> None:
        t, start = self.text, self.i
        ch = t[start]
        if self.cases.inside and (ch == "&" or t.startswith("\\\\", start)):
            self.i += 1 if ch == "&" else 2
            self.row_mark(ch, start, self.i)
        elif ch == "\\":
            self.macro()
        elif ch in "0123456789" or (ch == "." and t[start + 1:start + 2].isdigit()):
            tok, self.i = read_number(self.source, start)
            self.tokens.append(tok)
        elif ch in _LETTERS:
            j = start
            while j < len(t) and t[j] in _ALNUM:
                j += 1
            self.i = j
            self.name(t[start:j], start)
        elif ch in GREEK:
            self.i += 1
            self.name(GREEK[ch], start)
        elif t[start:start + 2] in ("<=", ">=", "!="):
            self.emit("rel", t[start:start + 2], start, start + 2)
            self.i += 2
        elif ch in _ONE:
            kind, value = _ONE[ch]
            self.emit(kind, value, start, start + 1)
            self.i += 1
            if kind == "gopen":
                self.braces += 1
            elif kind == "gclose":
                self.close_group()
        elif ch in UNICODE_OPS or ch in UNICODE_RELS:
            self.emit(*(("op", UNICODE_OPS[ch]) if ch in UNICODE_OPS else ("rel", UNICODE_RELS[ch])),
                      start, start + 1)
            self.i += 1
        else:
            self.emit("bad", ch, start, start + 1)
            self.i += 1

    def read_macro(self) -> tuple[str, int]:
        """The macro at the cursor (without backslash) and where it starts; moves past it."""
        t, start = self.text, self.i
        j = start + 1
        if j < len(t) and t[j] in _LETTERS:
            while j < len(t) and t[j] in _LETTERS:
                j += 1
        else:
            j = min(j + 1, len(t))
        self.i = j
        return t[start + 1:j], start

    def macro(self) -> None:
        word, start = self.read_macro()
        if word in IGNORED:
            return
        if word in SIZING:
            self.skip_space()
            if self.text[self.i:self.i + 1] == ".":
                self.i += 1  # \left. is an invisible delimiter
            return
        if word in GREEK_MACROS:
            self.name(GREEK_MACROS[word], start)
        elif word in SIMPLE:
            kind, value = SIMPLE[word]
            self.emit(kind, value, start, self.i)
            if kind == "frac":
                self.fracs.append(_FracArgs(self.braces))
        elif word in TEXT_MACROS:
            self.text_macro(word, start)
        elif word in ("begin", "end"):
            env = self.braced_word(word, start)
            if word == "begin":
                self.cases.begin(env, start)
            else:
                self.cases.end(env, start)
                self.i = self.cases.after(self.text, self.i)
        else:
            self.fail(f"unknown macro '\\{word}'", start, UnknownNameError)

    def braced_word(self, macro: str, start: int) -> str:
        self.skip_space()
        close = self.text.find("}", self.i)
        if not self.text.startswith("{", self.i) or close < 0:
            self.fail(f"expected '{{...}}' after '\\{macro}'", self.i)
        word = self.text[self.i + 1:close].strip().replace("\\_", "_")
        self.i = close + 1
        return word

    def text_macro(self, macro: str, start: int) -> None:
        """\\text{and} is a connective; \\mathrm{snr} a name; \\operatorname{max} a function."""
        word = self.braced_word(macro, start)
        if word in TEXT_WORDS:
            self.emit("kw", word, start, self.i)
        elif macro in PROSE_MACROS:
            self.fail(f"unsupported text '\\{macro}{{{word}}}' (only and, or, if, for, everywhere)",
                      start)
        elif word in FUNCTION_WORDS:
            self.emit("func", word, start, self.i)
        elif word and word[0] in _LETTERS | {"_"} and all(c in _ALNUM or c == "_" for c in word):
            self.name(word, start)
        else:
            self.fail(f"unsupported text '\\{macro}{{{word}}}'", start)

    # --- names and subscripts ------------------------------------------------------------------
    def name(self, base: str, start: int) -> None:
        sub = self.subscript() if self.text.startswith("_", self.i) else None
        value = base if sub is None else f"{base}_{sub}"
        self.emit("kw" if value in TEXT_WORDS else "name", value, start, self.i)

    def subscript(self) -> str:
        """After `_`: `{sd}`, `{1}`, `{\\alpha}`, `{\\mathrm{sd}}`, `1`, `\\alpha`, leniently `12`."""
        underscore = self.i
        self.i += 1
        t, start = self.text, self.i
        if t.startswith("{", start):
            close = t.find("}", start)
            inner, self.i = self._subscript_body(start + 1, close), close + 1
            # \mathrm{sd} inside the braces closes an extra brace
            while inner.count("{") != inner.count("}") and close >= 0:
                close = t.find("}", self.i)
                inner, self.i = self._subscript_body(start + 1, close), close + 1
            return self._subscript_text(inner, start + 1, underscore)
        if t.startswith("\\", start):
            word, _ = self.read_macro()
            return self._subscript_text("\\" + word, start, underscore)
        j = start
        while j < len(t) and t[j] in _ALNUM:
            j += 1
        self.i = j
        return self._subscript_text(t[start:j], start, underscore)

    def _subscript_body(self, begin: int, close: int) -> str:
        if close < 0:
            self.fail("unclosed subscript '{'", begin - 1)
        return self.text[begin:close]

    def _subscript_text(self, inner: str, start: int, underscore: int) -> str:
        """The identifier part of a subscript; `start` is the offset of `inner` in the fragment."""
        out, k = [], 0
        while k < len(inner):
            ch = inner[k]
            if ch in _ALNUM:
                out.append(ch)
                k += 1
            elif ch.isspace() or ch in "{}":
                k += 1
            elif inner.startswith("\\_", k):
                out.append("_")
                k += 2
            elif ch in GREEK:
                out.append(GREEK[ch])
                k += 1
            elif ch == "\\":
                j = k + 1
                while j < len(inner) and inner[j] in _LETTERS:
                    j += 1
                word = inner[k + 1:j]
                if word in GREEK_MACROS:
                    out.append(GREEK_MACROS[word])
                elif word not in TEXT_MACROS:
                    self.fail(f"unknown macro '\\{word}' in subscript", start + k, UnknownNameError)
                k = j
            else:
                self.fail(f"unsupported character {ch!r} in subscript", start + k)
        if not out:
            self.fail("empty subscript", underscore)
        return "".join(out)


def latex_tokens(text: str) -> list[Token]:
    return LatexLexer(text).run()


def _run(text: str, names, what: str):
    lexer = LatexLexer(text)
    tokens = lexer.run()
    if what != "piecewise" and lexer.cases.begun_at is not None:
        raise ParseError("a cases environment defines a value regime by regime, which cannot stand here",
                         text, lexer.cases.begun_at)
    return Parser(tokens, text, names).run(what)


def parse_latex_expr(text: str, names: Iterable[str] | None = None) -> Expr:
    """`\\min\\left\\{2\\alpha, \\frac{\\gamma}{2}+(1-\\alpha)^+\\right\\}` -> Expr."""
    return _run(text, names, "expr")


def parse_latex_region(text: str, names: Iterable[str] | None = None) -> Region:
    """`0 \\le \\alpha \\le \\tfrac12,\\ \\gamma > \\alpha \\text{ or } \\alpha > 2` -> Region."""
    return _run(text, names, "region")


def parse_latex_relation(text: str, names: Iterable[str] | None = None):
    """A single `lhs REL rhs` in LaTeX; REL is returned as one of < <= == >= >."""
    return _run(text, names, "relation")


def parse_latex_piecewise(text: str, names: Iterable[str] | None = None) -> Piecewise:
    """`1-\\alpha \\text{ if } \\alpha \\le \\frac12; \\alpha \\text{ otherwise}`, or a cases environment:
    `\\begin{cases} 1-\\alpha, & \\alpha \\le \\frac12 \\\\ \\alpha, & \\text{otherwise} \\end{cases}`."""
    return _run(text, names, "piecewise")
