"""The line probe tool: drag a segment to see the potential and the field along it."""

from __future__ import annotations

import math

from psygnal import Signal

from solver.layout import Point

from .base import Preview, Tool

Segment = tuple[Point, Point]


class ProbeTool(Tool):
    """Press at one end, drag, release at the other: the segment becomes the line probe.

    Both ends are snapped (to vertices, outlines and the grid), so a probe can start
    exactly on a conductor's surface.  The finished segment is kept in
    :attr:`segment` and announced through ``segment_changed(segment or None)``; it
    stays when another tool is chosen.  A drag shorter than the pick tolerance keeps
    the old segment.  Escape abandons a drag in progress, or, when none is, removes
    the probe.  The tool never edits the document.
    """

    name, label = "probe", "Line probe"
    hint = "drag a segment to plot the potential and the field along it"
    segment_changed = Signal(object)

    def __init__(self, ctx) -> None:  # noqa: ANN001 - ToolContext
        super().__init__(ctx)
        self.start: Point | None = None
        self.current: Point | None = None
        self.segment: Segment | None = None

    def press(self, pt: Point, shift: bool = False) -> None:
        self.start = self.current = self.ctx.snap(pt)
        self._changed()

    def move(self, pt: Point, dragging: bool) -> None:
        if self.start is None or not dragging:
            return
        self.current = self.ctx.snap(pt)
        self.ctx.status(f"{self.label}: {describe((self.start, self.current))}")
        self._changed()

    def release(self, pt: Point) -> None:
        if self.start is None:
            return
        seg = (self.start, self.ctx.snap(pt))
        self.start = self.current = None
        self._changed()
        if length(seg) <= 0.5 * self.ctx.tol_mm:
            self.ctx.status(f"{self.label}: {self.hint}")
            return
        self.set_segment(seg)
        self.ctx.status(f"{self.label}: {describe(seg)}")

    def set_segment(self, seg: Segment | None) -> None:
        """Make ``seg`` the probe line (None removes it)."""
        self.segment = seg
        self.segment_changed.emit(seg)

    def key(self, key: str, shift: bool = False) -> bool:
        if key in ("Escape", "Delete", "Backspace") and self.start is None \
                and self.segment is not None:
            self.set_segment(None)
            return True
        return super().key(key, shift)

    def cancel(self) -> None:
        if self.start is not None:
            self.start = self.current = None
            self._changed()

    def preview(self) -> Preview | None:
        if self.start is None or self.current is None:
            return None
        return Preview(points=(self.start, self.current))


def length(seg: Segment) -> float:
    """Length of a segment, mm."""
    (x0, y0), (x1, y1) = seg
    return math.hypot(x1 - x0, y1 - y0)


def describe(seg: Segment) -> str:
    """'from (x0, y0) to (x1, y1) mm, 12.5 mm long' for the status bar."""
    (x0, y0), (x1, y1) = seg
    return (f"from ({x0:.4g}, {y0:.4g}) to ({x1:.4g}, {y1:.4g}) mm, "
            f"{length(seg):.4g} mm long")
