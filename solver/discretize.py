"""Finite-volume discretisation of :math:`\\nabla\\cdot(\\varepsilon_r\\nabla\\phi) = 0`.

Unknowns are the potentials of the grid nodes in the medium (not inside a conductor,
not on a fixed outer edge), in C order of ``[iy, ix]``.  Around node P the balance of fluxes is

.. math:: \\sum_{Q\\in\\{E,W,N,S\\}} c_{PQ}(\\phi_Q - \\phi_P) = 0,\\qquad
          c_{PQ} = \\bar\\varepsilon_{PQ}\\,A_{PQ} / d_{PQ},

where :math:`d_{PQ}` is the distance to the neighbour node or, where the link is cut
by a conductor outline, the exact distance to the crossing (Shortley-Weller: the
conductor's potential is imposed there, no staircase).  The control volume's half
widths use the same distances, :math:`\\Delta X = (d_E + d_W)/2`, so on a cut node the
scheme is exactly the Shortley-Weller difference formula.  Face areas are
:math:`A_E = \\Delta Y` (planar) or :math:`A_E = (r + d_E/2)\\Delta Y`,
:math:`A_N = [(r + d_E/2)^2 - (r - d_W/2)^2]/2` (axisymmetric, the r-weighted volume;
on the axis :math:`d_W = 0` gives the limit :math:`\\phi_{rr} + \\phi_r/r \\to 2\\phi_{rr}`).
:math:`\\bar\\varepsilon_{PQ}` is the harmonic mean of the permittivity along the
segment, weighted by the length in each material (exact for layers across the link).

Every conductor (floating ones included) is a Dirichlet boundary here; floating
potentials come from superposing unit solutions (see :mod:`solver.api`).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import scipy.sparse as sp
import shapely

from .crossings import Crossings, first_last, line_crossings, ring_edges
from .geometry import PartOutline
from .grid import Grid
from .layout import Layout

EPS0 = 8.8541878128e-12
"""Vacuum permittivity, F/m."""

# direction d: unit step (dj, di); opposite direction is d ^ 1
DIRS = ((0, 1), (0, -1), (1, 0), (-1, 0))
OUTSIDE = -2
NODE = -1


@dataclass(frozen=True)
class System:
    """The assembled system :math:`A u = G V` and what post-processing needs to read it.

    ``G`` maps the vector of conductor potentials (one per part, then the fixed outer
    edge) to the right-hand side.  ``nb_dist[d]`` and ``nb_part[d]`` give, for every node
    and direction d (0 +x, 1 -x, 2 +y, 3 -y), the distance to the neighbour (mm) and what
    is there: ``NODE`` (-1) a grid node, ``OUTSIDE`` (-2) nothing (edge of the grid), or
    k >= 0 the outline of conductor part k (k == n_parts: the fixed outer edge).
    ``cut_cross[d]`` is the index of the outline crossing used (-1 where none) in
    ``crossings[0]`` (x-links, d = 0, 1) or ``crossings[1]`` (y-links, d = 2, 3).
    """

    grid: Grid
    A: sp.csr_matrix
    G: sp.csr_matrix
    node_index: np.ndarray
    conductor: np.ndarray
    eps_node: np.ndarray
    nb_dist: np.ndarray
    nb_part: np.ndarray
    cut_cross: np.ndarray
    crossings: tuple[Crossings, Crossings]


def discretize(layout: Layout, outlines: tuple[PartOutline, ...], grid: Grid) -> System:
    """Assemble the system for a layout on a grid (all numpy, no loop over nodes)."""
    x, y = grid.x, grid.y
    ny, nx = grid.shape
    cond = conductor_map(layout, outlines, x, y)
    eps_node = permittivity_at(layout, outlines, *np.meshgrid(x, y))
    outer_fixed = _outer_fixed(grid)
    free = (cond < 0) & ~outer_fixed
    n_parts = len(layout.parts)
    pairs = enumerate(zip(layout.parts, outlines, strict=True))
    edges = ring_edges([(k, r, ring) for k, (p, o) in pairs
                        if p.is_conductor for r, ring in enumerate(o.rings)])
    cx = line_crossings(x, y, edges, swap=False)
    cy = line_crossings(y, x, edges, swap=True)
    nb_dist, nb_part, cut_cross = _neighbours(grid, cond, outer_fixed, cx, cy, n_parts)
    if _snap_to_outlines(grid, cond, free, nb_dist, nb_part, n_parts):
        free = (cond < 0) & ~outer_fixed
        nb_dist, nb_part, cut_cross = _neighbours(grid, cond, outer_fixed, cx, cy, n_parts)
    inv = _segment_inverse_eps(layout, outlines, grid, nb_dist, eps_node)
    coef = _coefficients(grid, nb_dist, nb_part, inv)
    return _assemble(layout, grid, cond, eps_node, free, nb_dist, nb_part, coef, cut_cross,
                     (cx, cy))


def conductor_map(layout: Layout, outlines: tuple[PartOutline, ...], x: np.ndarray,
                  y: np.ndarray) -> np.ndarray:
    """Index of the conductor part covering each node (boundary included), else -1."""
    cond = np.full((len(y), len(x)), -1, dtype=np.int64)
    for k, (part, ol) in enumerate(zip(layout.parts, outlines, strict=True)):
        if not part.is_conductor:
            continue
        x0, y0, x1, y1 = ol.polygon.bounds
        i0, i1 = np.searchsorted(x, x0, side="left"), np.searchsorted(x, x1, side="right")
        j0, j1 = np.searchsorted(y, y0, side="left"), np.searchsorted(y, y1, side="right")
        if i1 <= i0 or j1 <= j0:
            continue
        xx, yy = np.meshgrid(x[i0:i1], y[j0:j1])
        shapely.prepare(ol.polygon)
        inside = shapely.intersects_xy(ol.polygon, xx, yy)
        block = cond[j0:j1, i0:i1]
        block[inside & (block < 0)] = k
    return cond


def permittivity_at(layout: Layout, outlines: tuple[PartOutline, ...], xx: np.ndarray,
                    yy: np.ndarray) -> np.ndarray:
    """Relative permittivity at points; nested dielectrics: the inner one wins."""
    eps = np.ones(np.shape(xx))
    diel = [(o.polygon.area, p.permittivity or 1.0, o.polygon)
            for p, o in zip(layout.parts, outlines, strict=True) if p.kind == "dielectric"]
    for _, e, poly in sorted(diel, key=lambda t: -t[0]):
        shapely.prepare(poly)
        eps[shapely.contains_xy(poly, xx, yy)] = e
    return eps


def _outer_fixed(grid: Grid) -> np.ndarray:
    ny, nx = grid.shape
    fixed = np.zeros((ny, nx), bool)
    if grid.outer != "dirichlet":
        return fixed
    fixed[0, :] = fixed[-1, :] = fixed[:, -1] = True
    if not grid.axisymmetric:
        fixed[:, 0] = True
    return fixed


def _neighbours(grid: Grid, cond: np.ndarray, outer_fixed: np.ndarray, cx: Crossings,
                cy: Crossings, n_parts: int) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Distances to neighbours per direction, what lies there, and the crossing used."""
    ny, nx = grid.shape
    hx, hy = np.diff(grid.x), np.diff(grid.y)
    dist = np.zeros((4, ny, nx))
    part = np.full((4, ny, nx), NODE, dtype=np.int64)
    cross = np.full((4, ny, nx), -1, dtype=np.int64)
    dist[0, :, :-1] = hx[None, :]
    dist[1, :, 1:] = hx[None, :]
    dist[2, :-1, :] = hy[:, None]
    dist[3, 1:, :] = hy[:, None]
    part[0, :, -1] = part[1, :, 0] = part[2, -1, :] = part[3, 0, :] = OUTSIDE
    for d, (dj, di) in enumerate(DIRS):
        nbr_fixed = np.zeros((ny, nx), bool)
        src = (slice(max(0, -dj), ny - max(0, dj)), slice(max(0, -di), nx - max(0, di)))
        dst = (slice(max(0, dj), ny - max(0, -dj) or None),
               slice(max(0, di), nx - max(0, -di) or None))
        nbr_fixed[src] = outer_fixed[dst]
        part[d][nbr_fixed] = n_parts
        nbr_cond = np.full((ny, nx), -1, dtype=np.int64)
        nbr_cond[src] = cond[dst]
        hit = nbr_cond >= 0
        part[d][hit] = nbr_cond[hit]  # fallback: boundary at the node itself
    _apply_cuts(cx, cond, dist, part, cross, axis=1)
    _apply_cuts(cy, cond, dist, part, cross, axis=0)
    np.maximum(dist, 0.0, out=dist)
    return dist, part, cross


