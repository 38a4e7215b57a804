"""Claim generator and independent ground truth for the differential fuzz test.

Why a separate tiny AST: the test's ground truth must not go through the engine's expression tree,
its smart constructors (which canonicalise, flatten and merge), its region normalisation or its SMT
encoding.  So claims are generated here as plain tuples, and from that one description we build
(1) the engine's claim, through the public constructors of verifier.expressions.expr / verifier.expressions.region /
verifier.claims.kinds (or, for some claims, through the text parser), and (2) a direct z3 encoding of the
violation ("is there a point of the region where the claim fails?") written with the z3 Python API,
plus (3) an exact evaluator over Fractions that re-checks points (the engine's counterexamples and
z3's own models).  Nothing in (2) or (3) calls the engine.

Node forms (tuples, hashable, printable):
    ("lin", ((name, coef), ...), const)   affine leaf (coefficients may be zero or repeated)
    ("add", (child, ...))                 sum
    ("mul", c, child)                     c * child, c a nonzero Fraction
    ("min", (child, ...)), ("max", (child, ...))
    ("pos", child)                        (child)^+
    ("abs", child)                        |child|
Region: tuple of pieces (a union); a piece is a tuple of constraints (lin, rel, lin), rel one of
< <= == >= >; the empty piece is the whole space; no piece at all is the empty region.

Drivers: `Chooser` is the only source of randomness, so the same generator runs under hypothesis
(`DataChooser`, which shrinks) and under a seeded `random.Random` (`RandomChooser`, the long run).
"""

from __future__ import annotations

import random
import time
import traceback
from dataclasses import dataclass, field, replace
from fractions import Fraction as F
from typing import Callable

import z3

NAMES = ("alpha", "beta", "gamma", "delta")
EPS = F(1, 999983)
SMALL = (F(0), F(1), F(-1), F(2), F(1, 2), F(-1, 2), F(3), F(-2), F(1, 3), F(2, 3))
AWKWARD = (F(1, 999983), F(10 ** 9), F(7, 3), F(-7, 3), F(999982, 999983), F(-1, 999983),
           F(10 ** 9 + 1, 10 ** 9), F(3, 7), F(-10 ** 9), F(1, 10 ** 9), F(5, 997))
RELS = ("==", "<=", "<", ">=", ">")
REGION_RELS = ("<=", "<", ">=", ">", "==")
KINDS = ("relation", "within", "monotone", "reduces-to", "symmetric")


# ---------------------------------------------------------------------------------------------
# randomness
# ---------------------------------------------------------------------------------------------

class RandomChooser:
    def __init__(self, rng: random.Random):
        self.rng = rng

    def integer(self, lo: int, hi: int) -> int:
        return self.rng.randint(lo, hi)

    def choice(self, seq):
        seq = list(seq)
        return seq[self.rng.randrange(len(seq))]

    def boolean(self, p: float = 0.5) -> bool:
        return self.rng.random() < p


class DataChooser:
    """Draws from hypothesis' `st.data()`; simplest choices (first elements, True for `boolean`
    with p > 0) are what hypothesis shrinks towards."""

    def __init__(self, data):
        from hypothesis import strategies as st
        self.data, self.st = data, st

    def integer(self, lo: int, hi: int) -> int:
        return self.data.draw(self.st.integers(lo, hi))

    def choice(self, seq):
        seq = list(seq)
        return seq[self.integer(0, len(seq) - 1)]

    def boolean(self, p: float = 0.5) -> bool:
        return self.integer(0, 999) < int(p * 1000)


TAME = {F(1, 999983): F(1, 7), F(10 ** 9): F(5), F(-10 ** 9): F(-5), F(999982, 999983): F(6, 7),
        F(-1, 999983): F(-1, 7), F(10 ** 9 + 1, 10 ** 9): F(6, 5), F(1, 10 ** 9): F(1, 5),
        F(5, 997): F(5, 7), F(-5, 997): F(-5, 7), F(999983): F(7)}


class Tame:
    """A chooser whose awkward numbers are replaced by tame ones (1/999983 -> 1/7, 10^9 -> 5, ...):
    failure sets then hold points of small denominator, so the engine's counterexample ranking (a
    lattice search over denominators up to 1000) ends quickly.  For the quick profile's ranked run."""

    eps = F(1, 7)

    def __init__(self, ch):
        self.ch = ch

    def integer(self, lo, hi):
        return self.ch.integer(lo, hi)

    def boolean(self, p=0.5):
        return self.ch.boolean(p)

    def choice(self, seq):
        got = self.ch.choice(seq)
        return TAME.get(got, got) if isinstance(got, F) else got


def _eps(ch) -> F:
    """The width of planted thin bands and slabs: 1/999983 (1/7 under Tame)."""
    return getattr(ch, "eps", EPS)


def number(ch, allow_zero: bool = True) -> F:
    """Readable rationals mostly, awkward ones (1/999983, 10^9, 7/3, ...) often."""
    r = ch.integer(0, 9)
    if r < 6:
        q = ch.choice(SMALL)
    elif r < 9:
        q = ch.choice(AWKWARD)
    else:
        q = F(ch.integer(-40, 40), ch.integer(1, 13))
    if q == 0 and not allow_zero:
        return F(1)
    return q


def small_coef(ch) -> F:
    """Coefficients of leaves: mostly small, sometimes awkward, never zero."""
    r = ch.integer(0, 9)
    if r < 7:
        return ch.choice((F(1), F(-1), F(2), F(1, 2), F(-1, 2), F(3), F(-2), F(1, 3)))
    if r < 9:
        return ch.choice((F(7, 3), F(-7, 3), F(1, 999983), F(999983), F(10 ** 9), F(3, 7), F(-5, 997)))
    return F(ch.integer(-9, 9) or 1, ch.integer(1, 7))


# ---------------------------------------------------------------------------------------------
# AST helpers
# ---------------------------------------------------------------------------------------------

def lin(coeffs=(), const=F(0)):
    return ("lin", tuple((n, F(c)) for n, c in coeffs), F(const))


def var(name):
    return lin(((name, 1),))


def cst(q):
    return lin((), F(q))


def neg(node):
    return ("mul", F(-1), node)


def add(*nodes):
    return ("add", tuple(nodes))


def node_names(node) -> set:
    tag = node[0]
    if tag == "lin":
        return {n for n, _ in node[1]}
    if tag == "mul":
        return node_names(node[2])
    if tag in ("pos", "abs"):
        return node_names(node[1])
    out = set()
    for c in node[1]:
        out |= node_names(c)
    return out


