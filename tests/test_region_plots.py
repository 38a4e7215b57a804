"""workbench/region_plots.py: exact polygons of rate regions at an exponent point (hand-derived
vertices of the MAC pentagon; region from memory, Cover-Thomas 2006 ch. 15, common practice)."""

from fractions import Fraction as F

import pytest

from verifier.core.errors import InputError
from verifier.rates.text import h_region, v_region
from workbench.region_plots import convex_hull, polygon_at, region_figure

RATES, EXPS = ["d1", "d2"], ["a1", "a2"]
MAC = h_region("MAC", RATES, EXPS, ["d1 <= a1", "d2 <= a2", "d1 + d2 <= max(a1, a2)"])
TDMA = v_region("TDMA", RATES, EXPS, ["(a1, 0)", "(0, a2)"], free_disposal=True)
THETA = {"a1": F(1), "a2": F(2)}


def test_polygons_are_exact():
    # at a1 = 1, a2 = 2: the pentagon degenerates to the quadrilateral (0,0), (1,0), (1,1), (0,2)
    assert set(polygon_at(MAC, THETA, "d1", "d2")) == {(0, 0), (1, 0), (1, 1), (0, 2)}
    assert set(polygon_at(TDMA, THETA, "d1", "d2")) == {(0, 0), (1, 0), (0, 2)}


def test_figure_marks_the_counterexample():
    fig = region_figure([MAC, TDMA], THETA, {"d1": F(1), "d2": F(1)})
    gids = [a.get_gid() for a in fig.axes[0].get_children()]
    assert gids.count("region") == 2 and "counterexample" in gids
    assert fig.gdof["rates"] == {"d1": 1, "d2": 1}


def test_hull_drops_interior_and_collinear_points():
    assert convex_hull([(F(0), F(0)), (F(2), F(0)), (F(1), F(0)), (F(0), F(2)), (F(1, 2), F(1, 2))]) == \
        [(0, 0), (2, 0), (0, 2)]


def test_three_rates_cannot_be_drawn():
    three = h_region("T", ["d1", "d2", "d3"], [], ["d1 + d2 + d3 <= 1"])
    with pytest.raises(InputError, match="exactly the two rates"):
        polygon_at(three, {}, "d1", "d2")