SNAP_FRACTION = 1e-3


def _snap_to_outlines(grid: Grid, cond: np.ndarray, free: np.ndarray, nb_dist: np.ndarray,
                      nb_part: np.ndarray, n_parts: int) -> bool:
    """Nodes within ``SNAP_FRACTION`` of a cell from a conductor's outline join it.

    Nodes are classified against the polygon, crossings are computed on the true arcs;
    a node in the thin band between the two (or practically on the outline) would
    otherwise carry a pinned value with a near-singular row.  Moving the outline by
    at most 1/1000 of a cell there changes the field by far less than the grid error.
    """
    hmin = np.minimum.reduce([np.where(nb_part[d] == OUTSIDE, np.inf,
                                       np.where(nb_part[d] >= 0, np.inf, nb_dist[d]))
                              for d in range(4)])
    hmin = np.where(np.isfinite(hmin), hmin, np.max(nb_dist, axis=0))
    best = np.full(cond.shape, np.inf)
    owner = np.full(cond.shape, -1, dtype=np.int64)
    for d in range(4):
        m = (nb_part[d] >= 0) & (nb_part[d] < n_parts) & (nb_dist[d] < best)
        best[m] = nb_dist[d][m]
        owner[m] = nb_part[d][m]
    snap = free & (owner >= 0) & (best < SNAP_FRACTION * hmin)
    cond[snap] = owner[snap]
    return bool(snap.any())


