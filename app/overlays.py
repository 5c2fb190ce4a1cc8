"""Field overlays on the canvas: potential colour map, equipotentials, field lines, hot
spots and the discharge-inception path.

Built on the GUI thread from a :class:`app.solve_runner.LiveResult` (plain arrays made
by the worker).  The colour map goes on the canvas's ``underlay`` layer, below the
parts; lines and markers on its ``overlay`` layer.  Lines use cosmetic pens (width in
screen pixels at any zoom); text and markers ignore the view transform, so they stay
upright in the y-up view and keep their size.

Colour maps: see :mod:`app.colour_maps` (their RGBA arrays are made on the worker).
"""

from __future__ import annotations

import math
from collections.abc import Callable

import numpy as np
from PySide6.QtCore import QPointF, QRectF, Qt
from PySide6.QtGui import (
    QBrush,
    QColor,
    QFont,
    QFontMetricsF,
    QImage,
    QPainter,
    QPainterPath,
    QPen,
    QPixmap,
    QTransform,
)
from PySide6.QtWidgets import (
    QGraphicsEllipseItem,
    QGraphicsItem,
    QGraphicsItemGroup,
    QGraphicsPathItem,
    QGraphicsPixmapItem,
    QGraphicsSimpleTextItem,
    QGraphicsView,
    QStyleOptionGraphicsItem,
    QWidget,
)

from .inception_view import path_label
from .palette import HOT_SPOT
from .solve_runner import LiveResult, thin

OVERLAY_NAMES = ("potential_map", "field_map", "equipotentials", "field_lines", "hot_spots",
                 "inception_path")
UNDERLAYS = ("potential_map", "field_map")
DEFAULT_OFF = ("field_map",)
OVERLAY_LABELS = {"potential_map": "Potential colour map",
                  "field_map": "Field-strength map (darkest at the limit)",
                  "equipotentials": "Equipotential lines",
                  "field_lines": "Field lines",
                  "hot_spots": "Hot spots",
                  "inception_path": "Discharge inception path (streamer estimate)"}
OVERLAY_SHORT = {"potential_map": "Potential map", "field_map": "Field map",
                 "equipotentials": "Equipotentials", "field_lines": "Field lines",
                 "hot_spots": "Hot spots", "inception_path": "Inception path"}
"""Tool-bar texts of the overlay switches."""
EQUIPOTENTIAL = QColor("#2d3a4a")
FIELD_LINE = QColor(150, 70, 40, 170)
LABEL_BG = QColor(251, 250, 247, 220)
INCEPTION_LABEL_AT = (0.5, 0.35, 0.65, 0.2, 0.8, 0.1, 0.9)
"""Fractions along the inception path where its label may go, best first."""
INCEPTION = QColor("#7b2d8e")
"""The inception path: a dotted violet line, apart in hue from every other overlay."""


def rgba_image(rgba: np.ndarray) -> QImage:
    """A QImage (own copy) of a (ny, nx, 4) uint8 array; row 0 is the lowest y, which
    the y-up view shows the right way round."""
    h, w = rgba.shape[:2]
    return QImage(rgba.data, w, h, 4 * w, QImage.Format.Format_RGBA8888).copy()


def _path(lines: list[np.ndarray]) -> QPainterPath:
    path = QPainterPath()
    for ln in lines:
        if len(ln) < 2:
            continue
        path.moveTo(QPointF(*ln[0]))
        for x, y in ln[1:]:
            path.lineTo(QPointF(x, y))
    return path


def _pen(colour: QColor, width: float, style: Qt.PenStyle = Qt.PenStyle.SolidLine) -> QPen:
    pen = QPen(colour, width, style)
    pen.setCosmetic(True)
    return pen


def format_kV(volts: float) -> str:
    """'12.5 kV' style text for a potential in volts."""
    kv = volts / 1000.0
    return f"{kv:.3g} kV" if abs(kv) >= 0.01 or kv == 0 else f"{volts:.3g} V"


