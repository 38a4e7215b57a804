"""Case files: a paper's GDoF result written down so that the tool can check it.

A case file is TOML in a layout of our own:

    title = "..."            scenario = "..."           source = "citation, for published results"
    [parameters]             name = "meaning"   (the only names expressions may use)
    [assume]                 region = "alpha >= 0"          (the standing assumption)
    [outer]                  named outer bounds; `outer` in a claim means their min
    [outer.NAME]             a version of the converse (workbench.versions): `NAME` in a claim
    [inner]                  named inner bounds / schemes; `inner` means their max
    [formulas]               named formulas (conjectures, published curves)
    [[claims]]               statement = "inner == outer", where = "...", name = "...", expect = "proved"
    [rates], [region.NAME]   rate regions and their claims (workbench/rate_case.py)

A bound may be given regime by regime, as `hk = "1 - alpha if alpha <= 1/2; alpha if alpha > 1/2"` or
`hk = { regimes = [["1 - alpha", "alpha <= 1/2"], ...] }`, or in LaTeX as a `cases` environment
(`'\\begin{cases} 1-\\alpha & \\alpha \\le \\frac12 \\\\ \\alpha & \\alpha > \\frac12 \\end{cases}'`, read
exactly like the text form).  Such a name stays a placeholder until a claim is built: when the
regimes form one continuous function it is replaced by its verified min/max form
(verifier.claims.piecewise); otherwise the claim is split into one sub-claim per regime.  Either way each
claim checks that the regimes cover its region (workbench.expansion).

Every error names the file, the key and the position (file line and column when the value can be
found verbatim in the file, else the column inside the value).  Unknown keys and values of the wrong
type are errors, never ignored (a misspelt `regoin` would silently drop the assumption), and a TOML
number is the exact rational written (`1e-7` is 1/10000000), never a float turned back into text.
"""

from __future__ import annotations

import datetime
import decimal
import math
import re
import tomllib
from dataclasses import dataclass, field
from fractions import Fraction
from pathlib import Path

from verifier.claims import kinds as C
from verifier.claims.piecewise import check_piecewise, Piece, PiecewiseCheck
from verifier.core.errors import CaseFileError, InputError, ParseError, UnknownNameError
from verifier.expressions.expr import const, max_, min_, param, params, substitute, Expr
from verifier.expressions.region import Region
from verifier.geometry.lp import feasible
from verifier.text.latex_in import parse_latex_expr, parse_latex_piecewise, parse_latex_region
from verifier.text.lexer import MAX_LITERAL_DIGITS
from verifier.text.parse import parse_expr, parse_piecewise, parse_region

from . import versions
from . import rate_case
from .names import NAME_RE, NOT_NAMES
from .expansion import expand
from .output_target import shown_path
from .statements import Part, did_you_mean, explained, listing, parse_sentence, shifted

RESERVED = {"inner", "outer"}
CLAIM_KEYS = {"name", "statement", "where", "expect"}
VERDICTS = ("proved", "refuted", "unknown")
TOP_KEYS = {"title", "scenario", "source", "parameters", "assume", "outer", "inner", "formulas",
            "claims", "network", "rates", "region"}
ASSUME_KEYS = {"region"}
REGIME_KEYS = {"regimes"}
MAX_SUBCLAIMS = 4096   # regimes of several discontinuous bounds multiply: a typo, not a case


