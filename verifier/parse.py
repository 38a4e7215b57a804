"""Reading expressions, regions, relations and piecewise schemes from text, without ever calling eval.

Why hand-written: the grammar is tiny (rationals, parameters, + - and multiplication by constants,
min/max, positive part, absolute value, linear constraints), and a recursive-descent parser over a token
list lets every error name the offending piece and its column.  The same `Parser` reads the tokens of
the LaTeX subset (verifier.latex_in), so both syntaxes always accept the same language.

Every node is built through the smart constructors of verifier.expr, so the result is canonical and
`parse_expr(to_text(e)) == e`.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Iterable, Mapping, Sequence

from .errors import InputError, NonlinearError, ParseError, RegionError, UnknownNameError
from .expr import (Affine, Expr, abs_, add, children, const, constant_value, evaluate, is_constant,
                   max_, min_, param, params, pos, scale, to_text)
from .lexer import Token, normalize_name, tokenize
from .region import Atom, Polyhedron, Region, atoms_of

MAX_DEPTH = 100       # bracket nesting; papers never come near it, and it keeps recursion bounded
MAX_BITS = 665        # about 200 decimal digits for any computed numerator or denominator
MAX_OTHERWISE_PIECES = 256  # the complement behind 'otherwise' is a product of negated atoms
MAX_NODES = 20000     # |x| = max(x, -x) doubles the tree, so nested bars could blow up exponentially
FUNCTIONS = {"min": "min", "max": "max", "Min": "min", "Max": "max", "pos": "pos", "abs": "abs",
             "Abs": "abs"}
CLOSER = {"(": ")", "[": "]", "{": "}"}
RELATION_WORDS = {"<": "<", "<=": "<=", "==": "==", ">=": ">=", ">": ">"}


@dataclass(frozen=True)
class _Val:
    """A parsed sub-expression with its source span (for 'nonlinear term ...' messages)."""

    expr: Expr
    start: int
    end: int


def _too_large(e: Expr) -> bool:
    if isinstance(e, Affine):
        nums = [e.const] + [c for _, c in e.coeffs]
        return any(abs(q.numerator).bit_length() > MAX_BITS or q.denominator.bit_length() > MAX_BITS
                   for q in nums)
    return any(_too_large(c) for c in children(e))


def _tree_size(e: Expr, memo: dict) -> int:
    """Node count of the expanded tree; memoised on shared sub-trees so it is cheap to ask."""
    hit = memo.get(id(e))
    if hit is None:
        hit = (e, 1 + sum(_tree_size(c, memo) for c in children(e)))
        memo[id(e)] = hit  # keeps `e` alive, so its id cannot be reused during this parse
    return hit[1]


def _direction(atom: Atom) -> tuple[tuple, Fraction, bool]:
    """(coefficients scaled so the first has magnitude 1, scaled constant, strict)."""
    scale_by = abs(atom.form.coeffs[0][1])
    coeffs = tuple((n, c / scale_by) for n, c in atom.form.coeffs)
    return coeffs, atom.form.const / scale_by, atom.strict


def _tidy(poly: Polyhedron) -> Polyhedron | None:
    """Drop a polyhedron that a false constant atom or an opposite pair of atoms makes empty, and keep
    only the tightest of parallel atoms.  Exact and cheap (no LP, so some empty ones remain)."""
    best: dict[tuple, tuple[Fraction, bool, Atom]] = {}
    for atom in poly.atoms:
        if not atom.form.coeffs:
            if not atom.holds({}):
                return None
            continue
        coeffs, k, strict = _direction(atom)  # the atom says L + k > 0 (or >= 0)
        old = best.get(coeffs)
        if old is None or k < old[0] or (k == old[0] and strict):
            best[coeffs] = (k, strict, atom)
    for coeffs, (k, strict, _) in best.items():
        opposite = tuple((n, -c) for n, c in coeffs)
        if opposite in best:  # L >= -k and -L >= -k2, i.e. -k <= L <= k2
            k2, strict2, _ = best[opposite]
            if -k > k2 or (-k == k2 and (strict or strict2)):
                return None
    kept = {entry[2] for entry in best.values()}
    return Polyhedron(tuple(a for a in poly.atoms if a in kept))


class Parser:
    """Recursive descent over a token list from either tokenizer (verifier.lexer or verifier.latex_in).

    Precedence, loosest first: `or` > `,`/`and` > relation chain > `+ -` > `* /` and juxtaposition >
    unary sign > `^` > primary (number, name, call, bracket, |...|, \\frac).
    """

    def __init__(self, tokens: list[Token], source: str, names: Iterable[str] | None = None):
        self.tokens = tokens
        self.source = source
        self.names = None if names is None else frozenset(normalize_name(n) for n in names)
        self.i = 0
        self.depth = 0
        self.abs_depth = 0
        self.sizes: dict = {}

    # --- token helpers ----------------------------------------------------------------------
    def peek(self, k: int = 0) -> Token:
        return self.tokens[min(self.i + k, len(self.tokens) - 1)]

    def advance(self) -> Token:
        tok = self.peek()
        self.i = min(self.i + 1, len(self.tokens) - 1)
        return tok

    def at(self, kind: str, *values) -> bool:
        tok = self.peek()
        return tok.kind == kind and (not values or tok.value in values)

    def fail(self, message: str, position: int, cls=ParseError):
        raise cls(message, self.source, position)

    def unexpected(self, tok: Token, expected: str = ""):
        if tok.kind == "bad":
            self.fail(f"unexpected character {tok.value!r}", tok.pos)
        if tok.kind in ("close", "gclose"):
            self.fail(f"unmatched {tok.describe()}", tok.pos)
        suffix = f" (expected {expected})" if expected else ""
        self.fail(f"unexpected {tok.describe()}{suffix}", tok.pos)

    def expect_end(self) -> None:
        if not self.at("end"):
            self.unexpected(self.peek())

    def enter(self, tok: Token) -> None:
        self.depth += 1
        if self.depth > MAX_DEPTH:
            self.fail(f"expression nested too deeply (more than {MAX_DEPTH} levels)", tok.pos)

    def close(self, opener: Token) -> Token:
        """Consume the bracket that matches `opener`, or explain what is wrong."""
        tok = self.peek()
        want = "gclose" if opener.kind == "gopen" else "close"
        if tok.kind == want and (want == "gclose" or tok.value == CLOSER[opener.value]):
            self.depth -= 1
            return self.advance()
        shown = "{" if opener.kind == "gopen" else opener.value
        if tok.kind == "end":
            self.fail(f"unclosed '{shown}'", opener.pos)
        if tok.kind in ("close", "gclose"):
            self.fail(f"mismatched {tok.describe()} for '{shown}'", tok.pos)
        self.unexpected(tok, "',' or a closing bracket")

    # --- arithmetic --------------------------------------------------------------------------
    def checked(self, e: Expr, position: int) -> Expr:
        if _too_large(e):
            self.fail("number too large", position)
        return e

    def nonlinear(self, left: _Val, right: _Val):
        term = self.source[left.start:right.end]
        self.fail(f"nonlinear term '{term}'", left.start, NonlinearError)

    def multiply(self, left: _Val, right: _Val) -> _Val:
        if is_constant(left.expr):
            e = scale(constant_value(left.expr), right.expr)
        elif is_constant(right.expr):
            e = scale(constant_value(right.expr), left.expr)
        else:
            self.nonlinear(left, right)
        return _Val(self.checked(e, left.start), left.start, right.end)

    def divide(self, left: _Val, right: _Val) -> _Val:
        if not is_constant(right.expr):
            self.nonlinear(left, right)
        value = constant_value(right.expr)
        if value == 0:
            self.fail("division by zero", right.start)
        return _Val(self.checked(scale(1 / value, left.expr), left.start), left.start, right.end)

    # --- grammar: sum > product > factor > postfix > primary ------------------------------------
    def sum(self) -> _Val:
        first = self.product()
        terms, end = [first.expr], first.end
        while self.at("op", "+", "-"):
            negative = self.advance().value == "-"
            nxt = self.product()
            terms.append(scale(-1, nxt.expr) if negative else nxt.expr)
            end = nxt.end
        if len(terms) == 1:
            return first
        return _Val(self.checked(add(*terms), first.start), first.start, end)

    def starts_implicit_factor(self) -> bool:
        tok = self.peek()
        if tok.kind in ("name", "func", "open", "gopen", "frac"):
            return True
        return tok.kind == "op" and tok.value == "|" and self.abs_depth == 0

    def product(self) -> _Val:
        left = self.factor()
        while True:
            if self.at("op", "*"):
                self.advance()
                left = self.multiply(left, self.factor())
            elif self.at("op", "/"):
                self.advance()
                left = self.divide(left, self.factor())
            elif self.starts_implicit_factor():  # 2alpha, 2 (1 - beta), \frac12\gamma
                left = self.multiply(left, self.factor())
            else:
                return left

    def factor(self) -> _Val:
        start, negative = self.peek().pos, False
        while self.at("op", "+", "-"):  # a loop, not recursion: '- - - alpha' is fine
            negative ^= self.advance().value == "-"
        val = self.postfix()
        if negative:
            return _Val(scale(-1, val.expr), start, val.end)
        return _Val(val.expr, start, val.end)

    def postfix(self) -> _Val:
        base = self.primary()
        if not self.at("op", "^"):
            return base
        self.advance()
        if self.exponent_is_plus():
            return _Val(pos(base.expr), base.start, self.tokens[self.i - 1].end)
        k, end = self.integer_exponent()
        if self.at("op", "^"):
            self.fail("chained powers are ambiguous; add parentheses", self.peek().pos)
        return _Val(self.power(base, k, end), base.start, end)

    def exponent_is_plus(self) -> bool:
        """`^+`, `^{+}`, `^(+)`: the positive part."""
        if self.at("op", "+"):
            self.advance()
            return True
        tok, mid, last = self.peek(), self.peek(1), self.peek(2)
        if tok.kind in ("open", "gopen") and mid.kind == "op" and mid.value == "+" and \
                last.kind in ("close", "gclose"):
            self.i += 3
            return True
        return False

    def integer_exponent(self) -> tuple[int, int]:
        """`^2`, `^-1`, `^{2}`, `^(2)`: an integer exponent and the offset where it ends."""
        opener = self.advance() if (self.at("open", "(", "{") or self.at("gopen")) else None
        if opener is not None:
            self.enter(opener)
        negative = self.at("op", "-")
        if negative:
            self.advance()
        first, tok = self.peek().pos if opener is None else opener.pos, self.advance()
        if tok.kind != "num" or tok.value.denominator != 1 or \
                (opener is not None and not (self.at("close") or self.at("gclose"))):
            self.fail("unsupported exponent: only '^+' (positive part) and integer powers of "
                      "constants are allowed", first)
        k = -int(tok.value) if negative else int(tok.value)
        end = self.close(opener).end if opener is not None else tok.end
        return k, end

    def power(self, base: _Val, k: int, end: int) -> Expr:
        if not is_constant(base.expr):
            if k == 1:
                return base.expr
            self.fail(f"nonlinear term '{self.source[base.start:end]}'", base.start, NonlinearError)
        c = constant_value(base.expr)
        if c == 0 and k < 0:
            self.fail("division by zero", base.start)
        bits = max(abs(c.numerator).bit_length(), c.denominator.bit_length())
        if abs(k) > 10000 or bits * abs(k) > MAX_BITS + 64:
            self.fail("number too large", base.start)
        return self.checked(const(c ** k), base.start)

    def primary(self) -> _Val:
        tok = self.advance()
        if tok.kind == "num":
            return _Val(const(tok.value), tok.pos, tok.end)
        if tok.kind == "name":
            return self.name_or_call(tok)
        if tok.kind == "func":
            return self.call(tok, tok.value)
        if tok.kind in ("open", "gopen"):
            self.enter(tok)
            inner = self.sum()
            end = self.close(tok).end
            return _Val(inner.expr, tok.pos, end)
        if tok.kind == "op" and tok.value == "|":
            return self.absolute(tok)
        if tok.kind == "frac":
            return self.frac(tok)
        if tok.kind == "end":
            empty = self.tokens[0].kind == "end"
            self.fail("empty input" if empty else "unexpected end of input", 0 if empty else tok.pos)
        self.unexpected(tok, "a number, a parameter or '('")

    def name_or_call(self, tok: Token) -> _Val:
        nxt = self.peek()
        glued = nxt.kind in ("open", "gopen") and nxt.pos == tok.end
        if tok.value in FUNCTIONS:
            if nxt.kind not in ("open", "gopen"):
                self.fail(f"expected '(' after '{tok.value}'", nxt.pos)
            return self.call(tok, FUNCTIONS[tok.value])
        if glued and nxt.value == "(" and (self.names is None or tok.value not in self.names):
            self.fail(f"unknown function '{tok.value}'", tok.pos, UnknownNameError)
        if self.names is not None and tok.value not in self.names:
            known = ", ".join(sorted(self.names)) or "none declared"
            self.fail(f"unknown parameter '{tok.value}' (known: {known})", tok.pos, UnknownNameError)
        return _Val(param(tok.value), tok.pos, tok.end)

    def call(self, tok: Token, fname: str) -> _Val:
        opener = self.advance()
        if opener.kind not in ("open", "gopen"):
            self.fail(f"expected '(' or '{{' after '{self.source[tok.pos:tok.end]}'", opener.pos)
        self.enter(opener)
        if self.at("close") or self.at("gclose"):
            self.fail(f"'{fname}' needs at least one argument", self.peek().pos)
        args = [self.sum().expr]
        while self.at("op", ","):
            self.advance()
            args.append(self.sum().expr)
        end = self.close(opener).end
        if fname in ("pos", "abs") and len(args) != 1:
            self.fail(f"'{fname}' takes one argument, got {len(args)}", tok.pos)
        if fname == "abs":
            self.bounded(args[0], tok.pos, factor=2)
        build = {"min": min_, "max": max_, "pos": pos, "abs": abs_}[fname]
        return _Val(build(*args), tok.pos, end)

    def absolute(self, tok: Token) -> _Val:
        self.enter(tok)
        self.abs_depth += 1
        inner = self.sum()
        self.abs_depth -= 1
        if not self.at("op", "|"):
            if self.at("end"):
                self.fail("unclosed '|'", tok.pos)
            self.unexpected(self.peek(), "'|'")
        self.depth -= 1
        end = self.advance().end
        self.bounded(inner.expr, tok.pos, factor=2)  # check before building: abs_ doubles the tree
        return _Val(abs_(inner.expr), tok.pos, end)

    def bounded(self, e: Expr, position: int, factor: int = 1) -> Expr:
        if factor * _tree_size(e, self.sizes) > MAX_NODES:
            self.fail(f"expression too large (more than {MAX_NODES} nodes once |...| is expanded)",
                      position)
        return e

    def frac(self, tok: Token) -> _Val:
        """LaTeX \\frac{a}{b}: the tokenizer already wrapped one-character arguments in groups."""
        parts = []
        for _ in range(2):
            opener = self.advance()
            if opener.kind != "gopen":
                self.fail(f"expected '{{' after '{self.source[tok.pos:tok.end]}'", opener.pos)
            self.enter(opener)
            inner = self.sum()
            close = self.close(opener)
            parts.append(_Val(inner.expr, opener.pos, close.end))
        num, den = parts
        quotient = self.divide(_Val(num.expr, tok.pos, num.end), _Val(den.expr, den.start, den.end))
        return _Val(quotient.expr, tok.pos, den.end)

    # --- relations and regions ---------------------------------------------------------------
    def relation_token(self) -> Token:
        tok = self.advance()
        if tok.value == "!=":
            self.fail("'!=' is not supported; write the two sides as regions joined by 'or'", tok.pos)
        return tok

    def chain(self) -> Region:
        """`gamma > alpha > 1`, `0 <= alpha <= 1/2`: one atom per adjacent pair."""
        left = self.sum()
        if not self.at("rel"):
            self.unexpected(self.peek(), "a relation <, <=, =, >=, >")
        atoms = []
        while self.at("rel"):
            rel = RELATION_WORDS.get(self.relation_token().value)
            right = self.sum()
            try:
                atoms.extend(atoms_of(left.expr, rel, right.expr))
            except RegionError as err:
                raise RegionError(err.message, self.source, left.start) from None
            left = right
        return Region.of(*atoms)

    def is_group(self) -> bool:
        """Does the bracket at the cursor hold constraints (a group) rather than an expression?"""
        depth = 0
        for tok in self.tokens[self.i:]:
            if tok.kind in ("open", "gopen"):
                depth += 1
            elif tok.kind in ("close", "gclose"):
                depth -= 1
                if depth == 0:
                    return False
            elif depth == 1 and (tok.kind in ("rel", "kw") or (tok.kind == "op" and tok.value == ",")):
                return True
            elif tok.kind == "end":
                return False
        return False

    def region_item(self) -> Region:
        tok = self.peek()
        if tok.kind == "kw" and tok.value in ("true", "everywhere"):
            self.advance()
            return Region.everywhere()
        if tok.kind == "kw" and tok.value in ("false", "nowhere"):
            self.advance()
            return Region(())
        if tok.kind in ("open", "gopen") and self.is_group():
            self.advance()
            self.enter(tok)
            inner = self.disjunction()
            self.close(tok)
            return inner
        return self.chain()

    def conjunction(self) -> Region:
        out = self.region_item()
        while self.at("op", ",") or self.at("kw", "and"):
            self.advance()
            out = out.meet(self.region_item())
        return out

    def disjunction(self) -> Region:
        out = self.conjunction()
        while self.at("kw", "or"):
            self.advance()
            out = out.join(self.conjunction())
        return out

    def relation(self) -> tuple[Expr, str, Expr]:
        left = self.sum().expr
        if not self.at("rel"):
            self.unexpected(self.peek(), "a relation <, <=, =, >=, >")
        rel = RELATION_WORDS[self.relation_token().value]
        right = self.sum().expr
        if self.at("rel"):
            self.fail("expected a single relation, not a chain", self.peek().pos)
        return left, rel, right

    # --- entry points (each consumes the whole input) ------------------------------------------
    def run(self, what: str):
        try:
            result = {"expr": lambda: self.sum().expr, "region": self.disjunction,
                      "relation": self.relation, "piecewise": self.pieces}[what]()
        except RecursionError:
            raise ParseError("expression nested too deeply", self.source, self.peek().pos) from None
        self.expect_end()
        return result

    def pieces(self) -> "Piecewise":
        """`expr if region; ...`, the last piece possibly `expr otherwise` (or `expr if otherwise`)."""
        out: list[tuple[Expr, Region]] = []
        while True:
            expr = self.sum().expr
            if self.at("kw", "if", "for"):
                self.advance()
            elif not self.at("kw", "otherwise"):
                self.unexpected(self.peek(), "'if' and a region")
            if self.at("kw", "otherwise"):
                tok = self.advance()
                out.append((expr, self.complement([r for _, r in out], tok)))
                if self.at("op", ";") and self.peek(1).kind != "end":
                    self.fail("'otherwise' must be the last piece", self.peek().pos)
            else:
                out.append((expr, self.disjunction()))
            if not self.at("op", ";"):
                break
            self.advance()
            if self.at("end"):
                break
        return Piecewise(tuple(out))

    def complement(self, regions: list[Region], tok: Token) -> Region:
        """Where none of `regions` holds, in disjunctive normal form (atoms negated exactly)."""
        out = Region.everywhere()
        for region in regions:
            for poly in region.pieces:
                out = out.meet(Region(tuple(Region.of(a.negated()).pieces[0] for a in poly.atoms)))
                out = Region(tuple(p for p in map(_tidy, out.pieces) if p is not None))
                if len(out.pieces) > MAX_OTHERWISE_PIECES:
                    self.fail(f"'otherwise' would need more than {MAX_OTHERWISE_PIECES} polyhedra; "
                              "state its region", tok.pos)
        return out


# ---------------------------------------------------------------------------------------------
# piecewise schemes
# ---------------------------------------------------------------------------------------------

@dataclass(frozen=True)
class Piecewise:
    """An expression given regime by regime: `(expr, region)` pairs in the order written.

    Coverage and overlap are the engine's business; `evaluate` takes the first piece whose region
    contains the point.
    """

    pieces: tuple[tuple[Expr, Region], ...]

    def evaluate(self, point: Mapping[str, object]) -> Fraction:
        for expr, region in self.pieces:
            if region.contains(point):
                return evaluate(expr, point)
        shown = ", ".join(f"{k}={v}" for k, v in sorted(point.items()))
        raise RegionError(f"the point ({shown}) lies in no piece of the piecewise expression")

    def params(self) -> frozenset[str]:
        out: frozenset[str] = frozenset()
        for expr, region in self.pieces:
            out |= params(expr) | region.params()
        return out

    def text(self) -> str:
        """The `expr if region; ...` form that parse_piecewise reads back."""
        return "; ".join(f"{to_text(e)} if {r.text()}" for e, r in self.pieces)

    def __str__(self) -> str:
        return self.text()


# ---------------------------------------------------------------------------------------------
# public API
# ---------------------------------------------------------------------------------------------

def _run(text: str, names, what: str):
    return Parser(tokenize(text), text, names).run(what)


def parse_expr(text: str, names: Iterable[str] | None = None) -> Expr:
    """`min(2*alpha, gamma/2 + (1-alpha)^+)` -> Expr.  With `names`, other identifiers are errors."""
    return _run(text, names, "expr")


def parse_region(text: str, names: Iterable[str] | None = None) -> Region:
    """`gamma > alpha > 1, beta <= 1/2 or alpha < 0`; `true` / `everywhere` is the whole space."""
    return _run(text, names, "region")


def parse_relation(text: str, names: Iterable[str] | None = None) -> tuple[Expr, str, Expr]:
    """A single `lhs REL rhs`; REL is returned as one of < <= == >= >."""
    return _run(text, names, "relation")


def parse_piecewise(spec: str | Sequence[tuple[object, object]],
                    names: Iterable[str] | None = None) -> Piecewise:
    """`1 - alpha if alpha <= 1/2; alpha if 1/2 < alpha <= 2/3; 2/3 otherwise`, or a list of
    (expr, region) pairs whose items are texts or already-built Expr / Region objects.  `otherwise`
    (last piece only) stands for the exact complement of the earlier regions."""
    if isinstance(spec, str):
        return _run(spec, names, "piecewise")
    pieces = []
    for item in spec:
        try:
            expr_part, region_part = item
        except (TypeError, ValueError):
            raise InputError(f"a piece must be an (expression, region) pair, not {item!r}") from None
        expr = expr_part if isinstance(expr_part, Expr) else parse_expr(expr_part, names)
        region = region_part if isinstance(region_part, Region) else parse_region(region_part, names)
        pieces.append((expr, region))
    if not pieces:
        raise InputError("a piecewise expression needs at least one piece")
    return Piecewise(tuple(pieces))
