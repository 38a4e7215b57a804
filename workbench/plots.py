"""Paper-size figures from a ClaimReport: a 1-D slice with both sides, and a 2-D regime map.

Why exact first, floats last: every breakpoint, threshold and counterexample is computed with
Fractions (verifier.regimes.thresholds.slice_profile, exact polygon clipping); floats appear only as the
coordinates handed to matplotlib.  A figure is therefore a faithful drawing of exact data, and the
exact values are kept on the figure (`fig.gdof`) for labels and tests.

Figures are built on matplotlib's object API (no pyplot state), Agg backend, 3.5in wide, so they
drop into a two-column paper; artists carry gids ('threshold', 'cell', 'failure', 'counterexample',
'bound') so tests inspect objects, not pixels.
"""

from __future__ import annotations

import math
from fractions import Fraction
from pathlib import Path
from typing import Mapping, Sequence

import matplotlib

matplotlib.use("Agg")
from matplotlib.figure import Figure  # noqa: E402
from matplotlib.patches import Polygon  # noqa: E402

from verifier.claims.kinds import compared_exprs, own_region, witness_region
from verifier.core.errors import InputError
from verifier.expressions.expr import evaluate, substitute
from verifier.regimes.spec import spec_of
from verifier.regimes.thresholds import slice_profile
from verifier.report.latex import name_latex
from verifier.report.text import active_cell

STYLE = {"font.size": 8, "axes.titlesize": 8, "axes.labelsize": 8, "legend.fontsize": 6,
         "xtick.labelsize": 7, "ytick.labelsize": 7, "lines.linewidth": 1.2}
WIDTH = 3.5  # inches: one column of a two-column paper


def tex(name: str) -> str:
    return f"${name_latex(name)}$"


def _curves(section):
    """(exprs, labels, region, named parts) of what a slice draws."""
    claim = section.claim
    if claim.kind == "monotone":
        return compared_exprs(claim)[:1], (section.labels[0],), own_region(claim), spec_of(claim).parts
    return compared_exprs(claim), section.labels, witness_region(claim), spec_of(claim).parts


def default_fixed(section, param: str) -> dict:
    """Other parameters fixed at the first counterexample, else at regime 0's interior point."""
    base = section.counterexamples[0].point if section.counterexamples else \
        (section.regimes[0].point if section.regimes else {})
    return {n: Fraction(v) for n, v in base.items() if n != param and n in section.names}


def _upper(candidates: Sequence[Fraction], lo: Fraction) -> Fraction:
    top = max([lo + 1] + [c for c in candidates if c is not None])
    return Fraction(math.ceil((top + max(Fraction(1, 2), (top - lo) / 4)) * 2), 2)


def _crossing(form, param, fixed):
    """Where the threshold form = 0 meets the slice, or None (parallel, or other names free)."""
    f = substitute(form, fixed)
    c = f.coeff(param) if hasattr(f, "coeff") else 0
    if c == 0 or any(n != param for n, _ in f.coeffs):
        return None
    return -f.const / c


def _points(expr, profile, param, fixed, lo, hi):
    """Exact (x, value) polylines of expr over the region's intervals inside [lo, hi]."""
    xs_all = set(profile.all_breakpoints)
    lines = []
    for a, b in profile.intervals:
        a = lo if a is None else max(a, lo)
        b = hi if b is None else min(b, hi)
        if a >= b:
            continue
        xs = sorted({a, b} | {x for x in xs_all if a < x < b})
        lines.append([(x, evaluate(expr, {**fixed, param: x})) for x in xs])
    return lines