@dataclass
class CaseClaim:
    """A claim as written (`claim`, whose sides may mention regime-wise names) and what to prove."""

    claim: C.Claim
    statement: str
    expect: str | None
    key: str
    subclaims: list = field(default_factory=list)   # [(label, Claim)] after expansion
    coverage: list = field(default_factory=list)    # [(name, Region)]: regimes that must cover it
    blocked: str = ""                               # why the claim cannot be decided (expansion)


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
    versions: dict = field(default_factory=dict)     # name -> (kind, {bound: Expr}): workbench.versions
    regime_checks: list[PiecewiseCheck] = field(default_factory=list)
    piecewise: dict = field(default_factory=dict)    # name -> PiecewiseCheck (pieces + min/max form)
    rates: dict = field(default_factory=dict)        # rate name -> meaning (workbench.rate_case)
    regions: dict = field(default_factory=dict)      # region name -> verifier.rates HRegion / VRegion
    raw: dict = field(default_factory=dict)
    _resolving: tuple = field(default=(), repr=False, compare=False)

    def named(self) -> dict[str, Expr]:
        """Every name a claim may use, with `outer` and `inner` as the min and max of their tables.

        Values may still mention regime-wise names (as placeholders); see workbench.expansion.
        """
        out = dict(self.outer) | dict(self.inner) | dict(self.formulas)
        versioned = {kind for kind, _ in self.versions.values()}
        if self.outer and "outer" not in versioned:
            out["outer"] = min_(*(param(n) for n in self.outer))
        if self.inner and "inner" not in versioned:
            out["inner"] = max_(*(param(n) for n in self.inner))
        for name, (kind, own) in self.versions.items():
            shared = self.outer if kind == "outer" else self.inner
            out[name] = versions.combine(kind, [param(n) for n in shared] + list(own.values()))
        return out

    def version_parts(self, name: str) -> tuple[tuple[str, Expr], ...]:
        """A version's named bounds (the shared ones first), resolved: the parts of its side."""
        kind, own = self.versions[name]
        shared = self.outer if kind == "outer" else self.inner
        return tuple((n, self.resolve(e)) for n, e in shared.items()) + tuple(own.items())

    def resolve(self, expr: Expr) -> Expr:
        """Substitute names until only parameters and regime-wise placeholders remain.

        The table of names is built once per state of the case (not per call: a [network] with
        thousands of cut bounds resolves each of them)."""
        state = (len(self.outer), len(self.inner), len(self.formulas), len(self.piecewise), len(self.versions))
        if not self._resolving or self._resolving[0] != state:
            named = {k: v for k, v in self.named().items() if k not in self.piecewise}
            self._resolving = (state, named, frozenset(named))
        _, named, keys = self._resolving
        for _ in range(len(named) + 2):
            if not (params(expr) & keys):
                return expr
            expr = substitute(expr, named)
        raise InputError("definitions refer to each other in a cycle")


def kind_of(value) -> str:
    """How a message names a TOML value's type."""
    if isinstance(value, bool):
        return "a boolean"
    if isinstance(value, int):
        return "an integer"
    if isinstance(value, (float, decimal.Decimal)):
        return "a number"
    if isinstance(value, str):
        return "a string" if value.strip() else "an empty string"
    if isinstance(value, list):
        return "an array"
    if isinstance(value, dict):
        return "a table"
    if isinstance(value, (datetime.date, datetime.time)):
        return "a date or time"
    return type(value).__name__


