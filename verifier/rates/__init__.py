"""GDoF results stated as regions of rate tuples (d1, ..., dK), decided exactly over exponent regions.

Knows nothing of channels.  The pipeline, one module per stage:

  region.py    HRegion (inequalities sum_k c_k d_k <= b(theta), constant c, PL b) and VRegion
               (corner points with PL coordinates, time sharing, optional free disposal)
  text.py      the text forms: 'd1 + d2 <= max(alpha, 1 - alpha)', '(1 - alpha, alpha)', 'd1 + 2*d2'
  claims.py    RateClaim kinds: subset, equal, contains, max (weighted sum), support (all weights >= 0),
               redundant (a facet implied by the others)
  support.py   the support function of a region as an ordinary PL expression (LP duality for
               H-forms: the dual polyhedron does not depend on theta, its vertices are enumerated once)
  vertices.py  basic solutions of an H-form (theta-independent bases), for "H-form inside corners"
  membership.py exact membership of a numeric rate tuple at a numeric exponent point (exact LP for
               the convex hull), the vertices of an H-form there: the re-checks of every witness
  queries.py   the violation questions of each kind, as verifier.solvers.smt Queries, with exact re-checks
  regimes.py   an H-form regime by regime of the exponents: irredundant inequalities, corner points as
               affine formulas, thresholds (for `gdof report`; every fact re-checked exactly)
  decide.py    RateClaim -> RateVerdict through verifier.core.verdicts (unknown never reads as proved),
               with the counterexample: an exponent point AND a rate tuple, both exact and re-checked

Soundness rules are those of the scalar engine: only unsat of a violation query proves; every model is
re-evaluated exactly with Fractions and must lie in the claim's exponent region.
"""

from verifier.core.public_names import lazy_names

__all__, __getattr__, __dir__ = lazy_names(__name__, {
    "region": ("HRegion", "VRegion", "RateInequality", "inequality"),
    "text": ("h_region", "v_region", "parse_inequality", "parse_corner", "parse_weights"),
    "claims": ("RateClaim", "subset", "equal", "contains", "max_of", "same_support", "redundant"),
    "support": ("support_expr", "dual_vertices"),
    "decide": ("RateVerdict",),
    "regimes": ("region_regimes", "RegionRegimes", "RegionNotShown"),
})
