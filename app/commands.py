"""Undoable edits of a :class:`app.document.Document`, one ``QUndoCommand`` class per kind.

Commands change the document only (never scene items; the canvas mirrors the
document's signals).  Each holds the before and after values it needs, so ``undo``
restores the document exactly.  Commands for drags take the ``before`` parts captured
when the drag began: the tool has already previewed the edit on the document, and
pushing the command on release makes the whole drag one undo step.  A constructor that
cannot make its edit raises :class:`app.shape_edit.EditError` with a message for the
status bar, and nothing is pushed.
"""

from __future__ import annotations

from collections.abc import Callable, Iterable, Mapping
from dataclasses import replace

from PySide6.QtGui import QUndoCommand

from solver.layout import Part, Point, Shape

from . import shape_edit as se
from .document import Document, Settings

NUDGE_ID = 1001


class ReplacePartsCommand(QUndoCommand):
    """Replace parts by new versions: the common mechanism of every shape edit."""

    def __init__(self, doc: Document, changes: Mapping[int, tuple[Part, Part]],
                 text: str) -> None:
        super().__init__(text)
        self.doc = doc
        self.changes = dict(changes)

    def redo(self) -> None:
        for pid, (_, after) in self.changes.items():
            self.doc.replace_part(pid, after)
        if all(b == a for b, a in self.changes.values()):
            self.setObsolete(True)  # e.g. a symmetric part mirrored: no step in the history

    def undo(self) -> None:
        for pid, (before, _) in self.changes.items():
            self.doc.replace_part(pid, before)


def _edit_shapes(doc: Document, ids: Iterable[int], edit: Callable[[Shape], Shape],
                 before: Mapping[int, Part] | None) -> dict[int, tuple[Part, Part]]:
    out = {}
    for pid in ids:
        b = before[pid] if before is not None else doc.part(pid)
        out[pid] = (b, replace(b, shape=edit(b.shape)))
    return out


class MovePartsCommand(ReplacePartsCommand):
    """Move parts by (dx, dy) mm; successive arrow-key nudges merge into one step."""

    def __init__(self, doc: Document, ids: Iterable[int], dx: float, dy: float,
                 before: Mapping[int, Part] | None = None, nudge: bool = False) -> None:
        ids = list(ids)
        super().__init__(doc, _edit_shapes(doc, ids, lambda s: se.translated(s, dx, dy), before),
                         f"Move {_count(ids)}")
        self.nudge = nudge

    def id(self) -> int:
        return NUDGE_ID if self.nudge else -1

    def mergeWith(self, other: QUndoCommand) -> bool:
        if not (isinstance(other, MovePartsCommand) and other.nudge
                and other.changes.keys() == self.changes.keys()):
            return False
        for pid, (_, after) in other.changes.items():
            self.changes[pid] = (self.changes[pid][0], after)
        return True


class MirrorPartsCommand(ReplacePartsCommand):
    """Mirror parts about a vertical (x = about) or horizontal (y = about) line, mm.

    ``about`` defaults to the centre of the parts' joint bounding box.
    """

    def __init__(self, doc: Document, ids: Iterable[int], vertical_line: bool,
                 about: float | None = None) -> None:
        ids = list(ids)
        if about is None:
            bb = [se.bounds(doc.part(i).shape) for i in ids]
            lo = min(b[0 if vertical_line else 1] for b in bb)
            hi = max(b[2 if vertical_line else 3] for b in bb)
            about = 0.5 * (lo + hi)
        super().__init__(doc, _edit_shapes(doc, ids, lambda s: se.mirrored(s, vertical_line,
                                                                           about), None),
                         f"Mirror {_count(ids)} {'left-right' if vertical_line else 'up-down'}")


class MoveVertexCommand(ReplacePartsCommand):
    """Move one vertex (or circle/ellipse handle) to a point, mm."""

    def __init__(self, doc: Document, pid: int, ref: se.Ref, to: Point,
                 before: Part | None = None) -> None:
        b = {pid: before} if before is not None else None
        super().__init__(doc, _edit_shapes(doc, [pid], lambda s: se.with_vertex_moved(s, ref, to),
                                           b), "Move vertex")


class MoveEdgeCommand(ReplacePartsCommand):
    """Shift one straight edge along its normal by the normal part of ``delta`` (mm)."""

    def __init__(self, doc: Document, pid: int, ref: se.Ref, delta: Point,
                 before: Part | None = None) -> None:
        b = {pid: before} if before is not None else None
        super().__init__(doc, _edit_shapes(doc, [pid], lambda s: se.with_edge_moved(s, ref, delta),
                                           b), "Move edge")


