"""Per-part summaries: surface traces, peaks, margins, hot spots, error estimates.

The margin is :math:`100\\,(1 - E_{peak}/E_{limit})` percent at the peak's location
(negative when the limit is exceeded).  A peak that sits on a convex corner of zero
radius is flagged: the field of a sharp corner is unbounded (it grows without limit
as the grid is refined), so the number is this grid's value only.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np
import shapely

from .grid import smooth_on_axis, vertex_radius
from .post import hot_spots, make_trace, sample, trace_peak
from .solution import PartResult, Solution, SurfaceTrace
from .surface import conductor_samples

if TYPE_CHECKING:
    from .api import PreparedLayout

RICHARDSON_DENOM = 1.6**2 - 1.0
SHARP_CELLS = 3.0


def summarise(pl: PreparedLayout, volts: np.ndarray, u: np.ndarray, phi: np.ndarray,
              ex: np.ndarray, ey: np.ndarray, cap: np.ndarray, cap_idx: list[int],
              seconds: float, estimate: dict[str, float] | None) -> Solution:
    """Build the :class:`Solution` from a superposed potential."""
    from .api import charges_from_samples, limit_function

    layout, system = pl.layout, pl.system
    limit_fn = limit_function(layout)
    samples = conductor_samples(system, pl.outlines, phi, volts)
    axisym = system.grid.axisymmetric
    traces = [make_trace(layout.parts[rs.part].name, rs, pl.outlines[rs.part].rings[rs.ring],
                         limit_fn, axisym) for rs in samples]
    charges = charges_from_samples(len(layout.parts), samples, system.grid.axisymmetric)
    partial = Solution(layout=layout, x_mm=system.grid.x, y_mm=system.grid.y, phi=phi,
                       Ex_kV_per_mm=ex, Ey_kV_per_mm=ey, conductor=system.conductor,
                       eps_r=system.eps_node, parts=(), surfaces=(), hot_spots=(),
                       capacitance=cap, conductor_names=(), unknowns=0, solve_seconds=0,
                       converged=True, residual=0.0, peak_field_kV_per_mm=0.0)
    results, spots = [], []
    for k, part in enumerate(layout.parts):
        mine = [t for t in traces if t.part == part.name]
        if part.is_conductor:
            res = _conductor_result(pl, k, mine, volts[k], charges[k], estimate)
            for t in mine:
                spots += hot_spots(t)
        else:
            res, dtraces = _dielectric_result(pl, k, partial, limit_fn)
            traces += dtraces
            for t in dtraces:
                spots += hot_spots(t)
        results.append(res)
    peak = max((r.peak_field_kV_per_mm for r in results), default=0.0)
    errs = [r.error_percent for r in results if r.error_percent is not None
            and r.peak_field_kV_per_mm >= 0.5 * peak]
    x0, y0, x1, y1 = system.grid.roi
    return Solution(
        layout=layout, x_mm=system.grid.x, y_mm=system.grid.y, phi=phi, Ex_kV_per_mm=ex,
        Ey_kV_per_mm=ey, conductor=system.conductor, eps_r=system.eps_node,
        parts=tuple(results), surfaces=tuple(traces),
        hot_spots=tuple(sorted(spots, key=lambda h: -h.field_kV_per_mm / h.limit_kV_per_mm)),
        capacitance=cap,
        conductor_names=tuple(" + ".join(layout.parts[k].name for k in pl.groups[g])
                              for g in cap_idx),
        unknowns=int(system.A.shape[0]), solve_seconds=seconds, converged=pl.converged,
        residual=pl.residual, peak_field_kV_per_mm=peak,
        estimated_error_percent=max(errs) if errs else None, view_box_mm=(x0, y0, x1, y1),
        resolution=pl.resolution)


def _conductor_result(pl: PreparedLayout, k: int, traces: list[SurfaceTrace], v: float,
                      q: float, estimate: dict[str, float] | None) -> PartResult:
    part = pl.layout.parts[k]
    best: tuple[float, tuple[float, float], SurfaceTrace | None, int] = (
        0.0, (np.nan, np.nan), None, -1)
    for t in traces:
        if len(t.E_kV_per_mm) == 0:
            continue
        val, at, i = trace_peak(t)
        if val > best[0]:
            best = (val, at, t, i)
    val, at, tr, i = best
    limit = float(tr.limit_kV_per_mm[i]) if tr is not None else np.inf
    sharp = tr is not None and _near_sharp_corner(pl, k, np.array(at))
    err = None
    if estimate is not None and part.name in estimate and val > 0 and not sharp:
        err = 100.0 * abs(val - estimate[part.name]) / RICHARDSON_DENOM / val
    return PartResult(name=part.name, kind=part.kind, volts=float(v), charge=float(q),
                      peak_field_kV_per_mm=val, peak_at_mm=(float(at[0]), float(at[1])),
                      limit_at_peak_kV_per_mm=limit, margin_percent=_margin(val, limit),
                      error_percent=err, sharp_corner=bool(sharp))


def _margin(val: float, limit: float) -> float:
    return float(100.0 * (1.0 - val / limit)) if np.isfinite(limit) and limit > 0 else 100.0


def _near_sharp_corner(pl: PreparedLayout, k: int, at: np.ndarray) -> bool:
    g = pl.grid
    ix = int(np.clip(np.searchsorted(g.x, at[0]), 1, len(g.x) - 1))
    iy = int(np.clip(np.searchsorted(g.y, at[1]), 1, len(g.y) - 1))
    h = max(g.x[ix] - g.x[ix - 1], g.y[iy] - g.y[iy - 1])
    for ring in pl.outlines[k].rings:
        r = vertex_radius(ring)
        corner = (r == 0) & (_turn(ring) > 0)
        if pl.layout.symmetry == "axisymmetric":
            corner &= ~smooth_on_axis(ring)
        corners = ring[corner]
        if len(corners) and np.min(np.hypot(*(corners - at).T)) < SHARP_CELLS * h:
            return True
    return False


def _turn(ring: np.ndarray) -> np.ndarray:
    a = ring - np.roll(ring, 1, axis=0)
    b = np.roll(ring, -1, axis=0) - ring
    return a[:, 0] * b[:, 1] - a[:, 1] * b[:, 0]


def _dielectric_result(pl: PreparedLayout, k: int, sol: Solution,
                       limit_fn) -> tuple[PartResult, list[SurfaceTrace]]:
    """Largest field inside the body, and the field in the medium along its outline.

    The outside field is read a little off the outline (1.5 local grid spacings along
    the outward normal) so that the interpolation does not straddle the interface.
    """
    part, ol = pl.layout.parts[k], pl.outlines[k]
    g = pl.grid
    xx, yy = np.meshgrid(g.x, g.y)
    inside = shapely.contains_xy(ol.polygon, xx, yy) & (pl.system.conductor < 0)
    emag = np.hypot(sol.Ex_kV_per_mm, sol.Ey_kV_per_mm)
    if inside.any():
        m = np.argmax(np.where(inside, emag, -1.0))
        peak, at = float(emag.flat[m]), (float(xx.flat[m]), float(yy.flat[m]))
    else:
        peak, at = 0.0, (float("nan"), float("nan"))
    traces: list[SurfaceTrace] = []
    best: tuple[float, tuple[float, float] | None, float] = (0.0, None, np.inf)
    for r, ring in enumerate(ol.rings):
        tr = _outside_trace(part.name, r, ring, sol, g, limit_fn)
        if tr is None:
            continue
        traces.append(tr)
        i = int(np.argmax(tr.E_kV_per_mm))
        if tr.E_kV_per_mm[i] > best[0]:
            best = (float(tr.E_kV_per_mm[i]), (float(tr.xy_mm[i, 0]), float(tr.xy_mm[i, 1])),
                    float(tr.limit_kV_per_mm[i]))
    lim = best[2] if best[1] is not None else float(limit_fn(np.array([np.inf]))[0])
    res = PartResult(name=part.name, kind="dielectric", volts=None, charge=None,
                     peak_field_kV_per_mm=peak, peak_at_mm=at, limit_at_peak_kV_per_mm=lim,
                     margin_percent=_margin(best[0], lim),
                     surface_field_kV_per_mm=best[0] if best[1] else 0.0,
                     surface_peak_at_mm=best[1])
    return res, traces


def _outside_trace(name: str, r: int, ring: np.ndarray, sol: Solution, g, limit_fn
                   ) -> SurfaceTrace | None:
    from .post import radius_at
    from .surface import ring_arclength

    seg = np.roll(ring, -1, axis=0) - ring
    length = np.hypot(*seg.T)
    mid = ring + 0.5 * seg
    normal = np.column_stack([seg[:, 1], -seg[:, 0]]) / np.maximum(length, 1e-300)[:, None]
    hx = np.interp(mid[:, 0], g.x[1:], np.diff(g.x))
    hy = np.interp(mid[:, 1], g.y[1:], np.diff(g.y))
    probe = mid + 1.5 * np.maximum(hx, hy)[:, None] * normal
    _, E = sample(sol, probe)
    cond = sol.conductor
    ix = np.clip(np.searchsorted(g.x, probe[:, 0]), 0, len(g.x) - 1)
    iy = np.clip(np.searchsorted(g.y, probe[:, 1]), 0, len(g.y) - 1)
    ok = np.isfinite(E[:, 0]) & (cond[iy, ix] < 0)
    if not ok.any():
        return None
    cum, _ = ring_arclength(ring)
    s = cum + 0.5 * length
    radius = radius_at(ring, mid[ok], np.flatnonzero(ok), sol.layout.symmetry == "axisymmetric")
    return SurfaceTrace(part=name, ring=r, s_mm=s[ok], xy_mm=mid[ok], normal=normal[ok],
                        E_kV_per_mm=np.hypot(*E[ok].T),
                        limit_kV_per_mm=limit_fn(radius, mid[ok], normal[ok]),
                        radius_mm=radius)