def _apply_cuts(cr: Crossings, cond: np.ndarray, dist: np.ndarray, part: np.ndarray,
                cross: np.ndarray, axis: int) -> None:
    """Shorten links cut by conductor outlines to the exact crossing distance."""
    if len(cr) == 0:
        return
    ny, nx = cond.shape
    n_links = nx - 1 if axis == 1 else ny - 1
    flat, first, last, count = first_last(cr, n_links)
    line, link = flat // n_links, flat % n_links
    if axis == 1:
        lo, hi = (line, link), (line, link + 1)
        h = dist[0][lo]
        d_up, d_down = 0, 1
    else:
        lo, hi = (link, line), (link + 1, line)
        h = dist[2][lo]
        d_up, d_down = 2, 3
    lo_free, hi_free = cond[lo] < 0, cond[hi] < 0
    # node at the low end looks up the link: the first crossing
    use = lo_free & ((~hi_free) | (count >= 2))
    tmin = np.maximum(cr.t[first], 1e-6)
    _set(dist, part, cross, d_up, (lo[0][use], lo[1][use]), tmin[use] * h[use],
         cr.owner[first][use], first[use])
    use = hi_free & ((~lo_free) | (count >= 2))
    tmax = np.minimum(cr.t[last], 1 - 1e-6)
    _set(dist, part, cross, d_down, (hi[0][use], hi[1][use]), (1 - tmax[use]) * h[use],
         cr.owner[last][use], last[use])


def _set(dist: np.ndarray, part: np.ndarray, cross: np.ndarray, d: int, idx: tuple,
         value: np.ndarray, owner: np.ndarray, cidx: np.ndarray) -> None:
    dist[d][idx] = value
    part[d][idx] = owner
    cross[d][idx] = cidx