class InsertVertexCommand(ReplacePartsCommand):
    """Split edge ``edge`` with a new vertex at ``at`` (mm)."""

    def __init__(self, doc: Document, pid: int, edge: se.Ref, at: Point) -> None:
        super().__init__(doc, _edit_shapes(
            doc, [pid], lambda s: se.with_vertex_inserted(s, edge, at), None), "Add vertex")


class RemoveVertexCommand(ReplacePartsCommand):
    """Remove one vertex."""

    def __init__(self, doc: Document, pid: int, ref: se.Ref) -> None:
        super().__init__(doc, _edit_shapes(doc, [pid], lambda s: se.with_vertex_removed(s, ref),
                                           None), "Remove vertex")


class SetCornerRadiusCommand(ReplacePartsCommand):
    """Round the corner at one vertex to a radius in mm (0 makes it sharp)."""

    def __init__(self, doc: Document, pid: int, ref: se.Ref, radius_mm: float) -> None:
        super().__init__(doc, _edit_shapes(
            doc, [pid], lambda s: se.with_corner_radius(s, ref, radius_mm), None),
            f"Corner radius {radius_mm:g} mm")


class CutHoleCommand(ReplacePartsCommand):
    """Cut the closed ring ``hole`` (mm) out of a part."""

    def __init__(self, doc: Document, pid: int, hole: tuple[Point, ...]) -> None:
        super().__init__(doc, _edit_shapes(doc, [pid], lambda s: se.with_hole(s, hole), None),
                         "Cut hole")


class ChangePartCommand(ReplacePartsCommand):
    """Replace one part by an edited version (properties panel: name, kind, values, sizes)."""

    def __init__(self, doc: Document, pid: int, after: Part, text: str = "Edit part") -> None:
        super().__init__(doc, {pid: (doc.part(pid), after)}, text)


class AddPartCommand(QUndoCommand):
    """Add a part on top of the others; ``pid`` is its id once done."""

    def __init__(self, doc: Document, part: Part, text: str | None = None) -> None:
        super().__init__(text or f"Add {part.name}")
        self.doc, self.part = doc, part
        self.pid: int | None = None

    def redo(self) -> None:
        self.pid = self.doc.insert_part(self.part, pid=self.pid)

    def undo(self) -> None:
        assert self.pid is not None
        self.doc.remove_part(self.pid)


class RemovePartsCommand(QUndoCommand):
    """Delete parts; undo puts them back at their places with their ids."""

    def __init__(self, doc: Document, ids: Iterable[int]) -> None:
        ids = sorted(ids, key=doc.index)
        super().__init__(f"Delete {_count(ids)}")
        self.doc, self.ids = doc, ids
        self.removed: list[tuple[int, int, Part]] = []

    def redo(self) -> None:
        self.removed = []
        for pid in reversed(self.ids):
            index, part = self.doc.remove_part(pid)
            self.removed.append((pid, index, part))

    def undo(self) -> None:
        for pid, index, part in reversed(self.removed):
            self.doc.insert_part(part, index=index, pid=pid)


class AddPartsCommand(QUndoCommand):
    """Add several parts on top, renamed where their names are taken; ``new_ids`` once done."""

    def __init__(self, doc: Document, parts: Iterable[Part], text: str) -> None:
        super().__init__(text)
        self.doc = doc
        self.parts: list[Part] = []
        for p in parts:
            name = doc.unique_name(p.name, taken=[q.name for q in self.parts])
            self.parts.append(replace(p, name=name))
        self.new_ids: list[int] = []

    def redo(self) -> None:
        ids: list[int | None] = list(self.new_ids) or [None] * len(self.parts)
        pairs = zip(self.parts, ids, strict=True)
        self.new_ids = [self.doc.insert_part(p, pid=i) for p, i in pairs]

    def undo(self) -> None:
        for pid in reversed(self.new_ids):
            self.doc.remove_part(pid)


class DuplicatePartsCommand(AddPartsCommand):
    """Copy parts, offset by (dx, dy) mm, under fresh unique names."""

    def __init__(self, doc: Document, ids: Iterable[int], dx: float, dy: float) -> None:
        ids = sorted(ids, key=doc.index)
        copies = [replace(doc.part(i), shape=se.translated(doc.part(i).shape, dx, dy))
                  for i in ids]
        super().__init__(doc, copies, f"Duplicate {_count(ids)}")


class ChangeSettingsCommand(QUndoCommand):
    """Replace the layout-wide settings (symmetry, boundary, limit, resolution, title)."""

    def __init__(self, doc: Document, after: Settings, text: str = "Change layout settings"
                 ) -> None:
        super().__init__(text)
        self.doc, self.before, self.after = doc, doc.settings, after

    def redo(self) -> None:
        self.doc.set_settings(self.after)

    def undo(self) -> None:
        self.doc.set_settings(self.before)


def _count(ids: list[int]) -> str:
    return "1 part" if len(ids) == 1 else f"{len(ids)} parts"
