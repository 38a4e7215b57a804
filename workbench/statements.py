"""The claim sentences of case files, e.g. `inner == outer`, `outer within 1 of inner`.

Our own small grammar, keyword-driven and read at bracket depth 0 so that commas and keywords inside
min{...} never split a sentence.  Forms (A, B, C are expressions; p, q parameters; v numbers):

    A REL B                         REL one of == = <= >= < > (also the symbols for <= and >=)
    A within C of B                 |A - B| <= C
    A nondecreasing in p            (also: nonincreasing, non-decreasing, non-increasing)
    A with p = v, q = w equals B    A reduces to B when p = v and q = w
    A symmetric in p, q             A unchanged when p and q are swapped
    ANY OF THESE with p = e, ...    the claim on the slice p = e (e affine in the other parameters;
                                    verifier.claims.slices): `inner == outer with beta = alpha`

In `A with p = e equals B` the values may be expressions too; a trailing `with` (no `equals` after
it) ends the sentence, so its `=` signs are never read as the claim's relation.

Expressions are parsed by verifier.text.parse with the case's parameter and bound names; an error inside a
part is re-raised with its column counted from the start of the sentence.
"""

from __future__ import annotations

import difflib
import re
from dataclasses import dataclass, field

from verifier.core.errors import InputError, ParseError, UnknownNameError

RELATION_RE = re.compile(r"==|<=|>=|≤|≥|=|<|>")
KEYWORDS = {
    "within": re.compile(r"\bwithin\b"),
    "symmetric": re.compile(r"\bsymmetric\s+in\b"),
    "monotone": re.compile(r"\b(non-?decreasing|non-?increasing)\s+in\b"),
    "reduces-to": re.compile(r"\bwith\b"),
}


@dataclass
class Part:
    """A slice of the sentence: its text and where it starts (0-based)."""

    text: str
    start: int


@dataclass
class Sentence:
    kind: str
    lhs: Part
    rhs: Part | None = None
    rel: str = "=="
    gap: Part | None = None
    param: str = ""
    increasing: bool = True
    values: list[tuple[str, Part]] = field(default_factory=list)
    swap: tuple[str, str] = ("", "")
    subst: list[tuple[str, Part]] = field(default_factory=list)   # a trailing `with p = e, ...`


def _depth0_mask(text: str) -> list[bool]:
    """True at characters outside every bracket (and outside |...|, which opens and closes alike)."""
    mask, depth, bars = [], 0, 0
    for ch in text:
        if ch in "([{":
            depth += 1
        elif ch in ")]}":
            depth -= 1
        elif ch == "|":
            bars ^= 1
        mask.append(depth == 0 and bars == 0 and ch != "|")
    return mask


def _find(pattern: re.Pattern, text: str, start: int = 0):
    mask = _depth0_mask(text)
    for m in pattern.finditer(text, start):
        if mask[m.start()]:
            return m
    return None


def _part(text: str, start: int, end: int, what: str, full: str) -> Part:
    raw = text[start:end]
    stripped = raw.strip()
    if not stripped:
        raise ParseError(f"missing {what}", full, min(start, len(full) - 1) if full else 0)
    return Part(stripped, start + (len(raw) - len(raw.lstrip())))


def _name(part: Part, full: str) -> str:
    if not re.fullmatch(r"[A-Za-z_][A-Za-z0-9_]*", part.text):
        raise ParseError(f"expected a parameter name, found '{part.text}'", full, part.start)
    return part.text


def _split_list(part: Part) -> list[Part]:
    """Items separated by `,` or `and` at bracket depth 0 (a value may be `min(alpha, 1)`)."""
    mask, pieces, begin = _depth0_mask(part.text), [], 0
    for m in re.finditer(r",|\band\b", part.text):
        if mask[m.start()]:
            pieces.append((begin, m.start()))
            begin = m.end()
    pieces.append((begin, len(part.text)))
    out = []
    for a, b in pieces:
        chunk = part.text[a:b]
        out.append(Part(chunk.strip(), part.start + a + (len(chunk) - len(chunk.lstrip()))))
    return out


