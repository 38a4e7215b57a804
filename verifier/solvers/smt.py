"""The SMT backend: the only module that imports pysmt.

Every question the engine asks is one `Query`: is there a point of `region` at which every condition
holds?  A claim is proved when the query for its negation is unsatisfiable.  Soundness rules kept here:
- each query gets a fresh pysmt environment, so formulas never mix across runs or tests;
- min/max become if-then-else terms, exact rationals become exact SMT reals: no rounding anywhere;
- a timeout, an 'unknown' or a backend failure is reported as status 'unknown', never as unsat;
- a model is returned as exact Fractions; callers re-check it with the exact evaluator.
"""

from __future__ import annotations

import time
from dataclasses import dataclass, field
from fractions import Fraction
from typing import Mapping, Sequence

from verifier.core.errors import SolverError
from verifier.expressions.expr import Affine, Expr, Max, Min, Sum, children, common_denominator, params
from verifier.expressions.region import Region

SOLVERS = ("z3", "cvc5")
CONDITION_RELATIONS = ("<", "<=", "==", "!=", ">=", ">")


@dataclass(frozen=True)
class Query:
    """Exists a point in `region` where all `conditions` (lhs, rel, rhs) hold?

    `grid`: when set, every parameter is forced onto the lattice (1/grid) * Z; the query is then
    stated over integer numerators (x = k / grid, everything scaled to integer coefficients), pure
    linear integer arithmetic, which both backends decide far faster than mixed real/integer terms.
    `box` (with grid): |k| <= box for every numerator k = grid * x.
    `numerators` (with grid): ((name, lo, hi), ...) bounds lo <= grid * x_name <= hi (None: open).
    `names`: parameters that must exist as variables even if no expression mentions them.
    `outside`: regions the point must avoid (coverage checks of regime-by-regime definitions).
    """

    region: Region
    conditions: tuple[tuple[Expr, str, Expr], ...] = ()
    grid: int | None = None
    names: tuple[str, ...] = ()
    outside: tuple[Region, ...] = ()
    box: int | None = None
    numerators: tuple[tuple[str, int | None, int | None], ...] = ()

    def variables(self) -> tuple[str, ...]:
        found = set(self.names) | set(self.region.params())
        for r in self.outside:
            found |= r.params()
        for lhs, _, rhs in self.conditions:
            found |= params(lhs) | params(rhs)
        return tuple(sorted(found))

    def numbers(self):
        """Every exact number the query mentions (the integer scaling is their common denominator)."""
        for r in (self.region,) + self.outside:
            for poly in r.pieces:
                for a in poly.atoms:
                    yield a.form.const
                    yield from (c for _, c in a.form.coeffs)
        for lhs, _, rhs in self.conditions:
            for e in (lhs, rhs):
                for node in _nodes(e):
                    aff = node.affine if isinstance(node, Sum) else node if isinstance(node, Affine) else None
                    if aff is not None:
                        yield aff.const
                        yield from (c for _, c in aff.coeffs)


def _nodes(e: Expr):
    stack, seen = [e], set()
    while stack:
        node = stack.pop()
        if id(node) in seen:
            continue
        seen.add(id(node))
        yield node
        stack.extend(children(node))


@dataclass(frozen=True)
class Answer:
    """status is 'sat', 'unsat' or 'unknown'; `model` only with 'sat'."""

    status: str
    solver: str
    model: Mapping[str, Fraction] | None = None
    detail: str = ""
    seconds: float = 0.0


