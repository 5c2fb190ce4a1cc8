"""The vertex tool: drag vertices and edges, add and remove vertices, round corners."""

from __future__ import annotations

from dataclasses import replace

from solver.layout import Part, Point, Shape

from .. import shape_edit as se
from ..commands import (
    InsertVertexCommand,
    MoveEdgeCommand,
    MoveVertexCommand,
    RemoveVertexCommand,
    SetCornerRadiusCommand,
)
from ..hit_test import edge_at, part_at, vertex_at
from .base import Preview, Tool, ToolContext


class VertexTool(Tool):
    """Edit the outline of the selected parts.

    Drag a vertex (or a circle/ellipse handle) to move it; drag a straight edge to
    shift it along its normal, so a rectangle side or a polygon face keeps its
    direction.  Double-click an edge to add a vertex there, double-click a vertex (or
    press Delete) to remove it.  The last vertex clicked is the *current* one: its
    corner radius is set with :meth:`set_corner_radius`.  Clicking another part selects it.
    """

    name, label = "vertex", "Edit outline"
    hint = ("drag vertices or edges; double-click adds/removes a vertex; Shift+R rounds "
            "the clicked corner")

    def __init__(self, ctx: ToolContext) -> None:
        super().__init__(ctx)
        self.drag: tuple[str, int, se.Ref] | None = None
        self.before: Part | None = None
        self.grab: Point = (0.0, 0.0)
        self.current: tuple[int, se.Ref] | None = None
        self.hover: se.Ref | None = None

    def press(self, pt: Point, shift: bool = False) -> None:
        hit = self._hit(pt)
        if hit is None:
            pid = part_at(self.ctx.doc, pt, self.ctx.tol_mm)
            self.ctx.selection.set([] if pid is None else [pid])
            self.current = None
        else:
            kind, pid, ref, on = hit
            self.drag, self.before, self.grab = (kind, pid, ref), self.ctx.doc.part(pid), on
            if kind == "vertex":
                self.current = (pid, ref)
        self._changed()

    def move(self, pt: Point, dragging: bool) -> None:
        if self.drag is None or not dragging:
            hit = self._hit(pt)
            hover = hit[2] if hit is not None and hit[0] == "vertex" else None
            if hover != self.hover:
                self.hover = hover
                self._changed()
            return
        assert self.before is not None
        kind, pid, _ = self.drag
        self.ctx.doc.set_interacting(True)
        self.ctx.doc.replace_part(pid, replace(self.before, shape=self._dragged_shape(pt)))
        q = self._target(pt, pid)
        if kind == "vertex":
            self.ctx.status(f"Vertex at ({q[0]:.4g}, {q[1]:.4g}) mm")
        else:
            self.ctx.status(f"Edge through ({q[0]:.4g}, {q[1]:.4g}) mm")
        self._changed()

    def release(self, pt: Point) -> None:
        if self.drag is None or self.before is None:
            return
        kind, pid, ref = self.drag
        before, after = self.before, self.ctx.doc.part(pid)
        self.drag = self.before = None
        self.ctx.doc.set_interacting(False)
        if after != before:
            self.ctx.doc.replace_part(pid, before)
            q = self._target(pt, pid)
            if kind == "vertex":
                self.ctx.push(lambda: MoveVertexCommand(self.ctx.doc, pid, ref, q, before))
            else:
                d = (q[0] - self.grab[0], q[1] - self.grab[1])
                self.ctx.push(lambda: MoveEdgeCommand(self.ctx.doc, pid, ref, d, before))
        self._changed()

    def double_click(self, pt: Point) -> None:
        hit = self._hit(pt)
        if hit is None:
            return
        kind, pid, ref, on = hit
        if kind == "vertex":
            self.remove_vertex(pid, ref)
        else:
            at = self.ctx.snap(pt, exclude=[pid])
            self.ctx.push(lambda: InsertVertexCommand(self.ctx.doc, pid, ref, at))
        self._changed()

    def key(self, key: str, shift: bool = False) -> bool:
        if key in ("Delete", "Backspace") and self.current is not None:
            self.remove_vertex(*self.current)
            return True
        return super().key(key, shift)

    def remove_vertex(self, pid: int, ref: se.Ref) -> None:
        """Remove one vertex (an undoable step)."""
        if self.ctx.push(lambda: RemoveVertexCommand(self.ctx.doc, pid, ref)) is not None:
            self.current = None
            self._changed()

    def set_corner_radius(self, radius_mm: float) -> bool:
        """Round the current vertex's corner to ``radius_mm``; False if there is none."""
        if self.current is None or self.current[0] not in self.ctx.doc:
            self.ctx.status("Edit outline: click a corner first, then set its radius")
            return False
        pid, ref = self.current
        cmd = self.ctx.push(lambda: SetCornerRadiusCommand(self.ctx.doc, pid, ref, radius_mm))
        return cmd is not None

    def current_radius(self) -> float | None:
        """The corner radius at the current vertex, mm (None when there is none)."""
        if self.current is None or self.current[0] not in self.ctx.doc:
            return None
        return se.corner_radius_at(self.ctx.doc.part(self.current[0]).shape, self.current[1])

    def cancel(self) -> None:
        if self.drag is not None and self.before is not None:
            self.ctx.doc.replace_part(self.drag[1], self.before)
        self.drag = self.before = None
        self.ctx.doc.set_interacting(False)
        self._changed()

    def deactivate(self) -> None:
        self.cancel()
        self.current = self.hover = None

    def preview(self) -> Preview | None:
        handles = tuple(h for pid in self.ctx.selection.ids if pid in self.ctx.doc
                        for h in se.handles(self.ctx.doc.part(pid).shape))
        active = self.drag[2] if self.drag and self.drag[0] == "vertex" else None
        if active is None and self.current is not None:
            active = self.current[1]
        return Preview(handles=handles, active=active or self.hover)

    def _hit(self, pt: Point) -> tuple[str, int, se.Ref, Point] | None:
        tol = self.ctx.tol_mm
        for pid in reversed(self.ctx.selection.ids):
            shape = self.ctx.doc.part(pid).shape
            ref = vertex_at(shape, pt, tol)
            if ref is not None:
                return "vertex", pid, ref, pt
        for pid in reversed(self.ctx.selection.ids):
            e = edge_at(self.ctx.doc.part(pid).shape, pt, tol)
            if e is not None:
                return "edge", pid, e[0], e[1]
        return None

    def _target(self, pt: Point, pid: int) -> Point:
        return self.ctx.snap(pt, exclude=[pid])

    def _dragged_shape(self, pt: Point) -> Shape:
        assert self.drag is not None and self.before is not None
        kind, pid, ref = self.drag
        q = self._target(pt, pid)
        try:
            if kind == "vertex":
                return se.with_vertex_moved(self.before.shape, ref, q)
            d = (q[0] - self.grab[0], q[1] - self.grab[1])
            return se.with_edge_moved(self.before.shape, ref, d)
        except se.EditError:
            return self.before.shape
