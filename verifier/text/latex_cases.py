"""The structure around LaTeX math that the token stream cannot show: `$` delimiters and the `cases`
environment of a regime-wise definition.

Why a module of its own: the LaTeX lexer (verifier.text.latex_in) used to blank out every `$` and to
treat `\\begin{cases}` / `\\end{cases}` as switches, so `$\\alpha` and a `\\begin{cases}` without its
`\\end` were read as if they were well formed, and text after `\\end{cases}` was silently glued onto the
condition of the last row (`... & \\alpha > 1 \\end{cases} + 1` meant `alpha > 2`).  A pasted bound
that is not what the manuscript says must be refused where it goes wrong, so the rules live here, each
raising a ParseError at the offending character:

- `$` (not `\\$`) come in pairs;
- a `cases` (or `dcases`) environment is the whole value: nothing but spacing before `\\begin`,
  nothing but one `.`, `,` or `;` after `\\end`; environments do not nest;
- every `\\begin{cases}` has its `\\end{cases}` and every `\\end` its `\\begin`;
- each row is `value & condition` with at most one `&` (or `value \\text{ if } condition`), rows end
  with `\\\\`; `&` stands for 'if', `\\\\` for ';', so a row reads exactly like the text form
  `value if condition; ...` (verifier.text.parse.Parser.pieces).
"""

from __future__ import annotations

import re
from dataclasses import dataclass

from verifier.core.errors import ParseError

ENVIRONMENTS = ("cases", "dcases")
ROW_WORDS = ("if", "for", "otherwise")      # a row's condition starts with one of these tokens
AFTER_END = ".,;"                            # sentence punctuation allowed after \end{cases}
_DOLLAR = re.compile(r"(?<!\\)\$")


def blank_dollars(source: str) -> str:
    """`source` with each math delimiter `$` replaced by a space (same length, so columns stay those of
    the fragment); an unpaired `$` is a ParseError at the one left open."""
    marks = [m.start() for m in _DOLLAR.finditer(source)]
    if len(marks) % 2:
        raise ParseError("unbalanced '$' (this math delimiter is never closed)", source, marks[-1])
    return _DOLLAR.sub(" ", source)


@dataclass
class Cases:
    """An open cases environment: its name, where `\\begin` stands, where the current row's tokens
    start, and whether the row has had its `&`."""

    name: str
    begin: int
    row_start: int
    amp: bool = False


class CasesTracker:
    """What the lexer asks about environments; `tokens` is the lexer's token list (shared)."""

    def __init__(self, source: str, tokens: list):
        self.source = source
        self.tokens = tokens
        self.open: Cases | None = None
        self.closed_at: int | None = None     # token count when \end{cases} was read
        self.begun_at: int | None = None      # position of the \begin, once one was read

    def fail(self, message: str, position: int):
        raise ParseError(message, self.source, position)

    @property
    def inside(self) -> bool:
        return self.open is not None

    def begin(self, env: str, start: int) -> None:
        if env not in ENVIRONMENTS:
            self.fail(f"unsupported environment '{env}' (only cases)", start)
        if self.open is not None:
            self.fail(f"'\\begin{{{env}}}' inside '\\begin{{{self.open.name}}}': cases do not nest", start)
        if self.tokens or self.closed_at is not None:
            self.fail("a cases environment must be the whole value; found text before "
                      f"'\\begin{{{env}}}'", start)
        self.open = Cases(env, start, 0)
        self.begun_at = start

    def end(self, env: str, start: int) -> None:
        if self.open is None:
            self.fail(f"'\\end{{{env}}}' without '\\begin{{{env}}}'", start)
        if env != self.open.name:
            self.fail(f"'\\end{{{env}}}' does not close '\\begin{{{self.open.name}}}'", start)
        last = self.tokens[-1] if self.tokens else None
        if last is not None and last.kind in ("op", "bad") and last.value in (",", "."):
            self.tokens.pop()  # sentence punctuation before \end{cases}
        self.end_row(start)
        self.open = None
        self.closed_at = len(self.tokens)

    def ampersand(self, start: int) -> None:
        if self.open.amp:
            self.fail("a second '&' in one row of cases (a row is 'value & condition')", start)
        self.open.amp = True

    def end_row(self, start: int) -> None:
        """At `\\\\` or `\\end`: the row just finished must have a condition, unless it is empty."""
        row = self.tokens[self.open.row_start:]
        if row and not any(t.kind == "kw" and t.value in ROW_WORDS for t in row):
            self.fail("a row of cases needs '&' and its condition (or 'otherwise')", row[0].pos)
        self.open.amp = False

    def next_row(self) -> None:
        self.open.row_start = len(self.tokens)

    def after(self, text: str, i: int) -> int:
        """Right after `\\end{cases}`: skip one sentence punctuation mark."""
        while i < len(text) and text[i].isspace():
            i += 1
        return i + 1 if i < len(text) and text[i] in AFTER_END else i

    def check(self) -> None:
        """After each token: nothing may follow `\\end{cases}`."""
        if self.closed_at is not None and len(self.tokens) > self.closed_at:
            self.fail("text after '\\end{cases}': a cases environment must be the whole value",
                      self.tokens[self.closed_at].pos)

    def finish(self) -> None:
        if self.open is not None:
            self.fail(f"'\\begin{{{self.open.name}}}' without '\\end{{{self.open.name}}}'", self.open.begin)