@dataclass
class _Encoder:
    """pysmt terms of one query.  Real mode: parameters are Real symbols.  Integer mode (a grid
    query): parameter x is k / grid with k an Int symbol, and every term is multiplied by `scale`
    (grid times the common denominator of the query's numbers), so all coefficients are integers
    and comparisons are unchanged (min, max, sums and relations commute with a positive scaling)."""

    mgr: object
    grid: int | None = None
    scale: int = 1
    symbols: dict = field(default_factory=dict)
    cache: dict = field(default_factory=dict)

    def var(self, name: str):
        from pysmt.typing import INT, REAL
        if name not in self.symbols:
            if self.grid is None:
                self.symbols[name] = self.mgr.Symbol(name, REAL)
            else:
                self.symbols[name] = self.mgr.Symbol(f"{name}__num", INT)
        return self.symbols[name]

    def number(self, q: Fraction, per_variable: bool = False):
        """A constant term; in integer mode scaled (a coefficient of k is scaled by scale/grid)."""
        q = Fraction(q)
        if self.grid is None:
            return self.mgr.Real(q)
        scaled = q * (Fraction(self.scale, self.grid) if per_variable else self.scale)
        if scaled.denominator != 1:
            raise SolverError("internal: integer scaling left a fraction")
        return self.mgr.Int(scaled.numerator)

    def affine(self, a: Affine):
        terms = [self.mgr.Times(self.number(c, True), self.var(n)) for n, c in a.coeffs]
        terms.append(self.number(a.const))
        return terms[0] if len(terms) == 1 else self.mgr.Plus(terms)

    def term(self, e: Expr):
        key = e.key
        if key not in self.cache:
            self.cache[key] = self._build(e)
        return self.cache[key]

    def _build(self, e: Expr):
        if isinstance(e, Affine):
            return self.affine(e)
        if isinstance(e, Sum):
            return self.mgr.Plus([self.affine(e.affine)] + [self.term(t) for t in e.terms])
        pick_first = self.mgr.LE if isinstance(e, Min) else self.mgr.GE
        acc = self.term(e.args[0])
        for arg in e.args[1:]:
            other = self.term(arg)
            acc = self.mgr.Ite(pick_first(acc, other), acc, other)
        return acc

    def relation(self, lhs: Expr, rel: str, rhs: Expr):
        a, b = self.term(lhs), self.term(rhs)
        m = self.mgr
        table = {"<": lambda: m.LT(a, b), "<=": lambda: m.LE(a, b), "==": lambda: m.Equals(a, b),
                 "!=": lambda: m.Not(m.Equals(a, b)), ">=": lambda: m.GE(a, b), ">": lambda: m.GT(a, b)}
        if rel not in table:
            raise SolverError(f"unknown relation '{rel}'")
        return table[rel]()

    def region(self, region: Region):
        m = self.mgr
        pieces = []
        for poly in region.pieces:
            atoms = [(m.GT if a.strict else m.GE)(self.affine(a.form), self.number(Fraction(0)))
                     for a in poly.atoms]
            pieces.append(m.And(atoms) if atoms else m.TRUE())
        return m.Or(pieces) if pieces else m.FALSE()

    def numerator_bounds(self, query: Query, names: Sequence[str]):
        """The box and per-name bounds on the integer numerators (integer mode only)."""
        m = self.mgr
        out = []
        if query.box is not None:
            for n in names:
                out += [m.LE(self.var(n), m.Int(int(query.box))), m.GE(self.var(n), m.Int(-int(query.box)))]
        for n, lo, hi in query.numerators:
            if lo is not None:
                out.append(m.GE(self.var(n), m.Int(int(lo))))
            if hi is not None:
                out.append(m.LE(self.var(n), m.Int(int(hi))))
        return out


def _formula(query: Query, enc: _Encoder):
    names = query.variables()
    for n in names:
        enc.var(n)
    parts = [enc.region(query.region)]
    parts += [enc.relation(l, r, h) for l, r, h in query.conditions]
    parts += [enc.mgr.Not(enc.region(r)) for r in query.outside]
    if query.grid is not None:
        parts += enc.numerator_bounds(query, names)
    return enc.mgr.And(parts), names


def _encoder(query: Query, env) -> _Encoder:
    if query.grid is None:
        return _Encoder(env.formula_manager)
    if not (isinstance(query.grid, int) and query.grid >= 1):
        raise SolverError(f"internal: grid must be a positive integer, not {query.grid!r}")
    return _Encoder(env.formula_manager, query.grid, query.grid * common_denominator(query.numbers()))