class FieldOverlays:
    """The overlay items of one canvas; :meth:`show` replaces them with a new result."""

    def __init__(self, underlay: QGraphicsItemGroup, overlay: QGraphicsItemGroup,
                 view: QGraphicsView | None = None) -> None:
        self.underlay, self.overlay, self.view = underlay, overlay, view
        self.tags: list[TagItem] = []
        self.inception_tag: TagItem | None = None
        self.keep_clear: Callable[[], list[QRectF]] = lambda: []
        """More viewport rectangles (px) labels must not cover (e.g. the colour scale)."""
        self.visible = {n: n not in DEFAULT_OFF for n in OVERLAY_NAMES}
        self.groups: dict[str, QGraphicsItemGroup] = {}
        for name in OVERLAY_NAMES:
            g = QGraphicsItemGroup()
            g.setHandlesChildEvents(False)
            (underlay if name in UNDERLAYS else overlay).addToGroup(g)
            self.groups[name] = g
        self.result: LiveResult | None = None

    def set_visible(self, name: str, on: bool) -> None:
        self.visible[name] = on
        self.groups[name].setVisible(on)

    def clear(self) -> None:
        for g in self.groups.values():
            for child in g.childItems():
                if child.scene() is not None:
                    child.scene().removeItem(child)

    def show(self, res: LiveResult) -> None:
        """Replace every overlay with those of ``res``."""
        self.clear()
        self.result = res
        self.inception_tag = None
        self._potential_map(res)
        self._field_map(res)
        self._equipotentials(res)
        self._field_lines(res)
        self._hot_spots(res)
        self._inception_path(res)
        self.place_labels()
        for name, g in self.groups.items():
            g.setVisible(self.visible[name])

    # ------------------------------------------------------------------ items

    def _add(self, name: str, item: QGraphicsItem) -> None:
        item.setParentItem(self.groups[name])  # cheaper than addToGroup; groups are untransformed

    def _potential_map(self, res: LiveResult) -> None:
        self._raster("potential_map", res, rgba_image(res.rgba_potential))

    def _field_map(self, res: LiveResult) -> None:
        self._raster("field_map", res, rgba_image(res.rgba_field))

    def _raster(self, name: str, res: LiveResult, img: QImage) -> None:
        x0, y0, x1, y1 = res.raster_box_mm
        item = QGraphicsPixmapItem(QPixmap.fromImage(img))
        item.setTransformationMode(Qt.TransformationMode.SmoothTransformation)
        item.setTransform(QTransform.fromScale((x1 - x0) / img.width(),
                                               (y1 - y0) / img.height()))
        item.setPos(x0, y0)
        self._add(name, item)

    def _equipotentials(self, res: LiveResult) -> None:
        self.tags = []
        for level, lines in res.equipotentials:
            if not lines:
                continue
            item = QGraphicsPathItem(_path(lines))
            item.setPen(_pen(EQUIPOTENTIAL, 1.0))
            self._add("equipotentials", item)
            tag = TagItem(format_kV(level), EQUIPOTENTIAL)
            tag.candidates = label_candidates(lines)
            self._add("equipotentials", tag)
            self.tags.append(tag)

    def place_labels(self) -> None:
        """Put each equipotential label on its line where it covers no part label, hot-spot
        marker or other equipotential label, inside the visible canvas; hide the labels
        that find no such place.  Runs again after every zoom or pan."""
        view = self.view
        if view is None or not (self.tags or self.inception_tag):
            return
        vt = view.viewportTransform()
        vp = QRectF(view.viewport().rect()).adjusted(34, 24, -8, -34)  # clear of the rulers
        taken = [r.adjusted(-2, -2, 2, 2) for r in
                 [*obstacle_rects(view, self.groups["hot_spots"]), *self.keep_clear()]]
        if self.inception_tag is not None and self.visible["inception_path"]:
            taken.append(self._place_inception_tag(vt, vp, taken))
        for tag in self.tags:
            size = tag.boundingRect()
            tag.setVisible(False)
            for x, y in tag.candidates:
                c = vt.map(QPointF(x, y))
                box = size.translated(c)
                if vp.contains(box) and not any(box.intersects(t) for t in taken):
                    tag.setPos(QPointF(x, y))
                    tag.setVisible(True)
                    taken.append(box.adjusted(-3, -3, 3, 3))
                    break

    def _place_inception_tag(self, vt: QTransform, vp: QRectF, taken: list[QRectF]) -> QRectF:
        """Put the inception label beside its path (right, else left, in screen pixels)
        where it covers no hot-spot label; return the box it takes (px)."""
        tag = self.inception_tag
        size = tag.boundingRect()
        gap = size.width() / 2 + 8
        first = None
        for x, y in tag.candidates:
            c = vt.map(QPointF(x, y))
            for dx in (gap, -gap):
                box = size.translated(c + QPointF(dx, 0))
                first = first or (box, x, y, dx)
                if vp.contains(box) and not any(box.intersects(t) for t in taken):
                    first = (box, x, y, dx)
                    break
            else:
                continue
            break
        box, x, y, dx = first
        tag.setPos(QPointF(x, y))
        tag.setTransform(QTransform.fromTranslate(dx, 0))
        return box.adjusted(-3, -3, 3, 3)

    def _field_lines(self, res: LiveResult) -> None:
        if res.field_lines:
            item = QGraphicsPathItem(_path(res.field_lines))
            item.setPen(_pen(FIELD_LINE, 0.9))
            self._add("field_lines", item)

    def _hot_spots(self, res: LiveResult) -> None:
        """A ring at each hot spot with its field and limit beside it, on the outer side.

        The text sits to the right of rings right of the hot spots' middle and to the
        left of the others, so mirror-image corners do not stack their labels (always to
        the right in an axisymmetric layout, whose axis is the left edge).
        """
        r = 9.0
        spots = res.solution.hot_spots
        mid_x = float(np.median([hs.at_mm[0] for hs in spots])) if spots else 0.0
        x0, y0, x1, y1 = res.solution.view_box_mm
        near_mm = 0.06 * max(x1 - x0, y1 - y0)
        placed: list[tuple[float, float, bool]] = []
        for hs in spots:
            ring = QGraphicsEllipseItem(QRectF(-r, -r, 2 * r, 2 * r))
            ring.setFlag(QGraphicsItem.GraphicsItemFlag.ItemIgnoresTransformations, True)
            ring.setPen(QPen(HOT_SPOT, 2.2))
            ring.setBrush(QBrush(QColor(HOT_SPOT.red(), HOT_SPOT.green(), HOT_SPOT.blue(),
                                        50)))
            ring.setPos(QPointF(*hs.at_mm))
            ring.setToolTip(f"{hs.part}: {hot_spot_text(hs)}")
            text = QGraphicsSimpleTextItem(
                f"{hs.field_kV_per_mm:.2f} kV/mm\nlimit {hs.limit_kV_per_mm:.2f} kV/mm", ring)
            font = QFont()
            font.setPointSizeF(8.0)
            font.setBold(True)
            text.setFont(font)
            text.setBrush(QBrush(HOT_SPOT))
            width = text.boundingRect().width()
            right = hs.at_mm[0] >= mid_x or res.solution.layout.symmetry == "axisymmetric"
            # stack the labels of hot spots close together on the same side
            stack = sum(1 for px_, py_, side in placed if side == right
                        and math.hypot(px_ - hs.at_mm[0], py_ - hs.at_mm[1]) < near_mm)
            placed.append((hs.at_mm[0], hs.at_mm[1], right))
            text.setPos(r + 3 if right else -r - 3 - width, -r - 12 + 28 * stack)
            self._add("hot_spots", ring)

    def _inception_path(self, res: LiveResult) -> None:
        """The field line of the inception estimate: dotted, a dot where it starts on the
        stressed surface, and a label with the top electrode voltage at inception (kV)."""
        outcome = res.inception
        inc = outcome.inception if outcome is not None else None
        if inc is None or len(inc.path_mm) < 2:
            return
        pts = thin(np.asarray(inc.path_mm, float))
        line = QGraphicsPathItem(_path([pts]))
        line.setPen(_pen(INCEPTION, 2.2, Qt.PenStyle.DotLine))
        line.setToolTip(path_label(inc) + f" ({inc.scale:.3g} x applied), from "
                        f"{inc.start_part} to {inc.ends_at}")
        self._add("inception_path", line)
        r = 3.5
        dot = QGraphicsEllipseItem(QRectF(-r, -r, 2 * r, 2 * r))
        dot.setFlag(QGraphicsItem.GraphicsItemFlag.ItemIgnoresTransformations, True)
        dot.setPen(QPen(QColor("white"), 1.0))
        dot.setBrush(QBrush(INCEPTION))
        dot.setPos(QPointF(*pts[0]))
        self._add("inception_path", dot)
        tag = TagItem(path_label(inc), INCEPTION)
        tag.candidates = [(float(x), float(y)) for x, y in
                          (pts[int(f * (len(pts) - 1))] for f in INCEPTION_LABEL_AT)]
        tag.setPos(QPointF(*tag.candidates[0]))
        self._add("inception_path", tag)
        self.inception_tag = tag

    def hot_spot_count(self) -> int:
        return len(self.result.solution.hot_spots) if self.result else 0


