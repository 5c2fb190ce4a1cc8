"""Non-uniform tensor-product grids refined at the outlines.

Every outline point p asks for a local spacing :math:`h_p = L_p / N`, where
:math:`L_p` is the smallest length that shapes the field there (the radius of
curvature, the gap to the nearest other part, the size of the layout) and N the cells
per length of the chosen resolution.  Along each axis the spacing is the lower envelope
of cones

.. math:: h(x) = \\min\\bigl(h_{max}(x),\\;
          \\min_p\\, [h_p + g\\,\\max(0, |x - p_x| - B h_p)]\\bigr),

so neighbouring cells differ by at most a factor :math:`1 + g` (g <= 0.2); the cones
have flat tops ``BAND_CELLS`` cells wide, so the spacing is uniform close to a surface.  Open
layouts are stretched geometrically out to a far boundary many layout sizes away.
Nodes are marched from the low end: :math:`x_{k+1} = x_k + h(x_k + h_k/2)`.

A grid larger than the machine can hold is refused before anything big is allocated,
with a message naming a resolution that fits.
"""

from __future__ import annotations

import math
import os
from dataclasses import dataclass

import numpy as np
import shapely

from .geometry import ARC_STEP_RAD, PartOutline
from .layout import Layout, LayoutError, Resolution

# cells per local length, growth per cell, cells across the region of interest
RESOLUTION_SETTINGS: dict[str, tuple[float, float, float]] = {
    "draft": (8.0, 0.20, 20.0),
    "normal": (24.0, 0.12, 40.0),
    "fine": (52.0, 0.08, 64.0),
}
BAND_BY_RESOLUTION = {"draft": 3.0, "normal": 6.0, "fine": 8.0}
BAND_CELLS = 6.0
"""Cells of uniform spacing kept on each side of an outline before the grid grows:
growth right at a surface costs the surface field its second order."""
FAR_FACTOR = {"planar": 30.0, "axisymmetric": 12.0}
BYTES_PER_UNKNOWN = 900.0
"""Peak memory of assembly, multigrid set-up and post-processing per unknown (measured)."""


@dataclass(frozen=True)
class Grid:
    """Node coordinates (mm) and the meaning of the outer edge of the grid.

    ``outer`` is ``"dirichlet"`` (nodes on the edge fixed at ``outer_volts``),
    ``"neumann"`` (insulating walls) or ``"robin"`` (open axisymmetric layout: the
    far field decays as a monopole, :math:`\\partial_n\\phi = -(\\hat n\\cdot\\hat R)\\phi/R`
    about ``centre``).  In axisymmetric grids ``x[0] == 0`` is the axis.
    """

    x: np.ndarray
    y: np.ndarray
    outer: str
    outer_volts: float
    axisymmetric: bool
    roi: tuple[float, float, float, float]
    centre: tuple[float, float]
    surface_spacing: float

    @property
    def shape(self) -> tuple[int, int]:
        return (len(self.y), len(self.x))


def resolution_settings(resolution: Resolution) -> tuple[float, float, float, float | None]:
    """(cells per length, growth, cells across ROI, finest spacing mm or None).

    A numeric resolution is the finest spacing: the outline where the local length is
    smallest gets exactly that spacing, every other outline point the same multiple of
    its local length (so the grading pattern of a named resolution is kept).
    """
    if isinstance(resolution, str):
        n, g, nroi = RESOLUTION_SETTINGS[resolution]
        return n, g, nroi, None
    n, g, nroi = RESOLUTION_SETTINGS["normal"]
    return n, g, nroi, float(resolution)


def max_unknowns() -> int:
    """How many unknowns fit in half the memory available now."""
    avail = None
    try:
        with open("/proc/meminfo") as fh:
            for line in fh:
                if line.startswith("MemAvailable:"):
                    avail = int(line.split()[1]) * 1024
    except OSError:
        pass
    if avail is None:
        avail = int(os.environ.get("STRESSLENS_MEMORY_BYTES", 4 * 2**30))
    return max(10_000, int(0.5 * avail / BYTES_PER_UNKNOWN))


