"""Snapping a cursor point to other parts' vertices, their outlines, or the grid."""

from __future__ import annotations

import math
from collections.abc import Collection
from dataclasses import dataclass

from shapely.geometry import Point as ShPoint

from solver.layout import Point

from . import shape_edit as se
from .document import Document


@dataclass
class Snapper:
    """Snap settings and the snapping rule.

    Order of preference: a vertex of another part within the tolerance, then the
    nearest point on another part's outline within the tolerance, then the nearest
    grid node (spacing ``grid_mm``).  With ``enabled`` False points pass unchanged.
    """

    doc: Document
    grid_mm: float = 1.0
    enabled: bool = True

    def snap(self, pt: Point, tol_mm: float, exclude: Collection[int] = ()) -> tuple[Point, str]:
        """The snapped point and what it snapped to: 'vertex', 'outline', 'grid' or ''."""
        if not self.enabled:
            return pt, ""
        best: Point | None = None
        best_d = tol_mm
        for pid, part in self.doc.parts():
            if pid in exclude:
                continue
            for _, v in se.handles(part.shape):
                d = math.hypot(v[0] - pt[0], v[1] - pt[1])
                if d <= best_d:
                    best, best_d = v, d
        if best is not None:
            return best, "vertex"
        on_outline = self._outline_point(pt, tol_mm, exclude)
        if on_outline is not None:
            return on_outline, "outline"
        g = self.grid_mm
        return (round(pt[0] / g) * g, round(pt[1] / g) * g), "grid"

    def _outline_point(self, pt: Point, tol_mm: float, exclude: Collection[int]) -> Point | None:
        p = ShPoint(pt)
        best, best_d = None, tol_mm
        for pid, part in self.doc.parts():
            reg = se.region(part.shape)
            if pid in exclude or reg is None:
                continue
            for ring in (reg.exterior, *reg.interiors):
                d = ring.distance(p)
                if d <= best_d:
                    q = ring.interpolate(ring.project(p))
                    best, best_d = (q.x, q.y), d
        return best