def region_names(region) -> set:
    out = set()
    for piece in region:
        for l, _, r in piece:
            out |= node_names(l) | node_names(r)
    return out


def subst(node, values: dict):
    """Replace parameters by numbers in the AST (our own substitution)."""
    tag = node[0]
    if tag == "lin":
        k = node[2] + sum((c * values[n] for n, c in node[1] if n in values), F(0))
        return ("lin", tuple((n, c) for n, c in node[1] if n not in values), k)
    if tag == "mul":
        return ("mul", node[1], subst(node[2], values))
    if tag in ("pos", "abs"):
        return (tag, subst(node[1], values))
    return (tag, tuple(subst(c, values) for c in node[1]))


def swap_names(node, p, q):
    tag = node[0]
    if tag == "lin":
        sw = {p: q, q: p}
        return ("lin", tuple((sw.get(n, n), c) for n, c in node[1]), node[2])
    if tag == "mul":
        return ("mul", node[1], swap_names(node[2], p, q))
    if tag in ("pos", "abs"):
        return (tag, swap_names(node[1], p, q))
    return (tag, tuple(swap_names(c, p, q) for c in node[1]))


def node_size(node) -> int:
    tag = node[0]
    if tag == "lin":
        return 1
    if tag == "mul":
        return 1 + node_size(node[2])
    if tag in ("pos", "abs"):
        return 1 + node_size(node[1])
    return 1 + sum(node_size(c) for c in node[1])


# ---------------------------------------------------------------------------------------------
# exact evaluation (Fractions) -- the test's own
# ---------------------------------------------------------------------------------------------

def ev(node, point) -> F:
    tag = node[0]
    if tag == "lin":
        return node[2] + sum((c * F(point[n]) for n, c in node[1]), F(0))
    if tag == "mul":
        return node[1] * ev(node[2], point)
    if tag == "pos":
        return max(ev(node[1], point), F(0))
    if tag == "abs":
        return abs(ev(node[1], point))
    vals = [ev(c, point) for c in node[1]]
    if tag == "add":
        return sum(vals, F(0))
    return min(vals) if tag == "min" else max(vals)


def holds(a, rel, b) -> bool:
    return {"<": a < b, "<=": a <= b, "==": a == b, "!=": a != b, ">=": a >= b, ">": a > b}[rel]


def in_region(region, point) -> bool:
    return any(all(holds(ev(l, point), rel, ev(r, point)) for l, rel, r in piece) for piece in region)


# ---------------------------------------------------------------------------------------------
# z3 encoding -- the test's own, straight from the AST
# ---------------------------------------------------------------------------------------------

def zq(q: F):
    return z3.RealVal(f"{q.numerator}/{q.denominator}")


def zterm(node, env, memo=None):
    memo = {} if memo is None else memo
    key = id(node)
    if key in memo:
        return memo[key][1]
    tag = node[0]
    if tag == "lin":
        out = zq(node[2])
        for n, c in node[1]:
            out = out + zq(c) * env[n]
    elif tag == "mul":
        out = zq(node[1]) * zterm(node[2], env, memo)
    elif tag == "pos":
        x = zterm(node[1], env, memo)
        out = z3.If(x >= 0, x, zq(F(0)))
    elif tag == "abs":
        x = zterm(node[1], env, memo)
        out = z3.If(x >= 0, x, -x)
    else:
        xs = [zterm(c, env, memo) for c in node[1]]
        if tag == "add":
            out = xs[0]
            for x in xs[1:]:
                out = out + x
        else:
            out = xs[0]
            for x in xs[1:]:
                out = z3.If(x < out, x, out) if tag == "min" else z3.If(x > out, x, out)
    memo[key] = (node, out)   # keep node alive so its id is not reused
    return out


def zrel(a, rel, b):
    return {"<": a < b, "<=": a <= b, "==": a == b, "!=": a != b, ">=": a >= b, ">": a > b}[rel]


def zregion(region, env):
    return z3.Or([z3.And([zrel(zterm(l, env), rel, zterm(r, env)) for l, rel, r in piece])
                  for piece in region]) if region else z3.BoolVal(False)


# ---------------------------------------------------------------------------------------------
# claims
# ---------------------------------------------------------------------------------------------

@dataclass(frozen=True)
class Spec:
    kind: str
    region: tuple
    lhs: tuple
    rhs: tuple | None = None
    rel: str = "=="
    gap: F = F(0)
    param: str = ""
    increasing: bool = True
    values: tuple = ()          # ((name, Fraction), ...)
    swap: tuple = ()
    template: str = "random"
    via_text: bool = False      # build the engine's expressions by parsing our text form
    sugar: bool = False         # build with operators (+, *, -) instead of add/scale

    def names(self) -> tuple:
        out = region_names(self.region) | node_names(self.lhs)
        if self.rhs is not None:
            out |= node_names(self.rhs)
        if self.param:
            out.add(self.param)
        out |= set(self.swap) | {n for n, _ in self.values}
        return tuple(sorted(out))

    def free_names(self) -> tuple:
        fixed = {n for n, _ in self.values}
        return tuple(n for n in self.names() if n not in fixed)

    def text(self) -> str:
        where = " where " + region_text(self.region)
        if self.kind == "relation":
            return f"{node_text(self.lhs)} {self.rel} {node_text(self.rhs)}{where}"
        if self.kind == "within":
            return f"|{node_text(self.lhs)} - ({node_text(self.rhs)})| <= {fmt(self.gap)}{where}"
        if self.kind == "monotone":
            return (f"{node_text(self.lhs)} {'nondecreasing' if self.increasing else 'nonincreasing'} "
                    f"in {self.param}{where}")
        if self.kind == "reduces-to":
            fixed = ", ".join(f"{n} = {fmt(v)}" for n, v in self.values)
            return f"{node_text(self.lhs)} with {fixed} equals {node_text(self.rhs)}{where}"
        return f"{node_text(self.lhs)} symmetric in {self.swap[0]}, {self.swap[1]}{where}"


# --- text forms (for messages and for the parser path) ---------------------------------------

def fmt(q: F) -> str:
    return str(q.numerator) if q.denominator == 1 else f"{q.numerator}/{q.denominator}"


def _num(q: F) -> str:
    return f"({fmt(q)})" if (q < 0 or q.denominator != 1) else fmt(q)


