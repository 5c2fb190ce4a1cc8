"""The select tool: click, shift-click, box-select, drag to move, arrow-key nudges."""

from __future__ import annotations

from solver.layout import Part, Point

from .. import shape_edit as se
from ..commands import MovePartsCommand, RemovePartsCommand
from ..hit_test import part_at, parts_in_box, vertex_at
from .base import Preview, Tool, ToolContext

NUDGE_KEYS = {"Left": (-1, 0), "Right": (1, 0), "Up": (0, 1), "Down": (0, -1)}


class SelectTool(Tool):
    """Pick parts and move them.

    Press on a part selects it (shift toggles it in the selection); dragging moves the
    whole selection by the snapped cursor displacement, one undo step per drag.  Press
    on empty canvas starts a box: parts the box touches are selected (shift adds).
    Arrow keys move the selection by one grid step (ten with shift).
    """

    name, label = "select", "Select"
    hint = "click or box-select parts; drag to move; arrows nudge; Del deletes"

    def __init__(self, ctx: ToolContext) -> None:
        super().__init__(ctx)
        self.mode: str | None = None
        self.anchor: Point = (0.0, 0.0)
        self.offset: Point = (0.0, 0.0)
        self.before: dict[int, Part] = {}
        self.delta: Point = (0.0, 0.0)
        self.box: tuple[Point, Point] | None = None
        self.shift = False

    def press(self, pt: Point, shift: bool = False) -> None:
        sel = self.ctx.selection
        pid = part_at(self.ctx.doc, pt, self.ctx.tol_mm)
        self.shift = shift
        if pid is None:
            self.mode, self.box = "box", (pt, pt)
            if not shift:
                sel.clear()
        elif shift:
            sel.toggle(pid)
            self.mode = None
        else:
            if pid not in sel:
                sel.set([pid])
            self.mode = "move"
            self.before = {i: self.ctx.doc.part(i) for i in sel.ids}
            self.anchor, self.offset = self._grip(pid, pt)
            self.delta = (0.0, 0.0)
        self._changed()

    def move(self, pt: Point, dragging: bool) -> None:
        if not dragging:
            return
        if self.mode == "box" and self.box is not None:
            self.box = (self.box[0], pt)
            self._changed()
        elif self.mode == "move":
            grip = (pt[0] + self.offset[0], pt[1] + self.offset[1])
            q = self.ctx.snapper.snap(grip, self.ctx.tol_mm, self.before)[0]
            self.delta = self._allowed((q[0] - self.anchor[0], q[1] - self.anchor[1]))
            self.ctx.status(f"Move by \u0394x = {self.delta[0]:.4g} mm, "
                            f"\u0394y = {self.delta[1]:.4g} mm")
            self.ctx.doc.set_interacting(True)
            for pid, b in self.before.items():
                self.ctx.doc.replace_part(pid, _moved(b, self.delta))

    def release(self, pt: Point) -> None:
        if self.mode == "box" and self.box is not None:
            hits = parts_in_box(self.ctx.doc, self.box[0], pt)
            (self.ctx.selection.add if self.shift else self.ctx.selection.set)(hits)
        elif self.mode == "move" and self.delta != (0.0, 0.0):
            before, (dx, dy) = self.before, self.delta
            self.ctx.push(lambda: MovePartsCommand(self.ctx.doc, before, dx, dy, before=before))
        self._end()

    def cancel(self) -> None:
        if self.mode == "move":
            for pid, b in self.before.items():
                if pid in self.ctx.doc:
                    self.ctx.doc.replace_part(pid, b)
        self._end()

    def key(self, key: str, shift: bool = False) -> bool:
        ids = self.ctx.selection.ids
        if key in NUDGE_KEYS and ids and self.mode is None:
            step = self.ctx.snapper.grid_mm * (10 if shift else 1)
            sx, sy = NUDGE_KEYS[key]
            self.before = {i: self.ctx.doc.part(i) for i in ids}
            dx, dy = self._allowed((sx * step, sy * step))
            if (dx, dy) != (0.0, 0.0):
                self.ctx.push(lambda: MovePartsCommand(self.ctx.doc, ids, dx, dy, nudge=True))
            return True
        if key in ("Delete", "Backspace") and ids:
            self.ctx.push(lambda: RemovePartsCommand(self.ctx.doc, ids))
            return True
        if key == "Escape" and self.mode is None:
            self.ctx.selection.clear()
            return True
        return super().key(key, shift)

    def preview(self) -> Preview | None:
        if self.mode == "box" and self.box is not None:
            return Preview(box=self.box)
        return None

    def _grip(self, pid: int, pt: Point) -> tuple[Point, Point]:
        """The point that follows the cursor, and its offset from the cursor.

        Grabbed near one of its vertices, a part is carried by that vertex, so it snaps
        exactly onto another part's vertex or outline; otherwise by the snapped cursor.
        """
        ref = vertex_at(self.ctx.doc.part(pid).shape, pt, self.ctx.tol_mm)
        if ref is not None:
            v = dict(se.handles(self.ctx.doc.part(pid).shape))[ref]
            return v, (v[0] - pt[0], v[1] - pt[1])
        return self.ctx.snap(pt, exclude=self.before), (0.0, 0.0)

    def _allowed(self, d: Point) -> Point:
        """Limit a displacement so an axisymmetric selection stays at r >= 0."""
        if self.ctx.doc.settings.symmetry != "axisymmetric" or not self.before:
            return d
        x0 = min(se.bounds(b.shape)[0] for b in self.before.values())
        return (max(d[0], -max(x0, 0.0)), d[1])

    def _end(self) -> None:
        self.mode, self.box, self.before = None, None, {}
        self.ctx.doc.set_interacting(False)
        self._changed()


def _moved(part: Part, d: Point) -> Part:
    from dataclasses import replace
    return replace(part, shape=se.translated(part.shape, d[0], d[1]))
