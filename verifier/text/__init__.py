"""Text in and out, never eval: the grammar for expressions, regions and piecewise definitions, the
LaTeX subset in and out, and the bridge to sympy.
"""

from verifier.core.public_names import lazy_names

__all__, __getattr__, __dir__ = lazy_names(__name__, {
    "parse": ("parse_expr", "parse_region", "parse_piecewise"),
    "latex_in": ("parse_latex_expr", "parse_latex_region"),
    "latex_out": ("expr_to_latex", "name_to_latex"),
    "sympy_bridge": ("piecewise_to_sympy",),
})
