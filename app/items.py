"""Scene items for parts: the outline and fill of one part, and its name label.

Scene coordinates are millimetres with y up (the view flips the y axis), so text is
drawn with ``ItemIgnoresTransformations`` to stay upright and of constant size.
Pens are cosmetic: outlines are as thin on screen at every zoom.
"""

from __future__ import annotations

from collections.abc import Sequence

from PySide6.QtCore import QPointF, QRectF, Qt
from PySide6.QtGui import QBrush, QColor, QFont, QPainter, QPainterPath, QPen, QTransform
from PySide6.QtWidgets import (
    QGraphicsItem,
    QGraphicsPathItem,
    QGraphicsRectItem,
    QStyleOptionGraphicsItem,
    QWidget,
)

from solver.layout import Boundary, Part

from . import palette
from . import shape_edit as se
from .units import format_volts, part_value_text


def shape_path(part: Part) -> tuple[QPainterPath, bool]:
    """The part's region as a painter path (holes cut out); False when it is not valid.

    An invalid shape (a corner radius too large, a ring crossing itself) is drawn
    through its vertices so the user can still see and fix it.
    """
    path = QPainterPath()
    path.setFillRule(Qt.FillRule.OddEvenFill)
    reg = se.region(part.shape)
    if reg is not None and reg.is_valid:
        for ring in (reg.exterior, *reg.interiors):
            _add_ring(path, list(ring.coords), closed=True)
        return path, True
    pts = [p for _, p in se.vertices(part.shape)]
    if pts:
        _add_ring(path, pts, closed=part.shape.type != "path")
    return path, False


def _add_ring(path: QPainterPath, pts: Sequence[Sequence[float]], closed: bool) -> None:
    path.moveTo(QPointF(*pts[0]))
    for x, y in pts[1:]:
        path.lineTo(QPointF(x, y))
    if closed:
        path.closeSubpath()


class PartLabelItem(QGraphicsItem):
    """A part's name and value, upright and of constant screen size, with a soft halo."""

    def __init__(self, parent: QGraphicsItem | None) -> None:
        super().__init__(parent)
        self.setFlag(QGraphicsItem.GraphicsItemFlag.ItemIgnoresTransformations)
        self.setAcceptedMouseButtons(Qt.MouseButton.NoButton)
        self.lines: list[str] = []
        self.font = QFont()
        self.font.setPointSizeF(8.5)
        self._rect = QRectF()

    def set_text(self, lines: list[str]) -> None:
        self.prepareGeometryChange()
        self.lines = lines
        from PySide6.QtGui import QFontMetricsF
        fm = QFontMetricsF(self.font)
        w = max((fm.horizontalAdvance(t) for t in lines), default=0.0)
        h = fm.height() * len(lines)
        self._rect = QRectF(-w / 2 - 3, -h / 2 - 1, w + 6, h + 2)
        self.update()

    def boundingRect(self) -> QRectF:
        return self._rect

    def paint(self, painter: QPainter, option: QStyleOptionGraphicsItem,
              widget: QWidget | None = None) -> None:
        painter.setPen(Qt.PenStyle.NoPen)
        painter.setBrush(palette.LABEL_HALO)
        painter.drawRoundedRect(self._rect, 3, 3)
        painter.setFont(self.font)
        painter.setPen(palette.LABEL_TEXT)
        painter.drawText(self._rect, Qt.AlignmentFlag.AlignCenter, "\n".join(self.lines))


