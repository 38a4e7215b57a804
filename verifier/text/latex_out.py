"""LaTeX rendering of expressions, atoms, regions and piecewise schemes, for reports and notebooks.

Why its own module: papers and referee reports want `\\min\\{2\\alpha, \\frac{\\gamma}{2}\\}`, not the
plain-text form.  The output stays inside the subset that verifier.text.latex_in reads, so
`parse_latex_expr(expr_to_latex(e)) == e` for every expression whose parameter names are identifiers
(the tests check it); `piecewise_to_latex` (a `cases` environment) reads back with
`parse_latex_piecewise` too.
"""

from __future__ import annotations

from fractions import Fraction

from verifier.expressions.expr import Affine, Expr, affine, join_affine, render
from verifier.expressions.region import Atom, Polyhedron, Region

GREEK_NAMES = frozenset(
    "alpha beta gamma delta epsilon zeta eta theta iota kappa lambda mu nu xi pi rho sigma tau upsilon "
    "phi chi psi omega Gamma Delta Theta Lambda Xi Pi Sigma Upsilon Phi Psi Omega".split())
REL_LATEX = {"<": "<", "<=": "\\leq", "==": "=", ">=": "\\geq", ">": ">"}
_FLIP = {">": "<", ">=": "<=", "<": ">", "<=": ">=", "==": "=="}


def _plain(word: str) -> str:
    return word.replace("_", "\\_")


def name_to_latex(name: str) -> str:
    """alpha -> \\alpha, alpha_1 -> \\alpha_{1}, n_sd -> n_{sd}, snr -> \\mathrm{snr}."""
    base, _, sub = name.partition("_")
    if not base or not base[0].isalpha():
        return f"\\mathrm{{{_plain(name)}}}"
    if base in GREEK_NAMES:
        head = "\\" + base
    elif len(base) == 1:
        head = base
    else:
        head = f"\\mathrm{{{base}}}"
    if not sub:
        return head if not name.endswith("_") else f"\\mathrm{{{_plain(name)}}}"
    if sub in GREEK_NAMES:
        return f"{head}_{{\\{sub}}}"
    if sub.isalnum() and sub.isascii():
        return f"{head}_{{{sub}}}"
    return f"{head}_{{\\mathrm{{{_plain(sub)}}}}}"


def number_to_latex(q: Fraction) -> str:
    """Magnitude-free rendering: 3 or \\frac{1}{2} (the sign is the caller's business)."""
    if q.denominator == 1:
        return str(q.numerator)
    return f"\\frac{{{q.numerator}}}{{{q.denominator}}}"


def _term(name: str, mag: Fraction) -> str:
    tex = name_to_latex(name)
    if mag == 1:
        return tex
    if mag.denominator == 1:
        return f"{mag.numerator}{tex}"
    top = tex if mag.numerator == 1 else f"{mag.numerator}{tex}"
    return f"\\frac{{{top}}}{{{mag.denominator}}}"


term_to_latex = _term   # one term of an affine form (`2\\alpha`, `\\frac{\\gamma}{2}`), for other printers


def affine_to_latex(a: Affine) -> str:
    return join_affine(a, _term, number_to_latex)


def expr_to_latex(e: Expr) -> str:
    """`\\min\\{2\\alpha, \\frac{\\gamma}{2} + (1 - \\alpha)^+\\}`."""
    return render(e, affine_to_latex, lambda inner: f"({inner})^+",
                  lambda kind, args: f"\\{kind}\\{{" + ", ".join(args) + "\\}")


def atom_to_latex(atom: Atom) -> str:
    """`\\gamma > 2\\alpha`: positive coefficients on each side, a parameter preferably on the left."""
    form, rel = atom.form, (">" if atom.strict else ">=")
    left = affine([(n, c) for n, c in form.coeffs if c > 0], max(form.const, 0))
    right = affine([(n, -c) for n, c in form.coeffs if c < 0], max(-form.const, 0))
    if not left.coeffs and right.coeffs:
        left, right, rel = right, left, _FLIP[rel]
    return f"{affine_to_latex(left)} {REL_LATEX[rel]} {affine_to_latex(right)}"


def relation_to_latex(lhs: Expr, rel: str, rhs: Expr) -> str:
    return f"{expr_to_latex(lhs)} {REL_LATEX[rel]} {expr_to_latex(rhs)}"


def polyhedron_to_latex(p: Polyhedron) -> str:
    if not p.atoms:
        return "\\text{everywhere}"
    return ",\\ ".join(atom_to_latex(a) for a in p.atoms)


def region_to_latex(region: Region) -> str:
    """Atoms joined by commas; several polyhedra as `\\left(...\\right) \\text{ or } ...`."""
    if not region.pieces:
        return "\\emptyset"
    if len(region.pieces) == 1:
        return polyhedron_to_latex(region.pieces[0])
    return " \\text{ or } ".join(f"\\left({polyhedron_to_latex(p)}\\right)" for p in region.pieces)


def piecewise_to_latex(pw) -> str:
    """A `cases` environment for a verifier.text.parse.Piecewise (parse_latex_piecewise reads it back)."""
    rows = " \\\\ ".join(f"{expr_to_latex(e)} & \\text{{if }} {region_to_latex(r)}" for e, r in pw.pieces)
    return f"\\begin{{cases}} {rows} \\end{{cases}}"