def node_text(node) -> str:
    tag = node[0]
    if tag == "lin":
        parts = [f"{_num(c)}*{n}" for n, c in node[1]]
        if node[2] != 0 or not parts:
            parts.append(_num(node[2]))
        return parts[0] if len(parts) == 1 else "(" + " + ".join(parts) + ")"
    if tag == "mul":
        return f"{_num(node[1])}*{node_text(node[2])}"
    if tag == "pos":
        return f"({node_text(node[1])})^+"
    if tag == "abs":
        return f"|({node_text(node[1])})|"
    if tag == "add":
        return "(" + " + ".join(node_text(c) for c in node[1]) + ")"
    return f"{tag}(" + ", ".join(node_text(c) for c in node[1]) + ")"


def region_text(region) -> str:
    if not region:
        return "<nowhere>"
    pieces = []
    for piece in region:
        pieces.append(", ".join(f"{node_text(l)} {rel} {node_text(r)}" for l, rel, r in piece)
                      if piece else "true")
    return pieces[0] if len(pieces) == 1 else " or ".join(f"({p})" for p in pieces)


# --- building the engine's claim ---------------------------------------------------------------

def engine_expr(node, sugar=False):
    from verifier.expressions import expr as E
    tag = node[0]
    if tag == "lin":
        if sugar:
            out = E.const(node[2])
            for n, c in node[1]:
                out = out + c * E.param(n)
            return out
        return E.affine(list(node[1]), node[2])
    if tag == "mul":
        inner = engine_expr(node[2], sugar)
        if sugar:
            c = node[1]
            return -inner if c == -1 else (inner / (1 / c) if c.numerator == 1 else c * inner)
        return E.scale(node[1], inner)
    if tag == "pos":
        return E.pos(engine_expr(node[1], sugar))
    if tag == "abs":
        return E.abs_(engine_expr(node[1], sugar))
    kids = [engine_expr(c, sugar) for c in node[1]]
    if tag == "add":
        if sugar:
            out = kids[0]
            for k in kids[1:]:
                out = out + k
            return out
        return E.add(*kids)
    return E.min_(*kids) if tag == "min" else E.max_(*kids)


def engine_region(region, sugar=False):
    from verifier.expressions.region import Polyhedron, Region, atoms_of
    pieces = []
    for piece in region:
        atoms = []
        for l, rel, r in piece:
            atoms += atoms_of(engine_expr(l, sugar), rel, engine_expr(r, sugar))
        pieces.append(Region.of(*atoms).pieces[0] if atoms else Polyhedron(()))
    return Region(tuple(pieces))


def build_claim(spec: Spec):
    """The engine's claim for `spec`; InputError propagates (the caller decides if it is valid)."""
    from verifier.claims import kinds as C
    if spec.via_text:
        from verifier.text.parse import parse_expr, parse_region
        ex = lambda n: parse_expr(node_text(n))
        region = parse_region(region_text(spec.region))
    else:
        ex = lambda n: engine_expr(n, spec.sugar)
        region = engine_region(spec.region, spec.sugar)
    if spec.kind == "relation":
        return C.relation(ex(spec.lhs), spec.rel, ex(spec.rhs), region)
    if spec.kind == "within":
        return C.within(ex(spec.lhs), ex(spec.rhs), spec.gap, region)
    if spec.kind == "monotone":
        return C.monotone(ex(spec.lhs), spec.param, region, increasing=spec.increasing)
    if spec.kind == "reduces-to":
        return C.reduces_to(ex(spec.lhs), dict(spec.values), ex(spec.rhs), region)
    return C.symmetric(ex(spec.lhs), spec.swap[0], spec.swap[1], region)


def _py_node(node) -> str:
    tag = node[0]
    q = lambda x: f"F({x.numerator}, {x.denominator})" if x.denominator != 1 else str(x.numerator)
    if tag == "lin":
        return f"affine({{{', '.join(f'{n!r}: {q(c)}' for n, c in node[1])}}}, {q(node[2])})" \
            if len({n for n, _ in node[1]}) == len(node[1]) else \
            f"affine([{', '.join(f'({n!r}, {q(c)})' for n, c in node[1])}], {q(node[2])})"
    if tag == "mul":
        return f"scale({q(node[1])}, {_py_node(node[2])})"
    if tag == "pos":
        return f"pos({_py_node(node[1])})"
    if tag == "abs":
        return f"abs_({_py_node(node[1])})"
    fn = {"add": "add", "min": "min_", "max": "max_"}[tag]
    return f"{fn}(" + ", ".join(_py_node(c) for c in node[1]) + ")"


def repro_snippet(spec: Spec, call: str = "prove") -> str:
    """Python code that builds the engine's claim for `spec` and asks for its verdict."""
    pieces = []
    for piece in spec.region:
        atoms = ", ".join(f"*atoms_of({_py_node(l)}, {rel!r}, {_py_node(r)})" for l, rel, r in piece)
        pieces.append(f"Region.of({atoms}).pieces[0]" if piece else "Polyhedron(())")
    region = f"Region(({', '.join(pieces)},))" if pieces else "Region(())"
    py_node = _py_node
    if spec.via_text:   # the engine's claim was built by the parser: reproduce that
        region = f"parse_region({region_text(spec.region)!r})"
        py_node = lambda n: f"parse_expr({node_text(n)!r})"
    if spec.kind == "relation":
        claim = f"relation({py_node(spec.lhs)}, {spec.rel!r}, {py_node(spec.rhs)}, region)"
    elif spec.kind == "within":
        claim = f"within({py_node(spec.lhs)}, {py_node(spec.rhs)}, F({spec.gap.numerator}, " \
                f"{spec.gap.denominator}), region)"
    elif spec.kind == "monotone":
        claim = f"monotone({py_node(spec.lhs)}, {spec.param!r}, region, increasing={spec.increasing})"
    elif spec.kind == "reduces-to":
        vals = ", ".join(f"{n!r}: F({v.numerator}, {v.denominator})" for n, v in spec.values)
        claim = f"reduces_to({py_node(spec.lhs)}, {{{vals}}}, {py_node(spec.rhs)}, region)"
    else:
        claim = f"symmetric({py_node(spec.lhs)}, {spec.swap[0]!r}, {spec.swap[1]!r}, region)"
    run = ("print(prove(claim, solver='z3', timeout=10))" if call == "prove" else
           "r = prove_by_regimes(claim, 'z3', 10); print(r.status, r.counterexamples)")
    return "\n".join([
        "from fractions import Fraction as F",
        "from verifier.expressions.expr import affine, add, scale, min_, max_, pos, abs_",
        "from verifier.expressions.region import Region, Polyhedron, atoms_of",
        "from verifier.claims.kinds import relation, within, monotone, reduces_to, symmetric",
        "from verifier.text.parse import parse_expr, parse_region",
        "from verifier.claims.one_shot import prove",
        "from verifier.regimes.proof import prove_by_regimes",
        f"region = {region}",
        f"claim = {claim}",
        run,
    ])


