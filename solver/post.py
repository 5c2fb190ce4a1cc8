"""Post-processing: potential and field on the grid, traces, peaks, hot spots.

Field on the grid: at each medium node the three-point derivative on the non-uniform
(possibly cut) stencil,

.. math:: \\partial_x\\phi \\approx \\frac{d_W^2(\\phi_E - \\phi_P) + d_E^2(\\phi_P - \\phi_W)}
          {d_E d_W (d_E + d_W)},

with conductor potentials at cut distances; inside conductors the field is zero.
Units: mm, V; fields returned in kV/mm.
"""

from __future__ import annotations

import numpy as np
from scipy.interpolate import RegularGridInterpolator

from .discretize import NODE, OUTSIDE, System
from .grid import smooth_on_axis, vertex_radius
from .solution import HotSpot, Solution, SurfaceTrace
from .surface import RingSamples


def grid_potential(system: System, u: np.ndarray, volts: np.ndarray) -> np.ndarray:
    """Potential at every node (V): unknowns, conductor potentials, fixed outer edge."""
    ny, nx = system.grid.shape
    phi = np.full((ny, nx), volts[-1])
    inside = system.conductor >= 0
    phi[inside] = volts[system.conductor[inside]]
    free = system.node_index >= 0
    phi[free] = u[system.node_index[free]]
    return phi


def grid_field(system: System, phi: np.ndarray, volts: np.ndarray) -> tuple[np.ndarray,
                                                                              np.ndarray]:
    """(Ex, Ey) in kV/mm at every node; zero inside conductors."""
    out = []
    ny, nx = phi.shape
    pad = np.pad(phi, 1, mode="edge")
    neighbours = (pad[1:-1, 2:], pad[1:-1, :-2], pad[2:, 1:-1], pad[:-2, 1:-1])
    vals, dist = [], []
    for d in range(4):
        kind = system.nb_part[d]
        v = np.where(kind == NODE, neighbours[d], volts[np.clip(kind, 0, len(volts) - 1)])
        v = np.where(kind == OUTSIDE, phi, v)
        vals.append(v)
        dist.append(np.where(kind == OUTSIDE, 0.0, system.nb_dist[d]))
    for a, b in ((0, 1), (2, 3)):
        de, dw = dist[a], dist[b]
        with np.errstate(divide="ignore", invalid="ignore"):
            both = (dw * dw * (vals[a] - phi) + de * de * (phi - vals[b])) / (de * dw * (de + dw))
            one_e = (vals[a] - phi) / de
            one_w = (phi - vals[b]) / dw
        g = np.where((de > 0) & (dw > 0), both, np.where(de > 0, one_e, one_w))
        g = np.where((de > 0) | (dw > 0), g, 0.0)
        out.append(-g / 1000.0)
    ex, ey = out
    inside = system.conductor >= 0
    ex[inside] = 0.0
    ey[inside] = 0.0
    return ex, ey


