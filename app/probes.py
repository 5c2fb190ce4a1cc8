"""Probes of a solved field: values along the line probe, and its mark on the canvas.

:func:`line_profile` samples a :class:`solver.solution.Solution` along a segment with
:func:`solver.sample` (linear interpolation of the grid values), so the profile shows
exactly what the cursor readout shows at the same points.  :class:`ProbeLineItem`
draws the finished probe segment above the field overlays, with its ends marked A and B.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from PySide6.QtCore import QPointF, QRectF, Qt
from PySide6.QtGui import QColor, QFont, QPainter, QPen
from PySide6.QtWidgets import QGraphicsItem, QStyleOptionGraphicsItem, QWidget

import solver
from solver.solution import Solution

from .tools.probe import Segment

PROBE_SAMPLES = 401
PROBE_COLOUR = QColor("#0f6f8a")
_HUGE = QRectF(-1.0e7, -1.0e7, 2.0e7, 2.0e7)


@dataclass(frozen=True)
class LineProfile:
    """Potential and field along a segment from A to B.

    ``s_mm`` distance from A (mm); ``xy_mm`` the sample points (N, 2); ``phi_V`` the
    potential (V); ``E_kV_per_mm`` the field magnitude :math:`|E| = \\sqrt{E_x^2 + E_y^2}`
    (kV/mm); NaN outside the grid.  ``inside`` is True in every grid cell with a corner
    inside a conductor: inside, the field is zero and the potential the conductor's; in
    the cell at a surface the interpolation blends the two, so |E| there falls short of
    the surface field (which the surface profile of the part gives exactly).
    """

    segment: Segment
    s_mm: np.ndarray
    xy_mm: np.ndarray
    phi_V: np.ndarray
    E_kV_per_mm: np.ndarray
    inside: np.ndarray


def line_profile(solution: Solution, segment: Segment, n: int = PROBE_SAMPLES
                 ) -> LineProfile:
    """Sample ``solution`` at ``n`` equally spaced points from A to B (ends included)."""
    (x0, y0), (x1, y1) = segment
    t = np.linspace(0.0, 1.0, max(n, 2))
    xy = np.column_stack([x0 + t * (x1 - x0), y0 + t * (y1 - y0)])
    phi, e = solver.sample(solution, xy)
    gx, gy, cond = solution.x_mm, solution.y_mm, solution.conductor >= 0
    ix = np.clip(np.searchsorted(gx, xy[:, 0]) - 1, 0, len(gx) - 2)
    iy = np.clip(np.searchsorted(gy, xy[:, 1]) - 1, 0, len(gy) - 2)
    inside = cond[iy, ix] | cond[iy, ix + 1] | cond[iy + 1, ix] | cond[iy + 1, ix + 1]
    return LineProfile(segment, t * np.hypot(x1 - x0, y1 - y0), xy, phi,
                       np.hypot(e[:, 0], e[:, 1]), inside)


class ProbeLineItem(QGraphicsItem):
    """The probe segment on the canvas: a dashed line in screen pixels, ends A and B."""

    def __init__(self) -> None:
        super().__init__()
        self.segment: Segment | None = None
        self.setAcceptedMouseButtons(Qt.MouseButton.NoButton)
        self.font = QFont()
        self.font.setPointSizeF(8.5)
        self.font.setBold(True)

    def set_segment(self, segment: Segment | None) -> None:
        self.segment = segment
        self.setVisible(segment is not None)
        self.update()

    def boundingRect(self) -> QRectF:
        return _HUGE

    def paint(self, painter: QPainter, option: QStyleOptionGraphicsItem,
              widget: QWidget | None = None) -> None:
        if self.segment is None:
            return
        t = painter.worldTransform()
        a, b = (t.map(QPointF(*p)) for p in self.segment)
        painter.save()
        painter.resetTransform()
        painter.setRenderHint(QPainter.RenderHint.Antialiasing)
        painter.setPen(QPen(QColor(255, 255, 255, 200), 4.0))
        painter.drawLine(a, b)
        painter.setPen(QPen(PROBE_COLOUR, 1.8, Qt.PenStyle.DashLine))
        painter.drawLine(a, b)
        painter.setFont(self.font)
        d = b - a
        norm = max((d.x() ** 2 + d.y() ** 2) ** 0.5, 1e-9)
        u = QPointF(d.x() / norm, d.y() / norm)
        for p, name, sign in ((a, "A", -1.0), (b, "B", 1.0)):
            painter.setPen(QPen(PROBE_COLOUR, 1.5))
            painter.setBrush(QColor("#ffffff"))
            painter.drawEllipse(p, 3.5, 3.5)
            c = p + u * (sign * 12.0)
            painter.drawText(QRectF(c.x() - 8, c.y() - 8, 16, 16),
                             Qt.AlignmentFlag.AlignCenter, name)
        painter.restore()
