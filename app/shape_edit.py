"""Geometric edits of layout shapes: pure functions, frozen shapes in, new shapes out.

Every shape exposes *vertices* addressed by ``(ring, index)``: ring 0 is the outline
(rectangle corners counted anticlockwise from ``min``; polygon points; path points),
ring ``k >= 1`` is polygon hole ``k - 1``.  Circles and ellipses expose handles in
place of vertices: circle ``(0, 0)`` is the point ``center + (radius, 0)``; ellipse
``(0, 0)`` and ``(0, 1)`` are the ends of the first and second semi-axis.  *Edges*
``(ring, i)`` run from vertex ``i`` to vertex ``i + 1`` (closed rings wrap; paths do
not).  All coordinates in millimetres.
"""

from __future__ import annotations

import math
from dataclasses import replace
from functools import lru_cache

import numpy as np
from shapely.geometry import Polygon as ShPolygon

from solver.geometry import shape_polygon
from solver.layout import Circle, Ellipse, LayoutError, Path, Point, Polygon, Rect, Shape
from solver.params import translated_shape

Ref = tuple[int, int]


class EditError(ValueError):
    """An edit that cannot be made; the message says why, for the status bar."""


@lru_cache(maxsize=4096)
def region(shape: Shape) -> ShPolygon | None:
    """The shapely region of a shape, or None when the shape is not a valid region."""
    try:
        poly = shape_polygon(shape)
    except (LayoutError, ValueError):
        return None
    return poly if not poly.is_empty else None


# --------------------------------------------------------------------------- whole shapes


def translated(shape: Shape, dx: float, dy: float) -> Shape:
    """The shape moved by (dx, dy) mm."""
    return translated_shape(shape, dx, dy)


def mirrored(shape: Shape, vertical_line: bool, about: float) -> Shape:
    """The mirror image about the line x = ``about`` (vertical) or y = ``about``.

    A reflection maps :math:`x \\mapsto 2a - x` (or y likewise); an ellipse's axis
    angle :math:`\\theta` becomes :math:`-\\theta`; per-vertex corner radii stay with
    their vertices.
    """
    def mp(p: Point) -> Point:
        return (2 * about - p[0], p[1]) if vertical_line else (p[0], 2 * about - p[1])

    if isinstance(shape, Circle):
        return replace(shape, center=mp(shape.center))
    if isinstance(shape, Ellipse):
        return replace(shape, center=mp(shape.center), angle_deg=_norm_angle(-shape.angle_deg))
    if isinstance(shape, Rect):
        (x0, y0), (x1, y1) = mp(shape.min), mp(shape.max)
        return replace(shape, min=(min(x0, x1), min(y0, y1)), max=(max(x0, x1), max(y0, y1)))
    if isinstance(shape, Polygon):
        return replace(shape, points=tuple(map(mp, shape.points)),
                       holes=tuple(tuple(map(mp, h)) for h in shape.holes))
    return replace(shape, points=tuple(map(mp, shape.points)))


def bounds(shape: Shape) -> tuple[float, float, float, float]:
    """(x0, y0, x1, y1) mm of the shape's region (of its handles if it has none)."""
    reg = region(shape)
    if reg is not None:
        return tuple(reg.bounds)  # type: ignore[return-value]
    pts = np.array([p for _, p in vertices(shape)], float)
    return (*pts.min(axis=0), *pts.max(axis=0))  # type: ignore[return-value]


def as_polygon(shape: Shape) -> Polygon:
    """The same region as a :class:`Polygon` (rectangles and circles exactly; ellipses and
    wires as fine chords)."""
    if isinstance(shape, Polygon):
        return shape
    if isinstance(shape, Rect):
        (x0, y0), (x1, y1) = shape.min, shape.max
        return Polygon(points=((x0, y0), (x1, y0), (x1, y1), (x0, y1)),
                       corner_radius=shape.corner_radius)
    if isinstance(shape, Circle):
        # a square of side 2r with corner radius r is exactly the circle, and stays editable
        (cx, cy), r = shape.center, shape.radius
        return Polygon(points=((cx - r, cy - r), (cx + r, cy - r), (cx + r, cy + r),
                               (cx - r, cy + r)), corner_radius=r)
    reg = region(shape)
    if reg is None:
        raise EditError("the shape is not a valid region")
    pts = tuple((float(x), float(y)) for x, y in reg.exterior.coords[:-1])
    return Polygon(points=pts)


def with_hole(shape: Shape, hole: tuple[Point, ...]) -> Polygon:
    """The shape with the ring ``hole`` cut out of it; the hole must lie inside."""
    if isinstance(shape, Path):
        raise EditError("a wire cannot take a hole; draw it as a polygon instead")
    outer = region(shape)
    if outer is None or not ShPolygon(hole).is_valid or not outer.contains(ShPolygon(hole)):
        raise EditError("the hole must lie wholly inside the part")
    for h in getattr(shape, "holes", ()):
        if ShPolygon(h).intersects(ShPolygon(hole)):
            raise EditError("the new hole overlaps an existing hole")
    poly = as_polygon(shape)
    return replace(poly, holes=poly.holes + (tuple(hole),))


