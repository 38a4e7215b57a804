"""Claims and the one-shot proof: claim kinds and their violation queries, exact re-checks of points,
the counterexample ranking, regime-by-regime definitions (piecewise), and prove().
"""

from verifier.core.public_names import lazy_names

__all__, __getattr__, __dir__ = lazy_names(__name__, {
    "kinds": ("Claim", "Side", "relation", "within", "monotone", "reduces_to", "symmetric", "violated_at",
              "violation_query", "claim_points"),
    "one_shot": ("prove", "Verdict"),
    "witness": ("Counterexample", "best_counterexample", "best_point"),
    "piecewise": ("Piece", "PiecewiseCheck", "check_piecewise"),
})
