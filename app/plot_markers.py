"""Hot-spot markers, the peak marker and their callouts on a report's axes.

Every hot spot gets a triangle; callouts go to the strongest of each cluster of nearby
hot spots (a cluster is everything within :data:`CLUSTER_FRACTION` of the view of its
strongest member), at most :data:`MAX_LABELLED_HOT_SPOTS` of them, each pointing into
the view so it stays on the page.
"""

from __future__ import annotations

import math

from matplotlib.axes import Axes

from solver.solution import HotSpot, Solution

from .plot_labels import MOVABLE_CALLOUT
from .plot_style import HOT_SPOT_COLOUR, PEAK_COLOUR
from .report_numbers import fmt_num

MAX_LABELLED_HOT_SPOTS = 6
"""Clusters beyond this many (the weakest) are marked but not labelled."""

CLUSTER_FRACTION = 0.06


def peak_location(solution: Solution) -> tuple[str, tuple[float, float], float] | None:
    """(part, (x, y) mm, |E| kV/mm) of the largest surface field, as the solver reports it;
    None when there is no field anywhere.

    Conductors count with their peak surface field, dielectrics with the gas-side field
    on their outline (the field inside a dielectric body is not a surface field).
    """
    best: tuple[str, tuple[float, float], float] | None = None
    for p in solution.parts:
        if p.kind == "dielectric":
            if p.surface_field_kV_per_mm is None or p.surface_peak_at_mm is None:
                continue
            value, at = p.surface_field_kV_per_mm, p.surface_peak_at_mm
        else:
            value, at = p.peak_field_kV_per_mm, p.peak_at_mm
        if not (math.isfinite(value) and value > 0 and all(map(math.isfinite, at))):
            continue  # no field at all (every conductor at one potential): nothing to mark
        if best is None or value > best[2]:
            best = (p.name, (float(at[0]), float(at[1])), float(value))
    return best


def clusters(spots: list[HotSpot], radius_mm: float) -> list[tuple[HotSpot, int]]:
    """(strongest spot, number of others within ``radius_mm`` of it), strongest first."""
    heads: list[HotSpot] = []
    others: list[int] = []
    for h in sorted(spots, key=lambda h: -h.field_kV_per_mm):
        j = next((j for j, g in enumerate(heads) if math.dist(g.at_mm, h.at_mm) <= radius_mm),
                 None)
        if j is None:
            heads.append(h)
            others.append(0)
        else:
            others[j] += 1
    return list(zip(heads, others, strict=True))


def draw_hot_spots(ax: Axes, solution: Solution, fontsize: float = 7.0) -> None:
    """Hot-spot triangles with 'E kV/mm > limit' callouts, and a star at the peak.

    With no hot spot the star's callout gives the peak value instead.
    """
    x0, y0, x1, y1 = solution.view_box_mm
    span = max(x1 - x0, y1 - y0)
    for h in solution.hot_spots:
        ax.plot(*h.at_mm, marker="^", ms=9, mfc=HOT_SPOT_COLOUR, mec="white", mew=1.0,
                zorder=9, ls="none", clip_on=False)
    heads = clusters(list(solution.hot_spots), CLUSTER_FRACTION * span)
    for k, (h, others) in enumerate(heads[:MAX_LABELLED_HOT_SPOTS]):
        more = f"\n(+{others} nearby)" if others else ""
        _callout(ax, solution, h.at_mm, f"{fmt_num(h.field_kV_per_mm)} kV/mm\n> limit "
                 f"{fmt_num(h.limit_kV_per_mm)}{more}", HOT_SPOT_COLOUR, k, fontsize,
                 f"{MOVABLE_CALLOUT}{k}")
    peak = peak_location(solution)
    if peak is not None:
        ax.plot(*peak[1], marker="*", ms=13, mfc="white", mec=PEAK_COLOUR, mew=1.0, zorder=10,
                ls="none", clip_on=False)
        if not heads:
            _callout(ax, solution, peak[1], f"peak {fmt_num(peak[2])} kV/mm", PEAK_COLOUR, 0,
                     fontsize, f"{MOVABLE_CALLOUT}peak")


def _callout(ax: Axes, solution: Solution, at: tuple[float, float], text: str, colour: str,
             k: int, fontsize: float, gid: str) -> None:
    """A boxed label 42 pt from a point, towards the middle of the view, with a leader.

    Successive callouts (index ``k``) turn alternately 30 degrees either side of that
    direction, so neighbours do not stack on each other.
    """
    x0, y0, x1, y1 = solution.view_box_mm
    base = math.atan2((y0 + y1) / 2 - at[1], (x0 + x1) / 2 - at[0])
    if math.hypot((y0 + y1) / 2 - at[1], (x0 + x1) / 2 - at[0]) < 1e-9 * (x1 - x0):
        base = math.radians(45)
    turn = math.radians(30) * ((k + 1) // 2) * (1 if k % 2 else -1)
    angle = base + turn
    ax.annotate(text, xy=at, xytext=(42 * math.cos(angle), 42 * math.sin(angle)),
                textcoords="offset points", fontsize=fontsize, ha="center", va="center",
                zorder=11, color="#1b1b1b", annotation_clip=False, gid=gid,
                bbox={"boxstyle": "round,pad=0.3", "fc": "white", "ec": colour, "lw": 1.0},
                arrowprops={"arrowstyle": "-", "color": colour, "lw": 0.9})