# --------------------------------------------------------------------------- vertices


def vertices(shape: Shape) -> list[tuple[Ref, Point]]:
    """Every editable vertex or handle as ((ring, index), (x, y) mm)."""
    if isinstance(shape, Circle):
        c = shape.center
        return [((0, 0), (c[0] + shape.radius, c[1]))]
    if isinstance(shape, Ellipse):
        c, (a, b) = shape.center, shape.radii
        t = math.radians(shape.angle_deg)
        u = (math.cos(t), math.sin(t))
        return [((0, 0), (c[0] + a * u[0], c[1] + a * u[1])),
                ((0, 1), (c[0] - b * u[1], c[1] + b * u[0]))]
    rings = _rings(shape)
    return [((k, i), p) for k, ring in enumerate(rings) for i, p in enumerate(ring)]


DENSE_RING = 64
"""Rings with more vertices than this (circular holes, ellipses made polygons) are
traced curves: their vertices are not offered as handles."""


def handles(shape: Shape) -> list[tuple[Ref, Point]]:
    """The vertices worth dragging: :func:`vertices` less those of densely traced rings."""
    if isinstance(shape, (Circle, Ellipse)):
        return vertices(shape)
    rings = _rings(shape)
    return [((k, i), p) for k, ring in enumerate(rings) if len(ring) <= DENSE_RING
            for i, p in enumerate(ring)]


def circle_ring(center: Point, radius: float) -> tuple[Point, ...]:
    """A circle traced as finely as the solver traces curved outlines (mm)."""
    reg = region(Circle(center=center, radius=radius))
    assert reg is not None
    return tuple((float(x), float(y)) for x, y in reg.exterior.coords[:-1])


def edges(shape: Shape) -> list[tuple[Ref, Point, Point]]:
    """Every straight edge as ((ring, index), start, end); none for circles and ellipses."""
    if isinstance(shape, (Circle, Ellipse)):
        return []
    out = []
    for k, ring in enumerate(_rings(shape)):
        n = len(ring)
        last = n - 1 if isinstance(shape, Path) else n
        out += [((k, i), ring[i], ring[(i + 1) % n]) for i in range(last)]
    return out


def with_vertex_moved(shape: Shape, ref: Ref, to: Point) -> Shape:
    """The shape with vertex or handle ``ref`` moved to ``to`` (mm).

    A rectangle keeps its sides axis-parallel: the dragged corner moves, the opposite
    corner stays.  A circle's handle sets the radius to the distance from the centre;
    an ellipse handle sets that semi-axis (and its angle, for the first one).
    """
    if isinstance(shape, Circle):
        r = math.hypot(to[0] - shape.center[0], to[1] - shape.center[1])
        return replace(shape, radius=max(r, 1e-6))
    if isinstance(shape, Ellipse):
        dx, dy = to[0] - shape.center[0], to[1] - shape.center[1]
        d = max(math.hypot(dx, dy), 1e-6)
        if ref[1] == 0:
            return replace(shape, radii=(d, shape.radii[1]),
                           angle_deg=_norm_angle(math.degrees(math.atan2(dy, dx))))
        return replace(shape, radii=(shape.radii[0], d))
    if isinstance(shape, Rect):
        opposite = _rings(shape)[0][(ref[1] + 2) % 4]
        return _rect_between(shape, opposite, to)
    return _set_ring_point(shape, ref, to)


def with_edge_moved(shape: Shape, ref: Ref, delta: Point) -> Shape:
    """The shape with edge ``ref`` shifted along its normal by the normal part of ``delta``.

    With unit edge direction :math:`\\hat t` and normal :math:`\\hat n`, both end points
    move by :math:`(\\Delta\\cdot\\hat n)\\,\\hat n`; the rest of the outline stays.
    """
    if isinstance(shape, (Circle, Ellipse)):
        raise EditError("circles and ellipses have no straight edges; drag the handle")
    if isinstance(shape, Rect):
        (x0, y0), (x1, y1) = shape.min, shape.max
        i = ref[1] % 4
        lo = (x0, y0 + delta[1] if i == 0 else y0)
        lo = (x0 + delta[0] if i == 3 else lo[0], lo[1])
        hi = (x1 + delta[0] if i == 1 else x1, y1 + delta[1] if i == 2 else y1)
        return _rect_between(shape, lo, hi)
    rings = _rings(shape)
    ring = rings[ref[0]]
    a, b = ring[ref[1]], ring[(ref[1] + 1) % len(ring)]
    t = np.subtract(b, a)
    length = float(np.hypot(*t))
    if length == 0:
        return shape
    n = np.array([t[1], -t[0]]) / length
    s = float(np.dot(delta, n)) * n
    moved = _set_ring_point(shape, ref, (a[0] + s[0], a[1] + s[1]))
    nxt = (ref[0], (ref[1] + 1) % len(ring))
    return _set_ring_point(moved, nxt, (b[0] + s[0], b[1] + s[1]))


