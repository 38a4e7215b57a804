"""Exact linear programming over the rationals: feasibility and optimisation, Farkas certificates,
the shape of a polyhedron (dimension, differences, irredundant form), vertices and rays, volume.
"""

from verifier.core.public_names import lazy_names

__all__, __getattr__, __dir__ = lazy_names(__name__, {
    "lp": ("feasible", "maximize", "solve_standard"),
    "farkas": ("Farkas", "check_farkas", "farkas_by_cone"),
    "shape": ("difference", "irredundant", "nice_point"),
    "vertices": ("Cone", "facet_atoms"),
})