def _options(solver: str, timeout: float) -> dict:
    ms = max(1, int(timeout * 1000))
    if solver == "z3":
        return {"timeout": ms}
    return {"tlimit-per": str(ms)}


def _logic(query: Query):
    from pysmt.logics import QF_LIA, QF_LRA
    return QF_LIA if query.grid is not None else QF_LRA


def check(query: Query, solver: str = "z3", timeout: float = 30.0) -> Answer:
    """Decide `query` with one backend.  Never raises for 'unknown'; a missing backend is SolverError."""
    if solver not in SOLVERS:
        raise SolverError(f"unknown solver '{solver}'; choose one of {', '.join(SOLVERS)}")
    from pysmt.environment import Environment
    from pysmt.exceptions import SolverReturnedUnknownResultError, NoSolverAvailableError

    env = Environment()
    enc = _encoder(query, env)
    formula, names = _formula(query, enc)
    start = time.perf_counter()
    try:
        with env.factory.Solver(name=solver, logic=_logic(query),
                                solver_options=_options(solver, timeout)) as s:
            s.add_assertion(formula)
            sat = s.solve()
            model = {n: s.get_value(enc.var(n)).constant_value() for n in names} if sat else None
    except SolverReturnedUnknownResultError:
        return Answer("unknown", solver, detail=f"{solver} returned unknown (timeout {timeout:g} s?)",
                      seconds=time.perf_counter() - start)
    except NoSolverAvailableError as exc:
        raise SolverError(f"solver '{solver}' is not available: {exc}") from None
    except Exception as exc:  # a backend crash must never read as a proof
        return Answer("unknown", solver, detail=f"{solver} failed: {type(exc).__name__}: {exc}",
                      seconds=time.perf_counter() - start)
    seconds = time.perf_counter() - start
    if sat:
        denominator = query.grid or 1
        return Answer("sat", solver, {n: Fraction(Fraction(v), denominator) for n, v in model.items()},
                      seconds=seconds)
    return Answer("unsat", solver, seconds=seconds)


def smtlib_text(query: Query, comment: str = "", expected: str = "unsat") -> str:
    """The query as an SMT-LIB v2.6 script (set-logic, declarations, one assertion, check-sat).

    Why: a third party can re-run any proof obligation with any SMT solver, without this project.
    `comment` lines explain what the obligation means; `expected` is stated with set-info :status."""
    import io
    from pysmt.environment import Environment
    from pysmt.smtlib.script import smtlibscript_from_formula

    env = Environment()
    enc = _encoder(query, env)
    formula, _ = _formula(query, enc)
    script = smtlibscript_from_formula(formula, logic=_logic(query))
    buf = io.StringIO()
    script.serialize(buf, daggify=False)
    body = buf.getvalue()
    head = "".join(f"; {line}\n" for line in comment.splitlines())
    lines = body.splitlines()
    # (set-info :status ...) goes right after set-logic, as the standard's benchmarks do
    out = [lines[0], f"(set-info :smt-lib-version 2.6)", f"(set-info :status {expected})"] + lines[1:]
    return head + "\n".join(out) + "\n"


def is_available(solver: str) -> bool:
    """True when pysmt can create the backend here (tests use it for skip markers)."""
    try:
        from pysmt.environment import Environment
        return solver in Environment().factory.all_solvers()
    except Exception:
        return False


def versions() -> dict[str, str]:
    """Backend versions for reports: a verdict is only as good as the solver that gave it."""
    out = {}
    try:
        import pysmt
        out["pysmt"] = pysmt.__version__
    except Exception:
        pass
    try:
        import z3
        out["z3"] = z3.get_version_string()
    except Exception:
        pass
    try:
        import cvc5
        out["cvc5"] = getattr(cvc5, "__version__", None) or cvc5.Solver().getVersion()
    except Exception:
        pass
    return out