def slice_figure(section, param: str | None = None, fixed: Mapping | None = None,
                 lo=0, hi=None) -> Figure:
    """lhs and rhs along `param` (others fixed), named bounds faint, thresholds, counterexamples."""
    param = param or section.names[0]
    if param not in section.names:
        raise InputError(f"slice: '{param}' is not a parameter of claim '{section.title}'")
    fixed = {k: Fraction(v) for k, v in (fixed if fixed is not None else default_fixed(section, param)).items()}
    exprs, labels, region, parts = _curves(section)
    every = list(exprs) + [e for _, _, e in parts]
    profile = slice_profile(every, region, param, fixed)
    crossings = {}
    for t in section.thresholds:
        x = _crossing(t.form, param, fixed)
        if x is not None:
            crossings.setdefault(x, t.text)
    cex = [c for c in section.counterexamples
           if all(c.point.get(n) == v for n, v in fixed.items()) and param in c.point]
    lo = Fraction(lo)
    hi = Fraction(hi) if hi is not None else _upper(list(profile.all_breakpoints) + list(crossings)
                                                     + [c.point[param] for c in cex], lo)
    with matplotlib.rc_context(STYLE):
        fig = Figure(figsize=(WIDTH, 2.5), layout="constrained")
        ax = fig.add_subplot()
        _draw_slice(ax, section, param, fixed, lo, hi, exprs, labels, parts, profile, crossings, cex)
    fig.gdof = {"param": param, "fixed": fixed, "range": (lo, hi),
                "thresholds": sorted(x for x in crossings if lo <= x <= hi),
                "breakpoints": profile.all_breakpoints, "counterexamples": [c.point for c in cex]}
    return fig


def _draw_slice(ax, section, param, fixed, lo, hi, exprs, labels, parts, profile, crossings, cex):
    for j, (_, name, e) in enumerate(parts):
        for k, line in enumerate(_points(e, profile, param, fixed, lo, hi)):
            ax.plot([float(x) for x, _ in line], [float(v) for _, v in line], lw=0.7, alpha=0.4,
                    ls="--", color=f"C{(j + 2) % 10}", gid="bound",
                    label=name.replace("_", " ") if k == 0 else None)
    styles = [dict(color="C0", lw=1.6), dict(color="C3", lw=1.2, ls=(0, (4, 2)))]
    for side, (e, label) in enumerate(zip(exprs, labels)):
        for k, line in enumerate(_points(e, profile, param, fixed, lo, hi)):
            ax.plot([float(x) for x, _ in line], [float(v) for _, v in line], gid=f"side{side}",
                    label=_short(label) if k == 0 else None, **styles[side % 2])
    for x, text in sorted(crossings.items()):
        if lo <= x <= hi:
            ax.axvline(float(x), color="0.5", lw=0.6, ls=":", gid="threshold")
            ax.annotate(f"{tex(param)} $= {_frac_tex(x)}$", (float(x), 1.0), xycoords=("data", "axes fraction"),
                        rotation=90, va="top", ha="right", fontsize=6, color="0.3")
    for c in cex:
        x = float(c.point[param])
        ax.plot([x, x], [float(c.lhs_value), float(c.rhs_value)], ls="none", marker="x", color="k",
                ms=5, gid="counterexample")
    ax.set_xlim(float(lo), float(hi))
    ax.set_xlabel(tex(param))
    ax.set_ylabel("GDoF")
    if fixed:
        ax.set_title(", ".join(f"{tex(n)} $= {_frac_tex(v)}$" for n, v in fixed.items()))
    ax.legend(loc="best", frameon=False)


def _short(label: str, width: int = 28) -> str:
    label = label.replace("_", " ")
    return label if len(label) <= width else label[:width - 1] + "…"


def _frac_tex(q: Fraction) -> str:
    q = Fraction(q)
    if q.denominator == 1:
        return str(q.numerator)
    return ("-" if q < 0 else "") + f"\\frac{{{abs(q.numerator)}}}{{{q.denominator}}}"


# ---------------------------------------------------------------------------------------------
# 2-D regime map
# ---------------------------------------------------------------------------------------------

def clip(polygon: list[tuple[Fraction, Fraction]], atom, x: str, y: str):
    """Exact Sutherland-Hodgman step: the part of a convex polygon where atom.form >= 0."""
    a, b, k = atom.form.coeff(x), atom.form.coeff(y), atom.form.const
    value = [a * px + b * py + k for px, py in polygon]
    out = []
    for i, (p, fp) in enumerate(zip(polygon, value)):
        q, fq = polygon[(i + 1) % len(polygon)], value[(i + 1) % len(polygon)]
        if fp >= 0:
            out.append(p)
        if (fp > 0 > fq) or (fp < 0 < fq):
            t = fp / (fp - fq)
            out.append((p[0] + t * (q[0] - p[0]), p[1] + t * (q[1] - p[1])))
    return out


