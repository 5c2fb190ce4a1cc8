"""The scene item that draws a tool's preview: shapes in progress, rubber bands, handles.

It paints in viewport pixels (mapping the mm points through the painter's transform),
so handles keep their size and lines stay crisp at every zoom.
"""

from __future__ import annotations

from PySide6.QtCore import QPointF, QRectF, Qt
from PySide6.QtGui import QPainter, QPen, QPolygonF, QTransform
from PySide6.QtWidgets import QGraphicsItem, QStyleOptionGraphicsItem, QWidget

from solver.layout import Part

from . import palette
from .items import shape_path
from .tools.base import Preview

HANDLE_PX = 7.0
_HUGE = QRectF(-1.0e7, -1.0e7, 2.0e7, 2.0e7)


class PreviewItem(QGraphicsItem):
    """Draws the current tool's :class:`Preview` above everything else."""

    def __init__(self) -> None:
        super().__init__()
        self.preview: Preview | None = None
        self.snap: tuple[tuple[float, float], str] | None = None
        self.problem_at: tuple[float, float] | None = None
        self.setAcceptedMouseButtons(Qt.MouseButton.NoButton)

    def set_snap(self, snap: tuple[tuple[float, float], str] | None) -> None:
        """Mark the point the cursor snaps to: a diamond on a vertex, a ring on an outline."""
        shown = snap if snap is not None and snap[1] != "grid" else None
        if shown != self.snap:
            self.snap = shown
            self.update()

    def set_preview(self, preview: Preview | None) -> None:
        self.preview = preview
        self.update()

    def boundingRect(self) -> QRectF:
        return _HUGE

    def paint(self, painter: QPainter, option: QStyleOptionGraphicsItem,
              widget: QWidget | None = None) -> None:
        t = painter.worldTransform()
        if self.snap is not None:
            self._snap_marker(painter, t)
        if self.problem_at is not None:
            self._problem_marker(painter, t)
        p = self.preview
        if p is None:
            return
        if p.shape is not None:
            path, _ = shape_path(Part("preview", "electrode", p.shape, volts=0.0))
            pen = QPen(palette.PREVIEW, 1.5, Qt.PenStyle.DashLine)
            pen.setCosmetic(True)
            painter.setPen(pen)
            painter.setBrush(palette.PREVIEW_FILL)
            painter.drawPath(path)
        painter.save()
        painter.resetTransform()
        painter.setRenderHint(QPainter.RenderHint.Antialiasing)
        if p.points:
            self._points(painter, t, p)
        if p.box is not None:
            self._box(painter, t, p)
        if p.handles:
            self._handles(painter, t, p)
        painter.restore()

    def _snap_marker(self, painter: QPainter, t: QTransform) -> None:
        assert self.snap is not None
        c = t.map(QPointF(*self.snap[0]))
        painter.save()
        painter.resetTransform()
        painter.setRenderHint(QPainter.RenderHint.Antialiasing)
        painter.setPen(QPen(palette.SNAP, 1.6))
        painter.setBrush(Qt.BrushStyle.NoBrush)
        if self.snap[1] == "vertex":
            painter.drawPolygon(QPolygonF([c + QPointF(0, -6), c + QPointF(6, 0),
                                           c + QPointF(0, 6), c + QPointF(-6, 0)]))
        else:
            painter.drawEllipse(c, 5.0, 5.0)
        painter.restore()

    def set_problem_at(self, at: tuple[float, float] | None) -> None:
        """Mark the point (mm) a layout problem refers to (None: no mark)."""
        if at != self.problem_at:
            self.problem_at = at
            self.update()

    def _problem_marker(self, painter: QPainter, t: QTransform) -> None:
        assert self.problem_at is not None
        c = t.map(QPointF(*self.problem_at))
        painter.save()
        painter.resetTransform()
        painter.setRenderHint(QPainter.RenderHint.Antialiasing)
        painter.setPen(QPen(palette.INVALID, 2.2))
        painter.setBrush(palette.LABEL_HALO)
        painter.drawEllipse(c, 11.0, 11.0)
        painter.drawLine(c + QPointF(0, -6), c + QPointF(0, 2))
        painter.drawPoint(c + QPointF(0, 6))
        painter.restore()

    @staticmethod
    def _points(painter: QPainter, t: QTransform, p: Preview) -> None:
        poly = QPolygonF([t.map(QPointF(*q)) for q in p.points])
        painter.setPen(QPen(palette.PREVIEW, 1.5, Qt.PenStyle.DashLine))
        painter.setBrush(palette.PREVIEW_FILL if p.closed else Qt.BrushStyle.NoBrush)
        (painter.drawPolygon if p.closed else painter.drawPolyline)(poly)
        painter.setPen(QPen(palette.PREVIEW, 1.2))
        painter.setBrush(palette.HANDLE_FILL)
        for q in list(poly)[:-1] or list(poly):
            painter.drawEllipse(q, 3.0, 3.0)

    @staticmethod
    def _box(painter: QPainter, t: QTransform, p: Preview) -> None:
        assert p.box is not None
        a, b = t.map(QPointF(*p.box[0])), t.map(QPointF(*p.box[1]))
        painter.setPen(QPen(palette.SELECTION, 1.0, Qt.PenStyle.DashLine))
        painter.setBrush(palette.PREVIEW_FILL)
        painter.drawRect(QRectF(a, b).normalized())

    @staticmethod
    def _handles(painter: QPainter, t: QTransform, p: Preview) -> None:
        h = HANDLE_PX
        for ref, q in p.handles:
            c = t.map(QPointF(*q))
            active = ref == p.active
            painter.setPen(QPen(palette.SELECTION, 1.4))
            painter.setBrush(palette.SELECTION if active else palette.HANDLE_FILL)
            s = h + 2 if active else h
            painter.drawRect(QRectF(c.x() - s / 2, c.y() - s / 2, s, s))
