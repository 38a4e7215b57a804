"""Case files: a paper's GDoF result written down so that the tool can check it.

A case file is TOML in a layout of our own:

    title = "..."            scenario = "..."           source = "citation, for published results"
    [parameters]             name = "meaning"   (the only names expressions may use)
    [assume]                 region = "alpha >= 0"          (the standing assumption)
    [outer]                  named outer bounds; `outer` in a claim means their min
    [inner]                  named inner bounds / schemes; `inner` means their max
    [formulas]               named formulas (conjectures, published curves)
    [[claims]]               statement = "inner == outer", where = "...", name = "...", expect = "proved"

A bound may be given regime by regime, as `hk = "1 - alpha if alpha <= 1/2; alpha if alpha > 1/2"` or
`hk = { regimes = [["1 - alpha", "alpha <= 1/2"], ...] }`.  Such a name stays a placeholder until a
claim is built: when the regimes form one continuous function it is replaced by its verified min/max
form (verifier.piecewise); otherwise the claim is split into one sub-claim per regime.  Either way each
claim checks that the regimes cover its region (workbench.expansion).

Every error names the file, the key and the position (file line and column when the value can be
found verbatim in the file, else the column inside the value).
"""

from __future__ import annotations

import re
import tomllib
from dataclasses import dataclass, field
from pathlib import Path

from verifier import claims as C
from verifier.errors import CaseFileError, InputError
from verifier.expr import Expr, max_, min_, param, params, substitute
from verifier.latex_in import parse_latex_expr, parse_latex_region
from verifier.parse import parse_piecewise
from verifier.parse import parse_expr, parse_region
from verifier.piecewise import Piece, PiecewiseCheck, check_piecewise
from verifier.region import Region

from .expansion import expand
from .statements import Part, parse_sentence, shifted

RESERVED = {"inner", "outer"}
CLAIM_KEYS = {"name", "statement", "where", "expect"}
VERDICTS = ("proved", "refuted", "unknown")
TOP_KEYS = {"title", "scenario", "source", "parameters", "assume", "outer", "inner", "formulas",
            "claims", "network", "plot"}


@dataclass
class CaseClaim:
    """A claim as written (`claim`, whose sides may mention regime-wise names) and what to prove."""

    claim: C.Claim
    statement: str
    expect: str | None
    key: str
    subclaims: list = field(default_factory=list)   # [(label, Claim)] after expansion
    coverage: list = field(default_factory=list)    # [(name, Region)]: regimes that must cover it


@dataclass
class Case:
    path: str
    title: str
    scenario: str
    source: str
    parameters: dict[str, str]
    assume: Region
    outer: dict[str, Expr]
    inner: dict[str, Expr]
    formulas: dict[str, Expr]
    claims: list[CaseClaim]
    regime_checks: list[PiecewiseCheck] = field(default_factory=list)
    piecewise: dict = field(default_factory=dict)    # name -> PiecewiseCheck (pieces + min/max form)
    raw: dict = field(default_factory=dict)

    def named(self) -> dict[str, Expr]:
        """Every name a claim may use, with `outer` and `inner` as the min and max of their tables.

        Values may still mention regime-wise names (as placeholders); see workbench.expansion.
        """
        out = dict(self.outer) | dict(self.inner) | dict(self.formulas)
        if self.outer:
            out["outer"] = min_(*(param(n) for n in self.outer))
        if self.inner:
            out["inner"] = max_(*(param(n) for n in self.inner))
        return out

    def resolve(self, expr: Expr) -> Expr:
        """Substitute names until only parameters and regime-wise placeholders remain."""
        named = {k: v for k, v in self.named().items() if k not in self.piecewise}
        for _ in range(len(named) + 2):
            if not (params(expr) & set(named)):
                return expr
            expr = substitute(expr, named)
        raise InputError("definitions refer to each other in a cycle")


