"""Counterexamples from the regime method: exact points of the failure set, best first.

Why not just the solver model: the failure set is known exactly, so we can offer its nice interior
points, the smallest-denominator lattice points found per piece, and the points of largest violation.
They are ordered by the one ranking of verifier.claims.witness (inside first, then smallest common
denominator, then smallest magnitude), and the first is the point of the same search `gdof check`
runs, so both commands print the same first counterexample.  Every point is re-checked with
claims.violated_at (which also requires the claim's own region) before it is returned.
For a monotone claim the witness is a pair of points of a failing cell, apart only in the parameter.
"""

from __future__ import annotations

from fractions import Fraction

from verifier.claims.kinds import Claim, violated_at, witness_of
from verifier.claims.witness import Counterexample, best_counterexample, describe
from verifier.regimes.failure import denominator
from verifier.regimes.spec import Spec

REFUTED = "refuted"


def counterexamples(claim: Claim, spec: Spec, regimes, solver: str = "z3", budget=None,
                    improve: bool = True) -> tuple[Counterexample, ...]:
    """Every re-checked counterexample, best first by the ranking of verifier.claims.witness; the first is
    the one `gdof check` prints (the same search, started from a point of the failure set)."""
    found = []
    for r in regimes:
        if r.status != REFUTED:
            continue
        if spec.kind == "monotone":
            point = _monotone_pair(spec, r)
            if point is not None:
                found.append(describe(claim, point, f"slope {r.forms[0].coeff(spec.param)} in regime {r.index}"))
            continue
        for piece in r.failures:
            found.append(describe(claim, piece.point, f"nice interior point of a failure piece in regime {r.index}"))
            if piece.worst_attained and piece.worst_point is not None:
                found.append(describe(claim, piece.worst_point,
                                      f"largest violation ({piece.worst_value}) in regime {r.index}"))
    found = [c for c in found if violated_at(claim, c.point)]
    if found and improve:
        first = min(found, key=lambda c: c.rank())
        found.insert(0, best_counterexample(claim, witness_of(claim, first.point), solver, budget))
    out, seen = [], set()
    for c in sorted(found, key=lambda c: c.rank()):   # stable: the searched point first among equals
        key = tuple(sorted(c.point.items()))
        if key not in seen and violated_at(claim, c.point):
            seen.add(key)
            out.append(c)
    return tuple(out)


def _den(point):
    return denominator(point)


def _monotone_pair(spec, regime):
    """Two points of the failing cell, apart only in p, where f decreases (increases)."""
    cell = regime.cells[0]
    z = dict(regime.cells[0].point)
    p = spec.param
    step = Fraction(1)
    for atom in cell.atoms:
        c = atom.form.coeff(p)
        if c < 0:
            room = atom.form.const + sum((k * z[n] for n, k in atom.form.coeffs), Fraction(0))
            step = min(step, room / (-c) / 2)
    point = dict(z)
    point[p + "'"] = z[p] + step
    return point if step > 0 else None
