"""The engine: exact piecewise-linear expressions, regions, claims and their proofs.

It knows nothing of channels.  The folders are the pipeline's floors, lowest first; a floor imports
only from itself and the floors below it (checked by tests/test_layout.py):

    core         errors, the per-claim Budget, verdicts (THE place where verdicts combine)
    expressions  Expr (Affine, Min, Max, Sum) and Region (unions of polyhedra), exact Fractions
    geometry     exact LP: feasibility, Farkas certificates, shape, vertices, volume
    text         text / LaTeX / sympy  ->  Expr, Region (a grammar, never eval); LaTeX out
    solvers      Query -> sat / unsat / unknown with z3 or cvc5 (the only pysmt user); SMT-LIB text
    claims       Claim kinds, violation queries, exact re-checks, counterexample ranking, prove()
    regimes      the region-wise prover: cells, certified regimes, failure sub-region, thresholds
    rates        regions of rate tuples (inequalities or corners) and their claims, via the floors below
    report       one Report object; text, Markdown, LaTeX and JSON renderers

    standalone   a checker of exported certificates that needs only the Python standard library

Each floor's `__init__` lists its public names (imported when first used).
"""