class _Reader:
    """Parses values of one file, turning every InputError into a CaseFileError with a location."""

    def __init__(self, path: str, text: str):
        self.path, self.text = path, text

    def fail(self, key: str, err: InputError | str, value: str | None = None) -> CaseFileError:
        if isinstance(err, str):
            return CaseFileError(f"{self.path}: {key}: {err}")
        where = self._locate(value, err.position) if value is not None else None
        if where is None and err.column is not None:
            where = f"column {err.column} of the value"
        return CaseFileError(f"{self.path}: {key}: {err.message}" + (f" ({where})" if where else ""))

    def _locate(self, value: str, offset: int | None) -> str | None:
        at = self.text.find(value) if value else -1
        if at < 0 or offset is None or "\n" in value:
            return None
        pos = at + offset
        line = self.text.count("\n", 0, pos) + 1
        return f"line {line}, column {pos - self.text.rfind(chr(10), 0, pos)}"

    def expr(self, key: str, value, names) -> Expr:
        if isinstance(value, (int, float)) and not isinstance(value, bool):
            value = repr(value)
        if not isinstance(value, str):
            raise self.fail(key, f"expected an expression in quotes, found {type(value).__name__}")
        try:
            if "\\" in value:  # pasted from a manuscript: the LaTeX subset
                return parse_latex_expr(value, names)
            return parse_expr(value, names)
        except InputError as err:
            raise self.fail(key, err, value) from None

    def region(self, key: str, value, names) -> Region:
        if not isinstance(value, str):
            raise self.fail(key, f"expected a region in quotes, found {type(value).__name__}")
        try:
            if "\\" in value:
                return parse_latex_region(value, names)
            return parse_region(value, names)
        except InputError as err:
            raise self.fail(key, err, value) from None


def load_case(path: str | Path, solver: str = "z3", timeout: float = 30.0) -> Case:
    """Read and check a case file; every problem is a CaseFileError naming file, key and position."""
    path = str(path)
    try:
        text = Path(path).read_text(encoding="utf-8")
    except OSError as exc:
        raise CaseFileError(f"{path}: cannot read: {exc.strerror or exc}") from None
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise CaseFileError(f"{path}: not valid TOML: {exc}") from None
    return build_case(path, text, data, solver, timeout)


def build_case(path: str, text: str, data: dict, solver="z3", timeout=30.0) -> Case:
    rd = _Reader(path, text)
    unknown = sorted(set(data) - TOP_KEYS)
    if unknown:
        raise rd.fail(unknown[0], f"unknown key; expected one of {', '.join(sorted(TOP_KEYS))}")
    params = _parameters(rd, data)
    assume = rd.region("assume.region", data.get("assume", {}).get("region", "true"), params)
    case = Case(path, str(data.get("title", Path(path).stem)), str(data.get("scenario", "")).strip(),
                str(data.get("source", "")), params, assume, {}, {}, {}, [], raw=data)
    _network_bounds(rd, data, case)
    for table in ("outer", "inner"):
        _bounds(rd, data.get(table, {}), table, case, solver, timeout)
    _formulas(rd, data.get("formulas", {}), case)
    case.claims = [_claim(rd, i, spec, case) for i, spec in enumerate(data.get("claims", []))]
    return case


def _parameters(rd: _Reader, data: dict) -> dict[str, str]:
    params = data.get("parameters")
    if not isinstance(params, dict) or not params:
        raise rd.fail("parameters", "declare the parameters: [parameters] alpha = \"meaning\"")
    for name in params:
        if not re.fullmatch(r"[A-Za-z_][A-Za-z0-9_]*", name) or name in RESERVED:
            raise rd.fail(f"parameters.{name}", f"'{name}' cannot be a parameter name")
    return {k: str(v) for k, v in params.items()}


def _check_new_name(rd: _Reader, key: str, name: str, case: Case) -> None:
    taken = set(case.parameters) | RESERVED | set(case.outer) | set(case.inner) | set(case.formulas)
    if name in taken or not re.fullmatch(r"[A-Za-z_][A-Za-z0-9_]*", name):
        raise rd.fail(key, f"the name '{name}' is already used or is not a valid name")


def _bounds(rd: _Reader, table: dict, kind: str, case: Case, solver, timeout) -> None:
    target = case.outer if kind == "outer" else case.inner
    for name, value in table.items():
        key = f"{kind}.{name}"
        _check_new_name(rd, key, name, case)
        if isinstance(value, dict) or (isinstance(value, str) and re.search(r"\bif\b", value)):
            case.piecewise[name] = _regimes(rd, key, value, case, solver, timeout)
            target[name] = param(name)
        else:
            target[name] = rd.expr(key, value, list(case.parameters))


def _pieces(rd: _Reader, key: str, value, case: Case) -> list[Piece]:
    names = list(case.parameters)
    if isinstance(value, str):
        try:
            return [Piece(e, r) for e, r in parse_piecewise(value, names).pieces]
        except InputError as err:
            raise rd.fail(key, err, value) from None
    rows = value.get("regimes")
    if not isinstance(rows, list) or not rows:
        raise rd.fail(key, "a bound given regime by regime needs regimes = [[\"formula\", \"region\"], ...]")
    pieces = []
    for i, row in enumerate(rows):
        if not (isinstance(row, list) and len(row) == 2):
            raise rd.fail(f"{key}.regimes[{i}]", "each regime is [\"formula\", \"region\"]")
        pieces.append(Piece(rd.expr(f"{key}.regimes[{i}]", row[0], names),
                            rd.region(f"{key}.regimes[{i}]", row[1], names)))
    return pieces


