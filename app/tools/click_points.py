"""Tools that take a sequence of clicked points: polygon, path (wire), hole."""

from __future__ import annotations

import math

from solver.layout import Path, Point, Polygon, Shape

from .. import shape_edit as se
from ..commands import AddPartCommand, CutHoleCommand
from ..hit_test import part_at
from .base import Preview, Tool, ToolContext


class ClickPointsTool(Tool):
    """Click the points in turn; double-click or Enter finishes, Esc cancels,
    Backspace takes back the last point.  Points are snapped as they are placed.
    """

    min_points = 3
    closed = True

    def __init__(self, ctx: ToolContext) -> None:
        super().__init__(ctx)
        self.points: list[Point] = []
        self.cursor: Point | None = None

    def press(self, pt: Point, shift: bool = False) -> None:
        q = self.ctx.snap(pt)
        if not self.points or q != self.points[-1]:
            self.points.append(q)
        self._changed()

    def move(self, pt: Point, dragging: bool) -> None:
        if self.points:
            self.cursor = self.ctx.snap(pt)
            self._changed()

    def double_click(self, pt: Point) -> None:
        self.finish()

    def key(self, key: str, shift: bool = False) -> bool:
        if key in ("Return", "Enter"):
            self.finish()
            return True
        if key == "Backspace" and self.points:
            self.points.pop()
            self._changed()
            return True
        return super().key(key, shift)

    def cancel(self) -> None:
        self.points, self.cursor = [], None
        self._changed()

    def finish(self) -> None:
        """Make the part from the points clicked so far (if there are enough)."""
        pts = tuple(self.points)
        if len(pts) < self.min_points:
            self.ctx.status(f"{self.label}: needs at least {self.min_points} points "
                            f"({len(pts)} so far)")
            return
        self.cancel()
        self.commit(pts)

    def commit(self, pts: tuple[Point, ...]) -> None:
        raise NotImplementedError

    def preview(self) -> Preview | None:
        if not self.points:
            return None
        pts = tuple(self.points) + ((self.cursor,) if self.cursor is not None else ())
        return Preview(points=pts, closed=self.closed and len(pts) >= 3)

    def _add(self, shape: Shape) -> None:
        cmd = self.ctx.push(lambda: AddPartCommand(self.ctx.doc, self.ctx.new_part(shape)))
        if isinstance(cmd, AddPartCommand) and cmd.pid is not None:
            self.ctx.selection.set([cmd.pid])


class PolygonTool(ClickPointsTool):
    """A polygon through the clicked points."""

    name, label = "polygon", "Polygon"
    hint = "click the corners; double-click or Enter closes, Esc cancels"

    def commit(self, pts: tuple[Point, ...]) -> None:
        self._add(Polygon(points=pts))


class PathTool(ClickPointsTool):
    """A wire or trace along the clicked points, of the tool bar's width."""

    name, label = "path", "Wire"
    hint = "click along the wire; double-click or Enter ends it, Esc cancels"
    min_points = 2
    closed = False

    def commit(self, pts: tuple[Point, ...]) -> None:
        self._add(Path(points=pts, width=self.ctx.options.path_width_mm))


class HoleTool(ClickPointsTool):
    """Cut a hole: click its corners inside a part (or drag a rectangle inside it)."""

    name, label = "hole", "Hole"
    hint = ("click the hole's corners inside a part, or drag a rectangle (shift-drag: a "
            "round hole from its centre); Enter closes")

    def __init__(self, ctx: ToolContext) -> None:
        super().__init__(ctx)
        self.drag_from: Point | None = None
        self.round = False

    def press(self, pt: Point, shift: bool = False) -> None:
        if not self.points:
            self.drag_from = self.ctx.snap(pt)
            self.round = shift
        super().press(pt, shift)

    def release(self, pt: Point) -> None:
        a, self.drag_from = self.drag_from, None
        b = self.ctx.snap(pt)
        if a is None or len(self.points) != 1 or \
                max(abs(b[0] - a[0]), abs(b[1] - a[1])) < self.ctx.tol_mm:
            return
        self.cancel()
        if self.round:  # shift-drag: a circular hole from its centre out to its rim
            self.commit(se.circle_ring(a, math.hypot(b[0] - a[0], b[1] - a[1])))
        elif abs(b[0] - a[0]) > 1e-9 and abs(b[1] - a[1]) > 1e-9:
            self.commit(((a[0], a[1]), (b[0], a[1]), (b[0], b[1]), (a[0], b[1])))

    def commit(self, pts: tuple[Point, ...]) -> None:
        cx = sum(p[0] for p in pts) / len(pts)
        cy = sum(p[1] for p in pts) / len(pts)
        pid = part_at(self.ctx.doc, pts[0], 0.0) or part_at(self.ctx.doc, (cx, cy), 0.0)
        if pid is None:
            self.ctx.status("Hole: draw it inside the part it is to be cut from")
            return
        self.ctx.push(lambda: CutHoleCommand(self.ctx.doc, pid, pts))
        self.ctx.selection.set([pid])