# ---------------------------------------------------------------------------------------------
# ground truth and the exact re-check of points
# ---------------------------------------------------------------------------------------------

def primed(name):
    return name + "'"


def _envs(spec: Spec):
    """z3 variables of the violation: (env of the first point, env of the second point or None)."""
    fixed = dict(spec.values)
    env = {n: (zq(fixed[n]) if n in fixed else z3.Real(n)) for n in spec.names()}
    if spec.kind == "monotone":
        env2 = dict(env)
        env2[spec.param] = z3.Real(primed(spec.param))
        return env, env2
    return env, None


def violation_formula(spec: Spec):
    env, env2 = _envs(spec)
    R = zregion(spec.region, env)
    if spec.kind == "relation":
        neg_rel = {"==": "!=", "<=": ">", "<": ">=", ">=": "<", ">": "<="}[spec.rel]
        return z3.And(R, zrel(zterm(spec.lhs, env), neg_rel, zterm(spec.rhs, env)))
    if spec.kind == "within":
        d = zterm(spec.lhs, env) - zterm(spec.rhs, env)
        return z3.And(R, z3.Or(d > zq(spec.gap), -d > zq(spec.gap)))
    if spec.kind == "monotone":
        f1, f2 = zterm(spec.lhs, env), zterm(spec.lhs, env2)
        drop = f2 < f1 if spec.increasing else f2 > f1
        return z3.And(R, zregion(spec.region, env2), env2[spec.param] > env[spec.param], drop)
    if spec.kind == "reduces-to":
        return z3.And(R, zterm(spec.lhs, env) != zterm(spec.rhs, env))
    p, q = spec.swap
    sw = dict(env)
    sw[p], sw[q] = env[q], env[p]
    return z3.And(R, zterm(spec.lhs, env) != zterm(spec.lhs, sw))


def region_formula(spec: Spec):
    env, _ = _envs(spec)
    return zregion(spec.region, env)


@dataclass
class Truth:
    status: str            # 'true', 'false', 'empty' (no point of the region), 'unknown'
    model: dict | None = None
    seconds: float = 0.0
    detail: str = ""


def _solve(formula, timeout_ms):
    s = z3.Solver()
    s.set("timeout", int(timeout_ms))
    s.add(formula)
    return s, s.check()


def ground_truth(spec: Spec, timeout: float = 20.0) -> Truth:
    start = time.perf_counter()
    s, r = _solve(region_formula(spec), timeout * 1000)
    if r == z3.unsat:
        return Truth("empty", seconds=time.perf_counter() - start)
    s, r = _solve(violation_formula(spec), timeout * 1000)
    if r == z3.unknown:
        return Truth("unknown", seconds=time.perf_counter() - start, detail=s.reason_unknown())
    if r == z3.unsat:
        return Truth("true", seconds=time.perf_counter() - start)
    m = s.model()
    names = list(spec.free_names()) + ([primed(spec.param)] if spec.kind == "monotone" else [])
    model = {n: m.eval(z3.Real(n), model_completion=True).as_fraction() for n in names}
    return Truth("false", model, time.perf_counter() - start)


@dataclass
class PointCheck:
    ok: bool                     # in the region (both points for monotone) and violates the claim
    problems: list
    lhs: F | None = None
    rhs: F | None = None


def check_point(spec: Spec, point: dict) -> PointCheck:
    """Does `point` (a counterexample's point, or our z3 model) violate `spec`, inside its region?

    Accepted forms: a point of the claim's parameters (monotone: plus the primed parameter);
    for reduces-to the fixed parameters may be present (with exactly the fixed values) or absent.
    A parameter of ours missing from the point is given 0 and 1 in turn (the engine may have dropped
    a parameter whose terms cancel; then any value must do): both must violate."""
    problems = []
    point = {k: F(v) for k, v in point.items()}
    names = set(spec.names())
    allowed = set(names) | ({primed(spec.param)} if spec.kind == "monotone" else set())
    extra = set(point) - allowed
    if extra:
        problems.append(f"unexpected coordinates {sorted(extra)}")
    fixed = dict(spec.values)
    for n, v in fixed.items():
        if n in point and point[n] != v:
            problems.append(f"fixed parameter {n} = {fmt(point[n])}, not {fmt(v)}")
    if spec.kind == "monotone" and primed(spec.param) not in point:
        problems.append(f"no second point ({primed(spec.param)} missing)")
        return PointCheck(False, problems)
    missing = sorted(n for n in names if n not in point and n not in fixed)
    results = []
    for fill in ((F(0), F(1)) if missing else (None,)):
        full = {n: v for n, v in point.items() if n in names}
        full.update({n: fill for n in missing})
        full.update(fixed)
        results.append(_violates(spec, full, point))
    ok = all(r[0] for r in results)
    if not ok:
        problems.append(results[[r[0] for r in results].index(False)][1])
    if missing:
        problems.append(f"(coordinates {missing} absent from the point; tried 0 and 1)")
    return PointCheck(ok and not extra and not any(p.startswith("fixed") for p in problems),
                      problems, results[0][2], results[0][3])


def _violates(spec, x, raw):
    """(violates and inside, why not, lhs value, rhs value) at the full point x."""
    if spec.kind == "monotone":
        x2 = dict(x)
        x2[spec.param] = raw[primed(spec.param)]
        f1, f2 = ev(spec.lhs, x), ev(spec.lhs, x2)
        if not in_region(spec.region, x):
            return False, "first point outside the region", f1, f2
        if not in_region(spec.region, x2):
            return False, "second point outside the region", f1, f2
        if not x2[spec.param] > x[spec.param]:
            return False, f"{primed(spec.param)} is not > {spec.param}", f1, f2
        bad = f2 < f1 if spec.increasing else f2 > f1
        return bad, "" if bad else "no drop (rise) between the two points", f1, f2
    if spec.kind == "symmetric":
        p, q = spec.swap
        xs = dict(x)
        xs[p], xs[q] = x[q], x[p]
        l, r = ev(spec.lhs, x), ev(spec.lhs, xs)
        bad = l != r
    else:
        l, r = ev(spec.lhs, x), ev(spec.rhs, x)
        if spec.kind == "relation":
            bad = not holds(l, spec.rel, r)
        elif spec.kind == "within":
            bad = abs(l - r) > spec.gap
        else:
            bad = l != r
    if not in_region(spec.region, x):
        return False, "point outside the region", l, r
    return bad, "" if bad else "the claim holds at the point", l, r


