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

from .errors import SolverError
from .expr import Affine, Expr, Max, Min, Sum, params
from .region import Region

SOLVERS = ("z3", "cvc5")
CONDITION_RELATIONS = ("<", "<=", "==", "!=", ">=", ">")


@dataclass(frozen=True)
class Query:
    """Exists a point in `region` where all `conditions` (lhs, rel, rhs) hold?

    `grid`: when set, every parameter is forced onto the lattice (1/grid) * Z; the witness search uses
    it to find counterexamples with a small common denominator.
    `names`: parameters that must exist as variables even if no expression mentions them.
    `outside`: regions the point must avoid (coverage checks of regime-by-regime definitions).
    """

    region: Region
    conditions: tuple[tuple[Expr, str, Expr], ...] = ()
    grid: int | None = None
    names: tuple[str, ...] = ()
    outside: tuple[Region, ...] = ()

    def variables(self) -> tuple[str, ...]:
        found = set(self.names) | set(self.region.params())
        for r in self.outside:
            found |= r.params()
        for lhs, _, rhs in self.conditions:
            found |= params(lhs) | params(rhs)
        return tuple(sorted(found))


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
    mgr: object
    symbols: dict = field(default_factory=dict)
    cache: dict = field(default_factory=dict)

    def var(self, name: str):
        from pysmt.typing import REAL
        if name not in self.symbols:
            self.symbols[name] = self.mgr.Symbol(name, REAL)
        return self.symbols[name]

    def real(self, q: Fraction):
        return self.mgr.Real(Fraction(q))

    def affine(self, a: Affine):
        terms = [self.mgr.Times(self.real(c), self.var(n)) for n, c in a.coeffs]
        terms.append(self.real(a.const))
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
            atoms = [(m.GT if a.strict else m.GE)(self.affine(a.form), self.real(Fraction(0)))
                     for a in poly.atoms]
            pieces.append(m.And(atoms) if atoms else m.TRUE())
        return m.Or(pieces) if pieces else m.FALSE()

    def grid(self, names: Sequence[str], denominator: int):
        from pysmt.typing import INT
        m = self.mgr
        links = []
        for n in names:
            k = m.Symbol(f"{n}__grid", INT)
            links.append(m.Equals(m.Times(self.real(Fraction(denominator)), self.var(n)), m.ToReal(k)))
        return m.And(links)


def _formula(query: Query, enc: _Encoder):
    parts = [enc.region(query.region)]
    parts += [enc.relation(l, r, h) for l, r, h in query.conditions]
    parts += [enc.mgr.Not(enc.region(r)) for r in query.outside]
    names = query.variables()
    for n in names:
        enc.var(n)
    if query.grid is not None:
        parts.append(enc.grid(names, query.grid))
    return enc.mgr.And(parts), names


def _options(solver: str, timeout: float) -> dict:
    ms = max(1, int(timeout * 1000))
    if solver == "z3":
        return {"timeout": ms}
    return {"tlimit-per": str(ms)}


def check(query: Query, solver: str = "z3", timeout: float = 30.0) -> Answer:
    """Decide `query` with one backend.  Never raises for 'unknown'; a missing backend is SolverError."""
    if solver not in SOLVERS:
        raise SolverError(f"unknown solver '{solver}'; choose one of {', '.join(SOLVERS)}")
    from pysmt.environment import Environment
    from pysmt.exceptions import SolverReturnedUnknownResultError, NoSolverAvailableError
    from pysmt.logics import QF_LIRA, QF_LRA

    env = Environment()
    enc = _Encoder(env.formula_manager)
    formula, names = _formula(query, enc)
    logic = QF_LIRA if query.grid is not None else QF_LRA
    start = time.perf_counter()
    try:
        with env.factory.Solver(name=solver, logic=logic, solver_options=_options(solver, timeout)) as s:
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
        return Answer("sat", solver, {n: Fraction(v) for n, v in model.items()}, seconds=seconds)
    return Answer("unsat", solver, seconds=seconds)


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