def _regimes(rd: _Reader, key: str, value, case: Case, solver, timeout) -> PiecewiseCheck:
    result = check_piecewise(key, _pieces(rd, key, value, case), case.assume, solver, timeout)
    case.regime_checks.append(result)
    return result


def _formulas(rd: _Reader, table: dict, case: Case) -> None:
    for name, value in table.items():
        key = f"formulas.{name}"
        _check_new_name(rd, key, name, case)
        case.formulas[name] = rd.expr(key, value, list(case.parameters) + list(case.named()))


def _network_bounds(rd: _Reader, data: dict, case: Case) -> None:
    """A [network] table contributes its cut-set bounds as named outer bounds (bounds/ generates them)."""
    if "network" not in data:
        return
    try:
        from bounds.casefile import network_outer_bounds
        generated = network_outer_bounds(data["network"], list(case.parameters))
    except InputError as err:
        raise rd.fail("network", err.message) from None
    for name, expr in generated.items():
        _check_new_name(rd, f"network -> outer.{name}", name, case)
        case.outer[name] = expr


def _side(rd: _Reader, part: Part, full: str, key: str, case: Case) -> C.Side:
    named = case.named()
    try:
        expr = parse_expr(part.text, list(case.parameters) + list(named))
    except InputError as err:
        raise rd.fail(key, shifted(err, part, full), full) from None
    label = part.text if part.text in named else ""
    parts = ()
    if part.text == "outer":
        parts = tuple((n, case.resolve(e)) for n, e in case.outer.items())
    elif part.text == "inner":
        parts = tuple((n, case.resolve(e)) for n, e in case.inner.items())
    return C.Side(case.resolve(expr), label, parts)


def _claim(rd: _Reader, index: int, spec, case: Case) -> CaseClaim:
    key = f"claims[{index}]"
    if not isinstance(spec, dict) or "statement" not in spec:
        raise rd.fail(key, "each [[claims]] entry needs statement = \"...\"")
    extra = sorted(set(spec) - CLAIM_KEYS)
    if extra:
        raise rd.fail(f"{key}.{extra[0]}", f"unknown key; a claim has {', '.join(sorted(CLAIM_KEYS))}")
    text = spec["statement"]
    try:
        s = parse_sentence(text)
    except InputError as err:
        raise rd.fail(f"{key}.statement", err, text) from None
    region = case.assume
    if "where" in spec:
        region = region.meet(rd.region(f"{key}.where", spec["where"], list(case.parameters)))
    name = str(spec.get("name", f"claim {index + 1}"))
    expect = spec.get("expect")
    if expect is not None and expect not in VERDICTS:
        raise rd.fail(f"{key}.expect", f"expected one of {', '.join(VERDICTS)}, found '{expect}'")
    claim = _make_claim(rd, s, text, f"{key}.statement", region, name, case)
    result = CaseClaim(claim, text, expect, key)
    try:
        expand(result, case)
    except InputError as err:
        raise rd.fail(f"{key}.statement", err.message) from None
    return result


def _make_claim(rd, s, text, key, region, name, case) -> C.Claim:
    lhs = _side(rd, s.lhs, text, key, case)
    for p in (s.param,) + s.swap:
        if p and p not in case.parameters:
            raise rd.fail(key, f"unknown parameter '{p}'")
    try:
        if s.kind == "relation":
            return C.relation(lhs, s.rel, _side(rd, s.rhs, text, key, case), region, name)
        if s.kind == "within":
            gap = _side(rd, s.gap, text, key, case).expr
            return C.within(lhs, _side(rd, s.rhs, text, key, case), gap, region, name)
        if s.kind == "monotone":
            return C.monotone(lhs, s.param, region, s.increasing, name)
        if s.kind == "symmetric":
            return C.symmetric(lhs, s.swap[0], s.swap[1], region, name)
        values = {n: _side(rd, v, text, key, case).expr for n, v in s.values}
        for n in values:
            if n not in case.parameters:
                raise rd.fail(key, f"unknown parameter '{n}'")
        return C.reduces_to(lhs, values, _side(rd, s.rhs, text, key, case), region, name)
    except CaseFileError:
        raise
    except InputError as err:
        raise rd.fail(key, err.message) from None
