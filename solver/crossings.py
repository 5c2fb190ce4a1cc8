"""Where grid lines cross part outlines: exact, vectorised.

For the x-links (between nodes ``[j, i]`` and ``[j, i+1]``) the crossings are the
intersections of the horizontal grid lines :math:`y = y_j` with every ring edge; an
edge from a to b meets the lines with :math:`\\min(a_y, b_y) \\le y_j < \\max(a_y, b_y)`
(half-open, so a line through a vertex counts once) at

.. math:: x_c = a_x + (y_j - a_y)\\,\\frac{b_x - a_x}{b_y - a_y}.

The y-links are the same computation with the axes swapped.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .geometry import ARC_STEP_RAD


@dataclass(frozen=True)
class Crossings:
    """Crossings of one family of grid lines with a set of rings.

    ``line`` is the index of the grid line (j for x-links), ``link`` the index of the
    link along it (i: between nodes i and i+1), ``t`` in [0, 1] the position along the
    link, ``owner`` the part index, ``normal`` the outward unit normal of the edge (in
    the original x, y frame), ``ring``/``edge``/``u`` locate the point on the outline.
    """

    line: np.ndarray
    link: np.ndarray
    t: np.ndarray
    owner: np.ndarray
    normal: np.ndarray
    ring: np.ndarray
    edge: np.ndarray
    u: np.ndarray

    def __len__(self) -> int:
        return len(self.t)


def circumcircles(ring: np.ndarray) -> np.ndarray:
    """Centre and radius (cx, cy, R) of the circle through each vertex and its neighbours.

    NaN where the three points are collinear.
    """
    p, q, r = np.roll(ring, 1, axis=0), ring, np.roll(ring, -1, axis=0)
    ax, ay = p[:, 0] - q[:, 0], p[:, 1] - q[:, 1]
    bx, by = r[:, 0] - q[:, 0], r[:, 1] - q[:, 1]
    d = 2.0 * (ax * by - ay * bx)
    with np.errstate(divide="ignore", invalid="ignore"):
        ux = (by * (ax * ax + ay * ay) - ay * (bx * bx + by * by)) / d
        uy = (ax * (bx * bx + by * by) - bx * (ax * ax + ay * ay)) / d
    rad = np.hypot(ux, uy)
    bad = np.abs(d) < 1e-14 * (ax * ax + ay * ay + bx * bx + by * by)
    out = np.column_stack([q[:, 0] + ux, q[:, 1] + uy, rad])
    out[bad] = np.nan
    return out


def edge_arcs(ring: np.ndarray, rtol: float = 1e-4) -> np.ndarray:
    """The circle each edge of a ring lies on, where it is an arc; NaN for straight edges.

    Curved outlines are polygons with vertices on the true curve.  Edge (i, i+1) is
    taken to lie on a circle when four consecutive vertices around it are concyclic
    (the circumcircles at i and i+1, or at i+1 and i+2, or at i-1 and i agree); that
    recovers circles, rounded corners and wire ends exactly, and the osculating circle
    of an ellipse.  Crossings are then computed on the circle, not the chord, which
    removes the polygon's sagitta from the surface field.
    """
    c = circumcircles(ring)
    nxt, nxt2, prv = (np.roll(c, -1, axis=0), np.roll(c, -2, axis=0), np.roll(c, 1, axis=0))

    def same(p: np.ndarray, q: np.ndarray) -> np.ndarray:
        scale = np.maximum(p[:, 2], 1e-300)
        with np.errstate(invalid="ignore"):
            return (np.hypot(p[:, 0] - q[:, 0], p[:, 1] - q[:, 1]) < rtol * scale) & (
                np.abs(p[:, 2] - q[:, 2]) < rtol * scale)

    chord = np.hypot(*(np.roll(ring, -1, axis=0) - ring).T)
    out = np.full_like(c, np.nan)

    def even(*shifts: int) -> np.ndarray:
        # the chords of one of our arcs are all alike; a long straight edge between two
        # mirror-image arcs can be concyclic with their end chords on a huge circle
        ls = [np.roll(chord, -k) for k in shifts]
        return (np.maximum.reduce(ls) < 2.0 * np.minimum.reduce(ls))

    for p, q, pick, shifts in ((c, nxt, c, (-1, 0, 1)), (nxt, nxt2, nxt, (0, 1, 2)),
                               (prv, c, c, (-2, -1, 0))):
        with np.errstate(invalid="ignore"):
            angle = 2 * np.arcsin(np.clip(chord / (2 * pick[:, 2]), 0, 1))
            plausible = (angle > 0.05 * ARC_STEP_RAD) & (angle < 1.5 * ARC_STEP_RAD)
        m = same(p, q) & plausible & even(*shifts) & np.isnan(out[:, 0])
        out[m] = pick[m]
    return out


def ring_edges(rings: list[tuple[int, int, np.ndarray]]) -> tuple[np.ndarray, ...]:
    """Stack the edges of rings given as (owner, ring id, (N, 2) array)."""
    a_l, b_l, own_l, rid_l, eid_l, arc_l = [], [], [], [], [], []
    for owner, rid, ring in rings:
        a_l.append(ring)
        b_l.append(np.roll(ring, -1, axis=0))
        own_l.append(np.full(len(ring), owner))
        rid_l.append(np.full(len(ring), rid))
        eid_l.append(np.arange(len(ring)))
        arc_l.append(edge_arcs(ring))
    if not a_l:
        z = np.zeros((0, 2))
        zi = np.zeros(0, int)
        return z, z, zi, zi, zi, np.zeros((0, 3))
    return (np.vstack(a_l), np.vstack(b_l), np.concatenate(own_l), np.concatenate(rid_l),
            np.concatenate(eid_l), np.vstack(arc_l))


def line_crossings(along: np.ndarray, across: np.ndarray, edges: tuple[np.ndarray, ...],
                   swap: bool) -> Crossings:
    """Crossings of the lines ``across[j]`` (constant coordinate) with the edges.

    ``swap`` False: lines y = y_j, links along x (``along`` = x nodes).  ``swap`` True:
    lines x = x_i, links along y.
    """
    a, b, owner, rid, eid, arc = edges
    ax, ay = (a[:, 1], a[:, 0]) if swap else (a[:, 0], a[:, 1])
    bx, by = (b[:, 1], b[:, 0]) if swap else (b[:, 0], b[:, 1])
    lo, hi = np.minimum(ay, by), np.maximum(ay, by)
    j0 = np.searchsorted(across, lo, side="left")
    j1 = np.searchsorted(across, hi, side="left")
    count = np.maximum(j1 - j0, 0)
    e = np.repeat(np.arange(len(ax)), count)
    j = np.arange(count.sum()) - np.repeat(np.cumsum(count) - count, count) + j0[e]
    yj = across[j]
    u = (yj - ay[e]) / (by[e] - ay[e])
    xc = ax[e] + u * (bx[e] - ax[e])
    i = np.searchsorted(along, xc, side="right") - 1
    ok = (i >= 0) & (i < len(along) - 1)
    e, j, u, xc, i = e[ok], j[ok], u[ok], xc[ok], i[ok]
    d = b[e] - a[e]
    length = np.hypot(d[:, 0], d[:, 1])
    normal = np.column_stack([d[:, 1], -d[:, 0]]) / length[:, None]
    xc, normal = _on_arcs(xc, across[j], arc[e], normal, swap)
    t = np.clip((xc - along[i]) / (along[i + 1] - along[i]), 0.0, 1.0)
    return Crossings(line=j, link=i, t=t, owner=owner[e], normal=normal, ring=rid[e],
                     edge=eid[e], u=u)


def _on_arcs(xc: np.ndarray, yc: np.ndarray, arc: np.ndarray, normal: np.ndarray,
             swap: bool) -> tuple[np.ndarray, np.ndarray]:
    """Move chord crossings onto the edge's circle; normals become radial."""
    m = np.isfinite(arc[:, 0])
    if not m.any():
        return xc, normal
    cx, cy, rad = arc[m, 0], arc[m, 1], arc[m, 2]
    if swap:
        cx, cy = cy, cx
    disc = rad * rad - (yc[m] - cy) ** 2
    ok = disc >= 0
    root = np.sqrt(np.maximum(disc, 0.0))
    x1, x2 = cx + root, cx - root
    xn = np.where(np.abs(x1 - xc[m]) < np.abs(x2 - xc[m]), x1, x2)
    near = ok & (np.abs(xn - xc[m]) < 0.05 * rad)
    xc = xc.copy()
    xc[np.flatnonzero(m)[near]] = xn[near]
    px, py = (yc[m], xn) if swap else (xn, yc[m])
    ccx, ccy = (arc[m, 0], arc[m, 1])
    radial = np.column_stack([px - ccx, py - ccy]) / rad[:, None]
    sign = np.sign(np.einsum("ij,ij->i", radial, normal[m]))
    normal = normal.copy()
    idx = np.flatnonzero(m)[near]
    normal[idx] = (radial * sign[:, None])[near]
    return xc, normal


def first_last(cr: Crossings, n_links: int) -> tuple[np.ndarray, np.ndarray, np.ndarray,
                                                     np.ndarray]:
    """Per link (flat index line * n_links + link): index of the crossing with the
    smallest t and of the one with the largest t (-1 where none), and the counts."""
    flat = cr.line * n_links + cr.link
    order = np.lexsort((cr.t, flat))
    fs = flat[order]
    starts = np.flatnonzero(np.r_[True, fs[1:] != fs[:-1]]) if len(fs) else np.zeros(0, int)
    ends = np.r_[starts[1:], len(fs)] - 1 if len(fs) else np.zeros(0, int)
    return fs[starts], order[starts], order[ends], (ends - starts + 1)
