"""The drawing canvas: a graphics view in millimetres (y up) that mirrors the document.

Layers, by z value, for views built on top of the editor:

* ``underlay`` (z = -10): below the parts, for colour maps of potential or field;
* parts (0 <= z < 1), in layout order, drawn by :class:`app.items.PartItem`;
* ``overlay`` (z = 10): above the parts, for equipotentials, field lines, markers;
* part names (z = 15), so no part or line hides them;
* the tool preview (z = 20).

Mouse and key events go to the current tool as scene points in mm.  The wheel zooms
about the cursor; the middle button, or space with the left button, pans.
"""

from __future__ import annotations

from PySide6.QtCore import QEvent, QPointF, QRectF, Qt, Signal
from PySide6.QtGui import (
    QKeyEvent,
    QMouseEvent,
    QPainter,
    QPixmap,
    QResizeEvent,
    QTransform,
    QWheelEvent,
)
from PySide6.QtWidgets import QGraphicsItemGroup, QGraphicsScene, QGraphicsView, QWidget

from . import shape_edit as se
from .canvas_grid import draw_grid, draw_rulers, grid_steps
from .document import Document
from .hit_test import part_at
from .items import BoundaryItem, PartItem
from .label_layout import declutter
from .preview_item import PreviewItem
from .problem_marks import problem_parts, problem_point
from .selection import Selection
from .tools import TOOL_CLASSES, Tool, ToolContext

PICK_PX = 7.0
MAX_DECLUTTER = 150
LABEL_Z = 15.0
ZOOM_STEP = 1.15
SCENE_HALF_MM = 1.0e6
KEY_NAMES = {Qt.Key.Key_Return: "Return", Qt.Key.Key_Enter: "Enter",
             Qt.Key.Key_Escape: "Escape", Qt.Key.Key_Delete: "Delete",
             Qt.Key.Key_Backspace: "Backspace", Qt.Key.Key_Left: "Left",
             Qt.Key.Key_Right: "Right", Qt.Key.Key_Up: "Up", Qt.Key.Key_Down: "Down"}