def box_polygon(atoms, x, y, box):
    (x0, x1), (y0, y1) = box[x], box[y]
    poly = [(x0, y0), (x1, y0), (x1, y1), (x0, y1)]
    for atom in atoms:
        if poly:
            poly = clip(poly, atom, x, y)
    return poly if len(poly) >= 3 else []


def default_box(section, x, y) -> dict:
    coords = {x: [Fraction(0)], y: [Fraction(0)]}
    for r in section.regimes:
        for p in r.polytopes:
            for v in p.vertices:
                coords[x].append(v[x]), coords[y].append(v[y])
    for c in section.counterexamples:
        coords[x].append(c.point.get(x, 0)), coords[y].append(c.point.get(y, 0))
    return {n: (min(min(v), 0), _upper(v, min(min(v), 0))) for n, v in coords.items()}


def regime_map(section, x: str | None = None, y: str | None = None, box: Mapping | None = None) -> Figure:
    """Regimes of a two-parameter claim as coloured cells (by active bounds), failures hatched."""
    if len(section.names) != 2:
        raise InputError(f"regime map: claim '{section.title}' has parameters {', '.join(section.names)}; "
                         "a map needs exactly two")
    x, y = x or section.names[0], y or section.names[1]
    box = {k: (Fraction(a), Fraction(b)) for k, (a, b) in (box or default_box(section, x, y)).items()}
    with matplotlib.rc_context(STYLE):
        fig = Figure(figsize=(WIDTH, 3.8), layout="constrained")
        ax = fig.add_subplot()
        cells = _draw_cells(ax, section, x, y, box)
        fails = _draw_failures(ax, section, x, y, box)
        for c in section.counterexamples:
            ax.plot(float(c.point[x]), float(c.point[y]), marker="x", color="k", ms=5, ls="none",
                    gid="counterexample")
        ax.set_xlim(float(box[x][0]), float(box[x][1]))
        ax.set_ylim(float(box[y][0]), float(box[y][1]))
        ax.set_xlabel(tex(x))
        ax.set_ylabel(tex(y))
        ax.legend(loc="upper center", bbox_to_anchor=(0.5, -0.18), frameon=False, ncol=1)
    fig.gdof = {"box": box, "cells": cells, "failures": fails}
    return fig


def _draw_cells(ax, section, x, y, box) -> int:
    colours: dict[str, str] = {}
    count, seen = 0, set()
    for row in section.regimes:
        label = active_cell(row) if any(s.active for s in row.sides) else \
            "; ".join(str(s.formula) for s in row.sides)
        colour = colours.setdefault(label, f"C{len(colours) % 10}")
        for p in row.polytopes:
            poly = box_polygon(p.polyhedron.atoms, x, y, box) if p.dim == 2 else []
            if not poly:
                continue
            first = label not in seen
            seen.add(label)
            ax.add_patch(Polygon([(float(a), float(b)) for a, b in poly], closed=True, facecolor=colour,
                                 alpha=0.35, edgecolor="0.3", lw=0.5, gid="cell",
                                 label=_short(label, 60) if first else None))
            cx = sum(float(a) for a, _ in poly) / len(poly)
            cy = sum(float(b) for _, b in poly) / len(poly)
            ax.text(cx, cy, str(row.index), fontsize=6, ha="center", va="center")
            count += 1
    return count


def _draw_failures(ax, section, x, y, box) -> int:
    count = 0
    pieces = section.failure.pieces if section.failure is not None else ()
    for p in pieces:
        poly = box_polygon(p.polyhedron.atoms, x, y, box) if p.dim == 2 else []
        if poly:
            ax.add_patch(Polygon([(float(a), float(b)) for a, b in poly], closed=True, fill=False,
                                 hatch="////", edgecolor="k", lw=0.0, gid="failure",
                                 label="claim fails" if count == 0 else None))
            count += 1
    return count


def save_figure(fig: Figure, stem: str | Path, formats: Sequence[str] = ("png", "pdf")) -> list[Path]:
    """Write the figure as stem.png / stem.pdf / stem.svg (PNG at 300 dpi); returns the paths."""
    out = []
    for fmt in formats:
        path = Path(f"{stem}.{fmt}")
        fig.savefig(path, dpi=300 if fmt == "png" else None, format=fmt)
        out.append(path)
    return out
