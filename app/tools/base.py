"""What every canvas tool shares: the context it edits through, and the tool interface.

A tool receives scene points in millimetres (y up) from the canvas, or from a test,
through ``press``, ``move``, ``release``, ``double_click``, ``key`` and ``cancel``.
It edits only by pushing commands on the undo stack (a drag may preview its edit on
the document first and push one command on release), and describes what the canvas
should draw on top of the parts through :meth:`Tool.preview`.
"""

from __future__ import annotations

from collections.abc import Callable, Collection
from dataclasses import dataclass, field

from psygnal import Signal
from PySide6.QtGui import QUndoCommand, QUndoStack

from solver.layout import Kind, Part, Point, Shape

from ..document import Document
from ..selection import Selection
from ..shape_edit import EditError, Ref
from ..snapping import Snapper


@dataclass
class ToolOptions:
    """Settings of the drawing tools (set from the tool bar)."""

    new_kind: Kind = "electrode"
    corner_radius_mm: float = 0.0
    path_width_mm: float = 2.0


DEFAULT_VALUES: dict[str, dict[str, float]] = {
    "electrode": {"volts": 0.0},
    "floating": {"charge": 0.0},
    "dielectric": {"permittivity": 4.0},
}
KIND_BASE_NAMES = {"electrode": "Electrode", "floating": "Floating", "dielectric": "Dielectric"}


@dataclass
class ToolContext:
    """Everything a tool edits or consults; the canvas owns one and keeps ``tol_mm`` current.

    ``tol_mm`` is the pick and snap distance in millimetres (a few screen pixels at the
    current zoom).  ``status`` shows a one-line message to the user.
    """

    doc: Document
    stack: QUndoStack
    selection: Selection
    snapper: Snapper
    options: ToolOptions = field(default_factory=ToolOptions)
    tol_mm: float = 1.0
    status: Callable[[str], None] = lambda msg: None

    last_snap: tuple[Point, str] | None = None
    """The last snapped point and what it snapped to ('vertex', 'outline', 'grid')."""

    def snap(self, pt: Point, exclude: Collection[int] = ()) -> Point:
        """``pt`` snapped (vertex, outline, grid) and kept at r >= 0 in axisymmetry."""
        q, kind = self.snapper.snap(pt, self.tol_mm, exclude)
        q = self.constrain(q)
        self.last_snap = (q, kind) if kind else None
        return q

    def constrain(self, pt: Point) -> Point:
        """Keep a point at r = x >= 0 in an axisymmetric layout."""
        if self.doc.settings.symmetry == "axisymmetric" and pt[0] < 0:
            return (0.0, pt[1])
        return pt

    def push(self, make: Callable[[], QUndoCommand]) -> QUndoCommand | None:
        """Build a command and push it; show the reason instead when the edit is impossible."""
        try:
            cmd = make()
        except EditError as exc:
            self.status(str(exc))
            return None
        self.stack.push(cmd)
        return cmd

    def new_part(self, shape: Shape) -> Part:
        """A part of the current new-part kind around ``shape``, with a fresh name."""
        kind = self.options.new_kind
        name = self.doc.unique_name(KIND_BASE_NAMES[kind])
        return Part(name=name, kind=kind, shape=shape, **DEFAULT_VALUES[kind])


@dataclass
class Preview:
    """What a tool asks the canvas to draw over the parts (all in mm).

    ``shape`` a shape being drawn; ``points`` an open polyline being clicked (with
    ``closed`` to draw it as a ring); ``box`` a rubber band (two corners); ``handles``
    vertex handles with ``active`` the one under the cursor or being dragged.
    """

    shape: Shape | None = None
    points: tuple[Point, ...] = ()
    closed: bool = False
    box: tuple[Point, Point] | None = None
    handles: tuple[tuple[Ref, Point], ...] = ()
    active: Ref | None = None


class Tool:
    """Base class: a tool does nothing until it overrides the events it uses."""

    name = "tool"
    label = "Tool"
    hint = ""
    preview_changed = Signal()

    def __init__(self, ctx: ToolContext) -> None:
        self.ctx = ctx

    def press(self, pt: Point, shift: bool = False) -> None:
        """Left button pressed at ``pt`` (mm); ``shift`` held."""

    def move(self, pt: Point, dragging: bool) -> None:
        """Cursor at ``pt``; ``dragging`` when the left button is held."""

    def release(self, pt: Point) -> None:
        """Left button released at ``pt``."""

    def double_click(self, pt: Point) -> None:
        """Left double-click at ``pt``."""

    def key(self, key: str, shift: bool = False) -> bool:
        """A key ('Return', 'Escape', 'Delete', 'Backspace', 'Left', ...); True if used."""
        if key == "Escape":
            self.cancel()
            return True
        return False

    def cancel(self) -> None:
        """Abandon whatever is in progress, restoring the document as it was."""

    def activate(self) -> None:
        """The tool was chosen."""

    def deactivate(self) -> None:
        """Another tool was chosen: finish nothing, cancel what is in progress."""
        self.cancel()

    def preview(self) -> Preview | None:
        return None

    def _changed(self) -> None:
        self.preview_changed.emit()
