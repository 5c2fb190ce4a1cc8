"""Part outlines and captions on a report's axes (mm).

Outlines are filled and hatched by kind in the canvas palette, with a line style per
kind; each part is captioned with its name and defining number (kV, solved kV for a
floating conductor, or relative permittivity).
"""

from __future__ import annotations

import numpy as np
import shapely
from matplotlib.axes import Axes
from matplotlib.patches import PathPatch
from matplotlib.path import Path as MplPath
from shapely.geometry import Polygon as ShPolygon
from shapely.ops import polylabel

from solver.geometry import part_outline
from solver.layout import Part
from solver.solution import Solution

from .plot_labels import MOVABLE_CAPTION
from .plot_style import PART_STYLES, part_colours

SLIM_FRACTION = 0.035
"""Parts with an inscribed radius below this share of the view are captioned beside."""


def part_caption(part: Part, solution: Solution) -> str:
    """Name and the number that defines the part: kV, solved kV, or permittivity."""
    if part.kind == "dielectric":
        return f"{part.name}\nεr = {part.permittivity:g}"
    volts = solution.part(part.name).volts
    if volts is None:
        return part.name
    prefix = "floating, " if part.kind == "floating" else ""
    return f"{part.name}\n{prefix}{volts / 1e3:.4g} kV"


def draw_parts(ax: Axes, solution: Solution, label: bool = True, fontsize: float = 7.5) -> None:
    """Outlines filled and hatched by kind, and each part's caption at its pole.

    The caption sits at the pole of inaccessibility of the part (the interior point
    farthest from the outline), so it lands inside thin walls and annular parts too.
    """
    for part in solution.layout.parts:
        outline = part_outline(part)
        style = PART_STYLES[part.kind]
        edge, fill, alpha = part_colours(part, solution)
        verts, codes = [], []
        for ring in outline.rings:
            closed = np.vstack([ring, ring[:1]])
            verts.append(closed)
            codes += [MplPath.MOVETO] + [MplPath.LINETO] * (len(ring) - 1) + [MplPath.CLOSEPOLY]
        path = MplPath(np.vstack(verts), codes)
        face = PathPatch(path, facecolor=fill, edgecolor=edge, lw=0.0, alpha=alpha,
                         hatch=style.hatch, zorder=4 if part.is_conductor else 1)
        if hasattr(face, "set_hatch_linewidth"):  # matplotlib >= 3.10
            face.set_hatch_linewidth(0.4)
        ax.add_patch(face)
        ax.add_patch(PathPatch(path, facecolor="none", edgecolor=edge, lw=1.3,
                               linestyle=style.linestyle, zorder=5))
        if label:
            _label_part(ax, part, outline.polygon, solution, fontsize, edge)


def _label_part(ax: Axes, part: Part, polygon: object, solution: Solution,
                fontsize: float, edge: str) -> None:
    """Caption at the part's pole; beside it, with a leader, when the part is too slim.

    A part whose inscribed radius is under :data:`SLIM_FRACTION` of the view is captioned
    off to the side, towards the middle of the view, so the box does not hide it.
    """
    x0, y0, x1, y1 = solution.view_box_mm
    span = max(x1 - x0, y1 - y0)
    if solution.layout.symmetry == "axisymmetric":
        polygon = _right_of_axis(polygon)
        if polygon is None:
            return
    pole = polylabel(polygon, tolerance=span * 1e-3)
    if not (x0 <= pole.x <= x1 and y0 <= pole.y <= y1):
        return
    box = {"boxstyle": "round,pad=0.25", "fc": "white", "ec": edge, "lw": 0.6, "alpha": 0.9}
    inscribed = polygon.exterior.distance(pole)  # type: ignore[attr-defined]
    for hole in polygon.interiors:  # type: ignore[attr-defined]
        inscribed = min(inscribed, hole.distance(pole))
    text = part_caption(part, solution)
    if inscribed >= SLIM_FRACTION * span:
        ax.text(pole.x, pole.y, text, ha="center", va="center", fontsize=fontsize, zorder=8,
                clip_on=True, linespacing=1.1, bbox=box)
        return
    # a slim part: caption beside it; plot_labels.place_labels finds it a free spot
    d = np.array([(x0 + x1) / 2 - pole.x, (y0 + y1) / 2 - pole.y])
    d = d / np.hypot(*d) if np.any(d) else np.array([0.0, 1.0])
    ax.annotate(text, xy=(pole.x, pole.y), xytext=tuple(36 * d), textcoords="offset points",
                ha="center", va="center", fontsize=fontsize, zorder=8, linespacing=1.1,
                bbox=box, arrowprops={"arrowstyle": "-", "color": edge, "lw": 0.8},
                gid=f"{MOVABLE_CAPTION}{part.name}")


def _right_of_axis(polygon: object) -> ShPolygon | None:
    """The part of a region with r >= 0 (its largest piece), or None if nothing is left.

    A circle centred on the axis is a sphere: only its r >= 0 half is in the section.
    """
    half = shapely.clip_by_rect(polygon, 0.0, -1e12, 1e12, 1e12)
    pieces = [g for g in getattr(half, "geoms", [half]) if isinstance(g, ShPolygon)]
    pieces = [g for g in pieces if g.area > 0]
    return max(pieces, key=lambda g: g.area) if pieces else None
