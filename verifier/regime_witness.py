"""Counterexamples from the regime method: exact points of the failure set, best first.

Why not just the solver model: the failure set is known exactly, so we can offer its nice interior
points (small denominators, strictly inside), the smallest-denominator lattice points found per piece,
and the points of largest violation; full-dimensional failures come first (they are robust), then
smaller denominators.  Every point is re-checked with claims.violated_at before it is returned.
For a monotone claim the witness is a pair of points of a failing cell, apart only in the parameter.
"""

from __future__ import annotations

from fractions import Fraction

from .claims import Claim, violated_at, witness_region
from .failure import denominator
from .regime_spec import Spec
from .witness import Counterexample, describe

REFUTED = "refuted"


def counterexamples(claim: Claim, spec: Spec, regimes) -> tuple[Counterexample, ...]:
    """Best first: full-dimensional failures, then small denominators; every one re-checked."""
    out = []
    for r in regimes:
        if r.status != REFUTED:
            continue
        if spec.kind == "monotone":
            point = _monotone_pair(spec, r)
            if point is not None:
                out.append((0, 1, describe(claim, point, witness_region(claim).interior().contains(point),
                                           f"slope {r.forms[0].coeff(spec.param)} in regime {r.index}")))
            continue
        for piece in r.failures:
            point = piece.small_point or piece.point
            origin = "smallest denominator" if piece.small_point else "nice interior point"
            cex = describe(claim, point, witness_region(claim).interior().contains(point),
                           f"{origin} of a failure piece in regime {r.index}")
            out.append((0 if piece.full_dimensional else 1, _den(point), cex))
            if piece.worst_attained and piece.worst_point is not None:
                worst = describe(claim, piece.worst_point,
                                 witness_region(claim).interior().contains(piece.worst_point),
                                 f"largest violation ({piece.worst_value}) in regime {r.index}")
                out.append((0 if piece.full_dimensional else 1, _den(piece.worst_point) + 10 ** 6, worst))
    good = [c for _, _, c in sorted(out, key=lambda t: (t[0], t[1])) if violated_at(claim, c.point)]
    return tuple(good)


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
