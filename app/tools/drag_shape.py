"""Tools that draw a shape with one drag: rectangle, circle, ellipse."""

from __future__ import annotations

import math

from solver.layout import Circle, Ellipse, Point, Rect, Shape

from ..commands import AddPartCommand
from .base import Preview, Tool, ToolContext


class DragShapeTool(Tool):
    """Press at one point, drag, release: the shape spanned by the two points is added.

    Both points are snapped.  A drag shorter than the pick tolerance adds nothing.
    The new part gets the current new-part kind and is selected.
    """

    def __init__(self, ctx: ToolContext) -> None:
        super().__init__(ctx)
        self.start: Point | None = None
        self.current: Point | None = None

    def shape_between(self, a: Point, b: Point) -> Shape | None:
        raise NotImplementedError

    def press(self, pt: Point, shift: bool = False) -> None:
        self.start = self.current = self.ctx.snap(pt)
        self._changed()

    def move(self, pt: Point, dragging: bool) -> None:
        if self.start is not None and dragging:
            self.current = self.ctx.snap(pt)
            shape = self.shape_between(self.start, self.current)
            if shape is not None:
                self.ctx.status(f"{self.label}: {describe(shape)}")
            self._changed()

    def release(self, pt: Point) -> None:
        if self.start is None:
            return
        a, b = self.start, self.ctx.snap(pt)
        self.start = self.current = None
        self._changed()
        shape = self.shape_between(a, b) if _span(a, b) > self.ctx.tol_mm * 0.5 else None
        if shape is None:
            self.ctx.status(f"{self.label}: {self.hint}")
            return
        cmd = self.ctx.push(lambda: AddPartCommand(self.ctx.doc, self.ctx.new_part(shape)))
        if isinstance(cmd, AddPartCommand) and cmd.pid is not None:
            self.ctx.selection.set([cmd.pid])

    def cancel(self) -> None:
        if self.start is not None:
            self.start = self.current = None
            self._changed()

    def preview(self) -> Preview | None:
        if self.start is None or self.current is None:
            return None
        shape = self.shape_between(self.start, self.current)
        return Preview(shape=shape, points=(self.start, self.current) if shape is None else ())


class RectangleTool(DragShapeTool):
    """Axis-parallel rectangle between two corners, with the tool bar's corner radius."""

    name, label = "rectangle", "Rectangle"
    hint = "drag from one corner to the opposite corner"

    def shape_between(self, a: Point, b: Point) -> Shape | None:
        w, h = abs(b[0] - a[0]), abs(b[1] - a[1])
        if w <= 0 or h <= 0:
            return None
        r = min(self.ctx.options.corner_radius_mm, 0.5 * min(w, h))
        return Rect(min=(min(a[0], b[0]), min(a[1], b[1])),
                    max=(max(a[0], b[0]), max(a[1], b[1])), corner_radius=r)


class CircleTool(DragShapeTool):
    """Circle from its centre (press) to a point on its rim (release)."""

    name, label = "circle", "Circle"
    hint = "drag from the centre out to the rim"

    def shape_between(self, a: Point, b: Point) -> Shape | None:
        r = _span(a, b)
        if self.ctx.doc.settings.symmetry == "axisymmetric":
            r = min(r, a[0]) if a[0] > 0 else r
        return Circle(center=a, radius=r) if r > 0 else None


class EllipseTool(DragShapeTool):
    """Axis-parallel ellipse inscribed in the box between two corners."""

    name, label = "ellipse", "Ellipse"
    hint = "drag across the box the ellipse fills"

    def shape_between(self, a: Point, b: Point) -> Shape | None:
        rx, ry = abs(b[0] - a[0]) / 2, abs(b[1] - a[1]) / 2
        if rx <= 0 or ry <= 0:
            return None
        return Ellipse(center=((a[0] + b[0]) / 2, (a[1] + b[1]) / 2), radii=(rx, ry))


def describe(shape: Shape) -> str:
    """The sizes of a shape being drawn, for the status bar (mm)."""
    if isinstance(shape, Rect):
        w, h = shape.max[0] - shape.min[0], shape.max[1] - shape.min[1]
        return (f"{w:.4g} \u00d7 {h:.4g} mm from ({shape.min[0]:.4g}, {shape.min[1]:.4g}) mm"
                + (f", corners r = {shape.corner_radius:.4g} mm" if shape.corner_radius else ""))
    if isinstance(shape, Circle):
        return (f"centre ({shape.center[0]:.4g}, {shape.center[1]:.4g}) mm, "
                f"r = {shape.radius:.4g} mm")
    assert isinstance(shape, Ellipse)
    return (f"centre ({shape.center[0]:.4g}, {shape.center[1]:.4g}) mm, "
            f"semi-axes {shape.radii[0]:.4g} \u00d7 {shape.radii[1]:.4g} mm")


def _span(a: Point, b: Point) -> float:
    return math.hypot(b[0] - a[0], b[1] - a[1])