class _Reader:
    """Parses values of one file, turning every InputError into a CaseFileError with a location."""

    def __init__(self, path: str, text: str):
        self.path, self.text = path, text
        self.shown = shown_path(path)

    def fail(self, key: str, err: InputError | str, value: str | None = None) -> CaseFileError:
        if isinstance(err, str):
            return CaseFileError(f"{self.shown}: {key}: {err}")
        where = self._locate(value, err.position) if value is not None else None
        if where is None and err.column is not None:
            where = f"column {err.column} of the value"
        return CaseFileError(f"{self.shown}: {key}: {err.message}" + (f" ({where})" if where else ""))

    def _locate(self, value: str, offset: int | None) -> str | None:
        at = self.text.find(value) if value else -1
        if at < 0 or offset is None or "\n" in value:
            return None
        pos = at + offset
        line = self.text.count("\n", 0, pos) + 1
        return f"line {line}, column {pos - self.text.rfind(chr(10), 0, pos)}"

    # --- where a key is written (best effort: TOML has many spellings of one key) ---------------
    def _section(self, name: str, index: int) -> tuple[int, int] | None:
        head = re.compile(r"^[ \t]*\[\[?[ \t]*" + re.escape(name) + r"[ \t]*\]\]?[ \t]*(#.*)?$", re.M)
        hits = list(head.finditer(self.text))
        if len(hits) <= index:
            return None
        start = hits[index].end()
        nxt = re.compile(r"^[ \t]*\[", re.M).search(self.text, start)
        return start, nxt.start() if nxt else len(self.text)

    def _key_at(self, key: str, start: int, end: int) -> int | None:
        q = re.escape(key)
        m = re.compile(r"(?:^|[{,])[ \t]*(?:" + q + r"|\"" + q + r"\"|'" + q + r"')[ \t]*[=.]",
                       re.M).search(self.text, start, end)
        return m.start() + len(m.group()) - len(m.group().lstrip("{, \t")) if m else None

    def key_line(self, path: list) -> str:
        """' at line N' for a key given as [(name, array index or None), ...], when found."""
        names = [n for n, _ in path]
        for k in range(len(path) - 1, 0, -1):
            section = self._section(".".join(names[:k]), path[k - 1][1] or 0)
            if section is not None:
                start, end = section
                rest = names[k:]
                break
        else:
            first = re.compile(r"^[ \t]*\[", re.M).search(self.text)
            start, end, rest = 0, first.start() if first else len(self.text), names
            section = self._section(names[0], 0)
            if len(names) == 1 and section is not None and self._key_at(names[0], start, end) is None:
                return f" at line {self.text.count(chr(10), 0, section[0]) + 1}"
        pos = start
        for name in rest:
            pos = self._key_at(name, pos, end)
            if pos is None:
                return ""
        return f" at line {self.text.count(chr(10), 0, pos) + 1}"

    def keys(self, table: dict, allowed, path: list, what: str) -> None:
        """Refuse keys a table does not have: an ignored misspelt key silently changes the case."""
        for key in table:
            if key not in allowed:
                hint = did_you_mean(key, allowed) or f" ({what} has: {', '.join(sorted(allowed))})"
                dotted = _dotted(path + [(key, None)])
                raise self.fail(dotted, f"unknown key{hint}{self.key_line(path + [(key, None)])}")

    # --- typed values ---------------------------------------------------------------------------
    def table(self, key: str, value, example: str) -> dict:
        if not isinstance(value, dict):
            raise self.fail(key, f"expected a table ({example}), found {kind_of(value)}")
        return value

    def string(self, key: str, value, what: str = "text in quotes") -> str:
        if not isinstance(value, str):
            raise self.fail(key, f"expected {what}, found {kind_of(value)}")
        return value

    def number(self, key: str, value) -> Fraction:
        """The exact rational a TOML number spells (1e-7 is 1/10000000, 0.1 is 1/10)."""
        if isinstance(value, float):          # a table from tomllib.loads without parse_float
            if not math.isfinite(value):
                raise self.fail(key, f"{value!r} is not a finite number")
            value = decimal.Decimal(repr(value))
        if isinstance(value, decimal.Decimal):
            if not value.is_finite():
                raise self.fail(key, f"'{value}' is not a finite number; give an exact one")
            sign, digits, exponent = value.as_tuple()
            if len(digits) + max(exponent, 0) > MAX_LITERAL_DIGITS or -exponent > MAX_LITERAL_DIGITS:
                raise self.fail(key, f"number too large or too precise (more than {MAX_LITERAL_DIGITS} "
                                     "digits)")
            return Fraction(value)
        if abs(value) >= 10 ** MAX_LITERAL_DIGITS:
            raise self.fail(key, f"number too large (more than {MAX_LITERAL_DIGITS} digits)")
        return Fraction(value)

    def expr(self, key: str, value, names, explain=None) -> Expr:
        if isinstance(value, (int, float, decimal.Decimal)) and not isinstance(value, bool):
            return const(self.number(key, value))
        if not isinstance(value, str):
            raise self.fail(key, f"expected an expression in quotes or a number, found {kind_of(value)}")
        try:
            if "\\" in value:  # pasted from a manuscript: the LaTeX subset
                return parse_latex_expr(value, names)
            return parse_expr(value, names)
        except InputError as err:
            raise self.fail(key, explained(err, explain) if explain else err, value) from None

    def region(self, key: str, value, names, explain=None) -> Region:
        if not isinstance(value, str):
            raise self.fail(key, f"expected a region in quotes, found {kind_of(value)}")
        try:
            if "\\" in value:
                return parse_latex_region(value, names)
            return parse_region(value, names)
        except InputError as err:
            raise self.fail(key, explained(err, explain) if explain else err, value) from None


