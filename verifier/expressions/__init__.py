"""Exact piecewise-linear expressions (Affine, Min, Max, Sum) and regions (unions of polyhedra):
the data every later floor works on.
"""

from verifier.core.public_names import lazy_names

__all__, __getattr__, __dir__ = lazy_names(__name__, {
    "expr": ("Expr", "Affine", "Min", "Max", "Sum", "add", "scale", "min_", "max_", "pos", "abs_", "const", "param", "evaluate", "substitute", "to_text", "format_number"),
    "region": ("Atom", "Polyhedron", "Region", "constraint_text"),
    "display": ("display_text", "equation_display"),
})