class TagItem(QGraphicsItem):
    """A short text on a soft halo, centred on its position, upright and of constant
    size at every zoom.  ``candidates`` are the places (mm) it may go, best first."""

    font: QFont | None = None

    def __init__(self, text: str, colour: QColor) -> None:
        super().__init__()
        self.setFlag(QGraphicsItem.GraphicsItemFlag.ItemIgnoresTransformations, True)
        self.setAcceptedMouseButtons(Qt.MouseButton.NoButton)
        if TagItem.font is None:
            TagItem.font = QFont()
            TagItem.font.setPointSizeF(8.0)
        self.text, self.colour = text, colour
        fm = QFontMetricsF(TagItem.font)
        w, h = fm.horizontalAdvance(text) + 6, fm.height() + 1
        self._rect = QRectF(-w / 2, -h / 2, w, h)
        self.candidates: list[tuple[float, float]] = []

    def boundingRect(self) -> QRectF:
        return self._rect

    def paint(self, painter: QPainter, option: QStyleOptionGraphicsItem,
              widget: QWidget | None = None) -> None:
        painter.setPen(Qt.PenStyle.NoPen)
        painter.setBrush(LABEL_BG)
        painter.drawRoundedRect(self._rect, 3, 3)
        painter.setFont(TagItem.font)
        painter.setPen(self.colour)
        painter.drawText(self._rect, Qt.AlignmentFlag.AlignCenter, self.text)