def _dotted(path: list) -> str:
    return ".".join(n if i is None else f"{n}[{i}]" for n, i in path)


def read_text(path: str) -> str:
    """The file's text; a missing file, a folder or bytes that are not UTF-8 are input errors."""
    shown = shown_path(path)
    p = Path(path)
    if not str(path):
        raise CaseFileError("empty file name given for the case file")
    if p.is_dir():
        raise CaseFileError(f"{shown}: is a folder, not a case file")
    try:
        raw = p.read_bytes()
    except OSError as exc:
        raise CaseFileError(f"{shown}: cannot read: {exc.strerror or type(exc).__name__}") from None
    try:
        return raw.decode("utf-8")
    except UnicodeDecodeError as exc:
        line = raw.count(b"\n", 0, exc.start) + 1
        column = exc.start - (raw.rfind(b"\n", 0, exc.start) + 1) + 1
        raise CaseFileError(f"{shown}: not UTF-8 text: byte 0x{raw[exc.start]:02x} at offset {exc.start} "
                            f"(line {line}, column {column}); save the file as UTF-8") from None


def read_toml(path: str) -> tuple[str, dict]:
    """(text, table) of a TOML file, numbers as Decimal (the exact value written, never a float)."""
    text = read_text(path)
    try:
        return text, tomllib.loads(text, parse_float=decimal.Decimal)
    except tomllib.TOMLDecodeError as exc:
        raise CaseFileError(f"{shown_path(path)}: not valid TOML: {exc}") from None
    except RecursionError:
        raise CaseFileError(f"{shown_path(path)}: not valid TOML: nested too deeply") from None
    except ValueError as exc:   # an integer beyond Python's digit limit for int(str)
        raise CaseFileError(f"{shown_path(path)}: not valid TOML: a number too large to read "
                            f"({str(exc).split(':')[0]})") from None


def load_case(path: str | Path, solver: str = "z3", timeout: float = 30.0, budget: float | None = None) -> Case:
    """Read and check a case file; every problem is a CaseFileError naming file, key and position."""
    path = str(path)
    text, data = read_toml(path)
    return build_case(path, text, data, solver, timeout, budget)


def build_case(path: str, text: str, data: dict, solver="z3", timeout=30.0, budget=None) -> Case:
    """The Case of parsed TOML `data`.  `budget`: seconds for checking each regime-wise definition
    (coverage and its min/max form), all queries included; default verifier.core.budget's."""
    rd = _Reader(path, text)
    rd.keys(data, TOP_KEYS, [], "a case file")
    params = _parameters(rd, data)
    assume_table = rd.table("assume", data.get("assume", {}), '[assume] region = "..."')
    rd.keys(assume_table, ASSUME_KEYS, [("assume", None)], "[assume]")
    only_params = _parameters_only(params, "the assumption")
    assume = rd.region("assume.region", assume_table.get("region", "true"), params, only_params)
    texts = {k: rd.string(k, data.get(k, ""), "text in quotes") for k in ("title", "scenario", "source")}
    case = Case(path, texts["title"] or Path(path).stem, texts["scenario"].strip(), texts["source"],
                params, assume, {}, {}, {}, [], raw=data)
    _network_bounds(rd, data, case)
    tables = {t: rd.table(t, data.get(t, {}), f'[{t}] name = "expression"')
              for t in ("outer", "inner", "formulas")}
    for kind in ("outer", "inner"):
        _bounds(rd, tables[kind], kind, case, solver, timeout, budget)
    _formulas(rd, tables["formulas"], case)
    rate_case.load(rd, data, case)
    claims = data.get("claims", [])
    if isinstance(claims, dict):
        raise rd.fail("claims", "expected an array of tables: write each claim under [[claims]] "
                                "(two brackets), not [claims]")
    if not isinstance(claims, list):
        raise rd.fail("claims", f"expected an array of tables ([[claims]] entries), found {kind_of(claims)}")
    case.claims = [_claim(rd, i, spec, case) for i, spec in enumerate(claims)]
    seen: dict[str, str] = {}
    for cc in case.claims:   # names select claims (--claim) and label reports: one claim each
        if cc.claim.name in seen:
            raise rd.fail(f"{cc.key}.name", f"'{cc.claim.name}' is already the name of {seen[cc.claim.name]}; "
                          "give each claim its own name")
        seen[cc.claim.name] = cc.key
    return case


