"""The colour scales of the field maps, drawn in a corner of the canvas.

A small translucent panel pinned to the bottom-right corner of the canvas viewport,
above the rulers.  It shows one bar per colour map that is switched on, in the colours
the canvas shows (the map's colours blended over the canvas background with the map's
opacity), with its ends and a few round values in its unit: potential in kV, field
strength in kV/mm.  It ignores the mouse, so the canvas under it stays usable.
"""

from __future__ import annotations

import math

import numpy as np
from PySide6.QtCore import QEvent, QObject, QPointF, QRectF, Qt
from PySide6.QtGui import QColor, QFont, QFontMetricsF, QImage, QPainter, QPen
from PySide6.QtWidgets import QWidget

from .colour_maps import colour_table
from .palette import CANVAS, LABEL_TEXT

BAR_W, BAR_H = 190, 10
MARGIN = 10
RULER_PX = 30
"""Room left for the canvas's bottom ruler, px."""


def seen_colours(name: str, fade_low: bool, n: int = 256) -> np.ndarray:
    """(n, 3) uint8 colours of a map as the canvas shows them: the colour table over
    the canvas background, with the map's opacity (``fade_low``: 30 + 200 t of 255)."""
    lut = colour_table(n, name).astype(float)
    t = np.linspace(0.0, 1.0, n)
    alpha = (30 + 200 * t if fade_low else lut[:, 3]) / 255.0
    bg = np.array([CANVAS.red(), CANVAS.green(), CANVAS.blue()], float)
    rgb = lut[:, :3] * alpha[:, None] + bg * (1 - alpha[:, None])
    return rgb.round().astype(np.uint8)


def nice_ticks(lo: float, hi: float, most: int = 5) -> list[float]:
    """Round values (1, 2, 2.5 or 5 times a power of ten) inside [lo, hi]."""
    span = hi - lo
    if not span > 0:
        return [lo]
    raw = span / max(most - 1, 1)
    mag = 10 ** math.floor(math.log10(raw))
    step = next(m * mag for m in (1, 2, 2.5, 5, 10) if m * mag >= raw)
    k0, k1 = math.ceil(lo / step - 1e-9), math.floor(hi / step + 1e-9)
    return [k * step for k in range(k0, k1 + 1)]


class ColourScale(QWidget):
    """Bars for the maps shown; :meth:`set_scales` gives each (title, lo, hi, colours)."""

    def __init__(self, viewport: QWidget) -> None:
        super().__init__(viewport)
        self.setAttribute(Qt.WidgetAttribute.WA_TransparentForMouseEvents)
        self.font = QFont()
        self.font.setPointSizeF(8.0)
        self.fm = QFontMetricsF(self.font)
        self.scales: list[tuple[str, float, float, QImage, str]] = []
        viewport.installEventFilter(self)
        self.hide()

    def set_scales(self, scales: list[tuple[str, float, float, np.ndarray, str]]) -> None:
        """``(title, lo, hi, colours (n, 3) uint8, top_note)`` per bar; empty hides it.

        ``top_note`` is written after the top value (e.g. ``"and above"``)."""
        self.scales = []
        for title, lo, hi, rgb, note in scales:
            strip = np.ascontiguousarray(np.repeat(rgb[None, :, :], 2, axis=0))
            img = QImage(strip.data, strip.shape[1], 2, 3 * strip.shape[1],
                         QImage.Format.Format_RGB888).copy()
            self.scales.append((title, lo, hi, img, note))
        line = self.fm.height()
        wide = max([BAR_W + 14] + [self.fm.horizontalAdvance(t) + 4 for t, *_ in self.scales])
        self.resize(int(wide) + 2 * MARGIN, int(len(self.scales) * (2 * line + BAR_H + 8) + 8))
        self._place()
        self.setVisible(bool(self.scales))
        self.update()

    def eventFilter(self, obj: QObject, event: QEvent) -> bool:
        if event.type() == QEvent.Type.Resize:
            self._place()
        return False

    def _place(self) -> None:
        vp = self.parentWidget()
        self.move(vp.width() - self.width() - 8, vp.height() - self.height() - RULER_PX)

    def paintEvent(self, event) -> None:  # noqa: ANN001
        p = QPainter(self)
        p.setRenderHint(QPainter.RenderHint.Antialiasing)
        p.setPen(QPen(QColor("#c8c3b8"), 1.0))
        p.setBrush(QColor(251, 250, 247, 225))
        p.drawRoundedRect(QRectF(self.rect()).adjusted(0.5, 0.5, -0.5, -0.5), 5, 5)
        p.setFont(self.font)
        line = self.fm.height()
        y = 6.0
        for title, lo, hi, img, note in self.scales:
            p.setPen(LABEL_TEXT)
            p.drawText(QPointF(MARGIN, y + self.fm.ascent()), title)
            y += line + 2
            bar = QRectF(MARGIN + 7, y, BAR_W, BAR_H)
            p.drawImage(bar, img)
            p.setPen(QPen(QColor("#8c877c"), 0.8))
            p.setBrush(Qt.BrushStyle.NoBrush)
            p.drawRect(bar)
            self._ticks(p, bar, lo, hi, note)
            y += BAR_H + line + 6
        p.end()

    def _ticks(self, p: QPainter, bar: QRectF, lo: float, hi: float, note: str) -> None:
        """Round values along the bar, and both ends (3 significant digits) when a
        round value does not already sit there."""
        span = hi - lo if hi > lo else 1.0
        ticks = [v for v in nice_ticks(lo, hi) if abs(v - hi) > 0.12 * span
                 and abs(v - lo) > 0.12 * span]
        ticks = [lo, *ticks, hi]
        last_right = -1e9
        for k, v in enumerate(ticks):
            x = bar.left() + (v - lo) / span * bar.width()
            p.setPen(QPen(QColor("#5b574f"), 0.8))
            p.drawLine(QPointF(x, bar.bottom()), QPointF(x, bar.bottom() + 3))
            text = f"{v:.3g}" + (f" {note}" if note and k == len(ticks) - 1 else "")
            w = self.fm.horizontalAdvance(text)
            left = min(max(x - w / 2, 2.0), self.width() - w - 2)
            if left > last_right + 4:
                p.setPen(LABEL_TEXT)
                p.drawText(QPointF(left, bar.bottom() + 3 + self.fm.ascent()), text)
                last_right = left + w
