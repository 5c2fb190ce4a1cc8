"""Finding parts, vertices and edges near a point: Qt-free, all in millimetres."""

from __future__ import annotations

import math

import shapely
from shapely.geometry import Point as ShPoint
from shapely.geometry import box

from solver.layout import Point, Shape

from . import shape_edit as se
from .document import Document


def part_at(doc: Document, pt: Point, tol_mm: float) -> int | None:
    """The topmost part whose region contains ``pt`` or whose outline is within ``tol_mm``."""
    p = ShPoint(pt)
    for pid in reversed(doc.ids()):
        reg = se.region(doc.part(pid).shape)
        if reg is not None and (reg.contains(p) or reg.exterior.distance(p) <= tol_mm
                                or any(h.distance(p) <= tol_mm for h in reg.interiors)):
            return pid
        if reg is None and _near_vertices(doc.part(pid).shape, pt, tol_mm):
            return pid
    return None


def parts_in_box(doc: Document, a: Point, b: Point) -> list[int]:
    """Parts whose region meets the box with corners ``a`` and ``b`` (mm), in layout order."""
    rect = box(min(a[0], b[0]), min(a[1], b[1]), max(a[0], b[0]), max(a[1], b[1]))
    out = []
    for pid, part in doc.parts():
        reg = se.region(part.shape)
        if reg is not None and shapely.intersects(reg, rect):
            out.append(pid)
    return out


def vertex_at(shape: Shape, pt: Point, tol_mm: float) -> se.Ref | None:
    """The vertex or handle of ``shape`` nearest ``pt`` within ``tol_mm``, or None."""
    best, best_d = None, tol_mm
    for ref, v in se.handles(shape):
        d = math.hypot(v[0] - pt[0], v[1] - pt[1])
        if d <= best_d:
            best, best_d = ref, d
    return best


def edge_at(shape: Shape, pt: Point, tol_mm: float) -> tuple[se.Ref, Point] | None:
    """The straight edge nearest ``pt`` within ``tol_mm`` and the nearest point on it."""
    best, best_d = None, tol_mm
    for ref, a, b in se.edges(shape):
        q = nearest_on_segment(pt, a, b)
        d = math.hypot(q[0] - pt[0], q[1] - pt[1])
        if d <= best_d:
            best, best_d = (ref, q), d
    return best


def nearest_on_segment(p: Point, a: Point, b: Point) -> Point:
    """The point of segment ab closest to p: :math:`a + t(b-a)`, :math:`t` clipped to [0, 1]."""
    dx, dy = b[0] - a[0], b[1] - a[1]
    ll = dx * dx + dy * dy
    t = 0.0 if ll == 0 else max(0.0, min(1.0, ((p[0] - a[0]) * dx + (p[1] - a[1]) * dy) / ll))
    return (a[0] + t * dx, a[1] + t * dy)


def _near_vertices(shape: Shape, pt: Point, tol_mm: float) -> bool:
    return vertex_at(shape, pt, tol_mm) is not None