def _parameters(rd: _Reader, data: dict) -> dict[str, str]:
    params = data.get("parameters")
    if params is None or params == {}:
        raise rd.fail("parameters", "declare the parameters: [parameters] alpha = \"meaning\"")
    rd.table("parameters", params, '[parameters] alpha = "meaning"')
    for name, meaning in params.items():
        if not NAME_RE.fullmatch(name) or name in RESERVED or name in NOT_NAMES:
            raise rd.fail(f"parameters.{name}", f"'{shown_path(name)}' cannot be a parameter name "
                          "(a letter or _, then letters, digits or _; not a word of the grammar)")
        rd.string(f"parameters.{name}", meaning, "its meaning as text in quotes")
    return dict(params)


def _parameters_only(params, what: str):
    """explain() for a value that may use only parameters (bounds, regions)."""
    def explain(name: str) -> str:
        return (f"unknown parameter '{name}'{did_you_mean(name, params)}; {what} may use only the "
                f"parameters ({listing(params)})")
    return explain


def _check_new_name(rd: _Reader, key: str, name: str, case: Case) -> None:
    taken = set(case.parameters) | RESERVED | set(case.outer) | set(case.inner) | set(case.formulas) | \
        set(case.versions)
    if not NAME_RE.fullmatch(name) or name in NOT_NAMES:
        raise rd.fail(key, f"'{shown_path(name)}' is not a valid name (a letter or _, then letters, "
                           "digits or _; not a word of the grammar)")
    if name in taken:
        raise rd.fail(key, f"the name '{name}' is already used")


def _bounds(rd: _Reader, table: dict, kind: str, case: Case, solver, timeout, budget=None) -> None:
    target = case.outer if kind == "outer" else case.inner
    explain = _explain_bound(case)
    table, own_tables = versions.split(kind, table, rd.text)
    for name, value in table.items():
        key = f"{kind}.{name}"
        _check_new_name(rd, key, name, case)
        if versions.is_regime_wise(value):
            case.piecewise[name] = _regimes(rd, key, value, case, solver, timeout, budget)
            target[name] = param(name)
        else:
            target[name] = rd.expr(key, value, list(case.parameters), explain)
    for version, own in own_tables.items():
        _version(rd, kind, version, own, case)


def _version(rd: _Reader, kind: str, version: str, table: dict, case: Case) -> None:
    """One `[outer.NAME]` table: a version of the converse (workbench.versions)."""
    key = f"{kind}.{version}"
    _check_new_name(rd, key, version, case)
    if not table:
        raise rd.fail(key, f"the version '{version}' has no bounds{rd.key_line([(kind, None), (version, None)])}")
    shared = case.outer if kind == "outer" else case.inner
    explain = _explain_bound(case)
    own = {}
    for name, value in table.items():
        bkey = f"{key}.{name}"
        if not NAME_RE.fullmatch(name) or name in NOT_NAMES or name in RESERVED:
            raise rd.fail(bkey, f"'{shown_path(name)}' is not a valid name (a letter or _, then letters, "
                                "digits or _; not a word of the grammar)")
        if name in case.parameters or name in shared:
            what = "a parameter" if name in case.parameters else f"a bound shared by every version ([{kind}])"
            raise rd.fail(bkey, f"the name '{name}' is already {what}")
        if versions.is_regime_wise(value):
            raise rd.fail(bkey, f"a version's own bound cannot be given regime by regime; put it in [{kind}] "
                                "(shared by every version) or write it with min/max")
        own[name] = rd.expr(bkey, value, list(case.parameters), explain)
    case.versions[version] = (kind, own)


def _explain_bound(case: Case, what: str = "a bound"):
    """explain() for a value that may use only parameters, saying so when it names a bound."""
    fallback = _parameters_only(case.parameters, what)

    def explain(name: str) -> str:
        if name in case.named() or name in RESERVED:
            hint = ": put combinations of bounds in [formulas]" if what == "a bound" else ""
            return (f"'{name}' is a bound or formula; {what} may use only the parameters "
                    f"({listing(case.parameters)}){hint}")
        return fallback(name)
    return explain


