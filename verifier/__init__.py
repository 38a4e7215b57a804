"""The engine: exact piecewise-linear expressions, regions, claims and their proofs.

It knows nothing of channels.  The pipeline, one plain function per stage:

    parse        text / LaTeX / sympy  ->  Expr, Region          (verifier.parse, verifier.latex_in)
    claim        relation + sides + region  ->  Claim            (verifier.claims)
    encode       Claim  ->  "is (region and not claim) satisfiable?"   (verifier.smt)
    solve        z3 or cvc5 through pysmt: unsat = proved, sat = model, else unknown
    witness      model  ->  small-denominator interior counterexample  (verifier.witness)
    regimes      region  ->  cells where every expression is affine     (verifier.regimes)
    certificate  per proved cell, exact and solver-free                  (verifier.certificates)
    report       one object, several renderers                          (verifier.report)
"""