# ---------------------------------------------------------------------------------------------
# generation
# ---------------------------------------------------------------------------------------------

def gen_lin(ch, names, anchor=None, through=False):
    """A random affine leaf; `through`: it vanishes at `anchor`."""
    coeffs = []
    for n in names:
        if ch.boolean(0.55):
            coeffs.append((n, small_coef(ch)))
    if ch.boolean(0.05) and coeffs:  # a repeated name: the constructors must merge it
        coeffs.append((coeffs[0][0], small_coef(ch)))
    if through and anchor is not None:
        if not coeffs:
            coeffs = [(names[0], F(1))]
        k = -sum(c * anchor[n] for n, c in coeffs)
    else:
        k = number(ch)
    return lin(coeffs, k)


def gen_expr(ch, names, depth, anchor=None):
    if depth <= 0 or ch.boolean(0.3):
        return gen_lin(ch, names, anchor, through=ch.boolean(0.2))
    op = ch.choice(("min", "max", "pos", "abs", "add", "mul", "min", "max"))
    if op in ("min", "max", "add"):
        return (op, tuple(gen_expr(ch, names, depth - 1, anchor) for _ in range(ch.integer(2, 3))))
    if op == "mul":
        return ("mul", number(ch, allow_zero=False), gen_expr(ch, names, depth - 1, anchor))
    return (op, gen_expr(ch, names, depth - 1, anchor))


def rewrite(ch, node):
    """An expression equal to `node` everywhere, through lattice and (x)^+ identities, so that a
    claim `node == rewrite(node)` is true but not true by canonical form."""
    tag = node[0]
    if tag == "lin":
        r = ch.integer(0, 3)
        if r == 0 and node[1]:  # split the leaf into two summands
            n, c = node[1][0]
            return add(lin(((n, c / 2),), node[2]), lin(((n, c / 2),) + node[1][1:]))
        if r == 1:  # k * (leaf / k)
            k = ch.choice((F(2), F(-3), F(7, 3), F(1, 999983)))
            return ("mul", k, ("lin", tuple((n, c / k) for n, c in node[1]), node[2] / k))
        return node
    if tag == "mul":
        return ("mul", node[1], rewrite(ch, node[2]))
    if tag == "pos":
        x = rewrite(ch, node[1])
        r = ch.integer(0, 2)
        if r == 0:
            return ("mul", F(1, 2), add(x, ("abs", x)))      # (x + |x|)/2
        if r == 1:
            return ("max", (x, cst(0)))
        return add(x, ("pos", neg(x)))                      # x + (-x)^+
    if tag == "abs":
        x = rewrite(ch, node[1])
        r = ch.integer(0, 2)
        if r == 0:
            return add(("pos", x), ("pos", neg(x)))
        if r == 1:
            return ("max", (x, neg(x)))
        return ("abs", neg(x))
    kids = tuple(rewrite(ch, c) for c in node[1])
    if tag == "add":
        return ("add", tuple(reversed(kids)))
    other = "max" if tag == "min" else "min"
    r = ch.integer(0, 3)
    if r == 0:  # min(a, b, ...) = -max(-a, -b, ...)
        return neg((other, tuple(neg(k) for k in kids)))
    if r == 1 and len(kids) == 2:  # min(a, b) = a + b - max(a, b)
        return add(kids[0], kids[1], neg((other, kids)))
    if r == 2 and kids[-1][0] == other and len(kids) >= 2:  # distributive lattice
        inner = kids[-1][1]
        return (other, tuple((tag, kids[:-1] + (y,)) for y in inner))
    if r == 3 and kids[0][0] == "lin":  # shift: min(a, b) = min(a + c, b + c) - c
        c = number(ch)
        return add((tag, tuple(add(k, cst(c)) for k in kids)), cst(-c))
    return (tag, kids)


def vanish_on_hyperplane(ch, names, anchor):
    """s >= 0 with s = 0 exactly on a hyperplane through the anchor."""
    L = gen_lin(ch, names, anchor, through=True)
    r = ch.integer(0, 3)
    if r == 0:
        return ("abs", L)
    if r == 1:
        return neg(("min", (L, neg(L))))        # -min(L, -L), the brief's min(alpha-1, 1-alpha)
    if r == 2:
        return add(("pos", L), ("pos", neg(L)))
    return ("mul", ch.choice((F(1, 999983), F(10 ** 9), F(7, 3))), ("max", (L, neg(L))))


def vanish_at_point(ch, names, anchor):
    """s >= 0 with s = 0 exactly at the anchor."""
    terms = tuple(("abs", lin(((n, 1),), -anchor[n])) for n in names)
    return ("max", terms) if ch.boolean() and len(terms) > 1 else add(*terms)


def band(ch, names, anchor, w=None):
    """(w - |L|)^+: zero outside a band of width about 2w/|grad L| around a hyperplane through the
    anchor, positive (at most w) inside it."""
    L = gen_lin(ch, names, anchor, through=True)
    w = _eps(ch) if w is None else w
    return ("pos", add(cst(w), neg(("abs", L))))


def gen_anchor(ch, names):
    return {n: ch.choice((F(0), F(1), F(1, 2), F(1, 3), F(2), F(7, 3), F(-1), F(3, 7), F(10 ** 9),
                          F(1, 999983))) for n in names}


def _constraint_at(ch, names, anchor, strict_ok=True):
    """A random linear constraint that the anchor satisfies (sometimes exactly on its boundary)."""
    L = gen_lin(ch, names, anchor, through=True)    # L(anchor) = 0
    rel = ch.choice((">=", ">", "<=", "<"))
    slack = ch.choice((F(0), F(1), _eps(ch), F(7, 3), F(10 ** 9)))
    if slack == 0 and rel in (">", "<"):
        slack = F(1)
    if not strict_ok:
        rel = rel[0] + "="
    k = -slack if rel[0] == ">" else slack           # L >= -slack or L <= slack at the anchor
    if ch.boolean(0.5):
        return (L, rel, cst(k))
    # the constant on the other side: L - k  rel 0
    return (lin(L[1], L[2] - k), rel, cst(0))


