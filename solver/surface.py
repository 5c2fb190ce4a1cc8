"""The field at conductor outlines, from second-order one-sided differences.

At every crossing B of a grid link with a conductor outline, with the medium node P
at distance :math:`s_1` and the next node :math:`P_2` at :math:`s_2` further along the
same grid line, the derivative of the quadratic through :math:`(0, V)`,
:math:`(s_1, \\phi_P)`, :math:`(s_2, \\phi_{P_2})` is

.. math:: \\phi'(0) = -\\frac{s_1 + s_2}{s_1 s_2} V + \\frac{s_2}{s_1 (s_2 - s_1)}\\phi_P
          - \\frac{s_1}{s_2 (s_2 - s_1)}\\phi_{P_2}.

On a conductor the potential is constant along the outline, so the gradient is normal
and :math:`\\phi'(0) = \\partial_n\\phi\\,(\\hat n\\cdot\\hat e)` with :math:`\\hat e` the
unit vector from B towards P; the normal field is
:math:`E_n = -\\phi'(0)/(\\hat n\\cdot\\hat e)`.  Crossings with
:math:`|\\hat n\\cdot\\hat e| < 0.5` are not used (the division would amplify errors);
every outline direction has a grid family within 45 degrees, so no stretch is left
without samples.  Shortley-Weller potentials have second-order accurate gradients at
the boundary, so :math:`E_n` is second order.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .discretize import DIRS, NODE, OUTSIDE, System
from .geometry import PartOutline

MIN_COS = 0.5


@dataclass(frozen=True)
class RingSamples:
    """Normal-field samples along one conductor ring, sorted by arc length."""

    part: int
    ring: int
    s_mm: np.ndarray
    xy_mm: np.ndarray
    normal: np.ndarray
    En_V_per_mm: np.ndarray
    eps_r: np.ndarray
    perimeter_mm: float
    edge: np.ndarray


def ring_arclength(ring: np.ndarray) -> tuple[np.ndarray, float]:
    """Cumulative arc length at each vertex and the perimeter of a closed ring, mm."""
    seg = np.hypot(*(np.roll(ring, -1, axis=0) - ring).T)
    cum = np.concatenate([[0.0], np.cumsum(seg)])
    return cum[:-1], float(cum[-1])


def conductor_samples(system: System, outlines: tuple[PartOutline, ...], phi: np.ndarray,
                      part_volts: np.ndarray) -> list[RingSamples]:
    """Normal-field samples on every conductor ring (see the module docstring)."""
    ny, nx = system.grid.shape
    n_parts = len(outlines)
    recs = []
    for d, (dj, di) in enumerate(DIRS):
        kind, cidx = system.nb_part[d], system.cut_cross[d]
        j, i = np.nonzero((kind >= 0) & (kind < n_parts) & (cidx >= 0)
                          & (system.node_index >= 0))
        if len(j) == 0:
            continue
        cr = system.crossings[0 if d < 2 else 1]
        c = cidx[j, i]
        s1 = system.nb_dist[d][j, i]
        k = kind[j, i]
        vb = part_volts[k]
        vp = phi[j, i]
        back = d ^ 1
        s2x = system.nb_dist[back][j, i]
        kb = system.nb_part[back][j, i]
        bj, bi = np.clip(j - dj, 0, ny - 1), np.clip(i - di, 0, nx - 1)
        v2 = np.where(kb == NODE, phi[bj, bi], part_volts[np.clip(kb, 0, n_parts)])
        # the quadratic must not reach across a dielectric interface (phi has a kink there)
        same_medium = system.eps_node[bj, bi] == system.eps_node[j, i]
        quad = (kb != OUTSIDE) & (s2x > 0) & same_medium
        s2 = s1 + s2x
        with np.errstate(divide="ignore", invalid="ignore"):
            dq = (-(s1 + s2) / (s1 * s2) * vb + s2 / (s1 * (s2 - s1)) * vp
                  - s1 / (s2 * (s2 - s1)) * v2)
        dl = (vp - vb) / s1
        dphi = np.where(quad, dq, dl)
        e_vec = -np.array(DIRS[d][::-1], float)  # from B towards P, (x, y)
        normal = cr.normal[c]
        cos = normal @ e_vec
        ok = np.abs(cos) >= MIN_COS
        recs.append((k[ok], cr.ring[c][ok], cr.edge[c][ok], cr.u[c][ok], normal[ok],
                     -dphi[ok] / cos[ok], system.eps_node[j[ok], i[ok]]))
    return _group(recs, outlines, system.grid.axisymmetric)


def _group(recs: list, outlines: tuple[PartOutline, ...], axisym: bool) -> list[RingSamples]:
    if not recs:
        return []
    k, ring, edge, u, normal, En, eps = (np.concatenate([r[n] for r in recs])
                                         for n in range(7))
    out = []
    for key in np.unique(np.column_stack([k, ring]), axis=0):
        m = (k == key[0]) & (ring == key[1])
        rg = outlines[key[0]].rings[key[1]]
        cum, perim = ring_arclength(rg)
        e = edge[m]
        a, b = rg[e], rg[(e + 1) % len(rg)]
        seg = np.hypot(*(b - a).T)
        s = cum[e] + u[m] * seg
        xy = a + u[m][:, None] * (b - a)
        o = np.argsort(s)
        out.append(RingSamples(int(key[0]), int(key[1]), s[o], xy[o], normal[m][o],
                               smooth_along(s[o], xy[o], En[m][o], perim, axisym), eps[m][o],
                               perim, e[o]))
    return out


SMOOTH_HALF_WINDOW = 3
GAP_FACTOR = 4.0


def smooth_along(s: np.ndarray, xy: np.ndarray, f: np.ndarray, perimeter: float,
                 axisymmetric: bool, half: int = SMOOTH_HALF_WINDOW) -> np.ndarray:
    """Least-squares quadratic in arc length through each sample and its ``half``
    neighbours on either side, evaluated at the sample.

    Each crossing's value carries an error that depends on where the outline cuts its
    cell; the fit averages that out (noise down by about 0.6 for seven samples) and is
    exact for any field that varies quadratically along the outline, so smooth peaks
    are not flattened.  Windows do not reach across a gap in the samples (a stretch of
    outline on the axis, or hidden inside another conductor): they shift to one side,
    and at an end on the axis of an axisymmetric layout the samples are mirrored, as
    the field is even in r there.
    """
    n = len(s)
    if n < 2 * half + 3:
        return f
    step = np.diff(np.concatenate([s, [s[0] + perimeter]]))
    # grids grade smoothly (<= 1.2 per cell); a step far longer than both neighbours is
    # outline without samples (on the axis, or inside another conductor)
    gaps = np.flatnonzero(step > GAP_FACTOR * np.maximum(np.roll(step, 1), np.roll(step, -1)))
    spacing = float(np.median(step))
    if len(gaps) == 0:
        idx = (np.arange(n)[:, None] + np.arange(-half, half + 1)[None, :]) % n
        ds = s[idx] - s[:, None]
        ds = (ds + perimeter / 2) % perimeter - perimeter / 2
        return _fit(ds, f[idx], f)
    out = f.copy()
    starts = (gaps + 1) % n
    for a, g in zip(starts, np.roll(gaps, -1), strict=True):
        seg = np.arange(a, a + ((g - a) % n) + 1) % n
        ss = s[seg] + np.where(seg < seg[0], perimeter, 0.0)
        out[seg] = _fit_segment(ss, f[seg], xy[seg], axisymmetric, half, spacing)
    return out


def _fit_segment(ss: np.ndarray, ff: np.ndarray, xy: np.ndarray, axisym: bool, half: int,
                 spacing: float) -> np.ndarray:
    m = len(ss)
    if m < 2 * half + 3:
        return ff
    lo_s, lo_f, hi_s, hi_f = [], [], [], []
    if axisym and abs(xy[0, 0]) < 1.5 * spacing:
        lo_s, lo_f = list(2 * ss[0] - ss[1:half + 1][::-1]), list(ff[1:half + 1][::-1])
    if axisym and abs(xy[-1, 0]) < 1.5 * spacing:
        hi_s, hi_f = list(2 * ss[-1] - ss[-half - 1:-1][::-1]), list(ff[-half - 1:-1][::-1])
    es = np.concatenate([lo_s, ss, hi_s])
    ef = np.concatenate([lo_f, ff, hi_f])
    off = len(lo_s)
    centre = np.arange(m) + off
    first = np.clip(centre - half, 0, len(es) - 2 * half - 1)
    idx = first[:, None] + np.arange(2 * half + 1)[None, :]
    return _fit(es[idx] - ss[:, None], ef[idx], ff)


def _fit(ds: np.ndarray, fw: np.ndarray, fallback: np.ndarray) -> np.ndarray:
    scale = np.maximum(np.abs(ds).max(axis=1, keepdims=True), 1e-300)
    t = ds / scale
    V = np.stack([np.ones_like(t), t, t * t], axis=-1)
    M = np.einsum("nki,nkj->nij", V, V)
    rhs = np.einsum("nki,nk->ni", V, fw)
    ok = np.abs(np.linalg.det(M)) > 1e-9
    out = fallback.copy()
    out[ok] = np.linalg.solve(M[ok], rhs[ok][..., None])[:, 0, 0]
    return out


def ring_charge_integral(rs: RingSamples, axisymmetric: bool) -> float:
    """:math:`\\oint \\varepsilon_r E_n\\,dl` (V) or with :math:`2\\pi r` weight (V mm).

    Trapezoidal rule on the closed ring; multiply by :math:`\\varepsilon_0` (planar:
    C/m) or :math:`\\varepsilon_0\\cdot10^{-3}` (axisymmetric: C).
    """
    if len(rs.s_mm) == 0:
        return 0.0
    f = rs.eps_r * rs.En_V_per_mm
    if axisymmetric:
        f = f * 2 * np.pi * rs.xy_mm[:, 0]
    s = np.concatenate([rs.s_mm, [rs.s_mm[0] + rs.perimeter_mm]])
    f = np.concatenate([f, [f[0]]])
    return float(np.sum(0.5 * (f[1:] + f[:-1]) * np.diff(s)))
