"""The only user of pysmt: a Query (is this system of constraints satisfiable?) answered by z3 or cvc5
as sat / unsat / unknown, and written as SMT-LIB text for anyone to re-run.
"""

from verifier.core.public_names import lazy_names

__all__, __getattr__, __dir__ = lazy_names(__name__, {
    "smt": ("Query", "Answer", "check", "smtlib_text", "versions", "is_available"),
})