class _TooLarge(Exception):
    """Internal: the grid would exceed the node cap (``nodes`` is a lower bound)."""

    def __init__(self, nodes: int) -> None:
        super().__init__(nodes)
        self.nodes = nodes


def build_grid(layout: Layout, outlines: tuple[PartOutline, ...],
               resolution: Resolution | None = None, coarsen: float = 1.0,
               unknown_cap: int | None = None) -> Grid:
    """The grid for a layout at a resolution; ``coarsen`` > 1 scales every spacing up.

    Raises LayoutError, naming a finest spacing that fits, when the grid would need more
    memory than the machine has; nothing large is allocated before that check.
    """
    res = layout.resolution if resolution is None else resolution
    cap = unknown_cap or max_unknowns()
    try:
        return _grid(layout, outlines, res, coarsen, cap)
    except _TooLarge as exc:
        fit = _spacing_that_fits(layout, outlines, res, coarsen, cap)
        raise LayoutError(f"resolution {res!r} needs {exc.nodes:,} grid nodes or more, "
                          f"more than the {cap:,} that fit in this machine's memory; a "
                          f"finest spacing of {fit:.3g} mm fits") from None


def _spacing_that_fits(layout: Layout, outlines: tuple[PartOutline, ...], res: Resolution,
                       coarsen: float, cap: int) -> float:
    """Bisect (in log space) for the finest spacing whose grid fits in half the cap."""
    size = max(b - a for a, b in zip(_roi(outlines)[:2], _roi(outlines)[2:], strict=True))
    lo = float(res) * coarsen if not isinstance(res, str) else size * 1e-6
    hi = size / 10.0
    for _ in range(12):
        mid = math.sqrt(lo * hi)
        try:
            _grid(layout, outlines, mid, 1.0, cap // 2)
            hi = mid
        except _TooLarge:
            lo = mid
        if hi / lo < 1.1:
            break
    return hi


def _grid(layout: Layout, outlines: tuple[PartOutline, ...], res: Resolution, coarsen: float,
          cap: int) -> Grid:
    n_per, growth, n_roi, fixed = resolution_settings(res)
    pts, h_pts = _surface_requests(layout, outlines, n_per / coarsen, n_roi / coarsen,
                                   None if fixed is None else fixed * coarsen)
    x0, y0, x1, y1 = _roi(outlines)
    size = max(x1 - x0, y1 - y0)
    h_roi = size / (n_roi / coarsen)
    axisym = layout.symmetry == "axisymmetric"
    lo, hi, outer, volts, centre = _domain(layout, (x0, y0, x1, y1), size, axisym)
    band = BAND_BY_RESOLUTION.get(res, BAND_CELLS) if isinstance(res, str) else BAND_CELLS
    try:  # every grid has dozens of rows at least (the far field alone), so cap x early
        xs = _axis(lo[0], hi[0], pts[:, 0], h_pts, growth, h_roi, (x0, x1), cap // 32, band)
    except _TooLarge as exc:
        raise _TooLarge(32 * exc.nodes) from None
    try:
        ys = _axis(lo[1], hi[1], pts[:, 1], h_pts, growth, h_roi, (y0, y1), cap // len(xs),
                   band)
    except _TooLarge as exc:
        raise _TooLarge(len(xs) * exc.nodes) from None
    n = len(xs) * len(ys)
    if n > cap:
        raise _TooLarge(n)
    return Grid(x=xs, y=ys, outer=outer, outer_volts=volts, axisymmetric=axisym,
                roi=(x0, y0, x1, y1), centre=centre, surface_spacing=float(h_pts.min()))


def _roi(outlines: tuple[PartOutline, ...]) -> tuple[float, float, float, float]:
    b = np.array([o.polygon.bounds for o in outlines])
    x0, y0 = b[:, 0].min(), b[:, 1].min()
    x1, y1 = b[:, 2].max(), b[:, 3].max()
    pad = 0.05 * max(x1 - x0, y1 - y0)
    return x0 - pad, y0 - pad, x1 + pad, y1 + pad


def _domain(layout: Layout, roi: tuple[float, float, float, float], size: float,
            axisym: bool) -> tuple[tuple[float, float], tuple[float, float], str, float,
                                   tuple[float, float]]:
    x0, y0, x1, y1 = roi
    b = layout.boundary
    centre = (0.0 if axisym else 0.5 * (x0 + x1), 0.5 * (y0 + y1))
    if b.type == "box" and b.min and b.max:
        lo = (0.0 if axisym else b.min[0], b.min[1])
        outer = "neumann" if b.volts is None else "dirichlet"
        return lo, b.max, outer, float(b.volts or 0.0), centre
    far = FAR_FACTOR[layout.symmetry] * size
    if axisym:
        return (0.0, centre[1] - far), (x1 + far, centre[1] + far), "robin", 0.0, centre
    return ((centre[0] - far, centre[1] - far), (centre[0] + far, centre[1] + far),
            "dirichlet", 0.0, centre)


def _surface_requests(layout: Layout, outlines: tuple[PartOutline, ...], n_per: float,
                      n_roi: float, fixed: float | None) -> tuple[np.ndarray, np.ndarray]:
    """Outline sample points (M, 2) and the spacing each asks for (M,), mm."""
    x0, y0, x1, y1 = _roi(outlines)
    size = max(x1 - x0, y1 - y0)
    step = size / 200.0
    all_pts, all_h = [], []
    polys = [o.polygon for o in outlines]
    for k, ol in enumerate(outlines):
        for ring in ol.rings:
            radius = vertex_radius(ring)
            if layout.symmetry == "axisymmetric":
                # an outline leaving the axis square is smooth in 3D: take the neighbours'
                smooth = smooth_on_axis(ring)
                radius = np.where(smooth, np.maximum(np.abs(np.roll(radius, 1)),
                                                     np.abs(np.roll(radius, -1))), radius)
            edge_len = np.hypot(*(np.roll(ring, -1, axis=0) - ring).T)
            local = np.minimum(np.abs(radius), size)
            corner = radius == 0
            near_edge = np.minimum(edge_len, np.roll(edge_len, 1))
            local = np.where(corner, np.minimum(near_edge, size) / 2.0, local)
            pts, loc = _densify(ring, local, step)
            gap = _gap_to_others(pts, polys, k)
            length = np.minimum(loc, gap)
            all_pts.append(pts)
            all_h.append(length)
    pts = np.vstack(all_pts)
    length = np.maximum(np.concatenate(all_h), size * 1e-6 * n_per)
    if fixed is None:
        h = length / n_per
    else:
        # a spacing in mm is the finest one: the grading pattern stays, its scale is set
        h = fixed * length / length.min()
    return pts, np.minimum(h, size / n_roi)


def _densify(ring: np.ndarray, local: np.ndarray, step: float) -> tuple[np.ndarray, np.ndarray]:
    """Add points along long edges so no two samples are more than ``step`` apart."""
    nxt = np.roll(ring, -1, axis=0)
    seg = np.hypot(*(nxt - ring).T)
    extra = np.maximum(0, np.ceil(seg / step).astype(int) - 1)
    if not extra.any():
        return ring, local
    reps = extra + 1
    idx = np.repeat(np.arange(len(ring)), reps)
    offs = np.arange(reps.sum()) - np.repeat(np.cumsum(reps) - reps, reps)
    t = (offs / reps[idx])[:, None]
    pts = ring[idx] * (1 - t) + nxt[idx] * t
    loc_next = np.roll(local, -1)
    loc = np.where(offs == 0, local[idx],
                   np.maximum(np.minimum(local[idx], loc_next[idx]), seg[idx]))
    return pts, np.minimum(loc, np.inf)


def _gap_to_others(pts: np.ndarray, polys: list, k: int) -> np.ndarray:
    gap = np.full(len(pts), np.inf)
    if len(polys) < 2:
        return gap
    p = shapely.points(pts)
    size = max(b - a for a, b in zip(polys[k].bounds[:2], polys[k].bounds[2:], strict=True))
    for j, poly in enumerate(polys):
        # parts that touch form a wedge at the contact with no length scale of its own
        if j != k and shapely.distance(polys[k], poly) > 0:
            # a gap only sets a spacing: 1e-3 of the part's size is exact enough
            coarse = poly.simplify(1e-3 * size) if len(poly.exterior.coords) > 64 else poly
            gap = np.minimum(gap, shapely.distance(p, coarse))
    return gap


def smooth_on_axis(ring: np.ndarray) -> np.ndarray:
    """Vertices on the axis where the outline leaves it at right angles (within 5 deg):
    the surface of revolution is smooth there, not a cone tip."""
    on_axis = np.abs(ring[:, 0]) < 1e-9
    out = np.zeros(len(ring), bool)
    for nb in (np.roll(ring, 1, axis=0), np.roll(ring, -1, axis=0)):
        d = nb - ring
        off = np.abs(nb[:, 0]) > 1e-9
        flat = np.abs(d[:, 1]) <= np.tan(np.radians(5.0)) * np.abs(d[:, 0])
        out |= on_axis & off & flat
    return out


def vertex_radius(ring: np.ndarray) -> np.ndarray:
    """Signed radius of curvature at each vertex of a ring with material on the left, mm.

    Positive where the outline is convex (turns left), negative where concave, ``inf``
    on straight runs and 0 at a sharp corner (turning more than three arc steps).  On a
    discretised arc the circumradius of three neighbouring vertices is the arc's radius.
    """
    prev, nxt = np.roll(ring, 1, axis=0), np.roll(ring, -1, axis=0)
    a, b = ring - prev, nxt - ring
    cross = a[:, 0] * b[:, 1] - a[:, 1] * b[:, 0]
    dot = np.einsum("ij,ij->i", a, b)
    turn = np.arctan2(cross, dot)
    la, lb = np.hypot(*a.T), np.hypot(*b.T)
    lc = np.hypot(*(nxt - prev).T)
    with np.errstate(divide="ignore", invalid="ignore"):
        r = la * lb * lc / (2.0 * np.abs(cross))
    r = np.where(np.abs(turn) < 1e-9, np.inf, r)
    r = np.where(np.abs(turn) > 3.0 * ARC_STEP_RAD, 0.0, r)
    return np.where(turn < 0, -r, r)


def _axis(lo: float, hi: float, feat: np.ndarray, h_feat: np.ndarray, growth: float,
          h_roi: float, roi: tuple[float, float], cap: int, band: float = 0.0) -> np.ndarray:
    """March nodes from lo to hi with the cone-envelope spacing (see module docstring).

    Raises ``_TooLarge`` as soon as more than ``cap`` nodes would be needed.
    """
    order = np.argsort(h_feat)
    feat, h_feat = feat[order], h_feat[order]
    keep = _thin(feat, h_feat)
    feat, h_feat = feat[keep], h_feat[keep]

    def h_at(x: float) -> float:
        h = float(np.min(h_feat + growth * np.maximum(np.abs(x - feat) - band * h_feat, 0.0)))
        out = max(roi[0] - x, x - roi[1], 0.0)
        return min(h, h_roi + growth * out)

    xs = [lo]
    x = lo
    while True:
        h = h_at(x)
        h = h_at(x + 0.5 * h)
        if x + 1.5 * h >= hi:
            break
        x += h
        xs.append(x)
        if len(xs) > cap:
            raise _TooLarge(len(xs))
    if hi - x > 1e-12 * max(1.0, abs(hi)):
        if len(xs) > 1 and hi - x < 0.5 * h:
            xs[-1] = 0.5 * (xs[-2] + hi)
        elif hi - x > 1.2 * h:
            xs.append(0.5 * (x + hi))
    xs.append(hi)
    return np.asarray(xs, dtype=float)


def _thin(feat: np.ndarray, h_feat: np.ndarray) -> np.ndarray:
    """Drop feature points whose cone lies wholly above another's (they change nothing)."""
    if len(feat) < 64:
        return np.ones(len(feat), bool)
    q = np.round(feat / np.maximum(h_feat, 1e-12) * 4.0)
    _, first = np.unique(np.column_stack([q, np.round(np.log(h_feat) * 8)]), axis=0,
                         return_index=True)
    mask = np.zeros(len(feat), bool)
    mask[first] = True
    return mask
