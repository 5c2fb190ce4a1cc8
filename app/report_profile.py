"""The surface-field profile on the tables page: |E| against arc length along outlines.

One line per outline ring (kV/mm against mm from the ring's first point), for the rings
that come closest to their limit, with the limit drawn beside them: a fixed limit as
one dashed line, a curvature-dependent (Peek) limit as a dotted line per ring.  Colours
and line styles both vary, so the lines stay apart in a grey print.
"""

from __future__ import annotations

import numpy as np
from matplotlib.figure import Figure

from solver.solution import Solution, SurfaceTrace

from .plot_style import HOT_SPOT_COLOUR

MAX_PROFILES = 6
PROFILE_COLOURS = ("#8a3a1c", "#2d3a4a", "#3a7a5b", "#4f4386", "#b07a12", "#5b6f8a")
PROFILE_STYLES = ("-", (0, (5.0, 1.5)), (0, (1.5, 1.2)), "-.", (0, (8.0, 2.0, 1.5, 2.0)),
                  (0, (3.0, 3.0)))


def ring_label(trace: SurfaceTrace) -> str:
    """'Part' for an outer outline, 'Part, hole k' for the k-th hole."""
    return trace.part if trace.ring == 0 else f"{trace.part}, hole {trace.ring}"


def closest_to_limit(solution: Solution, n: int = MAX_PROFILES) -> list[SurfaceTrace]:
    """The ``n`` rings with the largest :math:`\\max_s E(s)/E_{lim}(s)`, highest first."""
    def ratio(t: SurfaceTrace) -> float:
        with np.errstate(divide="ignore", invalid="ignore"):
            r = np.asarray(t.E_kV_per_mm) / np.asarray(t.limit_kV_per_mm)
        r = r[np.isfinite(r)]
        return float(r.max()) if r.size else 0.0

    traces = [t for t in solution.surfaces if len(t.s_mm) > 1]
    return sorted(traces, key=ratio, reverse=True)[:n]


def draw_surface_profiles(fig: Figure, solution: Solution,
                          rect: tuple[float, float, float, float]) -> int:
    """Draw the profile axes in ``rect`` (figure fractions); return the rings drawn."""
    traces = closest_to_limit(solution)
    if not traces:
        return 0
    ax = fig.add_axes(rect)
    for k, t in enumerate(traces):
        colour, style = PROFILE_COLOURS[k % 6], PROFILE_STYLES[k % 6]
        ax.plot(t.s_mm, t.E_kV_per_mm, color=colour, ls=style, lw=1.1, label=ring_label(t))
    limits = np.concatenate([np.asarray(t.limit_kV_per_mm, float) for t in traces])
    limits = limits[np.isfinite(limits)]
    if limits.size and np.ptp(limits) <= 1e-9 * max(abs(limits.max()), 1e-300):
        ax.axhline(limits[0], color=HOT_SPOT_COLOUR, ls=(0, (6.0, 3.0)), lw=1.0,
                   label=f"limit {limits[0]:.4g} kV/mm")
    else:
        for k, t in enumerate(traces):
            ax.plot(t.s_mm, t.limit_kV_per_mm, color=PROFILE_COLOURS[k % 6], ls=":", lw=0.8,
                    label=f"limit on {ring_label(t)}")
    ax.set_xlabel("arc length along the outline (mm)")
    ax.set_ylabel("surface field |E| (kV/mm)")
    ax.set_ylim(bottom=0)
    ax.grid(True, color="#dddddd", lw=0.5)
    ax.legend(fontsize=7, loc="upper left", bbox_to_anchor=(1.01, 1.0), frameon=False)
    ax.tick_params(labelsize=7.5)
    ax.xaxis.label.set_fontsize(8.5)
    ax.yaxis.label.set_fontsize(8.5)
    return len(traces)