LABEL_FRACTIONS = (0.5, 0.38, 0.62, 0.26, 0.74, 0.14, 0.86, 0.06, 0.94)


def label_candidates(lines: list[np.ndarray]) -> list[tuple[float, float]]:
    """Places for a contour's label: along its longest pieces, middle first, then
    alternately towards the ends."""
    out = []
    for ln in sorted(lines, key=len, reverse=True)[:3]:
        for f in LABEL_FRACTIONS:
            x, y = ln[int(f * (len(ln) - 1))]
            out.append((float(x), float(y)))
    return out


def obstacle_rects(view: QGraphicsView, *groups: QGraphicsItem) -> list[QRectF]:
    """Viewport rectangles (px) that labels must not cover: the part labels of the view
    (its ``items_by_id[...].label``, when it has them) and every item under ``groups``."""
    vt = view.viewportTransform()
    items = [getattr(it, "label", None) for it in getattr(view, "items_by_id", {}).values()]
    for g in groups:
        for child in g.childItems():
            items += [child, *child.childItems()]
    return [it.deviceTransform(vt).mapRect(it.boundingRect()) for it in items
            if it is not None and it.isVisible()]


def hot_spot_text(hs) -> str:  # noqa: ANN001 - solver.solution.HotSpot
    """'3.41 kV/mm > limit 3.00 kV/mm' for a hot spot."""
    return f"{hs.field_kV_per_mm:.2f} kV/mm > limit {hs.limit_kV_per_mm:.2f} kV/mm"
