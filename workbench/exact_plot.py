"""The exact holds / fails sets of a two-exponent claim as a figure (verifier.regimes.optimality).

Why a figure of its own (not drawn into the regime map): a referee pastes "the scheme is optimal
exactly when ..." next to a picture of exactly that set.  Pieces are clipped to the box in exact
arithmetic (plots.clip on the closure); a piece of lower dimension (the boundary where the two sides
meet, an isolated point) is drawn as a segment or a dot, so a holds set that is only a line is not
lost.  Floats appear only as the coordinates handed to matplotlib; `fig.gdof` keeps the exact data.
"""

from __future__ import annotations

from fractions import Fraction
from typing import Mapping

import matplotlib

from verifier.core.errors import InputError

from .plots import STYLE, WIDTH, clip, default_box, tex

COLOURS = {"holds": "tab:green", "fails": "tab:red"}


def clipped(atoms, x: str, y: str, box) -> list[tuple[Fraction, Fraction]]:
    """Distinct vertices of the piece's closure inside the box (1: a point, 2: a segment, more: a
    polygon, in boundary order)."""
    (x0, x1), (y0, y1) = box[x], box[y]
    poly = [(x0, y0), (x1, y0), (x1, y1), (x0, y1)]
    for atom in atoms:
        if poly:
            poly = clip(poly, atom.relaxed(), x, y)
    out = []
    for p in poly:
        if p not in out:
            out.append(p)
    return out


def exact_map(section, x: str | None = None, y: str | None = None, box: Mapping | None = None):
    """Holds (green) and fails (red) sets of a refuted two-parameter comparison."""
    from matplotlib.figure import Figure
    from matplotlib.patches import Polygon
    op = section.optimality
    if op is None or len(op.names) != 2:
        raise InputError(f"exact map: claim '{section.title}' has no exact sets in two parameters")
    x, y = x or op.names[0], y or op.names[1]
    box = {k: (Fraction(a), Fraction(b)) for k, (a, b) in (box or default_box(section, x, y)).items()}
    drawn = {"holds": 0, "fails": 0}
    with matplotlib.rc_context(STYLE):
        fig = Figure(figsize=(WIDTH, 3.6), layout="constrained")
        ax = fig.add_subplot()
        for which, pieces in (("holds", op.holds), ("fails", op.fails)):
            for piece in pieces:
                pts = clipped(tuple(piece) + tuple(op.within or ()), x, y, box)
                label = (f"claim {which}" if drawn[which] == 0 else None)
                xy = [(float(a), float(b)) for a, b in pts]
                if len(pts) >= 3:
                    ax.add_patch(Polygon(xy, closed=True, facecolor=COLOURS[which], alpha=0.4,
                                         edgecolor=COLOURS[which], lw=0.8, gid=which, label=label))
                elif len(pts) == 2:
                    ax.plot([a for a, _ in xy], [b for _, b in xy], color=COLOURS[which], lw=2.0, zorder=3,
                            gid=which, label=label)
                elif len(pts) == 1:
                    ax.plot(*xy[0], marker="o", color=COLOURS[which], ms=4, ls="none", gid=which, zorder=4,
                            label=label)
                else:
                    continue
                drawn[which] += 1
        ax.set_xlim(float(box[x][0]), float(box[x][1]))
        ax.set_ylim(float(box[y][0]), float(box[y][1]))
        ax.set_xlabel(tex(x))
        ax.set_ylabel(tex(y))
        ax.legend(loc="upper center", bbox_to_anchor=(0.5, -0.18), frameon=False, ncol=2)
    fig.gdof = {"box": box, "holds": drawn["holds"], "fails": drawn["fails"]}
    return fig
