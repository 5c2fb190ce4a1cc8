"""The canvas background and rulers: grid spacing, grid lines, axes, mm scales.

The grid spacing is chosen from the 1-2-5 series so that minor lines lie at least
``MIN_MINOR_PX`` screen pixels apart; every fifth (or second, for a 2 step) line is a
major line and carries a ruler label.
"""

from __future__ import annotations

import math

from PySide6.QtCore import QLineF, QPointF, QRectF, Qt
from PySide6.QtGui import QFont, QPainter, QPen, QTransform

from . import palette

MIN_MINOR_PX = 9.0
RULER_PX = 22


def grid_steps(px_per_mm: float) -> tuple[float, float]:
    """(minor, major) grid spacing in mm for a zoom of ``px_per_mm`` pixels per mm."""
    want = MIN_MINOR_PX / max(px_per_mm, 1e-12)
    exp = math.floor(math.log10(want))
    for m in (1.0, 2.0, 5.0, 10.0):
        step = m * 10.0 ** exp
        if step >= want * (1 - 1e-9):
            break
    lead = round(step / 10.0 ** math.floor(math.log10(step)))
    return step, step * (2 if lead == 5 else 5)


def draw_grid(painter: QPainter, rect: QRectF, px_per_mm: float, axisymmetric: bool) -> None:
    """Fill ``rect`` (scene mm) with the canvas colour, grid lines and the axes."""
    painter.setRenderHint(QPainter.RenderHint.Antialiasing, False)  # crisp and fast
    painter.fillRect(rect, palette.CANVAS)
    minor, major = grid_steps(px_per_mm)
    for step, colour in ((minor, palette.GRID_MINOR), (major, palette.GRID_MAJOR)):
        pen = QPen(colour, 1.0)
        pen.setCosmetic(True)
        painter.setPen(pen)
        painter.drawLines(_lines(rect, step))
    if axisymmetric:
        painter.fillRect(QRectF(rect.left(), rect.top(), min(0.0, rect.right()) - rect.left(),
                                rect.height()), palette.FORBIDDEN_SIDE)
    pen = QPen(palette.AXIS, 1.0)
    pen.setCosmetic(True)
    painter.setPen(pen)
    painter.drawLine(QLineF(rect.left(), 0.0, rect.right(), 0.0))
    if axisymmetric:
        pen = QPen(palette.AXIS_OF_SYMMETRY, 1.6, Qt.PenStyle.DashDotLine)
        pen.setCosmetic(True)
        painter.setPen(pen)
    painter.drawLine(QLineF(0.0, rect.top(), 0.0, rect.bottom()))


def _lines(rect: QRectF, step: float) -> list[QLineF]:
    x0, x1 = math.ceil(rect.left() / step), math.floor(rect.right() / step)
    y0, y1 = math.ceil(rect.top() / step), math.floor(rect.bottom() / step)
    if (x1 - x0) + (y1 - y0) > 4000:
        return []
    out = [QLineF(i * step, rect.top(), i * step, rect.bottom()) for i in range(x0, x1 + 1)]
    out += [QLineF(rect.left(), j * step, rect.right(), j * step) for j in range(y0, y1 + 1)]
    return out


def draw_rulers(painter: QPainter, to_view: QTransform, width: int, height: int,
                px_per_mm: float, names: tuple[str, str]) -> None:
    """Rulers along the bottom and left edges of the viewport (pixel coordinates).

    ``to_view`` maps scene mm to viewport pixels; ``names`` are the axis names, e.g.
    ("x", "y") or ("r", "z"); the unit (mm) is printed with them.
    """
    minor, major = grid_steps(px_per_mm)
    inv, _ = to_view.inverted()
    lo, hi = inv.map(QPointF(0, height)), inv.map(QPointF(width, 0))
    font = QFont()
    font.setPointSizeF(7.5)
    painter.setFont(font)
    painter.setRenderHint(QPainter.RenderHint.Antialiasing, False)
    painter.fillRect(QRectF(0, height - RULER_PX, width, RULER_PX), palette.RULER_BG)
    painter.fillRect(QRectF(0, 0, RULER_PX + 24, height - RULER_PX), palette.RULER_BG)
    painter.setPen(QPen(palette.RULER_LINE, 1.0))
    painter.drawLine(0, height - RULER_PX, width, height - RULER_PX)
    painter.drawLine(RULER_PX + 24, 0, RULER_PX + 24, height - RULER_PX)
    _ruler_ticks(painter, to_view, (lo.x(), hi.x()), minor, major, True, height)
    _ruler_ticks(painter, to_view, (lo.y(), hi.y()), minor, major, False, height)
    painter.setPen(palette.RULER_TEXT)
    bold = QFont(font)
    bold.setBold(True)
    painter.setFont(bold)
    for box, text in ((QRectF(width - 52, height - RULER_PX + 1, 52, RULER_PX - 1),
                       f"{names[0]} (mm)"), (QRectF(0, 0, RULER_PX + 24, 16), f"{names[1]} (mm)")):
        painter.fillRect(box, palette.RULER_BG)
        painter.drawText(box, Qt.AlignmentFlag.AlignCenter, text)


def _ruler_ticks(painter: QPainter, to_view: QTransform, span: tuple[float, float],
                 minor: float, major: float, horizontal: bool, height: int) -> None:
    i0, i1 = math.ceil(span[0] / minor), math.floor(span[1] / minor)
    if i1 - i0 > 3000:
        return
    ratio = round(major / minor)
    for i in range(i0, i1 + 1):
        v = i * minor
        is_major = i % ratio == 0
        tick = 7 if is_major else 3
        painter.setPen(QPen(palette.RULER_TEXT if is_major else palette.RULER_LINE, 1.0))
        if horizontal:
            x = to_view.map(QPointF(v, 0)).x()
            if x < RULER_PX + 24:
                continue
            painter.drawLine(int(x), height - RULER_PX, int(x), height - RULER_PX + tick)
            if is_major:
                painter.drawText(QRectF(x - 40, height - RULER_PX + 7, 80, 14),
                                 Qt.AlignmentFlag.AlignHCenter, _num(v, major))
        else:
            y = to_view.map(QPointF(0, v)).y()
            if y > height - RULER_PX or y < 18:
                continue
            painter.drawLine(RULER_PX + 24 - tick, int(y), RULER_PX + 24, int(y))
            if is_major:
                painter.drawText(QRectF(0, y - 7, RULER_PX + 14, 14),
                                 Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter,
                                 _num(v, major))


def _num(v: float, step: float) -> str:
    digits = max(0, -math.floor(math.log10(step) + 1e-9))
    return f"{v:.{digits}f}" if abs(v) > step * 1e-6 else "0"