class Canvas(QGraphicsView):
    """The editor's view of a :class:`Document`.

    Signals: ``cursor_moved(x_mm, y_mm)``, ``tool_changed(name)``, ``view_changed()``
    (after zoom or pan).
    """

    cursor_moved = Signal(float, float)
    tool_changed = Signal(str)
    view_changed = Signal()

    def __init__(self, ctx: ToolContext, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.ctx = ctx
        self.doc: Document = ctx.doc
        self.selection: Selection = ctx.selection
        s = SCENE_HALF_MM
        self.scene_ = QGraphicsScene(-s, -s, 2 * s, 2 * s, self)
        self.setScene(self.scene_)
        self.underlay = self._layer(-10.0)
        self.overlay = self._layer(10.0)
        self.preview_item = PreviewItem()
        self.preview_item.setZValue(20.0)
        self.scene_.addItem(self.preview_item)
        self.items_by_id: dict[int, PartItem] = {}
        self.boundary_item = BoundaryItem()
        self.scene_.addItem(self.boundary_item)
        self.tools: dict[str, Tool] = {cls.name: cls(ctx) for cls in TOOL_CLASSES}
        for tool in self.tools.values():
            tool.preview_changed.connect(self._on_preview_changed)
        self.tool: Tool = self.tools["select"]
        self._pan_from: QPointF | None = None
        self._space = False
        self._left_down = False
        self._ruler_cache: tuple[tuple, QPixmap] | None = None
        self._auto_fit = True
        self._hovered: int | None = None
        self._setup_view()
        self._connect_model()
        self._rebuild()

    # ------------------------------------------------------------------ set-up

    def _layer(self, z: float) -> QGraphicsItemGroup:
        group = QGraphicsItemGroup()
        group.setZValue(z)
        group.setHandlesChildEvents(False)
        self.scene_.addItem(group)
        return group

    def _setup_view(self) -> None:
        self.setRenderHints(QPainter.RenderHint.Antialiasing
                            | QPainter.RenderHint.TextAntialiasing)
        self.setViewportUpdateMode(QGraphicsView.ViewportUpdateMode.FullViewportUpdate)
        self.setCacheMode(QGraphicsView.CacheModeFlag.CacheBackground)
        self.setTransformationAnchor(QGraphicsView.ViewportAnchor.NoAnchor)
        self.setHorizontalScrollBarPolicy(Qt.ScrollBarPolicy.ScrollBarAlwaysOff)
        self.setVerticalScrollBarPolicy(Qt.ScrollBarPolicy.ScrollBarAlwaysOff)
        self.setFrameShape(QGraphicsView.Shape.NoFrame)
        self.setMouseTracking(True)
        self.viewport().setMouseTracking(True)
        self.setFocusPolicy(Qt.FocusPolicy.StrongFocus)
        self.setTransform(QTransform.fromScale(4.0, -4.0))
        self._sync_scale()

    def _connect_model(self) -> None:
        self.doc.part_added.connect(self._on_part_added)
        self.doc.part_removed.connect(self._on_part_removed)
        self.doc.part_changed.connect(self._on_part_changed)
        self.doc.settings_changed.connect(self._on_settings_changed)
        self.doc.reset.connect(self._rebuild)
        self.selection.changed.connect(self._on_selection_changed)

    # ------------------------------------------------------------------ model -> scene

    def _max_abs_volts(self) -> float:
        return max((abs(p.volts or 0.0) for _, p in self.doc.parts() if p.kind == "electrode"),
                   default=0.0)

    def _rebuild(self) -> None:
        self.tool.cancel()  # a half-drawn outline belongs to the layout that was replaced
        for item in self.items_by_id.values():
            self.scene_.removeItem(item.label)
            self.scene_.removeItem(item)
        self.items_by_id.clear()
        for pid in self.doc.ids():
            self._new_item(pid)
        self._restyle_all()
        self.boundary_item.set_boundary(self.doc.settings.boundary)
        self.zoom_to_fit()

    def _restyle_all(self) -> None:
        vmax = self._max_abs_volts()
        n = max(len(self.doc), 1)
        for k, pid in enumerate(self.doc.ids()):
            item = self.items_by_id[pid]
            item.setZValue(k / n)
            item.highlighted = pid in self.selection
            item.set_part(self.doc.part(pid), vmax)
        self._declutter_labels()

    def _new_item(self, pid: int) -> PartItem:
        item = PartItem(pid, self.px_per_mm())
        self.items_by_id[pid] = item
        self.scene_.addItem(item)
        item.label.setZValue(LABEL_Z)  # names above every part and overlay line
        self.scene_.addItem(item.label)
        return item

    def _declutter_labels(self) -> None:
        """Place every part label, then shift overlapping ones apart on screen (for layouts
        of up to ``MAX_DECLUTTER`` parts)."""
        items = list(self.items_by_id.values())
        ppm = self.px_per_mm()
        for item in items:
            item.place_label(ppm)  # from the base places, so old shifts do not pile up
        if len(items) > MAX_DECLUTTER:
            return
        t = self.viewportTransform()
        boxes = []
        for item in items:
            c = t.map(item.label.scenePos())
            r = item.label.boundingRect()
            boxes.append((c.x() + r.left(), c.y() + r.top(), c.x() + r.right(),
                          c.y() + r.bottom()))
        for item, dy in zip(items, declutter(boxes), strict=True):
            if dy:
                item.label.setPos(item.label.pos() - QPointF(0.0, dy / ppm))

    def _on_part_added(self, pid: int) -> None:
        self._new_item(pid)
        self._restyle_all()

    def _on_part_removed(self, pid: int) -> None:
        item = self.items_by_id.pop(pid, None)
        if item is not None:
            self.scene_.removeItem(item.label)
            self.scene_.removeItem(item)
        self._restyle_all()

    def _on_part_changed(self, pid: int) -> None:
        item = self.items_by_id[pid]
        old = item.part
        new = self.doc.part(pid)
        if old is not None and (old.volts, old.kind) != (new.volts, new.kind):
            self._restyle_all()
        else:
            item.set_part(new, self._max_abs_volts())
            self._declutter_labels()
        self._on_preview_changed()

    def _on_settings_changed(self) -> None:
        self.boundary_item.set_boundary(self.doc.settings.boundary)
        self.resetCachedContent()  # the background shows the axis of symmetry
        self.viewport().update()

    def _on_selection_changed(self) -> None:
        vmax = self._max_abs_volts()
        for pid, item in self.items_by_id.items():
            if item.highlighted != (pid in self.selection):
                item.set_highlighted(pid in self.selection, vmax)
        self._on_preview_changed()

    def _on_preview_changed(self) -> None:
        self.preview_item.set_preview(self.tool.preview())

    def show_problem(self, message: str | None) -> None:
        """Mark the parts a layout problem names, and the point it gives (None: clear)."""
        names = {p.name for _, p in self.doc.parts()}
        bad = set(problem_parts(message, names)) if message else set()
        vmax = self._max_abs_volts()
        for pid, item in self.items_by_id.items():
            item.set_problem(self.doc.part(pid).name in bad, vmax)
        self.preview_item.set_problem_at(problem_point(message) if message else None)

    # ------------------------------------------------------------------ tools

    def set_tool(self, name: str) -> None:
        """Make the tool called ``name`` current (cancelling the old one's work)."""
        if self.tool.name == name:
            return
        self.tool.deactivate()
        self.tool = self.tools[name]
        self.tool.activate()
        self._tool_cursor()
        self.preview_item.set_snap(None)
        self._on_preview_changed()
        self.ctx.status(f"{self.tool.label}: {self.tool.hint}")
        self.tool_changed.emit(name)

    def _tool_cursor(self) -> None:
        drawing = self.tool.name not in ("select", "vertex")
        self.viewport().setCursor(Qt.CursorShape.CrossCursor if drawing
                                  else Qt.CursorShape.ArrowCursor)

    # ------------------------------------------------------------------ zoom and pan

    def px_per_mm(self) -> float:
        return abs(self.transform().m11())

    def zoom_by(self, factor: float, about: QPointF | None = None) -> None:
        """Zoom by ``factor`` keeping the scene point under ``about`` (viewport px) fixed."""
        new = self.px_per_mm() * factor
        if not 1e-3 <= new <= 1e5:
            return
        self._auto_fit = False
        anchor = about if about is not None else QPointF(self.viewport().rect().center())
        before = self.mapToScene(anchor.toPoint())
        self.scale(factor, factor)
        after = self.mapToScene(anchor.toPoint())
        self.translate_scene(after.x() - before.x(), after.y() - before.y())
        self._sync_scale()

    def translate_scene(self, dx_mm: float, dy_mm: float) -> None:
        """Shift the view so scene content moves by (dx, dy) mm on screen."""
        c = self.mapToScene(self.viewport().rect().center())
        self.centerOn(c.x() - dx_mm, c.y() - dy_mm)

    def pan_pixels(self, dx: int, dy: int) -> None:
        """Move the content by (dx, dy) screen pixels (exactly, through the scroll bars)."""
        self._auto_fit = False
        h, v = self.horizontalScrollBar(), self.verticalScrollBar()
        h.setValue(h.value() - dx)
        v.setValue(v.value() - dy)
        self.view_changed.emit()

    def zoom_to_fit(self) -> None:
        """Show every part with a margin (an area 200 mm wide about the origin when empty)."""
        self._auto_fit = True
        boxes = [se.bounds(p.shape) for _, p in self.doc.parts()]
        b = self.doc.settings.boundary
        if b.type == "box" and b.min is not None and b.max is not None:
            boxes.append((*b.min, *b.max))
        if boxes:
            x0 = min(b[0] for b in boxes)
            y0 = min(b[1] for b in boxes)
            x1 = max(b[2] for b in boxes)
            y1 = max(b[3] for b in boxes)
        else:
            x0, y0, x1, y1 = -100.0, -70.0, 100.0, 70.0
        w, h = max(x1 - x0, 1.0), max(y1 - y0, 1.0)
        rect = QRectF(x0 - 0.08 * w, y0 - 0.08 * h, 1.16 * w, 1.16 * h)
        vp = self.viewport().rect()
        avail_w, avail_h = max(vp.width() - 60, 50), max(vp.height() - 40, 50)
        s = min(avail_w / rect.width(), avail_h / rect.height())
        self.setTransform(QTransform.fromScale(s, -s))
        centre = rect.center() + QPointF(-24 / (2 * s), -22 / (2 * s))
        if self.doc.settings.symmetry == "axisymmetric":
            # keep the axis near the left edge: the side r < 0 holds nothing to see
            half_w = vp.width() / (2 * s)
            centre.setX(max(centre.x(), 0.88 * half_w - 46 / s))
        self.centerOn(centre)
        self._sync_scale()

    def _sync_scale(self) -> None:
        ppm = self.px_per_mm()
        self.resetCachedContent()
        self._declutter_labels()
        self.ctx.tol_mm = PICK_PX / ppm
        self.ctx.snapper.grid_mm = grid_steps(ppm)[0]
        self.viewport().update()
        self.view_changed.emit()

    def resizeEvent(self, event: QResizeEvent) -> None:
        super().resizeEvent(event)
        if self._auto_fit:  # until the user zooms or pans, the view keeps fitting the parts
            self.zoom_to_fit()
        self.viewport().update()

    # ------------------------------------------------------------------ painting

    def drawBackground(self, painter: QPainter, rect: QRectF) -> None:
        draw_grid(painter, rect, self.px_per_mm(),
                  self.doc.settings.symmetry == "axisymmetric")

    def drawForeground(self, painter: QPainter, rect: QRectF) -> None:
        painter.save()
        painter.resetTransform()
        painter.drawPixmap(0, 0, self._rulers())
        painter.restore()

    def _rulers(self) -> QPixmap:
        """The rulers as a transparent pixmap, redrawn only when the view changes."""
        vp = self.viewport()
        t = self.viewportTransform()
        names = ("r", "z") if self.doc.settings.symmetry == "axisymmetric" else ("x", "y")
        key = (vp.width(), vp.height(), t.m11(), t.m22(), t.dx(), t.dy(), names)
        if self._ruler_cache is None or self._ruler_cache[0] != key:
            pm = QPixmap(vp.size())
            pm.fill(Qt.GlobalColor.transparent)
            p = QPainter(pm)
            draw_rulers(p, t, vp.width(), vp.height(), self.px_per_mm(), names)
            p.end()
            self._ruler_cache = (key, pm)
        return self._ruler_cache[1]

    # ------------------------------------------------------------------ events

    def scene_point(self, pos: QPointF) -> tuple[float, float]:
        p = self.mapToScene(pos.toPoint())
        return (p.x(), p.y())

    def wheelEvent(self, event: QWheelEvent) -> None:
        steps = event.angleDelta().y() / 120.0
        if steps:
            self.zoom_by(ZOOM_STEP ** steps, event.position())
        event.accept()

    def mousePressEvent(self, event: QMouseEvent) -> None:
        b = event.button()
        if b == Qt.MouseButton.MiddleButton or (b == Qt.MouseButton.LeftButton and self._space):
            self._pan_from = event.position()
            self.viewport().setCursor(Qt.CursorShape.ClosedHandCursor)
        elif b == Qt.MouseButton.LeftButton:
            self._left_down = True
            shift = bool(event.modifiers() & Qt.KeyboardModifier.ShiftModifier)
            self.tool.press(self.scene_point(event.position()), shift)
        event.accept()

    def mouseMoveEvent(self, event: QMouseEvent) -> None:
        pt = self.scene_point(event.position())
        self.cursor_moved.emit(*pt)
        if self._pan_from is not None:
            d = (event.position() - self._pan_from).toPoint()
            self._pan_from += QPointF(d)
            self.pan_pixels(d.x(), d.y())
        else:
            self.ctx.last_snap = None
            if self.tool.name not in ("select", "vertex") and not self._left_down:
                self.ctx.snap(pt)  # show where a click would land
            self.tool.move(pt, self._left_down)
            self.preview_item.set_snap(self.ctx.last_snap)
            self._hover(pt if self.tool.name == "select" and not self._left_down else None)
        event.accept()

    def _hover(self, pt: tuple[float, float] | None) -> None:
        pid = part_at(self.doc, pt, self.ctx.tol_mm) if pt is not None else None
        if pid != self._hovered:
            vmax = self._max_abs_volts()
            for old_new, on in ((self._hovered, False), (pid, True)):
                if old_new in self.items_by_id:
                    self.items_by_id[old_new].set_hover(on, vmax)
            self._hovered = pid

    def leaveEvent(self, event: QEvent) -> None:
        self.preview_item.set_snap(None)
        self._hover(None)
        super().leaveEvent(event)

    def mouseReleaseEvent(self, event: QMouseEvent) -> None:
        if self._pan_from is not None and event.button() in (Qt.MouseButton.MiddleButton,
                                                             Qt.MouseButton.LeftButton):
            self._pan_from = None
            self._tool_cursor()
        elif event.button() == Qt.MouseButton.LeftButton:
            self._left_down = False
            self.tool.release(self.scene_point(event.position()))
        event.accept()

    def mouseDoubleClickEvent(self, event: QMouseEvent) -> None:
        if event.button() == Qt.MouseButton.LeftButton:
            pt = self.scene_point(event.position())
            if self.tool.name == "select" and part_at(self.doc, pt, self.ctx.tol_mm) is not None:
                self.set_tool("vertex")  # double-click a part to edit its outline
            else:
                self.tool.double_click(pt)
        event.accept()

    def keyPressEvent(self, event: QKeyEvent) -> None:
        if event.key() == Qt.Key.Key_Space and not event.isAutoRepeat():
            self._space = True
            self.viewport().setCursor(Qt.CursorShape.OpenHandCursor)
            return
        name = KEY_NAMES.get(Qt.Key(event.key()))
        shift = bool(event.modifiers() & Qt.KeyboardModifier.ShiftModifier)
        if name is None or not self.tool.key(name, shift):
            super().keyPressEvent(event)

    def keyReleaseEvent(self, event: QKeyEvent) -> None:
        if event.key() == Qt.Key.Key_Space and not event.isAutoRepeat():
            self._space = False
            self._tool_cursor()
            return
        super().keyReleaseEvent(event)
