"""Keep callouts and captions from covering each other: a small greedy placer.

Fixed labels (captions sitting inside their part) are obstacles.  Each movable label
(an annotation offset from its anchor point, in priority order) tries offsets at growing
distance and turning either side of its preferred direction, and takes the first whose
box overlaps no label already placed and stays inside the axes; if none fits, the one
with the least overlap (leaving the axes costs more, leaving the page far more).
Positions are compared in display units on an Agg renderer; offsets are in points, so
the result holds at any dpi the figure is saved at.
"""

from __future__ import annotations

import math
from collections.abc import Sequence

from matplotlib.axes import Axes
from matplotlib.backend_bases import RendererBase
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.text import Annotation, Text
from matplotlib.transforms import Bbox, BboxBase

MOVABLE_CALLOUT = "stresslens-callout-"
MOVABLE_CAPTION = "stresslens-caption-"
"""Prefixes of the gid of movable labels: callouts are placed before captions."""

DISTANCES_PT = (42.0, 62.0, 88.0)
TURNS_DEG = (0, 30, -30, 60, -60, 90, -90, 125, -125, 180)
PAD_PX = 3.0


def _box(text: Text, renderer: RendererBase) -> Bbox:
    """The text's own box (no leader line), padded a little.

    An annotation's text transform follows its offset only after ``update_positions``;
    without it the offset would be read in data units.
    """
    if isinstance(text, Annotation):
        text.update_positions(renderer)
    bb = Text.get_window_extent(text, renderer)
    return Bbox.from_extents(bb.x0 - PAD_PX, bb.y0 - PAD_PX, bb.x1 + PAD_PX, bb.y1 + PAD_PX)


def _overlap(a: BboxBase, b: BboxBase) -> float:
    w = min(a.x1, b.x1) - max(a.x0, b.x0)
    h = min(a.y1, b.y1) - max(a.y0, b.y0)
    return max(w, 0.0) * max(h, 0.0)


def _outside(box: BboxBase, frame: BboxBase) -> float:
    """Area of ``box`` lying outside ``frame``."""
    return box.width * box.height - _overlap(box, frame)


def place_labels(ax: Axes, fixed: Sequence[Text], movable: Sequence[Annotation]) -> None:
    """Move each of ``movable`` (offset annotations) to a free spot; see the module doc.

    The preferred direction of an annotation is the one it was created with.
    """
    fig = ax.figure  # a report's axes sit on a Figure, never a SubFigure
    canvas = (fig.canvas if isinstance(fig.canvas, FigureCanvasAgg)
              else FigureCanvasAgg(fig))  # type: ignore[arg-type]
    renderer = canvas.get_renderer()
    frame = ax.get_window_extent(renderer)
    page = fig.bbox
    placed = [_box(t, renderer) for t in fixed]
    for a in movable:
        x, y = a.xyann
        base = math.atan2(y, x) if (x or y) else math.radians(45)
        best: tuple[float, tuple[float, float]] | None = None
        for dist in DISTANCES_PT:
            for turn in TURNS_DEG:
                ang = base + math.radians(turn)
                a.xyann = (dist * math.cos(ang), dist * math.sin(ang))
                box = _box(a, renderer)
                cost = (sum(_overlap(box, p) for p in placed) + 4.0 * _outside(box, frame)
                        + 1000.0 * _outside(box, page))
                if best is None or cost < best[0]:
                    best = (cost, a.xyann)
                if cost == 0.0:
                    break
            if best is not None and best[0] == 0.0:
                break
        assert best is not None
        a.xyann = best[1]
        placed.append(_box(a, renderer))


def place_axes_labels(ax: Axes) -> None:
    """Place the movable labels of ``ax`` (found by gid) around its fixed texts.

    Call it once the axes have their final position (after adding a colour bar).
    """
    ax.apply_aspect()
    texts = [t for t in ax.texts if t.get_text()]
    gid = [t.get_gid() or "" for t in texts]
    callouts = [t for t, g in zip(texts, gid, strict=True) if g.startswith(MOVABLE_CALLOUT)]
    captions = [t for t, g in zip(texts, gid, strict=True) if g.startswith(MOVABLE_CAPTION)]
    fixed = [t for t in texts if t not in callouts and t not in captions]
    place_labels(ax, fixed, [*callouts, *captions])  # type: ignore[list-item]
