"""Every undo command: redo changes the document, undo restores it exactly (JSON)."""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import replace

import pytest
from editor_layouts import every_shape_layout
from PySide6.QtGui import QUndoStack

from app import commands as c
from app.document import Document, Settings
from app.shape_edit import EditError
from solver.layout import Circle, FixedLimit, Part


def _ids(doc: Document, *names: str) -> list[int]:
    return [doc.id_of(n) for n in names]  # type: ignore[misc]


CASES: dict[str, Callable[[Document], c.QUndoCommand]] = {
    "add": lambda d: c.AddPartCommand(d, Part("New", "electrode", Circle((0, 150), 4),
                                              volts=-3000.0)),
    "add_many": lambda d: c.AddPartsCommand(d, [
        Part("Ball", "floating", Circle((0, 150), 4), charge=1e-9),
        Part("Ball", "dielectric", Circle((20, 150), 4), permittivity=2.0)], "Paste"),
    "remove": lambda d: c.RemovePartsCommand(d, _ids(d, "Ball", "Bar", "Lead")),
    "duplicate": lambda d: c.DuplicatePartsCommand(d, _ids(d, "Bar", "Lens"), 5.0, -5.0),
    "move": lambda d: c.MovePartsCommand(d, _ids(d, "Bar", "Plate"), 3.0, 4.0),
    "nudge": lambda d: c.MovePartsCommand(d, _ids(d, "Ball"), 0.5, 0.0, nudge=True),
    "mirror_v": lambda d: c.MirrorPartsCommand(d, _ids(d, "Lens", "Lead"), True),
    "mirror_h": lambda d: c.MirrorPartsCommand(d, _ids(d, "Plate"), False, about=0.0),
    "move_vertex_poly": lambda d: c.MoveVertexCommand(d, *_ids(d, "Plate"), (0, 2),
                                                      (70.0, -55.0)),
    "move_vertex_rect": lambda d: c.MoveVertexCommand(d, *_ids(d, "Bar"), (0, 2), (-15.0, 12.0)),
    "move_handle_circle": lambda d: c.MoveVertexCommand(d, *_ids(d, "Ball"), (0, 0), (38, 0)),
    "move_edge": lambda d: c.MoveEdgeCommand(d, *_ids(d, "Plate"), (0, 1), (5.0, 3.0)),
    "move_hole_edge": lambda d: c.MoveEdgeCommand(d, *_ids(d, "Plate"), (1, 0), (0.0, 1.0)),
    "insert_vertex": lambda d: c.InsertVertexCommand(d, *_ids(d, "Plate"), (0, 0), (0.0, -85.0)),
    "remove_vertex": lambda d: c.RemoveVertexCommand(d, *_ids(d, "Lead"), (0, 1)),
    "corner_radius": lambda d: c.SetCornerRadiusCommand(d, *_ids(d, "Plate"), (0, 2), 4.0),
    "cut_hole": lambda d: c.CutHoleCommand(d, *_ids(d, "Bar"), ((-35.0, -5.0), (-25.0, -5.0),
                                                                 (-30.0, 5.0))),
    "change_part": lambda d: c.ChangePartCommand(
        d, *_ids(d, "Ball"), replace(d.part(d.id_of("Ball")), name="Sphere", kind="electrode",
                                     volts=100.0, charge=None)),
    "settings": lambda d: c.ChangeSettingsCommand(
        d, Settings(title="Other", symmetry="axisymmetric", limit=FixedLimit(2.0),
                    resolution="fine")),
}


@pytest.mark.parametrize("name", sorted(CASES))
def test_redo_then_undo_restores_the_document(qapp, name: str) -> None:
    # common practice, no source: an undo must give back exactly what was there
    doc = Document(every_shape_layout())
    original = doc.to_json()
    stack = QUndoStack()
    stack.push(CASES[name](doc))
    changed = doc.to_json()
    assert changed != original, "the command changed nothing"
    stack.undo()
    assert doc.to_json() == original and not doc.dirty
    stack.redo()
    assert doc.to_json() == changed
    stack.undo()
    assert doc.to_json() == original


def test_every_command_class_is_covered() -> None:
    # common practice, no source: every undo command has a redo-then-undo check
    built = {type(f(Document(every_shape_layout()))) for f in CASES.values()}
    classes = {v for v in vars(c).values() if isinstance(v, type)
               and issubclass(v, c.QUndoCommand) and v.__module__ == c.__name__
               and v is not c.ReplacePartsCommand}
    assert classes <= built, classes - built


def test_added_parts_get_free_names(qapp) -> None:
    # DESIGN.md section 2: part names are unique
    doc = Document(every_shape_layout())
    QUndoStack().push(CASES["add_many"](doc))
    assert [p.name for _, p in doc.parts()][-2:] == ["Ball 2", "Ball 3"]


def test_nudges_merge_into_one_step(qapp) -> None:
    # common practice, no source: repeated arrow-key nudges are one undo step
    doc = Document(every_shape_layout())
    stack = QUndoStack()
    (ball,) = _ids(doc, "Ball")
    for _ in range(4):
        stack.push(c.MovePartsCommand(doc, [ball], 0.5, 0.0, nudge=True))
    assert stack.count() == 1
    assert doc.part(ball).shape.center == (32.0, 0.0)
    stack.undo()
    assert doc.part(ball).shape.center == (30.0, 0.0)


def test_impossible_edits_say_why() -> None:
    # common practice, no source: an impossible edit is refused with a reason
    doc = Document(every_shape_layout())
    cut = c.CutHoleCommand(doc, doc.id_of("Bar"), ((-35, -5), (-25, -5), (-30, 5)))
    cut.redo()
    with pytest.raises(EditError, match="at least 3"):
        c.RemoveVertexCommand(doc, doc.id_of("Bar"), (1, 0))  # the hole is a triangle
    with pytest.raises(EditError, match="inside"):
        c.CutHoleCommand(doc, doc.id_of("Ball"), ((0, 0), (1, 0), (0, 1)))
    with pytest.raises(EditError, match="wire"):
        c.CutHoleCommand(doc, doc.id_of("Lead"), ((80, 0), (81, 0), (80, 1)))
