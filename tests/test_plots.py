"""Plots are checked through matplotlib objects (lines, patches, gids) and exact data, never pixels."""

from fractions import Fraction

import pytest

from report_fixtures import DEMO, DEMO_WRONG, ETW, W_CLAIM, section
from verifier.core.errors import InputError
from verifier.expressions.expr import param
from verifier.expressions.region import atoms_of
from workbench.plots import box_polygon, regime_map, save_figure, slice_figure


def _gid(ax, gid, kind="lines"):
    return [a for a in getattr(ax, kind) if a.get_gid() == gid]


def test_w_curve_slice_has_four_threshold_lines_at_exact_points():
    fig = slice_figure(section(ETW, W_CLAIM))
    ax = fig.axes[0]
    # Etkin, Tse, Wang, IEEE Trans. IT 54(12), 2008: corners at 1/2, 2/3, 1, 2 (from memory)
    want = [Fraction(1, 2), Fraction(2, 3), Fraction(1), Fraction(2)]
    assert fig.gdof["thresholds"] == want
    lines = _gid(ax, "threshold")
    assert sorted(l.get_xdata()[0] for l in lines) == [float(x) for x in want]
    assert _gid(ax, "side0") and _gid(ax, "side1")
    assert len({l.get_label() for l in _gid(ax, "bound") if not l.get_label().startswith("_")}) == 4
    assert "$\\alpha$" in ax.get_xlabel()
    assert fig.get_size_inches()[0] == pytest.approx(3.5)


def test_slice_drawn_through_exact_breakpoints():
    fig = slice_figure(section(ETW, W_CLAIM), hi=3)
    ys = {}
    for line in _gid(fig.axes[0], "side0"):
        ys.update(zip(line.get_xdata(), line.get_ydata()))
    # W curve values at its corners (same paper, from memory): d(1/2) = 1/2, d(2/3) = 2/3, d(1) = 1/2
    assert ys[0.5] == pytest.approx(0.5) and ys[2 / 3] == pytest.approx(2 / 3) and ys[1.0] == pytest.approx(0.5)


def test_regime_map_cells_failures_and_counterexamples():
    s = section(DEMO, DEMO_WRONG)
    fig = regime_map(s)
    ax = fig.axes[0]
    assert len(_gid(ax, "cell", "patches")) == len(s.regimes) == 4
    assert len(_gid(ax, "failure", "patches")) == len(s.failure.pieces) == 4
    assert len(_gid(ax, "counterexample")) == len(s.counterexamples)
    assert "$\\gamma$" in ax.get_ylabel()


def test_regime_map_needs_two_parameters():
    with pytest.raises(InputError, match="exactly two"):
        regime_map(section(ETW, W_CLAIM))


def test_box_clipping_is_exact():
    atoms = atoms_of(param("g"), ">", param("a")) + atoms_of(param("a"), ">=", 1)
    box = {"a": (Fraction(0), Fraction(3)), "g": (Fraction(0), Fraction(3))}
    poly = box_polygon(atoms, "a", "g", box)
    # the triangle 1 <= a <= g <= 3 (common practice: half-plane clipping of a convex polygon)
    assert set(poly) == {(1, 1), (1, 3), (3, 3)}


def test_files_written_and_not_empty(tmp_path):
    fig = slice_figure(section(DEMO, DEMO_WRONG), "gamma")
    paths = save_figure(fig, tmp_path / "slice", ("png", "pdf", "svg"))
    assert [p.suffix for p in paths] == [".png", ".pdf", ".svg"]
    assert all(p.stat().st_size > 1000 for p in paths)
    assert fig.gdof["counterexamples"]  # the first counterexample lies on its own default slice
    assert _gid(fig.axes[0], "counterexample")