def with_vertex_inserted(shape: Shape, edge: Ref, at: Point) -> Shape:
    """A new vertex at ``at`` after vertex ``edge[1]`` of ring ``edge[0]`` (splits the edge)."""
    if isinstance(shape, (Circle, Ellipse)):
        raise EditError("circles and ellipses have no vertices to add to")
    if isinstance(shape, Rect):
        shape = as_polygon(shape)
    rings = [list(r) for r in _rings(shape)]
    rings[edge[0]].insert(edge[1] + 1, (float(at[0]), float(at[1])))
    radii = _radii_list(shape)
    if radii is not None and edge[0] == 0:
        radii.insert(edge[1] + 1, 0.0)
    return _with_rings(shape, rings, radii)


def with_vertex_removed(shape: Shape, ref: Ref) -> Shape:
    """The shape without vertex ``ref``; a polygon ring keeps at least 3, a path 2."""
    if isinstance(shape, (Circle, Ellipse)):
        raise EditError("circles and ellipses have no vertices to remove")
    if isinstance(shape, Rect):
        shape = as_polygon(shape)
    rings = [list(r) for r in _rings(shape)]
    minimum = 2 if isinstance(shape, Path) else 3
    if len(rings[ref[0]]) <= minimum:
        raise EditError(f"an outline needs at least {minimum} vertices")
    rings[ref[0]].pop(ref[1])
    radii = _radii_list(shape)
    if radii is not None and ref[0] == 0:
        radii.pop(ref[1])
    return _with_rings(shape, rings, radii)


def with_corner_radius(shape: Shape, ref: Ref, radius_mm: float) -> Shape:
    """The shape with the corner at vertex ``ref`` rounded to ``radius_mm`` (0: sharp)."""
    if radius_mm < 0 or not math.isfinite(radius_mm):
        raise EditError("a corner radius must be a finite number >= 0 mm")
    if isinstance(shape, (Circle, Ellipse, Path)):
        raise EditError("only rectangles and polygons have corners to round")
    if ref[0] != 0:
        raise EditError("hole corners cannot be rounded; round the outer outline")
    poly = as_polygon(shape)
    radii = _radii_list(poly) or [0.0] * len(poly.points)
    radii[ref[1]] = float(radius_mm)
    if isinstance(shape, Rect) and len(set(radii)) == 1:
        return replace(shape, corner_radius=radii[0])
    return replace(poly, corner_radius=radii[0] if len(set(radii)) == 1 else tuple(radii))


def corner_radius_at(shape: Shape, ref: Ref) -> float:
    """The corner radius (mm) at vertex ``ref`` (0 where there is none)."""
    if isinstance(shape, Rect):
        return shape.corner_radius
    if isinstance(shape, Polygon) and ref[0] == 0:
        cr = shape.corner_radius
        return cr[ref[1]] if isinstance(cr, tuple) else cr
    return 0.0


# --------------------------------------------------------------------------- internals


def _norm_angle(a: float) -> float:
    """Ellipse axis angle folded into (-90, 90] degrees (an ellipse has period 180)."""
    a = math.fmod(a, 180.0)
    if a <= -90:
        a += 180
    elif a > 90:
        a -= 180
    return 0.0 if a == 0 else a


def _rings(shape: Shape) -> list[tuple[Point, ...]]:
    if isinstance(shape, Rect):
        (x0, y0), (x1, y1) = shape.min, shape.max
        return [((x0, y0), (x1, y0), (x1, y1), (x0, y1))]
    if isinstance(shape, Polygon):
        return [shape.points, *shape.holes]
    if isinstance(shape, Path):
        return [shape.points]
    raise EditError("circles and ellipses have no vertex rings")


def _radii_list(shape: Shape) -> list[float] | None:
    if not isinstance(shape, Polygon):
        return None
    cr = shape.corner_radius
    return list(cr) if isinstance(cr, tuple) else None


def _with_rings(shape: Shape, rings: list[list[Point]], radii: list[float] | None) -> Shape:
    if isinstance(shape, Path):
        return replace(shape, points=tuple(rings[0]))
    assert isinstance(shape, Polygon)
    cr = tuple(radii) if radii is not None else shape.corner_radius
    return replace(shape, points=tuple(rings[0]), holes=tuple(tuple(r) for r in rings[1:]),
                   corner_radius=cr)


def _set_ring_point(shape: Shape, ref: Ref, to: Point) -> Shape:
    rings = [list(r) for r in _rings(shape)]
    rings[ref[0]][ref[1]] = (float(to[0]), float(to[1]))
    return _with_rings(shape, rings, _radii_list(shape))


def _rect_between(shape: Rect, a: Point, b: Point) -> Rect:
    return replace(shape, min=(min(a[0], b[0]), min(a[1], b[1])),
                   max=(max(a[0], b[0]), max(a[1], b[1])))