def _segment_inverse_eps(layout: Layout, outlines: tuple[PartOutline, ...], grid: Grid,
                         nb_dist: np.ndarray, eps_node: np.ndarray) -> np.ndarray:
    """:math:`\\int ds/\\varepsilon_r` over each node's segment to each neighbour, mm."""
    inv = nb_dist / eps_node[None]
    diel = [(k, o) for k, (p, o) in enumerate(zip(layout.parts, outlines, strict=True))
            if p.kind == "dielectric"]
    if not diel:
        return inv
    edges = ring_edges([(k, r, ring) for k, o in diel for r, ring in enumerate(o.rings)])
    for axis, (cr_args, dirs) in enumerate((((grid.x, grid.y, False), (0, 1)),
                                            ((grid.y, grid.x, True), (2, 3)))):
        cr = line_crossings(cr_args[0], cr_args[1], edges, swap=cr_args[2])
        if len(cr):
            _piecewise(layout, outlines, grid, cr, axis, dirs, nb_dist, inv)
    return inv


def _piecewise(layout: Layout, outlines: tuple[PartOutline, ...], grid: Grid, cr: Crossings,
               axis: int, dirs: tuple[int, int], nb_dist: np.ndarray, inv: np.ndarray) -> None:
    """Recompute the inverse-permittivity integral on segments that cross dielectrics."""
    ny, nx = grid.shape
    n_links = nx - 1 if axis == 0 else ny - 1
    coords = grid.x if axis == 0 else grid.y
    flat = cr.line * n_links + cr.link
    for d in dirs:
        sign = 1 if d in (0, 2) else -1
        # nodes whose segment in direction d lies on a link with dielectric crossings
        link_of_node = np.unique(flat)
        line, link = link_of_node // n_links, link_of_node % n_links
        node_along = link if sign > 0 else link + 1
        jj, ii = (line, node_along) if axis == 0 else (node_along, line)
        seg = nb_dist[d][jj, ii]
        ok = seg > 0
        jj, ii, line, link, seg, lf = jj[ok], ii[ok], line[ok], link[ok], seg[ok], \
            link_of_node[ok]
        h = coords[link + 1] - coords[link]
        t0 = np.where(sign > 0, 0.0, 1.0 - seg / h)
        t1 = np.where(sign > 0, seg / h, 1.0)
        order = np.argsort(flat, kind="stable")
        fs, ts = flat[order], cr.t[order]
        start = np.searchsorted(fs, lf, "left")
        stop = np.searchsorted(fs, lf, "right")
        cnt = stop - start
        q = np.repeat(np.arange(len(lf)), cnt)
        k = np.arange(cnt.sum()) - np.repeat(np.cumsum(cnt) - cnt, cnt) + start[q]
        tb = ts[k]
        inside = (tb > t0[q]) & (tb < t1[q])
        qb = np.concatenate([np.arange(len(lf)), np.arange(len(lf)), q[inside]])
        tb = np.concatenate([t0, t1, tb[inside]])
        o = np.lexsort((tb, qb))
        qb, tb = qb[o], tb[o]
        same = qb[1:] == qb[:-1]
        tm = 0.5 * (tb[1:] + tb[:-1])[same]
        dt = np.diff(tb)[same]
        qm = qb[1:][same]
        pos = coords[link[qm]] + tm * h[qm]
        other = (grid.y[line[qm]] if axis == 0 else grid.x[line[qm]])
        px, py = (pos, other) if axis == 0 else (other, pos)
        e = permittivity_at(layout, outlines, px, py)
        total = np.bincount(qm, weights=dt * h[qm] / e, minlength=len(lf))
        inv[d][jj, ii] = total