def _pieces(rd: _Reader, key: str, value, case: Case) -> list[Piece]:
    names = list(case.parameters)
    explain = _explain_bound(case)
    if isinstance(value, str):
        read = parse_latex_piecewise if "\\" in value else parse_piecewise   # LaTeX: `cases`
        try:
            return [Piece(e, r) for e, r in read(value, names).pieces]
        except InputError as err:
            raise rd.fail(key, explained(err, explain), value) from None
    rd.keys(value, REGIME_KEYS, [(n, None) for n in key.split(".")], "a regime-wise bound")
    rows = value.get("regimes")
    if not isinstance(rows, list) or not rows:
        found = "" if rows is None else ", found an empty array" if rows == [] else f", found {kind_of(rows)}"
        raise rd.fail(key, "a bound given regime by regime needs regimes = [[\"formula\", \"region\"], ...]"
                      + found)
    pieces = []
    for i, row in enumerate(rows):
        if not (isinstance(row, list) and len(row) == 2):
            raise rd.fail(f"{key}.regimes[{i}]", "each regime is [\"formula\", \"region\"], found "
                          + (f"an array of {len(row)}" if isinstance(row, list) else kind_of(row)))
        pieces.append(Piece(rd.expr(f"{key}.regimes[{i}]", row[0], names, explain),
                            rd.region(f"{key}.regimes[{i}]", row[1], names, explain)))
    return pieces


def _regimes(rd: _Reader, key: str, value, case: Case, solver, timeout, budget=None) -> PiecewiseCheck:
    from verifier.core.budget import Budget
    result = check_piecewise(key, _pieces(rd, key, value, case), case.assume, solver,
                             Budget.of(None, timeout, budget))
    case.regime_checks.append(result)
    return result


def _formulas(rd: _Reader, table: dict, case: Case) -> None:
    for name, value in table.items():
        key = f"formulas.{name}"
        _check_new_name(rd, key, name, case)
        if isinstance(value, dict):
            raise rd.fail(key, "a formula is one expression; give a bound regime by regime in [outer] "
                               "or [inner]")
        later = [n for n in table if n not in case.formulas and n != name]
        names = list(case.parameters) + list(case.named())

        def explain(used: str) -> str:
            if used == name:
                return f"the formula '{name}' uses itself"
            if used in later:
                return (f"'{used}' is defined later in [formulas]; a formula may use only parameters, "
                        "bounds and formulas defined above it")
            return _explain_claim_name(used, case)
        case.formulas[name] = rd.expr(key, value, names, explain)


def _exact_numbers(rd: _Reader, value, key: str):
    """A copy of a [network] value with TOML numbers as exact Fractions (bounds/ takes those)."""
    if isinstance(value, dict):
        return {k: _exact_numbers(rd, v, f"{key}.{k}") for k, v in value.items()}
    if isinstance(value, list):
        return [_exact_numbers(rd, v, f"{key}[{i}]") for i, v in enumerate(value)]
    if isinstance(value, (float, decimal.Decimal)) or (isinstance(value, int) and not isinstance(value, bool)):
        return rd.number(key, value)
    return value


def exact_table(path: str, text: str, value, key: str):
    """`value` (read by read_toml) with every number as the exact Fraction written; a bad number is
    a CaseFileError naming `key` (for readers of other TOML files, such as `gdof network`)."""
    return _exact_numbers(_Reader(path, text), value, key)


def _network_bounds(rd: _Reader, data: dict, case: Case) -> None:
    """A [network] table contributes its cut-set bounds as named outer bounds (bounds/ generates them)."""
    if "network" not in data:
        return
    table = rd.table("network", data["network"], "[network] with nodes, links and messages")
    try:
        from bounds.casefile import network_outer_bounds
        generated = network_outer_bounds(_exact_numbers(rd, table, "network"), list(case.parameters))
    except CaseFileError:
        raise
    except RecursionError:
        raise rd.fail("network", "nested too deeply") from None
    except InputError as err:   # bounds/ names the key inside the table: network.links[0], ...
        inner = re.fullmatch(r"([A-Za-z_][\w.\[\]]*): (.*)", err.message, re.S)
        if inner:
            raise rd.fail(f"network.{inner[1]}", inner[2]) from None
        raise rd.fail("network", err.message) from None
    for name, expr in generated.items():
        _check_new_name(rd, f"network -> outer.{name}", name, case)
        case.outer[name] = expr


