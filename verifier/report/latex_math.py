"""The mathematics of a LaTeX report: numbers, constraints, regions, claims, side names, part labels and
figure captions, each as LaTeX math (verifier.report.latex puts them into the document).

Why a module of its own: a claim, its region and a caption are mathematics in a paper, so a report that
sets them in typewriter text (`\\texttt{inner == outer where alpha >= 0}`) cannot be pasted into a
manuscript or a referee report.  Everything here goes through verifier.text.latex_out (expr_to_latex,
name_to_latex and its affine printer) and the one constraint printer of verifier.expressions.region, so
the report, the notebook view and the LaTeX a user pastes back in are one dialect.  Names stay names:
a claim's name is text, a bound's name is an upright identifier (`\\mathrm{coded\\_multicast}`), a
parameter is a symbol (`\\alpha`).
"""

from __future__ import annotations

import re
from fractions import Fraction

from verifier.core.errors import InputError
from verifier.expressions.expr import Affine, affine
from verifier.expressions.display import display_text, equation_display
from verifier.expressions.region import Atom, Notation, Region, constraint_text
from verifier.text.latex_out import expr_to_latex, name_to_latex, term_to_latex

_SPECIALS = {"\\": r"\textbackslash{}", "&": r"\&", "%": r"\%", "$": r"\$", "#": r"\#", "_": r"\_",
             "{": r"\{", "}": r"\}", "~": r"\textasciitilde{}", "^": r"\textasciicircum{}",
             "<": r"\textless{}", ">": r"\textgreater{}", "|": r"\textbar{}"}


def escape(text: str) -> str:
    """Plain text made safe for LaTeX text mode."""
    return "".join(_SPECIALS.get(ch, ch) for ch in text)


def name_latex(name: str) -> str:
    """alpha -> \\alpha, alpha_1 / alpha1 -> \\alpha_{1}, gamma' -> \\gamma', snr -> \\mathrm{snr}
    (verifier.text.latex_out: one LaTeX dialect for the whole tool)."""
    return name_to_latex(name)


def number_latex(q: Fraction) -> str:
    q = Fraction(q)
    if q.denominator == 1:
        return str(q.numerator)
    sign = "-" if q < 0 else ""
    return f"{sign}\\tfrac{{{abs(q.numerator)}}}{{{q.denominator}}}"


def affine_latex(a: Affine) -> str:
    """An affine form in the order papers write it: 1 - \\tfrac{1}{2}\\alpha."""
    return expr_to_latex(a)


def atom_latex(atom: Atom) -> str:
    """A constraint with positive coefficients on each side, shorter side on the left."""
    return _sides_latex(atom.form, (">", "<") if atom.strict else (r"\ge", r"\le"))


def equation_latex(form: Affine, names=()) -> str:
    """The hyperplane form = 0 in the display form (verifier.expressions.display), as text prints it:
    `2\\alpha = \\gamma`."""
    return equation_display(form, names, DISPLAY_LATEX)


def _sides_latex(f: Affine, rels) -> str:
    left = affine([(n, c) for n, c in f.coeffs if c > 0], max(f.const, 0))
    right = affine([(n, -c) for n, c in f.coeffs if c < 0], max(-f.const, 0))
    size = lambda a: len(a.coeffs) + (a.const != 0)  # noqa: E731
    if (not left.coeffs and right.coeffs) or (right.coeffs and size(right) < size(left)):
        return f"{affine_latex(right)} {rels[1]} {affine_latex(left)}"
    return f"{affine_latex(left)} {rels[0]} {affine_latex(right)}"


LATEX_RELS = {"<": "<", "<=": r"\le", "==": "=", ">=": r"\ge", ">": ">"}
# the display notation in LaTeX: the same normal forms, chains and order as the text report
DISPLAY_LATEX = Notation(name=name_latex, number=number_latex, rel=LATEX_RELS.get, atom=atom_latex,
                         joiner=",\\ ", everywhere=r"\text{everywhere}", affine=affine_latex, term=term_to_latex)


def condition_latex(atoms, names=()) -> str:
    """Constraints as the text report displays them (verifier.expressions.display: normal forms,
    chains such as 1/2 <= alpha < 2/3, the parameters in the order `names`), in LaTeX."""
    return display_text(atoms, names, DISPLAY_LATEX)


