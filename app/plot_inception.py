"""The discharge-inception path on a report figure (matplotlib Axes, no pyplot).

The field line the streamer estimate integrates along (:mod:`solver.inception`), drawn
dotted in the canvas's violet with a dot where it leaves the stressed surface and a
label with the top electrode voltage at inception in kV.  Dotted, so it also stands
apart from the dashed field lines and solid equipotentials in a grey print.
"""

from __future__ import annotations

import numpy as np
from matplotlib.axes import Axes

from solver.inception import Inception

from .inception_view import path_label

INCEPTION_COLOUR = "#7b2d8e"
"""The canvas's inception-path colour (:data:`app.overlays.INCEPTION`)."""
INCEPTION_STYLE = (0, (1.0, 1.6))


def draw_inception_path(ax: Axes, inc: Inception, fontsize: float = 7.5) -> None:
    """The path (mm) dotted, its start marked, and its label beside its middle."""
    pts = np.asarray(inc.path_mm, float)
    if len(pts) < 2:
        return
    ax.plot(pts[:, 0], pts[:, 1], color=INCEPTION_COLOUR, lw=1.8, ls=INCEPTION_STYLE,
            dash_capstyle="round", zorder=8, clip_on=False,  # often on the axis, r = 0
            gid="inception_path")
    ax.plot(*pts[0], marker="o", ms=5, mfc=INCEPTION_COLOUR, mec="white", mew=0.8,
            ls="none", zorder=8, clip_on=False)
    mid = pts[len(pts) // 2]
    ax.annotate(path_label(inc), xy=mid, xytext=(8, 0), textcoords="offset points",
                fontsize=fontsize, color=INCEPTION_COLOUR, va="center", ha="left", zorder=10,
                bbox={"boxstyle": "round,pad=0.2", "fc": "white", "ec": "none", "alpha": 0.8})