def _explain_claim_name(name: str, case: Case) -> str:
    """Why a claim cannot use `name`: a missing [outer]/[inner], or a typo among the names it has."""
    held = [v for v, (kind, _) in case.versions.items() if kind == name]
    if name in RESERVED and held:
        return (f"'{name}' has versions ({listing(held)}): name the one the claim is about, "
                f"e.g. '{held[-1]} <= {held[0]}'")
    if name in RESERVED:
        if isinstance(case.raw.get(name), dict):
            return f"'{name}' is used but the [{name}] table of the case file is empty"
        return f"'{name}' is used but the case file has no [{name}] table"
    named = [n for n in ("outer", "inner") if n in case.named()]
    named += [n for n in case.named() if n not in named]
    close = did_you_mean(name, list(case.parameters) + named).strip(" ()")
    # a near-miss of a bound is an unknown name; anything else most likely a parameter
    what = "name" if close and close.split("'")[1] in named else "parameter"
    return (f"unknown {what} '{name}' (parameters: {listing(case.parameters)}; bounds and formulas: "
            f"{listing(named)}" + (f"; {close})" if close else ")"))


def _side(rd: _Reader, part: Part, full: str, key: str, case: Case) -> C.Side:
    named = case.named()
    try:
        expr = parse_expr(part.text, list(case.parameters) + list(named))
    except InputError as err:
        err = explained(err, lambda name: _explain_claim_name(name, case))
        raise rd.fail(key, shifted(err, part, full), full) from None
    label = part.text if part.text in named else ""
    parts = ()
    if part.text == "outer":
        parts = tuple((n, case.resolve(e)) for n, e in case.outer.items())
    elif part.text == "inner":
        parts = tuple((n, case.resolve(e)) for n, e in case.inner.items())
    elif part.text in case.versions:
        parts = case.version_parts(part.text)
    return C.Side(case.resolve(expr), label, parts)


def _claim(rd: _Reader, index: int, spec, case: Case) -> CaseClaim:
    key = f"claims[{index}]"
    if not isinstance(spec, dict):
        raise rd.fail(key, f"expected a table (a [[claims]] entry), found {kind_of(spec)}")
    rd.keys(spec, CLAIM_KEYS, [("claims", index)], "a claim")
    if "statement" not in spec:
        raise rd.fail(key, "each [[claims]] entry needs statement = \"...\"")
    text = rd.string(f"{key}.statement", spec["statement"], "the claim in quotes")
    about_regions = rate_case.is_region_sentence(text, case)
    try:
        s = None if about_regions else parse_sentence(text)
    except InputError as err:
        raise rd.fail(f"{key}.statement", err, text) from None
    region = case.assume
    if "where" in spec:
        explain = _explain_bound(case, "'where'")
        region = region.meet(rd.region(f"{key}.where", spec["where"], list(case.parameters), explain))
    _check_nonempty(rd, [("claims", index), ("where", None)] if "where" in spec
                    else [("assume", None), ("region", None)], region)
    name = rd.string(f"{key}.name", spec.get("name", f"claim {index + 1}"), "the claim's name in quotes")
    if not name.strip():
        raise rd.fail(f"{key}.name", "empty name")
    expect = spec.get("expect")
    if expect is not None and expect not in VERDICTS:
        found = f"'{expect}'" if isinstance(expect, str) else kind_of(expect)
        raise rd.fail(f"{key}.expect", f"expected one of {', '.join(VERDICTS)}, found {found}")
    if about_regions:
        return CaseClaim(rate_case.rate_claim(rd, f"{key}.statement", text, region, name, case), text,
                         expect, key)
    claim = _make_claim(rd, s, text, f"{key}.statement", region, name, case)
    if claim.subst:   # the slice itself may miss the region: that is a typo too
        _check_nonempty(rd, [("claims", index), ("statement", None)], claim.region)
    result = CaseClaim(claim, text, expect, key)
    _check_split(rd, f"{key}.statement", claim, case)
    try:
        expand(result, case)
    except InputError as err:
        raise rd.fail(f"{key}.statement", err.message) from None
    return result


