"""The 2-D picture of rate regions at one exponent point, with a refuting rate tuple marked.

Why exact first: each region's polygon is computed with Fractions (the vertices of an H-form by
verifier.rates.membership.vertices_at; the corners of a V-form, their coordinate projections for
free disposal, and the convex hull by an exact monotone-chain), and kept on the figure as `fig.gdof`;
floats appear only as the coordinates handed to matplotlib.  Regions over exactly two rates only.
"""

from __future__ import annotations

from fractions import Fraction
from typing import Mapping, Sequence

import matplotlib

matplotlib.use("Agg")
from matplotlib.figure import Figure  # noqa: E402
from matplotlib.patches import Polygon  # noqa: E402

from verifier.core.errors import InputError  # noqa: E402
from verifier.rates.membership import vertices_at  # noqa: E402
from verifier.rates.region import HRegion, VRegion  # noqa: E402

from .plots import STYLE, WIDTH  # noqa: E402


def _cross(o, a, b) -> Fraction:
    return (a[0] - o[0]) * (b[1] - o[1]) - (a[1] - o[1]) * (b[0] - o[0])


def convex_hull(points) -> list[tuple[Fraction, Fraction]]:
    """Counter-clockwise hull of exact points (Andrew's monotone chain; collinear points dropped)."""
    pts = sorted(set(points))
    if len(pts) <= 2:
        return pts
    lower, upper = [], []
    for p in pts:
        while len(lower) >= 2 and _cross(lower[-2], lower[-1], p) <= 0:
            lower.pop()
        lower.append(p)
    for p in reversed(pts):
        while len(upper) >= 2 and _cross(upper[-2], upper[-1], p) <= 0:
            upper.pop()
        upper.append(p)
    return lower[:-1] + upper[:-1]


def polygon_at(region, theta: Mapping[str, Fraction], x: str, y: str) -> list[tuple[Fraction, Fraction]]:
    """The region at `theta` as an exact polygon in the (x, y) rate plane ([] when it is empty)."""
    if set(region.rates) != {x, y}:
        raise InputError(f"a region plot needs exactly the two rates {x}, {y}; '{region.name}' has "
                         f"{', '.join(region.rates)}")
    if isinstance(region, HRegion):
        got = vertices_at(region, theta)
        if got is None:
            return []
        if not got[1]:
            raise InputError(f"region '{region.name}' is unbounded at this point: nothing to draw")
        points = [(v[x], v[y]) for v in got[0]]
    else:
        points = []
        for i in range(len(region.corners)):
            c = region.corner_at(i, theta)
            points.append((c[x], c[y]))
            if region.free_disposal:
                points += [(c[x], Fraction(0)), (Fraction(0), c[y]), (Fraction(0), Fraction(0))]
    return convex_hull(points)


def region_figure(regions: Sequence[HRegion | VRegion], theta: Mapping[str, Fraction],
                  rates: Mapping[str, Fraction] | None = None, x: str | None = None,
                  y: str | None = None) -> Figure:
    """Both (or all) regions overlaid at `theta`; `rates`, when given, marked as the counterexample."""
    if not regions:
        raise InputError("give at least one region to draw")
    x = x or regions[0].rates[0]
    y = y or regions[0].rates[1 if len(regions[0].rates) > 1 else 0]
    exact = {r.name: polygon_at(r, theta, x, y) for r in regions}
    with matplotlib.rc_context(STYLE):
        fig = Figure(figsize=(WIDTH, WIDTH * 0.8), layout="constrained")
        ax = fig.add_subplot()
        for k, (name, poly) in enumerate(exact.items()):
            if poly:
                ax.add_patch(Polygon([(float(a), float(b)) for a, b in poly], closed=True, fill=k == 0,
                                     alpha=0.25 if k == 0 else 1.0, edgecolor=f"C{k}", facecolor=f"C{k}",
                                     linewidth=1.2, label=name, gid="region"))
        if rates is not None:
            ax.plot([float(rates[x])], [float(rates[y])], "kx", markersize=7, gid="counterexample",
                    label="counterexample")
        ax.margins(0.08)           # a counterexample on a corner stays visible inside the frame
        ax.autoscale_view()
        ax.set_xlabel(x)
        ax.set_ylabel(y)
        at = ", ".join(f"{k} = {v}" for k, v in theta.items())
        ax.set_title(f"at {at}")
        ax.legend(loc="best")
    fig.gdof = {"polygons": exact, "rates": dict(rates) if rates else None, "theta": dict(theta)}
    return fig