def gen_piece(ch, names, anchor):
    kind = ch.choice(("everywhere", "orthant", "box", "random", "equality", "thin", "random", "box"))
    cons = []
    if kind == "orthant":
        for n in names:
            if ch.boolean(0.7):
                d = ch.choice((F(0), F(1), F(7, 3)))
                cons.append((var(n), ch.choice((">=", ">")) if d else ">=", cst(anchor[n] - d)))
    elif kind == "box":
        for n in names:
            lo = anchor[n] - ch.choice((F(1), _eps(ch), F(7, 3), F(10 ** 9), F(0)))
            hi = anchor[n] + ch.choice((F(1), _eps(ch), F(1, 3), F(10 ** 9)))
            cons.append((cst(lo), "<=" if lo == anchor[n] else ch.choice(("<=", "<")), var(n)))
            cons.append((var(n), ch.choice(("<=", "<")), cst(hi)))
    elif kind == "random":
        for _ in range(ch.integer(1, 3)):
            cons.append(_constraint_at(ch, names, anchor))
    elif kind == "equality":
        n = ch.choice(names)
        others = [m for m in names if m != n]
        r = ch.integer(0, 2)
        if r == 0 and others:
            m = ch.choice(others)
            cons.append((var(n), "==", add(var(m), cst(anchor[n] - anchor[m])) if anchor[n] != anchor[m]
                         else var(m)))
        elif r == 1 or not others:
            cons.append((var(n), "==", cst(anchor[n])))
        else:
            m = ch.choice(others)
            cons.append((lin(((n, 1), (m, 1))), "==", cst(anchor[n] + anchor[m])))
        if ch.boolean(0.5):
            cons.append(_constraint_at(ch, names, anchor))
    elif kind == "thin":  # c < x < c + 1/999983 (anchor moved to its middle)
        n = ch.choice(names)
        c = anchor[n]
        anchor[n] = c + _eps(ch) / 2
        cons.append((cst(c), ch.choice(("<", "<=")), var(n)))
        cons.append((var(n), ch.choice(("<", "<=")), cst(c + _eps(ch))))
    return tuple(cons), kind


def gen_region(ch, names):
    """(region, anchor, kind): the anchor lies in the region (None when it might be empty)."""
    anchor = gen_anchor(ch, names)
    r = ch.integer(0, 19)
    if r == 0:  # possibly empty: constraints with no point built in
        cons = tuple((gen_lin(ch, names), ch.choice(REGION_RELS), cst(0)) for _ in range(ch.integer(1, 3)))
        region, kind = (cons,), "random-maybe-empty"
    elif r < 4:  # union of two polyhedra
        p1, k1 = gen_piece(ch, names, anchor)
        anchor2 = gen_anchor(ch, names)
        p2, k2 = gen_piece(ch, names, anchor2)
        region, kind = (p1, p2), f"union({k1},{k2})"
    else:
        p1, kind = gen_piece(ch, names, anchor)
        region = (p1,)
    if not in_region(region, anchor):
        anchor = None
    return region, anchor, kind


def _point(anchor, names):
    return anchor if anchor is not None else {n: F(0) for n in names}