class PartItem(QGraphicsPathItem):
    """One part on the canvas: outline and fill in the colours of its kind, and a label."""

    def __init__(self, pid: int, px_per_mm: float = 1.0) -> None:
        super().__init__()
        self.pid = pid
        self.part: Part | None = None
        self.valid = True
        self.highlighted = False
        self.problem = False
        self.hover = False
        self.label = PartLabelItem(None)  # a scene item of its own, on the names layer
        self._inside = QPointF()
        self._px_per_mm = px_per_mm
        # parts that do not change during a drag are blitted, not re-rasterised
        self.setCacheMode(QGraphicsItem.CacheMode.DeviceCoordinateCache)
        self.setAcceptedMouseButtons(Qt.MouseButton.NoButton)

    def set_part(self, part: Part, max_abs_volts: float) -> None:
        """Show ``part``; ``max_abs_volts`` scales the electrode fill hint."""
        self.part = part
        path, self.valid = shape_path(part)
        self.setPath(path)
        self._style(max_abs_volts)
        self.label.set_text([part.name, part_value_text(part.kind, part.volts, part.charge,
                                                        part.permittivity)])
        reg = se.region(part.shape)
        at = reg.representative_point() if reg is not None and reg.is_valid else None
        self._inside = QPointF(at.x, at.y) if at is not None else path.boundingRect().center()
        self.place_label(self._px_per_mm)

    def place_label(self, px_per_mm: float) -> None:
        """Put the label inside the part, or beside it when the part is too small on screen."""
        self._px_per_mm = px_per_mm
        box = self.path().boundingRect()
        lab = self.label.boundingRect()
        if box.width() * px_per_mm >= lab.width() + 6 and box.height() * px_per_mm >= \
                lab.height() + 4:
            self.label.setPos(self._inside)
        else:
            gap = (lab.width() / 2 + 6) / px_per_mm
            self.label.setPos(QPointF(box.right() + gap, box.center().y()))

    def set_highlighted(self, on: bool, max_abs_volts: float) -> None:
        self.highlighted = on
        self._style(max_abs_volts)

    def set_hover(self, on: bool, max_abs_volts: float) -> None:
        """Show that a click here would pick this part."""
        if on != self.hover:
            self.hover = on
            self._style(max_abs_volts)

    def set_problem(self, on: bool, max_abs_volts: float) -> None:
        """Mark the part as named in the layout's current problem."""
        if on != self.problem:
            self.problem = on
            self._style(max_abs_volts)

    def _style(self, max_abs_volts: float) -> None:
        assert self.part is not None
        line, fill = palette.part_colours(self.part.kind, self.part.volts, max_abs_volts)
        if self.highlighted:
            pen = QPen(palette.SELECTION, 2.2)
        elif self.hover:
            pen = QPen(palette.mix(line, palette.SELECTION, 0.6), 2.0)
        else:
            pen = QPen(line, 1.3)
        pen.setCosmetic(True)
        pen.setJoinStyle(Qt.PenJoinStyle.RoundJoin)
        if not self.valid or self.problem:
            pen = QPen(palette.INVALID, 2.0 if self.problem else 1.6, Qt.PenStyle.DashLine)
            pen.setCosmetic(True)
            if not self.valid:
                fill = QColor(fill.red(), fill.green(), fill.blue(), 70)
        self.setPen(pen)
        self.setBrush(QBrush(fill))


class BoundaryItem(QGraphicsRectItem):
    """The outer box of a layout with a box boundary (hidden for an open boundary).

    A grounded (fixed-potential) box is drawn as a conductor outline, insulating walls
    as a grey dash-dot line; a label in the top-left corner says which.
    """

    def __init__(self) -> None:
        super().__init__()
        self.setZValue(-1.0)
        self.setAcceptedMouseButtons(Qt.MouseButton.NoButton)
        self.setBrush(Qt.BrushStyle.NoBrush)
        self.label = PartLabelItem(self)

    def set_boundary(self, b: Boundary) -> None:
        if b.type != "box" or b.min is None or b.max is None:
            self.hide()
            return
        self.setRect(QRectF(QPointF(*b.min), QPointF(*b.max)).normalized())
        fixed = b.volts is not None
        pen = QPen(palette.ELECTRODE_LINE if fixed else palette.AXIS_OF_SYMMETRY, 1.6,
                   Qt.PenStyle.DashLine if fixed else Qt.PenStyle.DashDotLine)
        pen.setCosmetic(True)
        self.setPen(pen)
        text = (f"Boundary box at {format_volts(b.volts)}" if b.volts is not None
                else "Boundary box: insulating walls")
        self.label.set_text([text])
        lab = self.label.boundingRect()
        self.label.setPos(QPointF(b.min[0], b.max[1]))
        self.label.setTransform(QTransform.fromTranslate(lab.width() / 2 + 4,
                                                         lab.height() / 2 + 4))
        self.show()