def _coefficients(grid: Grid, nb_dist: np.ndarray, nb_part: np.ndarray,
                  inv: np.ndarray) -> np.ndarray:
    """Flux coefficients c[d] = A_face / integral(ds / eps) for each node and direction."""
    d = np.where(nb_part == OUTSIDE, 0.0, nb_dist)
    dx = 0.5 * (d[0] + d[1])
    dy = 0.5 * (d[2] + d[3])
    if grid.axisymmetric:
        r = grid.x[None, :]
        re, rw = r + 0.5 * d[0], np.maximum(r - 0.5 * d[1], 0.0)
        area = np.stack([re * dy, rw * dy, 0.5 * (re**2 - rw**2), 0.5 * (re**2 - rw**2)])
    else:
        area = np.stack([dy, dy, dx, dx])
    with np.errstate(divide="ignore", invalid="ignore"):
        c = np.where((nb_part != OUTSIDE) & (inv > 0), area / inv, 0.0)
    return c


def _robin(grid: Grid, eps_node: np.ndarray, nb_dist: np.ndarray,
           nb_part: np.ndarray) -> np.ndarray:
    """Diagonal term of the monopole far-field condition on the outer edge (axisymmetric)."""
    ny, nx = grid.shape
    out = np.zeros((ny, nx))
    if grid.outer != "robin":
        return out
    xx, yy = np.meshgrid(grid.x, grid.y)
    dz = yy - grid.centre[1]
    rad = np.hypot(xx, dz)
    d = np.where(nb_part == OUTSIDE, 0.0, nb_dist)
    dy = 0.5 * (d[2] + d[3])
    re, rw = xx + 0.5 * d[0], np.maximum(xx - 0.5 * d[1], 0.0)
    ring_area = 0.5 * (re**2 - rw**2)
    out[:, -1] += (xx[:, -1] / rad[:, -1]) * xx[:, -1] * dy[:, -1] / rad[:, -1]
    out[-1, :] += (dz[-1, :] / rad[-1, :]) * ring_area[-1, :] / rad[-1, :]
    out[0, :] += (-dz[0, :] / rad[0, :]) * ring_area[0, :] / rad[0, :]
    return out * eps_node


def _assemble(layout: Layout, grid: Grid, cond: np.ndarray, eps_node: np.ndarray,
              free: np.ndarray, nb_dist: np.ndarray, nb_part: np.ndarray, coef: np.ndarray,
              cut_cross: np.ndarray, crossings: tuple[Crossings, Crossings]) -> System:
    ny, nx = grid.shape
    n_parts = len(layout.parts)
    idx = np.full((ny, nx), -1, dtype=np.int64)
    n = int(free.sum())
    idx[free] = np.arange(n)
    rows, cols, vals = [], [], []
    grows, gcols, gvals = [], [], []
    fj, fi = np.nonzero(free)
    p_idx = idx[fj, fi]
    diag = _robin(grid, eps_node, nb_dist, nb_part)[fj, fi]
    for d, (dj, di) in enumerate(DIRS):
        c = coef[d][fj, fi]
        kind = nb_part[d][fj, fi]
        diag = diag + c
        q = idx[np.clip(fj + dj, 0, ny - 1), np.clip(fi + di, 0, nx - 1)]
        node = (kind == NODE) & (c > 0) & (q >= 0)
        rows.append(p_idx[node])
        cols.append(q[node])
        vals.append(-c[node])
        fixed = (kind >= 0) & (c > 0)
        grows.append(p_idx[fixed])
        gcols.append(kind[fixed])
        gvals.append(c[fixed])
    rows.append(p_idx)
    cols.append(p_idx)
    vals.append(diag)
    A = sp.csr_matrix((np.concatenate(vals), (np.concatenate(rows), np.concatenate(cols))),
                      shape=(n, n))
    G = sp.csr_matrix((np.concatenate(gvals), (np.concatenate(grows), np.concatenate(gcols))),
                      shape=(n, n_parts + 1))
    return System(grid=grid, A=A, G=G, node_index=idx, conductor=cond, eps_node=eps_node,
                  nb_dist=nb_dist, nb_part=nb_part, cut_cross=cut_cross, crossings=crossings)