def gen_spec(ch, max_params=4, max_depth=4, kinds=KINDS) -> Spec:
    """One random claim: a kind, a template (random, true by construction, or a planted failure)."""
    k = ch.integer(1, max_params)
    names = NAMES[:k]
    region, anchor, rkind = gen_region(ch, names)
    a = _point(anchor, names)
    depth = ch.integer(1, max_depth)
    kind = ch.choice(kinds)
    via_text = ch.boolean(0.15) and all(region)
    sugar = ch.boolean(0.2)
    E = gen_expr(ch, names, depth, a)
    common = dict(region=region, via_text=via_text, sugar=sugar)

    if kind in ("relation", "within"):
        t = ch.choice(("random", "identity", "hyperplane", "point", "band", "brief", "random"))
        E2 = rewrite(ch, E)
        if kind == "within":
            if t == "random":
                return Spec("within", lhs=E, rhs=gen_expr(ch, names, depth, a), gap=abs(number(ch)),
                            template="within/random", **common)
            if t in ("identity", "hyperplane", "point", "brief"):
                return Spec("within", lhs=E, rhs=E2, gap=ch.choice((F(0), _eps(ch))),
                            template="within/identity", **common)
            w = ch.choice((_eps(ch), F(1), F(7, 3)))
            gap = ch.choice((w, w * (1 - _eps(ch)), w / 2, F(0), w + _eps(ch)))
            return Spec("within", lhs=add(E, band(ch, names, a, w)), rhs=E2, gap=gap,
                        template="within/band", **common)
        if t == "random":
            return Spec("relation", lhs=E, rhs=gen_expr(ch, names, depth, a), rel=ch.choice(RELS),
                        template="relation/random", **common)
        if t == "identity":
            return Spec("relation", lhs=E, rhs=E2, rel=ch.choice(("==", "<=", ">=")),
                        template="relation/identity", **common)
        if t in ("hyperplane", "point"):
            s = vanish_on_hyperplane(ch, names, a) if t == "hyperplane" else vanish_at_point(ch, names, a)
            # E < E2 + s fails exactly where s = 0 (a hyperplane / the anchor), if that meets the region
            lhs, rel, rhs = (E, "<", add(E2, s)) if ch.boolean() else (add(E2, s), ">", E)
            if ch.boolean(0.25):  # the non-strict version is true
                rel = {"<": "<=", ">": ">="}[rel]
            return Spec("relation", lhs=lhs, rhs=rhs, rel=rel, template=f"relation/{t}", **common)
        if t == "brief":  # lhs = rhs + min(x - c, c - x): == fails off x = c, < fails only at x = c
            n = ch.choice(names)
            L = lin(((n, 1),), -a[n])
            rel = ch.choice(("==", "<", "<=", ">"))
            return Spec("relation", lhs=add(E2, ("min", (L, neg(L)))), rhs=E, rel=rel,
                        template="relation/brief", **common)
        w = ch.choice((_eps(ch), _eps(ch), F(1)))
        rel = ch.choice(("<=", "==", ">="))   # <= and == fail on the band only, >= holds
        return Spec("relation", lhs=add(E, band(ch, names, a, w)), rhs=E2, rel=rel,
                    template="relation/band", **common)

    if kind == "monotone":
        p = ch.choice(names)
        others = [n for n in names if n != p]
        inc = ch.boolean(0.7)
        t = ch.choice(("random", "lattice", "dip", "random"))
        if t == "random":
            f = E
        elif t == "lattice":
            # min/max/+ of affine pieces with non-negative p-slope: nondecreasing
            def mono(d):
                if d <= 0 or ch.boolean(0.3):
                    L = gen_lin(ch, others, a) if others else cst(number(ch))
                    slope = ch.choice((F(0), F(1), _eps(ch), F(7, 3), F(10 ** 9)))
                    return lin(L[1] + ((p, slope),), L[2])
                op = ch.choice(("min", "max", "add", "pos"))
                if op == "pos":
                    return ("pos", mono(d - 1))
                return (op, (mono(d - 1), mono(d - 1)))
            f = mono(depth)
        else:
            # k*p + g(others) - k2*(w - |p - c|)^+: nondecreasing iff k2 <= k (when the dip is inside)
            g = gen_expr(ch, others, depth - 1, a) if others else cst(0)
            k2 = ch.choice((F(1), F(1) + _eps(ch), F(1, 2), F(2)))
            dip = ("mul", -k2, ("pos", add(cst(_eps(ch)), neg(("abs", lin(((p, 1),), -a[p]))))))
            f = add(var(p), g, dip)
        if not inc:
            f = neg(f)
        return Spec("monotone", lhs=f, param=p, increasing=inc, template=f"monotone/{t}", **common)

    if kind == "symmetric":
        if len(names) < 2:
            names = NAMES[:2]
        p, q = ch.choice(((names[0], names[1]), (names[1], names[0]), (names[0], names[-1])))
        if p == q:
            p, q = names[0], names[1]
        t = ch.choice(("random", "sum", "minmax", "band"))
        if t == "random":
            f = E
        else:
            G = E
            Gs = swap_names(rewrite(ch, G), p, q)
            f = add(G, Gs) if t in ("sum", "band") else (ch.choice(("min", "max")), (G, Gs))
            if t == "band":
                f = add(f, ("pos", add(cst(_eps(ch)), neg(("abs", lin(((p, 1),), -a.get(p, F(0))))))))
        return Spec("symmetric", lhs=f, swap=(p, q), template=f"symmetric/{t}", **common)

    # reduces-to
    fixed_names = [n for n in names if ch.boolean(0.4)] or [ch.choice(names)]
    if ch.boolean(0.7) and len(fixed_names) == len(names) and len(names) > 1:
        fixed_names = fixed_names[:-1]
    values = tuple((n, a[n] if ch.boolean(0.7) else number(ch)) for n in fixed_names)
    vals = dict(values)
    t = ch.choice(("random", "same", "sliced", "spike", "offset", "band"))
    free = [n for n in names if n not in vals]
    if t == "random":
        rhs = gen_expr(ch, names, depth, a)
    elif t == "same":
        rhs = rewrite(ch, E)                                 # both sides read on the slice: true
    elif t == "sliced":
        rhs = subst(rewrite(ch, E), vals)                    # the slice written out: true
    elif t == "spike":                                       # + |p - v|: zero on the slice, true
        n = fixed_names[0]
        rhs = add(rewrite(ch, E), ("abs", lin(((n, 1),), -vals[n])))
    elif t == "offset":                                      # + |p - v'|, v' != v: false
        n = fixed_names[0]
        rhs = add(rewrite(ch, E), ("abs", lin(((n, 1),), -(vals[n] + _eps(ch)))))
    else:                                                    # band in a free parameter: false
        rhs = add(rewrite(ch, E), band(ch, free or names, a))
    return Spec("reduces-to", lhs=E, rhs=rhs, values=values, template=f"reduces-to/{t}", **common)


# ---------------------------------------------------------------------------------------------
# one differential run
# ---------------------------------------------------------------------------------------------

@dataclass
class Outcome:
    spec: Spec
    truth: Truth | None = None
    status: str = ""                 # the engine's status, 'region-error', 'crash', 'rejected'
    regimes_status: str = ""
    findings: list = field(default_factory=list)
    seconds: float = 0.0
    regimes_seconds: float = 0.0
    unknown: int = 0


def _check_counterexample(spec, cex, who, out, truth):
    pc = check_point(spec, cex.point)
    if not pc.ok:
        out.findings.append(f"{who}: counterexample {dict(cex.point)} does not re-check: "
                            f"{'; '.join(pc.problems)}")
        return False
    if spec.kind != "monotone" and (cex.lhs_value, cex.rhs_value) != (pc.lhs, pc.rhs):
        out.findings.append(f"{who}: counterexample values {fmt(cex.lhs_value)}, {fmt(cex.rhs_value)} "
                            f"but the sides are {fmt(pc.lhs)}, {fmt(pc.rhs)} at {dict(cex.point)}")
        return False
    if spec.kind == "monotone" and (cex.lhs_value, cex.rhs_value) != (pc.lhs, pc.rhs):
        out.findings.append(f"{who}: counterexample values {fmt(cex.lhs_value)}, {fmt(cex.rhs_value)} "
                            f"but f is {fmt(pc.lhs)} then {fmt(pc.rhs)} at {dict(cex.point)}")
        return False
    if truth.status == "true":
        out.findings.append(f"{who}: GROUND TRUTH SAYS TRUE but the counterexample {dict(cex.point)} "
                            "re-checks (our z3 encoding or z3 is wrong)")
    return True


def _compare(spec, status, cexs, who, truth, out, timeout, unknown_ok):
    if status == "proved" and truth.status == "false":
        out.findings.append(f"{who}: PROVED but the claim fails at {truth.model} (re-checked exactly)")
    if status == "refuted":
        if not cexs:
            out.findings.append(f"{who}: refuted without a counterexample")
        for cex in cexs:
            _check_counterexample(spec, cex, who, out, truth)
    if status == "unknown":
        out.unknown += 1
        if not unknown_ok:
            out.findings.append(f"{who}: unknown with a {timeout} s timeout")


