"""Reading expressions, regions, relations and piecewise schemes from text, without ever calling eval.

Why hand-written: the grammar is tiny (rationals, parameters, + - and multiplication by constants,
min/max, positive part, absolute value, linear constraints), and a recursive-descent parser over a token
list lets every error name the offending piece and its column.  The same `Parser` reads the tokens of
the LaTeX subset (verifier.text.latex_in), so both syntaxes always accept the same language.

Every node is built through the smart constructors of verifier.expressions.expr, so the result is canonical and
`parse_expr(to_text(e)) == e`.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Iterable, Mapping, Sequence

from verifier.core.errors import InputError, NonlinearError, ParseError, RegionError, UnknownNameError
from verifier.expressions.expr import (Affine, Expr, abs_, add, children, const, constant_value, evaluate, is_constant,
                   max_, min_, param, params, pos, scale, to_text)
from verifier.text.lexer import Token, normalize_name, tokenize
from verifier.expressions.region import (MAX_POLYHEDRA, Atom, Polyhedron, Product, Region, TooManyPolyhedra, atoms_of,
                     direction, too_many_polyhedra, trivially_empty)

MAX_DEPTH = 100       # bracket nesting; papers never come near it, and it keeps recursion bounded
MAX_BITS = 665        # about 200 decimal digits for any computed numerator or denominator
MAX_NODES = 20000     # |x| = max(x, -x) doubles the tree, so nested bars could blow up exponentially
# 'otherwise' is the complement of the earlier regimes, an intersection of unions of negated atoms.
# Pruned exactly (empty and contained pieces dropped) it stays small for regimes that slice one or two
# parameters (64 slices: a handful of pieces), but it is exponential in general: k regimes
# `x_i <= 0, y_i <= 0` in distinct parameters leave 2^k maximal pieces.  Each piece costs every later
# stage one more polyhedron, so beyond this many we ask for the region to be stated.
MAX_OTHERWISE_PIECES = 256
# Candidate pieces examined (pieces so far times atoms of the next regime, plus one overlap test per
# piece), summed over all regimes: bounds the time spent on 'otherwise' before giving up (a few
# seconds of small exact LPs at worst).  Slicing schemes need a few thousand (64 slices: about 400).
MAX_OTHERWISE_WORK = 1 << 15
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


def _tidy(poly: Polyhedron) -> Polyhedron | None:
    """Drop a polyhedron that a false constant atom or an opposite pair of atoms makes empty, and keep
    only the tightest of parallel atoms.  Exact and cheap (no LP, so some empty ones remain)."""
    best: dict[tuple, tuple[Fraction, bool, Atom]] = {}
    for atom in poly.atoms:
        if not atom.form.coeffs:
            if not atom.holds({}):
                return None
            continue
        coeffs, k, strict = direction(atom)  # the atom says L + k > 0 (or >= 0)
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


class _Directions:
    """Small integer ids for atom directions, so that a polyhedron's set of directions is a bit mask
    and most containment tests are one integer operation."""

    def __init__(self):
        self.ids: dict[int, int] = {}  # region.direction_id -> bit

    def bounds(self, poly: Polyhedron) -> tuple[int, dict[int, tuple[Fraction, bool]]]:
        """(mask of directions, id -> (k, strict)) of a tidied polyhedron: one atom `L + k > 0`
        (or >= 0) per direction."""
        mask, out = 0, {}
        for atom in poly.atoms:
            _, k, strict = direction(atom)
            i = self.ids.setdefault(atom.direction_id, len(self.ids))
            mask |= 1 << i
            out[i] = (k, strict)
        return mask, out


def _inside(p_bounds: tuple, q_bounds: tuple) -> bool:
    """Syntactic P within Q: every atom of Q is implied by a parallel atom of P (L + k_p >= 0 with
    k_p <= k_q, strict where Q's is).  Exact; False proves nothing."""
    (p_mask, p), (q_mask, q) = p_bounds, q_bounds
    if q_mask & ~p_mask:
        return False
    for i, (kq, sq) in q.items():
        kp, sp = p[i]
        if kp > kq or (kp == kq and sq and not sp):
            return False
    return True


def _nonempty(atoms, extra=()) -> bool:
    """Is `atoms` plus `extra` non-empty?  Exact: the syntactic test first, then an exact LP
    (verifier.geometry.lp.feasible).  With `extra` given, `atoms` must be known non-empty: only the atoms
    linked to the extra ones through shared parameters can then conflict (the others form a
    feasible system in other parameters), so the LP gets just those."""
    from verifier.geometry.lp import feasible
    atoms, extra = tuple(atoms), tuple(extra)
    if trivially_empty(atoms + extra):
        return False
    if extra:
        names = {n for a in extra for n, _ in a.form.coeffs}
        rest, block, grew = list(atoms), list(extra), True
        while grew:
            grew, left = False, []
            for a in rest:
                if any(n in names for n, _ in a.form.coeffs):
                    block.append(a)
                    names.update(n for n, _ in a.form.coeffs)
                    grew = True
                else:
                    left.append(a)
            rest = left
        atoms = tuple(block)
    names = sorted({n for a in atoms for n, _ in a.form.coeffs})
    return feasible(atoms, names) is not None


class Parser:
    """Recursive descent over a token list from either tokenizer (verifier.text.lexer or verifier.text.latex_in).

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
        start = self.peek().pos
        first = self.region_item()
        if not (self.at("op", ",") or self.at("kw", "and")):
            return first
        out = Product(first)  # linear in the number of constraints, however many are met
        while self.at("op", ",") or self.at("kw", "and"):
            self.advance()
            item = self.region_item()
            size = len(out.parts) * len(item.pieces)
            try:  # Product checks the size before it builds anything
                out.meet(item)
            except TooManyPolyhedra as err:  # the message names what the whole conjunction expands into
                if err.atoms is not None:
                    raise too_many_polyhedra(size, self.source, start, err.atoms) from None
                raise too_many_polyhedra(size * self.rest_size("and"), self.source, start) from None
        return out.region()

    def disjunction(self) -> Region:
        start = self.peek().pos
        out = self.conjunction()
        while self.at("kw", "or"):
            self.advance()
            item = self.conjunction()
            size = len(out.pieces) + len(item.pieces)
            if size > MAX_POLYHEDRA:
                raise too_many_polyhedra(size + self.rest_size("or"), self.source, start)
            out = out.join(item)
        return out

    def rest_size(self, within: str) -> int:
        """How many polyhedra the rest of the current conjunction (`within` 'and': a factor) or
        disjunction ('or': a summand) expands into, read off the tokens from the cursor to the end of
        the enclosing group without building anything: a bracket counts the sum over its 'or' parts
        of the product of the brackets in each part, anything else 1 (pruning ignored).  Only for
        naming the size in the message of too_many_polyhedra."""
        nested: list[list[int]] = []  # per open bracket: [sum of finished 'or' parts, current product]
        total, part = 0, (1 if within == "and" else 0)
        for tok in self.tokens[self.i:]:
            if tok.kind in ("open", "gopen"):
                nested.append([0, 1])
            elif tok.kind == "end" or (not nested and (tok.kind in ("close", "gclose") or
                                                       (tok.kind == "op" and tok.value == ";"))):
                break
            elif tok.kind in ("close", "gclose"):
                done, prod = nested.pop()
                if nested:
                    nested[-1][1] *= done + prod
                else:
                    part *= done + prod
            elif tok.kind == "kw" and tok.value == "or":
                if nested:
                    nested[-1][0] += nested[-1][1]
                    nested[-1][1] = 1
                elif within == "and":
                    break
                else:
                    total, part = total + part, 1
        return part if within == "and" else total + part

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
        """Where none of `regions` holds, exactly: the earlier regimes' polyhedra are removed one
        after the other.  A piece that misses the removed polyhedron Q stays whole; a piece P that
        meets it becomes P and not-a for each atom a of Q (negated exactly), each tidied, dropped when
        empty (syntactic test, then an exact LP) or contained in another piece (syntactically).  The
        pieces may overlap; their union is the complement.  Limits: MAX_OTHERWISE_PIECES and
        MAX_OTHERWISE_WORK, each with a message naming how far it got."""
        polys = [p for region in regions for p in region.pieces]
        out: list[Polyhedron] = [Polyhedron(())]
        work, dirs = 0, _Directions()
        for k, q in enumerate(polys, 1):
            work += len(out) * (1 + len(q.atoms))
            if work > MAX_OTHERWISE_WORK:
                self.fail(f"'otherwise' would take more than {MAX_OTHERWISE_WORK} steps to compute (limit "
                          f"{MAX_OTHERWISE_WORK}; reached at regime polyhedron {k} of {len(polys)}, "
                          f"with {len(out)} pieces so far); state its region", tok.pos, RegionError)
            kept: list[tuple[Polyhedron, dict]] = []
            for piece in out:
                if not _nonempty(piece.atoms, q.atoms):
                    self.keep(kept, dirs.bounds(piece), piece)
                    continue
                for atom in q.atoms:
                    cand = _tidy(piece.meet(Polyhedron((atom.negated(),))))
                    if cand is not None:
                        self.keep(kept, dirs.bounds(cand), cand, piece, atom.negated())
                if len(kept) > MAX_OTHERWISE_PIECES:
                    self.fail(f"'otherwise' would need more than {MAX_OTHERWISE_PIECES} polyhedra (limit "
                              f"{MAX_OTHERWISE_PIECES}; reached at regime polyhedron {k} of {len(polys)}); "
                              "state its region", tok.pos, RegionError)
            out = [p for p, _ in kept]
        return Region(tuple(out))

    @staticmethod
    def keep(kept: list, bounds: tuple, piece: Polyhedron, parent: Polyhedron | None = None,
             added: Atom | None = None) -> None:
        """Add `piece` to `kept` unless a kept piece contains it or it is empty; drop kept pieces it
        contains.  Without `parent` the piece is known non-empty; with it, the piece is the non-empty
        `parent` and the atom `added` (tidied), which is what the emptiness test is told.
        `bounds`: the piece's _Directions.bounds."""
        if any(_inside(bounds, other) for _, other in kept):
            return
        if parent is not None and not _nonempty(parent.atoms, (added,)):
            return
        kept[:] = [(p, b) for p, b in kept if not _inside(b, bounds)]
        kept.append((piece, bounds))


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
