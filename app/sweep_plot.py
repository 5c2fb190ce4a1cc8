"""The sweep figure: peak surface field and its limit against the swept parameter.

A matplotlib :class:`~matplotlib.figure.Figure` (no pyplot), drawn into whatever
canvas holds it: the sweep dialog's ``FigureCanvasQTAgg``.  Steps that failed are gaps
in the curve; the target (fraction x limit) is a dashed line; a goal-seek answer is a
marked point with its value.  When the steps carry a streamer-inception estimate, its
scale (the factor on every electrode potential at inception) is plotted against a
second axis on the right.  Units: the parameter's own (mm, V or relative), kV/mm.
"""

from __future__ import annotations

import math

import numpy as np
from matplotlib.figure import Figure

from solver.sweep import NOT_RUN, GoalResult, SweepResult

PEAK_COLOUR = "#1f5f8b"
LIMIT_COLOUR = "#b3410e"
TARGET_COLOUR = "#c98a1a"
GOAL_COLOUR = "#2e7d32"
INCEPTION_COLOUR = "#6a5a8c"


def axis_label(param: str, unit: str) -> str:
    """``corner_radius (mm)``; ``permittivity (relative)``."""
    return f"{param} ({unit or 'relative'})"


def draw_sweep(fig: Figure, res: SweepResult | None, goal: GoalResult | None = None,
               fraction: float | None = None) -> None:
    """Redraw ``fig`` for a sweep (``None``: an empty, labelled plot)."""
    fig.clear()
    ax = fig.add_subplot(1, 1, 1)
    ax.set_ylabel("peak surface field (kV/mm)")
    ax.grid(True, color="#dddddd", linewidth=0.6)
    if res is None:
        ax.set_xlabel("parameter")
        ax.text(0.5, 0.5, "run a sweep to see the peak field against the parameter",
                ha="center", va="center", transform=ax.transAxes, color="#777777")
        fig.tight_layout()
        return
    ax.set_xlabel(axis_label(res.param, res.unit))
    x, peak, limit = res.values, res.peak_field_kV_per_mm, res.limit_kV_per_mm
    order = np.argsort(x)
    x, peak, limit = x[order], peak[order], limit[order]
    ax.plot(x, peak, "-o", color=PEAK_COLOUR, markersize=4, linewidth=1.8,
            label="peak surface field")
    ax.plot(x, limit, "-", color=LIMIT_COLOUR, linewidth=1.2, label="limit at that point")
    if fraction is not None and np.isfinite(limit).any():
        ax.plot(x, fraction * limit, "--", color=TARGET_COLOUR, linewidth=1.0,
                label=f"target: {fraction:g} x limit")
    bad = [s.value for s in res.steps if not s.ok]
    for v in bad:
        ax.axvline(v, color="#999999", linewidth=0.8, linestyle=":")
    if bad:
        ax.plot([], [], ":", color="#999999", label="no valid layout")
    if goal is not None and goal.value is not None and goal.peak_field_kV_per_mm is not None:
        ax.plot([goal.value], [goal.peak_field_kV_per_mm], "*", color=GOAL_COLOUR,
                markersize=13, label="goal", zorder=5)
        unit = f" {res.unit}" if res.unit else ""
        ax.annotate(f"{goal.value:.4g}{unit}\n{goal.peak_field_kV_per_mm:.3g} kV/mm",
                    (goal.value, goal.peak_field_kV_per_mm), textcoords="offset points",
                    xytext=(10, 10), color=GOAL_COLOUR, fontsize=9)
    finite = np.concatenate([peak[np.isfinite(peak)], limit[np.isfinite(limit)]])
    if finite.size:
        ax.set_ylim(0.0, 1.1 * float(finite.max()))
    handles, labels = ax.get_legend_handles_labels()
    scale = res.inception_scale[order]
    if np.isfinite(scale).any():
        right = ax.twinx()
        (line,) = right.plot(x, scale, "s:", color=INCEPTION_COLOUR, markersize=3.5,
                             linewidth=1.0)
        right.set_ylabel("inception voltage scale (x)", color=INCEPTION_COLOUR)
        right.tick_params(axis="y", colors=INCEPTION_COLOUR)
        right.set_ylim(0.0, 1.15 * float(np.nanmax(scale)))
        handles.append(line)
        labels.append("inception scale (right)")
    ax.legend(handles, labels, loc="best", fontsize=8, frameon=False)
    fig.tight_layout()


def summary_text(res: SweepResult) -> str:
    """One line: the range of peaks, how many steps failed, whether it was cancelled."""
    peaks = res.peak_field_kV_per_mm
    ok = np.isfinite(peaks)
    not_run = sum(s.error == NOT_RUN for s in res.steps)
    failed = int((~ok).sum()) - not_run
    stop = (f" (cancelled: {len(res.steps) - not_run} of {len(res.steps)} steps run)"
            if res.cancelled else "")
    if not ok.any():
        return (f"no step gave a valid layout ({failed} refused){stop}" if failed
                else f"no step finished{stop}")
    i_lo, i_hi = int(np.nanargmin(peaks)), int(np.nanargmax(peaks))
    unit = f" {res.unit}" if res.unit else ""
    text = (f"peak field from {peaks[i_lo]:.3g} kV/mm (at {res.values[i_lo]:.4g}{unit}) to "
            f"{peaks[i_hi]:.3g} kV/mm (at {res.values[i_hi]:.4g}{unit})")
    if failed:
        text += f"; {failed} step(s) gave no valid layout"
    return text + stop


def fmt(v: float | None, spec: str = ".4g") -> str:
    """A number for a table cell, or an empty string for None / NaN."""
    return "" if v is None or (isinstance(v, float) and math.isnan(v)) else format(v, spec)
