"""The Qt-free document model: ids, signals, dirty flag, validation through the parser."""

from __future__ import annotations

import json
import sys
from dataclasses import replace

import pytest
from editor_layouts import every_shape_layout

from app.document import Document, Settings
from solver.layout import Circle, LayoutError, Part, layout_to_json


def test_document_never_imports_qt() -> None:
    # common practice, no source: the model must stay usable without a GUI
    import subprocess
    code = ("import sys, app.document; "
            "print(any(m.startswith('PySide6') for m in sys.modules))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=True).stdout.strip()
    assert out == "False"


def test_load_then_json_is_the_file_json() -> None:
    # common practice, no source: opening then writing a file gives it back unchanged
    layout = every_shape_layout()
    doc = Document(layout)
    assert doc.to_json() == layout_to_json(layout)
    assert doc.to_layout() == layout
    assert not doc.dirty and doc.problem() is None


def test_signals_and_revision() -> None:
    # common practice, no source: one event per change, none for a no-op
    doc = Document(every_shape_layout())
    seen: list[tuple[str, object]] = []
    doc.part_added.connect(lambda i: seen.append(("added", i)))
    doc.part_changed.connect(lambda i: seen.append(("changed", i)))
    doc.part_removed.connect(lambda i: seen.append(("removed", i)))
    doc.dirty_changed.connect(lambda d: seen.append(("dirty", d)))
    rev = doc.revision
    pid = doc.insert_part(Part("Extra", "electrode", Circle((0, 150), 3), volts=1.0))
    doc.replace_part(pid, replace(doc.part(pid), volts=2.0))
    doc.replace_part(pid, doc.part(pid))  # no change: no signal, no revision
    doc.remove_part(pid)
    assert seen == [("added", pid), ("dirty", True), ("changed", pid), ("removed", pid),
                    ("dirty", False)]
    assert doc.revision == rev + 3


def test_removed_part_comes_back_at_its_place_with_its_id() -> None:
    # common practice, no source: undo of a delete restores the part where it was
    doc = Document(every_shape_layout())
    ids = doc.ids()
    index, part = doc.remove_part(ids[2])
    doc.insert_part(part, index=index, pid=ids[2])
    assert doc.ids() == ids and not doc.dirty


def test_invalid_state_is_held_and_reported_not_raised() -> None:
    # DESIGN.md section 2: two different conductors may not overlap
    doc = Document(every_shape_layout())
    bar, ball = doc.id_of("Bar"), doc.id_of("Ball")
    # move the floating ball onto the 5 kV bar: two different conductors overlap
    doc.replace_part(ball, replace(doc.part(ball), shape=Circle((-30.0, 0.0), 6.0)))
    msg = doc.problem()
    assert msg is not None and "Bar" in msg and "Ball" in msg
    with pytest.raises(LayoutError):
        doc.to_layout()
    assert doc.part(bar) == every_shape_layout().parts[0]


def test_unique_names() -> None:
    # DESIGN.md section 2: part names are unique
    doc = Document(every_shape_layout())
    assert doc.unique_name("Ball") == "Ball 2"
    doc.insert_part(Part("Ball 2", "floating", Circle((0, 150), 1), charge=0.0))
    assert doc.unique_name("Ball") == "Ball 3"
    assert doc.unique_name("Ball 2") == "Ball 3"
    assert doc.unique_name("New") == "New"


def test_settings_and_saved_state() -> None:
    # common practice, no source: a document is dirty exactly when it differs from the saved one
    doc = Document(every_shape_layout(), path="/tmp/x.layout.json")
    doc.update_settings(symmetry="axisymmetric")
    assert doc.dirty and doc.snapshot().symmetry == "axisymmetric"
    doc.mark_saved("/tmp/y.layout.json")
    assert not doc.dirty and str(doc.path) == "/tmp/y.layout.json"
    doc.set_settings(Settings())
    assert doc.dirty
    json.dumps(doc.to_json())


def test_clear_gives_an_empty_clean_document() -> None:
    # common practice, no source: New gives an empty, clean, untitled layout
    doc = Document(every_shape_layout())
    doc.clear()
    assert len(doc) == 0 and doc.path is None and not doc.dirty
    assert "no conductor" not in (doc.problem() or "")
