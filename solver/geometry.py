"""Shapes to outlines: exact-enough polygons, oriented rings, and the geometric checks.

Curved outlines (circles, ellipses, rounded corners, wire ends) become polygons whose
vertices lie on the true curve and whose chords turn by at most ``ARC_STEP_RAD``; the
relative sagitta error is then :math:`1 - \\cos(\\Delta\\theta/2) \\approx 1.6\\times10^{-5}`,
far below the discretisation error of any grid we build.  Rings are returned oriented so
that the part's material is on the left of the direction of travel: exteriors
anticlockwise, holes clockwise.  The outward normal of a ring edge (dx, dy) is then
(dy, -dx)/|d|, for exterior and holes alike.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass

import numpy as np
import shapely
import shapely.ops
from shapely.geometry import LineString
from shapely.geometry import Polygon as ShPolygon
from shapely.validation import explain_validity

from .layout import Circle, Ellipse, Layout, LayoutError, Part, Path, Polygon, Rect, Shape

ARC_STEP_RAD = 2.0 * math.pi / 560
"""Largest turning angle between neighbouring vertices on a curved outline, radians."""

_GEOM_TOL_MM = 1e-9
_SAGITTA_REL = 1.0 - math.cos(ARC_STEP_RAD / 2)
"""Largest gap between a discretised arc and the true arc, per mm of arc radius."""


@dataclass(frozen=True)
class PartOutline:
    """The outline of one part.

    Attributes
    ----------
    polygon : the part's region (shapely), holes included.
    rings : closed rings (first point not repeated), shape (N, 2) in mm, material on the
        left; ``rings[0]`` is the exterior.
    """

    name: str
    polygon: ShPolygon
    rings: tuple[np.ndarray, ...]


def shape_polygon(shape: Shape) -> ShPolygon:
    """The region of a shape as a shapely polygon (mm), arcs discretised finely."""
    if isinstance(shape, Circle):
        return ShPolygon(_ellipse_ring(shape.center, (shape.radius, shape.radius), 0.0))
    if isinstance(shape, Ellipse):
        return ShPolygon(_ellipse_ring(shape.center, shape.radii, shape.angle_deg))
    if isinstance(shape, Rect):
        (x0, y0), (x1, y1) = shape.min, shape.max
        pts = np.array([[x0, y0], [x1, y0], [x1, y1], [x0, y1]], float)
        return ShPolygon(rounded_ring(pts, [shape.corner_radius] * 4))
    if isinstance(shape, Polygon):
        pts = np.asarray(shape.points, float)
        cr = shape.corner_radius
        radii = list(cr) if isinstance(cr, tuple) else [cr] * len(pts)
        return ShPolygon(rounded_ring(pts, radii), [np.asarray(h, float) for h in shape.holes])
    if isinstance(shape, Path):
        quad = max(8, math.ceil((math.pi / 2) / ARC_STEP_RAD))
        line = LineString(np.asarray(shape.points, float))
        geom = line.buffer(shape.width / 2, quad_segs=quad)
        if not isinstance(geom, ShPolygon):
            raise LayoutError("path outline is not a single region")
        return geom
    raise TypeError(f"unknown shape {shape!r}")


def _ellipse_ring(center: tuple[float, float], radii: tuple[float, float],
                  angle_deg: float) -> np.ndarray:
    """Ellipse vertices: the union of two uniform spacings of the parameter :math:`t`.

    One set is uniform in the normal's direction angle :math:`\\beta`, with
    :math:`t = \\operatorname{atan2}(b\\sin\\beta, a\\cos\\beta)`, so no chord turns
    by more than ``ARC_STEP_RAD`` however elongated the ellipse.  The other is uniform in
    :math:`t` itself: on a thin ellipse the first set alone leaves the flat sides with
    chords whose sagitta, :math:`(1-\\cos(\\Delta\\beta/2))\\,a^2/b`, is a large fraction
    of the thickness :math:`b`; with both, the sagitta is at most
    :math:`(1-\\cos(\\Delta/2))\\,\\min(a, a^2/b)`.
    """
    a, b = radii
    # 1% finer than the step: on an ellipse a chord's direction is not exactly the
    # normal at its middle, so the turn between chords slightly exceeds the step in beta.
    n = max(64, math.ceil(1.01 * 2 * math.pi / ARC_STEP_RAD))
    beta = np.linspace(0.0, 2 * math.pi, n, endpoint=False)
    t_normal = np.mod(np.arctan2(b * np.sin(beta), a * np.cos(beta)), 2 * math.pi)
    t = np.unique(np.concatenate([t_normal, beta]))
    t = t[np.diff(t, append=t[0] + 2 * math.pi) > 1e-9]
    x, y = a * np.cos(t), b * np.sin(t)
    c, s = math.cos(math.radians(angle_deg)), math.sin(math.radians(angle_deg))
    return np.column_stack([center[0] + c * x - s * y, center[1] + s * x + c * y])


def rounded_ring(pts: np.ndarray, radii: list[float]) -> np.ndarray:
    """Replace each vertex of a closed ring by a tangent circular arc of the given radius.

    At a vertex with turning angle :math:`\\varphi` the arc's tangent points lie
    :math:`t = r\\tan(|\\varphi|/2)` back along each edge; the arc is refused (LayoutError)
    when the two tangent lengths meeting on one edge exceed it.
    """
    n = len(pts)
    if not any(r > 0 for r in radii):
        return pts
    d_out = np.roll(pts, -1, axis=0) - pts
    length = np.hypot(d_out[:, 0], d_out[:, 1])
    if np.any(length <= _GEOM_TOL_MM):
        raise LayoutError("outline has two coincident neighbouring points")
    u_out = d_out / length[:, None]
    u_in = np.roll(u_out, 1, axis=0)
    cross = u_in[:, 0] * u_out[:, 1] - u_in[:, 1] * u_out[:, 0]
    dot = np.einsum("ij,ij->i", u_in, u_out)
    phi = np.arctan2(cross, dot)
    t = np.array([r * math.tan(abs(p) / 2) for r, p in zip(radii, phi, strict=True)])
    for i in range(n):
        j = (i + 1) % n
        if t[i] + t[j] > length[i] * (1 + 1e-9):
            raise LayoutError(f"corner radius at vertex {i + 1} or {j + 1} is too large for "
                              f"the {length[i]:.4g} mm edge between them")
    out: list[np.ndarray] = []
    for i in range(n):
        r, p = radii[i], phi[i]
        if r <= 0 or abs(p) < 1e-9:
            out.append(pts[i][None, :])
            continue
        t1 = pts[i] - t[i] * u_in[i]
        left = np.array([-u_in[i][1], u_in[i][0]]) * math.copysign(1.0, p)
        centre = t1 + r * left
        a0 = math.atan2(t1[1] - centre[1], t1[0] - centre[0])
        m = max(2, math.ceil(abs(p) / ARC_STEP_RAD) + 1)
        ang = a0 + np.linspace(0.0, p, m)
        out.append(np.column_stack([centre[0] + r * np.cos(ang), centre[1] + r * np.sin(ang)]))
    ring = np.vstack(out)
    keep = np.hypot(*(np.roll(ring, -1, axis=0) - ring).T) > _GEOM_TOL_MM
    return ring[keep]


def oriented_rings(poly: ShPolygon) -> tuple[np.ndarray, ...]:
    """Rings of a polygon with material on the left (exterior CCW, holes CW), unclosed."""
    poly = shapely.geometry.polygon.orient(poly, sign=1.0)
    rings = [np.asarray(poly.exterior.coords)[:-1]]
    rings += [np.asarray(h.coords)[:-1] for h in poly.interiors]
    return tuple(rings)


def part_outline(part: Part) -> PartOutline:
    """The oriented outline of one part; LayoutError names the part on bad geometry."""
    try:
        poly = shape_polygon(part.shape)
    except LayoutError as exc:
        raise LayoutError(f"part '{part.name}': {exc}") from None
    if not poly.is_valid:
        raise LayoutError(f"part '{part.name}': {_explain(poly)}")
    if poly.area <= 0:
        raise LayoutError(f"part '{part.name}': the outline encloses no area")
    return PartOutline(part.name, poly, oriented_rings(poly))


def _meeting_point(pa: ShPolygon, pb: ShPolygon) -> tuple[float, float]:
    """A point (mm) where two outlines overlap, or midway across the gap between them."""
    if pa.intersects(pb):
        pt = pa.intersection(pb).representative_point()
        x, y = pt.x, pt.y
    else:
        qa, qb = shapely.ops.nearest_points(pa, pb)
        x, y = (qa.x + qb.x) / 2, (qa.y + qb.y) / 2
    return (round(x, 6) + 0.0, round(y, 6) + 0.0)


def _explain(poly: ShPolygon) -> str:
    why = explain_validity(poly)
    m = re.search(r"\[\s*([-\d.e+]+)\s+([-\d.e+]+)\s*\]", why)
    at = f" near ({float(m.group(1)):.4g}, {float(m.group(2)):.4g}) mm" if m else ""
    if "Self-intersection" in why or "Ring Self-intersection" in why:
        return f"the outline crosses itself{at}"
    if "Hole" in why or "hole" in why:
        return f"a hole lies outside the outline or crosses it{at}"
    return f"the outline is not a valid region ({why})"


def layout_outlines(layout: Layout) -> tuple[PartOutline, ...]:
    """Outlines of all parts, in layout order.

    In an axisymmetric layout a circle or ellipse centred on the axis (x = 0, its axes
    along r and z: rotated by a multiple of 90 degrees) is a sphere or spheroid: its
    outline is the half with r >= 0.
    """
    outlines = tuple(part_outline(p) for p in layout.parts)
    if layout.symmetry != "axisymmetric":
        return outlines
    return tuple(_half_on_axis(p, o) for p, o in zip(layout.parts, outlines, strict=True))


def _half_on_axis(part: Part, ol: PartOutline) -> PartOutline:
    s = part.shape
    centred = isinstance(s, (Circle, Ellipse)) and abs(s.center[0]) < 1e-12 and (
        isinstance(s, Circle) or _multiple_of_90(s.angle_deg))
    if not centred:
        return ol
    x0, y0, x1, y1 = ol.polygon.bounds
    half = ol.polygon.intersection(shapely.box(0.0, y0 - 1.0, x1 + 1.0, y1 + 1.0))
    if not isinstance(half, ShPolygon) or half.is_empty:
        return ol
    ring = oriented_rings(half)[0]
    # the cut leaves a sliver edge where the axis passes close to a vertex: drop it
    seg = np.hypot(*(np.roll(ring, -1, axis=0) - ring).T)
    keep = (seg > 1e-3 * np.median(seg)) | (np.abs(ring[:, 0]) < 1e-12)
    half = ShPolygon(ring[keep])
    return PartOutline(part.name, half, oriented_rings(half))


def _multiple_of_90(angle_deg: float) -> bool:
    """True when an angle (degrees) is a whole multiple of 90, to 1e-9 degrees."""
    q = angle_deg / 90.0
    return abs(q - round(q)) < 1e-11


def same_conductor(a: Part, b: Part) -> bool:
    """Two conductor parts that may touch or overlap: electrodes at the same potential."""
    return a.kind == b.kind == "electrode" and a.volts == b.volts


def validate_geometry(layout: Layout) -> tuple[PartOutline, ...]:
    """Check every geometric rule of format v1; return the outlines when all hold."""
    outlines = layout_outlines(layout)
    if not layout.parts:
        return outlines
    for part, ol in zip(layout.parts, outlines, strict=True):
        x0 = ol.polygon.bounds[0]
        if layout.symmetry == "axisymmetric" and x0 < -1e-9:
            raise LayoutError(f"part '{part.name}': reaches r = {x0:.4g} mm; in an "
                              f"axisymmetric layout x is the radius and must be >= 0")
        _check_in_box(layout, part, ol.polygon)
    if not any(p.is_conductor for p in layout.parts):
        raise LayoutError("layout has no conductor: add at least one electrode")
    _check_pairs(layout, outlines)
    return outlines


def _check_in_box(layout: Layout, part: Part, poly: ShPolygon) -> None:
    """A part lies inside the boundary box; a conductor touches no grounded wall.

    A conductor at another potential than a grounded (fixed-voltage) box may not touch
    its walls; an electrode at the box's voltage and any part at an insulating wall
    may.  In an axisymmetric layout the box's side at r = 0 is the axis, not a wall.
    """
    b = layout.boundary
    if b.type != "box" or b.min is None or b.max is None:
        return
    x0, y0, x1, y1 = poly.bounds
    gaps = {"left": x0 - b.min[0], "bottom": y0 - b.min[1],
            "right": b.max[0] - x1, "top": b.max[1] - y1}
    if min(gaps.values()) < -1e-9:
        raise LayoutError(f"part '{part.name}': lies partly outside the boundary box")
    if layout.symmetry == "axisymmetric":
        del gaps["left"]  # the axis
    at_box_volts = part.kind == "electrode" and part.volts == b.volts
    if b.volts is None or not part.is_conductor or at_box_volts:
        return
    tol = _sagitta_allowance_mm(largest_arc_radius(part.shape))
    walls = [w for w, g in gaps.items() if g <= tol]
    if walls:
        raise LayoutError(f"part '{part.name}': touches the {walls[0]} wall of the boundary "
                          f"box, which is held at {b.volts:g} V; move it inside, or make "
                          f"the walls insulating (volts null)")


def largest_arc_radius(shape: Shape) -> float:
    """The largest radius of curvature (mm) of any arc in a shape's outline; 0 if none.

    For an ellipse with semi-axes :math:`a \\ge b` the radius reaches :math:`a^2/b`, but
    its outline's sagitta is bounded as for a circle of radius :math:`a` (see
    ``_ellipse_ring``), so :math:`a` is returned.
    """
    if isinstance(shape, Circle):
        return shape.radius
    if isinstance(shape, Ellipse):
        return max(shape.radii)
    if isinstance(shape, Rect):
        return shape.corner_radius
    if isinstance(shape, Polygon):
        cr = shape.corner_radius
        return max(cr) if isinstance(cr, tuple) else cr
    return shape.width / 2


def touch_tolerance_mm(a: Part, b: Part) -> float:
    """Gap (mm) below which two outlines count as touching.

    Discretised arcs are chords inside the true arcs, so the true gap can be smaller
    than the computed one by up to the sum of the two sagittas,
    :math:`(1-\\cos(\\Delta\\theta/2))(R_a + R_b)`; we allow 1.5 times that.
    """
    return _sagitta_allowance_mm(largest_arc_radius(a.shape) + largest_arc_radius(b.shape))


def _sagitta_allowance_mm(arc_radii_mm: float) -> float:
    """1.5 times the largest sagitta of arcs of these radii (summed, mm), plus round-off."""
    return 1.5 * _SAGITTA_REL * arc_radii_mm + _GEOM_TOL_MM


def _check_pairs(layout: Layout, outlines: tuple[PartOutline, ...]) -> None:
    polys = [o.polygon for o in outlines]
    widest = _sagitta_allowance_mm(2 * max(largest_arc_radius(p.shape) for p in layout.parts))
    tree = shapely.STRtree(polys)
    left, right = tree.query(polys, predicate="dwithin", distance=widest)
    for i, j in sorted(zip(left.tolist(), right.tolist(), strict=True)):
        if i >= j:
            continue
        _check_pair(layout.parts[i], polys[i], layout.parts[j], polys[j])


def _check_pair(a: Part, pa: ShPolygon, b: Part, pb: ShPolygon) -> None:
    names = f"parts '{a.name}' and '{b.name}'"
    if a.is_conductor and b.is_conductor:
        if not same_conductor(a, b) and pa.distance(pb) <= touch_tolerance_mm(a, b):
            pt = _meeting_point(pa, pb)
            raise LayoutError(f"{names}: two different conductors touch or overlap near "
                              f"({pt[0]:.4g}, {pt[1]:.4g}) mm; separate them or give them "
                              f"the same voltage")
        return
    if not pa.intersects(pb):
        return
    area = pa.intersection(pb).area
    if area <= 1e-9 * min(pa.area, pb.area):
        return  # touching along an edge is fine
    if a.is_conductor or b.is_conductor:
        cond, diel = (a, b) if a.is_conductor else (b, a)
        pc, pd = (pa, pb) if a.is_conductor else (pb, pa)
        if pd.buffer(-1e-9).within(pc):
            raise LayoutError(f"part '{diel.name}': dielectric lies inside conductor "
                              f"'{cond.name}', where there is no field; remove it or move it")
        if not pc.buffer(-1e-9).within(pd):
            raise LayoutError(f"part '{cond.name}': conductor lies partly inside dielectric "
                              f"'{diel.name}'; put it wholly inside, or cut a hole in the "
                              f"dielectric for it")
        return
    if not (pa.buffer(-1e-9).within(pb) or pb.buffer(-1e-9).within(pa)):
        raise LayoutError(f"{names}: two dielectrics overlap partly; one must lie wholly "
                          f"inside the other (the inner one wins) or they must not overlap")