def run_one(spec: Spec, timeout: float = 10.0, regimes: bool = False, gt_timeout: float = 30.0,
            unknown_ok_below: float = 30.0, rank: bool = True) -> Outcome:
    """Ground truth, then the engine's verdict(s), compared; findings are plain sentences.

    rank=False asks the engine for its re-checked solver model instead of the ranked counterexample
    (improve_witness=False): the same verdict for a fraction of the time (the long run uses it for
    most claims, since the lattice search behind the ranking is the slow part)."""
    from verifier.core.errors import InputError, RegionError
    out = Outcome(spec)
    truth = ground_truth(spec, gt_timeout)
    out.truth = truth
    if truth.status == "false":
        pc = check_point(spec, truth.model)
        if not pc.ok:
            out.findings.append(f"ground truth model {truth.model} does not re-check: {pc.problems} "
                                "(a bug of the test's z3 encoding or evaluator)")
    try:
        claim = build_claim(spec)
    except RegionError as exc:
        out.status = "region-error"
        if truth.status != "empty":
            out.findings.append(f"construction raised RegionError on a non-empty region: {exc}")
        return out
    except InputError as exc:
        out.status = "rejected"
        out.findings.append(f"construction rejected a valid claim: {type(exc).__name__}: {exc}")
        return out
    except Exception:
        out.status = "crash"
        out.findings.append("construction crashed:\n" + traceback.format_exc())
        return out
    unknown_ok = timeout < unknown_ok_below
    from verifier.claims.one_shot import prove
    extra = {} if rank else {"improve_witness": False}
    runs = [("prove", lambda: prove(claim, solver="z3", timeout=timeout, **extra))]
    if regimes:
        from verifier.regimes.proof import prove_by_regimes
        runs.append(("prove_by_regimes", lambda: prove_by_regimes(claim, "z3", timeout, **extra)))
    for who, call in runs:
        start = time.perf_counter()
        try:
            result = call()
            status = result.status
            if who == "prove":
                cexs = (result.counterexample,) if result.counterexample is not None else ()
            else:
                cexs = tuple(result.counterexamples)
        except RegionError as exc:
            status, cexs = "region-error", ()
            if truth.status != "empty":
                out.findings.append(f"{who}: RegionError on a non-empty region: {exc}")
        except Exception:
            status, cexs = "crash", ()
            out.findings.append(f"{who} crashed:\n" + traceback.format_exc())
        took = time.perf_counter() - start
        if who == "prove":
            out.status, out.seconds = status, took
        else:
            out.regimes_status, out.regimes_seconds = status, took
        if truth.status == "empty":
            if status not in ("region-error", "crash"):
                out.findings.append(f"{who}: the region is empty but the verdict is {status} "
                                    "(expected RegionError)")
            continue
        _compare(spec, status, cexs, who, truth, out, timeout, unknown_ok)
    return out


def describe_outcome(o: Outcome, call: str = "prove") -> str:
    t = o.truth
    lines = [f"claim [{o.spec.kind} / {o.spec.template}{' / text' if o.spec.via_text else ''}"
             f"{' / sugar' if o.spec.sugar else ''}]: {o.spec.text()}",
             f"ground truth: {t.status if t else '?'}{f' at {t.model}' if t and t.model else ''}",
             f"engine: prove -> {o.status}" + (f", prove_by_regimes -> {o.regimes_status}"
                                                if o.regimes_status else "")]
    lines += [f"  FINDING: {f}" for f in o.findings]
    lines += ["repro:", repro_snippet(o.spec, call)]
    return "\n".join(lines)


# ---------------------------------------------------------------------------------------------
# greedy minimisation of a failing spec (for reports)
# ---------------------------------------------------------------------------------------------

def _smaller_nodes(node):
    tag = node[0]
    if tag == "lin":
        for i in range(len(node[1])):
            yield ("lin", node[1][:i] + node[1][i + 1:], node[2])
        if node[2] != 0:
            yield ("lin", node[1], F(0))
        for i, (n, c) in enumerate(node[1]):
            if c != 1:
                yield ("lin", node[1][:i] + ((n, F(1)),) + node[1][i + 1:], node[2])
        if node[2].denominator != 1 or abs(node[2]) > 3:
            yield ("lin", node[1], F(round(node[2])))
        return
    if tag == "mul":
        yield node[2]
        if node[1] not in (1, -1):
            yield ("mul", F(-1) if node[1] < 0 else F(1), node[2])
        for s in _smaller_nodes(node[2]):
            yield ("mul", node[1], s)
        return
    if tag in ("pos", "abs"):
        yield node[1]
        for s in _smaller_nodes(node[1]):
            yield (tag, s)
        return
    kids = node[1]
    for k in kids:
        yield k
    if len(kids) > 2:
        for i in range(len(kids)):
            yield (tag, kids[:i] + kids[i + 1:])
    for i, k in enumerate(kids):
        for s in _smaller_nodes(k):
            yield (tag, kids[:i] + (s,) + kids[i + 1:])


def _smaller_specs(spec: Spec):
    if spec.via_text:
        yield replace(spec, via_text=False)
    if spec.sugar:
        yield replace(spec, sugar=False)
    reg = spec.region
    if len(reg) > 1:
        for i in range(len(reg)):
            yield replace(spec, region=reg[:i] + reg[i + 1:])
    for i, piece in enumerate(reg):
        for j in range(len(piece)):
            yield replace(spec, region=reg[:i] + (piece[:j] + piece[j + 1:],) + reg[i + 1:])
        for j, (l, rel, r) in enumerate(piece):
            for side in (0, 1):
                for s in _smaller_nodes((l, r)[side]):
                    if s[0] != "lin":
                        continue
                    c = (s, rel, r) if side == 0 else (l, rel, s)
                    yield replace(spec, region=reg[:i] + (piece[:j] + (c,) + piece[j + 1:],) + reg[i + 1:])
    for s in _smaller_nodes(spec.lhs):
        yield replace(spec, lhs=s)
    if spec.rhs is not None:
        for s in _smaller_nodes(spec.rhs):
            yield replace(spec, rhs=s)


def minimise(spec: Spec, still_fails: Callable[[Spec], bool], max_tries: int = 3000) -> Spec:
    """Greedy: keep the first smaller spec that still fails, until none does."""
    tries = 0
    improved = True
    while improved and tries < max_tries:
        improved = False
        for cand in _smaller_specs(spec):
            tries += 1
            try:
                bad = still_fails(cand)
            except Exception:
                bad = False
            if bad:
                spec, improved = cand, True
                break
            if tries >= max_tries:
                break
    return spec
