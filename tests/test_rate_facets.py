"""Where each inequality of a region is a facet (verifier.rates.facets), re-checked by sampling exact
points on both sides of every printed boundary with an independent brute-force LP (our own pairwise
line intersection in Fractions).  The region is the symmetric two-user IC outer region of Etkin, Tse,
Wang (IEEE Trans. IT, 2008; bounds from memory); that the 2 d1 + d2 bound matters exactly for
1/2 < alpha < 1 is also what the W curve's regimes say (common knowledge of that paper's figure)."""

from __future__ import annotations

from fractions import Fraction as F
from itertools import combinations

import pytest

from verifier.core.budget import Budget
from verifier.expressions.expr import evaluate
from verifier.rates.facets import activity_lines, facet_activity
from verifier.rates.text import h_region
from verifier.regimes.proof import prove_by_regimes
from verifier.text.parse import parse_region

ROWS = ["d1 <= 1", "d2 <= 1", "d1 + d2 <= max(1, alpha) + (1 - alpha)^+", "d1 + d2 <= 2*max(alpha, 1 - alpha)",
        "2*d1 + d2 <= max(1, alpha) + (1 - alpha)^+ + max(alpha, 1 - alpha)",
        "d1 + 2*d2 <= max(1, alpha) + (1 - alpha)^+ + max(alpha, 1 - alpha)"]
ETW = h_region("outer", ["d1", "d2"], ["alpha"], ROWS)
R = parse_region("alpha >= 0, alpha <= 3")


@pytest.fixture(scope="module")
def activity():
    return facet_activity(ETW, R, lambda c, b: prove_by_regimes(c, budget=b), Budget(120, 30))


def brute_cuts(j: int, alpha: F) -> bool:
    """Does inequality j cut the region at alpha (max of its left side over the others > its bound)?"""
    point = {"alpha": alpha}
    rows = [(q.coeff("d1"), q.coeff("d2"), evaluate(q.bound, point)) for q in ETW.inequalities]
    target = rows[j]
    others = [r for k, r in enumerate(rows) if k != j] + [(F(-1), F(0), F(0)), (F(0), F(-1), F(0))]
    best = None
    for (a, b, c), (d, e, f) in combinations(others, 2):
        det = a * e - b * d
        if det == 0:
            continue
        x, y = (c * e - b * f) / det, (a * f - c * d) / det
        if all(p * x + q * y <= r for p, q, r in others):
            value = target[0] * x + target[1] * y
            best = value if best is None or value > best else best
    return best > target[2]


def test_the_printed_intervals(activity):
    where = {a.index + 1: a.where for a in activity}
    assert where[5] == where[6] == ("1/2 < alpha < 1",)
    assert where[4] == ("0 < alpha < 2/3",) and where[3] == ("2/3 < alpha < 2",)
    assert where[1] == ("0 <= alpha < 1/2", "1 < alpha <= 3")
    assert all(a.status == "facet" for a in activity)
    assert activity_lines(ETW, activity)[0] == "facets of outer:"


SAMPLES = [F(0), F(1, 4), F(1, 2), F(11, 20), F(3, 5), F(2, 3), F(4, 5), F(1), F(3, 2), F(2), F(5, 2), F(3)]
EPS = F(1, 1000)


def test_printed_pieces_agree_with_brute_force_on_both_sides_of_each_boundary(activity):
    for a in activity:
        pieces = [parse_region(text) for text in a.where]
        boundaries = {F(t) for text in a.where for t in __import__("re").findall(r"\d+(?:/\d+)?", text)}
        points = set(SAMPLES) | {b + s for b in boundaries for s in (-EPS, 0, EPS)}
        for alpha in sorted(p for p in points if 0 <= p <= 3):
            inside = any(piece.contains({"alpha": alpha}) for piece in pieces)
            assert inside == brute_cuts(a.index, alpha), (a.index + 1, alpha)
