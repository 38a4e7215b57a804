"""Foundations every other floor uses: the error classes, the per-claim time budget, and the one
place where verdicts are combined (verifier.core.verdicts).
"""

from verifier.core.public_names import lazy_names

__all__, __getattr__, __dir__ = lazy_names(__name__, {
    "errors": ("GdofError", "InputError", "ParseError", "NonlinearError", "UnknownNameError", "RegionError", "CaseFileError", "SolverError"),
    "budget": ("Budget", "OutOfBudget", "TooLarge"),
    "verdicts": ("PROVED", "REFUTED", "UNKNOWN", "CAUTION", "Obligation", "all_of", "backends", "methods", "overall", "tally", "tally_sentence"),
})