def region_math(region: Region) -> str:
    """A region as it was written, one parameter's bounds chained (`0 \\le \\alpha \\le 1,\\ \\gamma >
    \\alpha`): a claim's own region and the scheme's regime conditions quoted in part labels read as
    their text does (reports display regimes, pieces and sets with condition_latex instead); a
    union as `(\\dots) \\text{ or } (\\dots)`; the empty region as `\\emptyset`."""
    if not region.pieces:
        return r"\emptyset"
    notation = Notation(name=name_latex, number=number_latex, rel=LATEX_RELS.get, atom=atom_latex,
                        joiner=",\\ ", everywhere=r"\text{everywhere}", affine=affine_latex)
    conds = [constraint_text(p.atoms, notation, reorder=True) for p in region.pieces]
    return conds[0] if len(conds) == 1 else r" \text{ or } ".join(f"({c})" for c in conds)


def bound_math(name: str) -> str:
    """A named bound, version or formula (`coded_multicast`) as an upright identifier in math."""
    return f"\\mathrm{{{escape(name)}}}"


_NAME = re.compile(r"[A-Za-z_][A-Za-z0-9_]*")


def side_math(side) -> str:
    """One side of a claim: its name when it has one (`inner`, a version, a formula), else the
    expression (verifier.claims.kinds.Side)."""
    if side.label and _NAME.fullmatch(side.label):
        return bound_math(side.label)
    return expr_to_latex(side.expr)


def _where(claim) -> str:
    return "" if claim.region == Region.everywhere() else r"\quad\text{for } " + region_math(claim.region)


def claim_math(claim) -> str:
    """A claim (verifier.claims.kinds.Claim) as one formula: `\\mathrm{inner} = \\mathrm{outer}\\quad
    \\text{for } \\alpha \\ge 0`; the kinds read as in the claim's own text()."""
    lhs = side_math(claim.lhs)
    if claim.kind == "relation":
        body = f"{lhs} {LATEX_RELS[claim.rel]} {side_math(claim.rhs)}"
    elif claim.kind == "within":
        body = rf"\left|{lhs} - {side_math(claim.rhs)}\right| \le {number_latex(claim.gap)}"
    elif claim.kind == "monotone":
        trend = "non-decreasing" if claim.increasing else "non-increasing"
        body = rf"{lhs}\ \text{{is {trend} in }} {name_latex(claim.param)}"
    elif claim.kind == "reduces-to":
        fixed = ", ".join([f"{name_latex(n)} = {number_latex(v)}" for n, v in claim.values] +
                          [f"{name_latex(n)} = {expr_to_latex(e)}" for n, e in claim.subst])
        body = rf"\left.{lhs}\right|_{{{fixed}}} = {side_math(claim.rhs)}"
    else:
        p, q = claim.swap
        body = rf"{lhs}\ \text{{is symmetric in }} {name_latex(p)} \text{{ and }} {name_latex(q)}"
    return body + _where(claim)


def compared_side_math(claim, side: int) -> str:
    """The side a report's regime table compares (verifier.regimes.spec labels): lhs, rhs, or for a
    symmetric claim the left side with its two parameters swapped."""
    if side == 0 or claim.rhs is not None:
        return side_math(claim.lhs if side == 0 else claim.rhs)
    p, q = claim.swap
    return side_math(claim.lhs) + rf"\ \text{{with }} {name_latex(p)} \text{{ and }} {name_latex(q)} \text{{ swapped}}"


# `scheme: regime 2 (1/2 < alpha <= 3/4)`, joined by '; ' (workbench.expansion)
_PART = re.compile(r"(?P<name>[A-Za-z_][A-Za-z0-9_]*): regime (?P<k>[0-9]+) \((?P<region>.*)\)")


def label_math(label: str) -> str:
    """A part label as text with its regions set as math: `\\mathrm{scheme}, regime 2 ($\\tfrac12 <
    \\alpha \\le \\tfrac34$)`.  The region is read back with the text parser (the label was printed by
    it); a label of another shape stays escaped text."""
    from verifier.text.parse import parse_region
    out = []
    for item in label.split("; "):
        m = _PART.fullmatch(item)
        try:
            region = parse_region(m.group("region")) if m else None
        except InputError:
            region = None
        if region is None:
            out.append(escape(item))
        else:
            out.append(f"${bound_math(m.group('name'))}$, regime {m.group('k')} (${region_math(region)}$)")
    return "; ".join(out)


def caption_math(section, what: str) -> str:
    """A figure caption in LaTeX: the claim's name as text, its part label with math, then what is
    drawn with the parameters as symbols.  `what`: slice, map or exact."""
    title = escape(section.name or section.statement) + (f" [{label_math(section.label)}]" if section.label else "")
    names = [f"${name_latex(n)}$" for n in section.names]
    if what == "slice":
        return f"{title}: both sides along {names[0]}"
    if what == "map":
        return f"{title}: regimes in ({names[0]}, {names[1]})"
    return f"{title}: where the claim holds and where it fails"