def sample(solution: Solution, points_mm: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Potential (V) and field (kV/mm, shape (N, 2)) at points, by linear interpolation.

    Points outside the grid get NaN.
    """
    pts = np.atleast_2d(np.asarray(points_mm, float))
    grid = (solution.y_mm, solution.x_mm)
    q = pts[:, ::-1]
    kw = dict(bounds_error=False, fill_value=np.nan)
    phi = RegularGridInterpolator(grid, solution.phi, **kw)(q)
    ex = RegularGridInterpolator(grid, solution.Ex_kV_per_mm, **kw)(q)
    ey = RegularGridInterpolator(grid, solution.Ey_kV_per_mm, **kw)(q)
    return phi, np.column_stack([ex, ey])


def radius_at(ring: np.ndarray, xy: np.ndarray, edge_of: np.ndarray | None = None,
              axisymmetric: bool = False) -> np.ndarray:
    """Signed radius of curvature (mm) of the ring at sample points (nearest edge).

    In axisymmetric layouts a vertex where the outline leaves the axis square is smooth
    (the tip of a sphere): it takes its neighbours' radius, not that of a corner.
    """
    rv = vertex_radius(ring)
    if axisymmetric:
        smooth = smooth_on_axis(ring)
        nb = np.where(np.abs(np.roll(rv, 1)) > 0, np.roll(rv, 1), np.roll(rv, -1))
        rv = np.where(smooth, nb, rv)
    nxt = np.roll(rv, -1)
    edge_r = np.where(np.abs(rv) > np.abs(nxt), rv, nxt)  # straight edge next to an arc
    same = np.sign(rv) == np.sign(nxt)
    edge_r = np.where(same & np.isfinite(rv) & np.isfinite(nxt) & (rv != 0) & (nxt != 0),
                      0.5 * (rv + nxt), np.where((rv == 0) | (nxt == 0), np.inf, edge_r))
    if edge_of is None:
        edge_of = _nearest_edge(ring, xy)
    return edge_r[edge_of]


def _nearest_edge(ring: np.ndarray, xy: np.ndarray) -> np.ndarray:
    a, b = ring, np.roll(ring, -1, axis=0)
    best = np.zeros(len(xy), int)
    bestd = np.full(len(xy), np.inf)
    for start in range(0, len(a), 2048):
        aa, bb = a[start:start + 2048], b[start:start + 2048]
        ab = bb - aa
        t = np.clip(((xy[:, None, :] - aa[None]) * ab[None]).sum(-1)
                    / np.maximum((ab * ab).sum(-1), 1e-300)[None], 0, 1)
        p = aa[None] + t[..., None] * ab[None]
        dd = np.hypot(*(xy[:, None, :] - p).transpose(2, 0, 1))
        k = dd.argmin(1)
        better = dd[np.arange(len(xy)), k] < bestd
        best[better] = k[better] + start
        bestd[better] = dd[np.arange(len(xy)), k][better]
    return best


def make_trace(name: str, rs: RingSamples, ring: np.ndarray, limit_fn,
               axisymmetric: bool = False) -> SurfaceTrace:
    """A SurfaceTrace from ring samples; ``limit_fn(radius_mm) -> kV/mm``."""
    radius = radius_at(ring, rs.xy_mm, rs.edge, axisymmetric)
    E = np.abs(rs.En_V_per_mm) / 1000.0
    return SurfaceTrace(part=name, ring=rs.ring, s_mm=rs.s_mm, xy_mm=rs.xy_mm,
                        normal=rs.normal, E_kV_per_mm=E,
                        limit_kV_per_mm=limit_fn(radius, rs.xy_mm, rs.normal),
                        radius_mm=radius)


def trace_peak(tr: SurfaceTrace) -> tuple[float, tuple[float, float], int]:
    """Peak |E| on a trace (kV/mm), its location, and the sample index.

    The largest sample: samples lie about one grid spacing apart, so on a smooth
    outline the true maximum exceeds it by :math:`O(h^2)` only.  (A parabola through
    the top three samples was tried and amplified sample noise on near-constant fields.)
    """
    E = tr.E_kV_per_mm
    k = int(np.argmax(E))
    x, y = tr.xy_mm[k]
    return float(E[k]), (float(x), float(y)), k


def hot_spots(tr: SurfaceTrace) -> list[HotSpot]:
    """Maximal runs of samples above the local limit (the ring is closed)."""
    over = tr.E_kV_per_mm > tr.limit_kV_per_mm
    if not over.any():
        return []
    n = len(over)
    runs: list[tuple[int, int]] = []
    if over.all():
        runs = [(0, n - 1)]
    else:
        start = int(np.argmin(over))  # begin scanning at a sample below the limit
        idx = (np.arange(n) + start) % n
        cur: list[int] | None = None
        for k in idx:
            if over[k] and cur is None:
                cur = [int(k), int(k)]
            elif over[k] and cur is not None:
                cur[1] = int(k)
            elif cur is not None:
                runs.append((cur[0], cur[1]))
                cur = None
        if cur is not None:
            runs.append((cur[0], cur[1]))
    out = []
    for a, b in runs:
        members = np.arange(a, b + 1) if b >= a else np.r_[np.arange(a, n), np.arange(0, b + 1)]
        m = members[np.argmax(tr.E_kV_per_mm[members] - tr.limit_kV_per_mm[members])]
        m = members[np.argmax(tr.E_kV_per_mm[members])]
        x, y = tr.xy_mm[m]
        out.append(HotSpot(part=tr.part, at_mm=(float(x), float(y)),
                           field_kV_per_mm=float(tr.E_kV_per_mm[m]),
                           limit_kV_per_mm=float(tr.limit_kV_per_mm[m]),
                           s_from_mm=float(tr.s_mm[a]), s_to_mm=float(tr.s_mm[b])))
    return out