def _check_nonempty(rd: _Reader, path: list, region: Region) -> None:
    """An empty region (alpha > 1, alpha < 0) is a typo; exact LP here, so the error can name the key."""
    names = sorted(region.params())
    if not any(feasible(piece.atoms, names) is not None for piece in region.pieces):
        raise rd.fail(_dotted(path), f"the claim's region '{region.text()}' is empty{rd.key_line(path)}")


def _check_split(rd: _Reader, key: str, claim: C.Claim, case: Case) -> None:
    """Refuse a claim whose split by regimes would be astronomically large (before building it)."""
    count = 1
    for n in sorted(set(claim.params) & set(case.piecewise)):
        if case.piecewise[n].expr is None:
            count *= len(case.piecewise[n].pieces)
    if count > MAX_SUBCLAIMS:
        raise rd.fail(key, f"the regime-wise bounds it mentions split it into {count} sub-claims "
                           f"(limit {MAX_SUBCLAIMS}); state it for fewer bounds at a time")


def _parameter_of_sentence(rd: _Reader, key: str, name: str, case: Case) -> None:
    if name not in case.parameters:
        close = did_you_mean(name, case.parameters).strip(" ()")
        raise rd.fail(key, f"unknown parameter '{name}' (parameters: {listing(case.parameters)}"
                           + (f"; {close})" if close else ")"))


def _assigned(rd, items, text, key, case) -> dict:
    """{name: value} of `p = e, ...` (a parameter, and an expression of the parameters only); the
    engine (verifier.claims.slices) refuses what is not a slice, and the error points at the item."""
    out = {}
    for name, part in items:
        if name not in case.parameters:
            close = did_you_mean(name, case.parameters).strip(" ()")
            err = UnknownNameError(f"unknown parameter '{name}' (parameters: {listing(case.parameters)}"
                                   + (f"; {close})" if close else ")"), text, _name_start(text, part))
            raise rd.fail(key, err, text)
        if name in out:
            raise rd.fail(key, ParseError(f"'{name}' is given a value twice", text, _name_start(text, part)),
                          text)
        try:
            out[name] = parse_expr(part.text, list(case.parameters))
        except InputError as err:
            err = explained(err, _explain_bound(case, "a substituted value"))
            raise rd.fail(key, shifted(err, part, text), text) from None
    return out


def _name_start(text: str, value: Part) -> int:
    """Where `name` of `name = value` starts: the word before the `=` preceding the value."""
    eq = text.rfind("=", 0, value.start)
    m = re.search(r"([A-Za-z_][A-Za-z0-9_]*)\s*$", text[:eq])
    return m.start(1) if m else eq


def _sliced(rd, make, items, text, key):
    """make() with a SliceError (a refused substitution) pointed at the item it names."""
    from verifier.claims.slices import SliceError
    try:
        return make()
    except SliceError as err:
        part = next((p for n, p in items if n == err.name), None)
        pos = _name_start(text, part) if part is not None else None
        raise rd.fail(key, ParseError(err.message, text, pos), text) from None


def _make_claim(rd, s, text, key, region, name, case) -> C.Claim:
    claim = _make_plain_claim(rd, s, text, key, region, name, case)
    if not s.subst:
        return claim
    mapping = _assigned(rd, s.subst, text, key, case)
    return _sliced(rd, lambda: C.on_slice(claim, mapping), s.subst, text, key)


def _make_plain_claim(rd, s, text, key, region, name, case) -> C.Claim:
    lhs = _side(rd, s.lhs, text, key, case)
    for p in (s.param,) + s.swap:
        if p:
            _parameter_of_sentence(rd, key, p, case)
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
        values = _assigned(rd, s.values, text, key, case)
        rhs = _side(rd, s.rhs, text, key, case)
        return _sliced(rd, lambda: C.reduces_to(lhs, values, rhs, region, name), s.values, text, key)
    except CaseFileError:
        raise
    except InputError as err:
        raise rd.fail(key, err.message) from None