def parse_sentence(text: str) -> Sentence:
    """Split a claim sentence into its kind and parts (expressions are parsed later)."""
    if not text.strip():
        raise ParseError("empty claim", text, 0)
    w = _find(KEYWORDS["reduces-to"], text)
    if w is not None and _find(EQUALS_RE, text, w.end()) is None:
        _part(text, 0, w.start(), "claim before 'with'", text)   # refuses an empty head
        sentence = parse_sentence(text[:w.start()])
        sentence.subst = _assignments(_part(text, w.end(), len(text), "substitution after 'with'", text),
                                      text)
        return sentence
    for kind, pattern in KEYWORDS.items():
        m = _find(pattern, text)
        if m is not None:
            return _KIND_PARSERS[kind](text, m)
    m = _find(RELATION_RE, text)
    if m is None:
        raise ParseError("a claim needs a relation (==, <=, >=, <, >) or a keyword "
                         "(within, nondecreasing in, with ... equals, symmetric in)", text, 0)
    rel = {"=": "==", "≤": "<=", "≥": ">="}.get(m.group(), m.group())
    second = _find(RELATION_RE, text, m.end())
    if second is not None:
        raise ParseError("one relation per claim; state chained conditions in 'where'", text, second.start())
    return Sentence("relation", _part(text, 0, m.start(), "left side", text),
                    _part(text, m.end(), len(text), "right side", text), rel)


def _within(text: str, m) -> Sentence:
    of = _find(re.compile(r"\bof\b"), text, m.end())
    if of is None:
        raise ParseError("'within' needs 'of': A within C of B", text, m.start())
    return Sentence("within", _part(text, 0, m.start(), "left side", text),
                    _part(text, of.end(), len(text), "right side", text),
                    gap=_part(text, m.end(), of.start(), "gap", text))


def _monotone(text: str, m) -> Sentence:
    param = _name(_part(text, m.end(), len(text), "parameter", text), text)
    return Sentence("monotone", _part(text, 0, m.start(), "function", text), param=param,
                    increasing="increasing" not in m.group(1).replace("decreasing", ""))


def _symmetric(text: str, m) -> Sentence:
    names = [_name(p, text) for p in _split_list(_part(text, m.end(), len(text), "parameters", text))]
    if len(names) != 2:
        raise ParseError("'symmetric in' takes exactly two parameters", text, m.end())
    return Sentence("symmetric", _part(text, 0, m.start(), "function", text), swap=(names[0], names[1]))


EQUALS_RE = re.compile(r"\bequals\b")


def _assignments(part: Part, text: str) -> list[tuple[str, Part]]:
    """`p = v, q = 2*alpha` as [(name, value part)], each value part positioned in the sentence."""
    values = []
    for item in _split_list(part):
        if "=" not in item.text or item.text.count("=") > 1 or re.search(r"[<>≤≥]", item.text):
            raise ParseError(f"expected 'name = value', found '{item.text}'", text, item.start)
        name, _, value = item.text.partition("=")
        if not value.strip():
            raise ParseError(f"missing value after '{name.strip()} ='", text, item.start + len(item.text) - 1)
        values.append((_name(Part(name.strip(), item.start), text),
                       Part(value.strip(), item.start + item.text.index("=") + 1 +
                            (len(value) - len(value.lstrip())))))
    return values


def _reduces(text: str, m) -> Sentence:
    eq = _find(EQUALS_RE, text, m.end())
    if eq is None:
        raise ParseError("'with' needs 'equals': A with p = 0 equals B", text, m.start())
    values = _assignments(_part(text, m.end(), eq.start(), "values", text), text)
    return Sentence("reduces-to", _part(text, 0, m.start(), "function", text),
                    _part(text, eq.end(), len(text), "right side", text), values=values)


_KIND_PARSERS = {"within": _within, "symmetric": _symmetric, "monotone": _monotone, "reduces-to": _reduces}


def shifted(err: InputError, part: Part, full: str) -> InputError:
    """The same error, its position moved from the part into the whole sentence."""
    pos = part.start + (err.position or 0)
    return type(err)(err.message, full, pos)


# ---------------------------------------------------------------------------------------------
# checks of a text beyond the grammar, and errors that say what a misspelt name might be
# ---------------------------------------------------------------------------------------------

def explained(err: InputError, explain) -> InputError:
    """The parser's "unknown parameter 'x'" error, reworded by explain(x) at the same position."""
    m = re.match(r"unknown parameter '([^']*)'", err.message) if isinstance(err, UnknownNameError) else None
    return err if m is None else UnknownNameError(explain(m[1]), err.source, err.position)


def did_you_mean(name: str, candidates) -> str:
    """' (did you mean 'x'?)' for the closest candidate, or '' when none is close."""
    close = difflib.get_close_matches(name, sorted(set(candidates)), n=1)
    return f" (did you mean '{close[0]}'?)" if close else ""


def listing(names, limit: int = 12) -> str:
    """Names for a message: at most `limit` of them, then '...'."""
    names = list(dict.fromkeys(names))
    if not names:
        return "none"
    return ", ".join(names[:limit]) + (", ..." if len(names) > limit else "")
