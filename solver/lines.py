"""Equipotential contours (contourpy) and field lines traced along E.

Field lines start on the conductor outlines where the surface charge is positive, at
equal steps of cumulative charge :math:`\\int \\varepsilon_r E_n\\,dl` (times
:math:`2\\pi r` in axisymmetric layouts), so their density shows the field strength.
Each is traced along :math:`\\hat E = E/|E|` with Heun's method (step 0.6 of the
larger local grid spacing) until it reaches a conductor, leaves the region around the
parts or the field vanishes.
"""

from __future__ import annotations

from collections.abc import Sequence

import contourpy
import numpy as np

from .solution import Solution


def equipotentials(solution: Solution, levels_V: Sequence[float]
                   ) -> list[tuple[float, list[np.ndarray]]]:
    """Contour lines of the potential at each level: (level V, [(M, 2) arrays, mm])."""
    gen = contourpy.contour_generator(solution.x_mm, solution.y_mm, solution.phi,
                                      name="serial", line_type=contourpy.LineType.Separate)
    return [(float(v), [np.asarray(s) for s in gen.lines(float(v)) if len(s) > 1])
            for v in levels_V]


def _bilinear(x: np.ndarray, y: np.ndarray, fields: Sequence[np.ndarray],
              p: np.ndarray) -> list[np.ndarray]:
    ix = np.clip(np.searchsorted(x, p[:, 0]) - 1, 0, len(x) - 2)
    iy = np.clip(np.searchsorted(y, p[:, 1]) - 1, 0, len(y) - 2)
    tx = np.clip((p[:, 0] - x[ix]) / (x[ix + 1] - x[ix]), 0, 1)
    ty = np.clip((p[:, 1] - y[iy]) / (y[iy + 1] - y[iy]), 0, 1)
    out = []
    for f in fields:
        out.append((1 - ty) * ((1 - tx) * f[iy, ix] + tx * f[iy, ix + 1])
                   + ty * ((1 - tx) * f[iy + 1, ix] + tx * f[iy + 1, ix + 1]))
    return out


def _seeds(solution: Solution, n_lines: int) -> tuple[np.ndarray, np.ndarray]:
    """Start points and the direction sign (+1 along E, -1 against)."""
    conductors = {p.name for p in solution.parts if p.kind != "dielectric"}
    traces = [t for t in solution.surfaces if t.part in conductors and len(t.s_mm) > 2]
    axisym = solution.layout.symmetry == "axisymmetric"
    parts = []
    for t in traces:
        names = {p.name: p for p in solution.parts}
        sign = np.sign(names[t.part].volts or 0.0) or 1.0
        w = t.E_kV_per_mm.copy()
        if axisym:
            w = w * 2 * np.pi * np.maximum(t.xy_mm[:, 0], 0.0)
        ds = np.gradient(t.s_mm)
        parts.append((t, w * np.abs(ds), sign))
    pos = [(t, w) for t, w, s in parts if s > 0]
    use, direction = (pos, 1.0) if pos else ([(t, w) for t, w, s in parts], -1.0)
    if not use:
        return np.zeros((0, 2)), np.zeros(0)
    w_all = np.concatenate([w for _, w in use])
    xy_all = np.vstack([t.xy_mm + 1e-3 * t.normal for t, _ in use])
    cum = np.cumsum(w_all)
    if cum[-1] <= 0:
        return np.zeros((0, 2)), np.zeros(0)
    marks = (np.arange(n_lines) + 0.5) / n_lines * cum[-1]
    k = np.searchsorted(cum, marks)
    return xy_all[k], np.full(len(k), direction)


def field_lines(solution: Solution, n_lines: int = 40, max_steps: int = 4000
                ) -> list[np.ndarray]:
    """Field lines as (M, 2) arrays in mm (see the module docstring)."""
    p, sign = _seeds(solution, n_lines)
    if len(p) == 0:
        return []
    x, y = solution.x_mm, solution.y_mm
    ex, ey, cond = solution.Ex_kV_per_mm, solution.Ey_kV_per_mm, solution.conductor
    x0, y0, x1, y1 = solution.view_box_mm
    span = max(x1 - x0, y1 - y0)
    # near the parts, and never past the grid (a box boundary ends it at the walls)
    box = (max(x0 - span, x[0]), max(y0 - span, y[0]), min(x1 + span, x[-1]),
           min(y1 + span, y[-1]))
    hx = np.diff(x)
    hy = np.diff(y)
    emax = float(np.hypot(ex, ey).max()) or 1.0
    hist_idx, hist_pts = [np.arange(len(p))], [p.copy()]
    alive = np.ones(len(p), bool)

    def direction(q: np.ndarray, s: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        fx, fy = _bilinear(x, y, (ex, ey), q)
        mag = np.hypot(fx, fy)
        d = np.column_stack([fx, fy]) / np.maximum(mag, 1e-300)[:, None]
        return d * s[:, None], mag

    for _ in range(max_steps):
        idx = np.flatnonzero(alive)
        if len(idx) == 0:
            break
        q = p[idx]
        ix = np.clip(np.searchsorted(x, q[:, 0]) - 1, 0, len(hx) - 1)
        iy = np.clip(np.searchsorted(y, q[:, 1]) - 1, 0, len(hy) - 1)
        h = 0.6 * np.maximum(hx[ix], hy[iy])
        d1, mag = direction(q, sign[idx])
        d2, _ = direction(q + h[:, None] * d1, sign[idx])
        q_new = q + 0.5 * h[:, None] * (d1 + d2)
        p[idx] = q_new
        jx = np.clip(np.searchsorted(x, q_new[:, 0]), 0, len(x) - 1)
        jy = np.clip(np.searchsorted(y, q_new[:, 1]), 0, len(y) - 1)
        hit = (cond[jy, jx] >= 0) | (cond[jy, np.maximum(jx - 1, 0)] >= 0) & \
              (cond[np.maximum(jy - 1, 0), jx] >= 0)
        out = ((q_new[:, 0] < box[0]) | (q_new[:, 0] > box[2]) | (q_new[:, 1] < box[1])
               | (q_new[:, 1] > box[3]) | (mag < 1e-6 * emax))
        if out.any():  # end exactly on the edge of the region, not a step past it
            q_new[out, 0] = np.clip(q_new[out, 0], box[0], box[2])
            q_new[out, 1] = np.clip(q_new[out, 1], box[1], box[3])
        hist_idx.append(idx)
        hist_pts.append(q_new)
        alive[idx[hit | out]] = False
    owner = np.concatenate(hist_idx)
    pts = np.vstack(hist_pts)
    order = np.argsort(owner, kind="stable")
    owner, pts = owner[order], pts[order]
    cuts = np.flatnonzero(np.diff(owner)) + 1
    return [line for line in np.split(pts, cuts) if len(line) > 2]
