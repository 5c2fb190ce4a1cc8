"""Panels and window actions: every edit lands in the document as one undoable step."""

from __future__ import annotations

import pytest
from editor_layouts import every_shape_layout
from editor_window import open_window
from PySide6.QtCore import Qt
from PySide6.QtWidgets import QInputDialog

from solver.layout import FixedLimit, PeekLimit, layout_to_json

ORIGINAL = layout_to_json(every_shape_layout())


@pytest.fixture
def win(qtbot, tmp_path):  # noqa: ANN001, ANN201
    return open_window(qtbot, tmp_path, every_shape_layout())


def _commit(field, value: float) -> None:  # noqa: ANN001
    field.setFocus()
    field.setValue(value)
    field.editingFinished.emit()


def test_properties_edit_potential_in_kV_and_radius_in_mm(win) -> None:  # noqa: ANN001
    # from memory: 1 kV = 1000 V; the file keeps volts
    ball = win.doc.id_of("Ball")
    win.selection.set([ball])
    panel = win.properties_panel
    panel.kind.setCurrentIndex(0)  # floating -> electrode, at 0 V
    assert win.doc.part(ball).kind == "electrode" and win.doc.part(ball).volts == 0.0
    _commit(panel.volts, -7.5)
    assert win.doc.part(ball).volts == -7500.0
    radius = panel.shape_form.fields[2][0]
    _commit(radius, 4.25)
    assert win.doc.part(ball).shape.radius == 4.25
    assert win.stack.count() == 3
    for _ in range(3):
        win.stack.undo()
    assert win.doc.to_json() == ORIGINAL


def test_rename_refuses_a_taken_name(win) -> None:  # noqa: ANN001
    # DESIGN.md section 2: part names are unique
    win.selection.set([win.doc.id_of("Ball")])
    name = win.properties_panel.name
    name.setText("Bar")
    name.editingFinished.emit()
    assert win.doc.id_of("Ball") is not None and win.stack.count() == 0
    assert "already used" in win.statusBar().currentMessage()
    name.setText("Sphere")
    name.editingFinished.emit()
    assert win.doc.id_of("Sphere") is not None


def test_vertex_table_edit_and_bad_number(win) -> None:  # noqa: ANN001
    # common practice, no source: a cell that is not a number changes nothing and says so
    plate = win.doc.id_of("Plate")
    win.selection.set([plate])
    table = win.properties_panel.shape_form.table
    table.item(1, 0).setText("65.5")
    assert win.doc.part(plate).shape.points[1] == (65.5, -80.0)
    table.item(1, 1).setText("abc")
    assert win.doc.part(plate).shape.points[1] == (65.5, -80.0)
    assert "not a number" in win.statusBar().currentMessage()
    table.item(3, 2).setText("2.5")
    assert win.doc.part(plate).shape.corner_radius == (1.0, 1.0, 0.0, 2.5)
    table.item(3, 2).setText("-1")
    assert win.doc.part(plate).shape.corner_radius == (1.0, 1.0, 0.0, 2.5)
    assert "corner radius" in win.statusBar().currentMessage()
    hole = win.properties_panel.shape_form.tables[1][1]
    hole.item(2, 0).setText("12")
    assert win.doc.part(plate).shape.holes[0][2] == (12.0, -65.0)


def test_layout_settings_panel(qtbot, win) -> None:  # noqa: ANN001
    # DESIGN.md section 2: boundary, limit, symmetry and resolution keys; axisymmetric parts at r
    #   >= 0
    panel = win.settings_panel
    panel.limit.setCurrentIndex(1)
    assert isinstance(win.doc.settings.limit, PeekLimit)
    _commit(panel.pressure, 80.0)
    assert win.doc.settings.limit.pressure_kPa == 80.0
    panel.limit.setCurrentIndex(0)
    _commit(panel.kv, 2.2)
    assert win.doc.settings.limit == FixedLimit(2.2)
    panel.boundary.setCurrentIndex(0)
    assert win.doc.settings.boundary.type == "open"
    panel.boundary.setCurrentIndex(2)
    b = win.doc.settings.boundary
    assert b.type == "box" and b.volts is None and b.min[0] < -60 and b.max[0] > 120
    panel.symmetry.setCurrentIndex(1)
    assert win.doc.settings.symmetry == "axisymmetric"
    assert win.doc.settings.boundary.min[0] == 0.0  # the box now starts at the axis
    # parts at x < 0 are refused in axisymmetry, and the status bar says so
    assert "r = " in (win.doc.problem() or "")
    qtbot.waitUntil(lambda: "r = " in win.problem_label.text(), timeout=2000)
    panel.resolution.setCurrentIndex(2)
    assert win.doc.settings.resolution == "fine"
    while win.stack.canUndo():
        win.stack.undo()
    assert win.doc.to_json() == ORIGINAL


def test_window_actions_duplicate_mirror_delete(win) -> None:  # noqa: ANN001
    # from memory: mirroring about a vertical line maps x to 2a - x
    bar = win.doc.id_of("Bar")
    win.selection.set([bar])
    win.actions_["duplicate"].trigger()
    copy = win.selection.ids[0]
    assert copy != bar and win.doc.part(copy).name == "Bar 2"
    win.actions_["mirror_v"].trigger()
    assert win.doc.part(copy).shape.min[0] == win.doc.part(bar).shape.min[0] + 5 * \
        win.snapper.grid_mm
    win.selection.set([bar])
    win.actions_["mirror_h"].trigger()
    win.actions_["delete"].trigger()
    assert bar not in win.doc
    for _ in range(4):
        win.stack.undo()
    assert win.doc.to_json() == ORIGINAL


def test_delete_in_outline_tool_removes_the_current_vertex(qtbot, win, monkeypatch) -> None:  # noqa: ANN001
    # common practice, no source: Delete acts on what the current tool points at
    from editor_window import click
    plate = win.doc.id_of("Plate")
    win.selection.set([plate])
    win.actions_["tool_vertex"].trigger()
    click(qtbot, win, (60.0, -60.0))
    monkeypatch.setattr(QInputDialog, "getDouble", staticmethod(lambda *a, **k: (5.0, True)))
    win.actions_["corner"].trigger()
    assert win.doc.part(plate).shape.corner_radius == (1.0, 1.0, 5.0, 0.0)
    win.actions_["delete"].trigger()
    assert len(win.doc.part(plate).shape.points) == 3 and plate in win.doc


def test_tool_shortcut_keys(qtbot, win) -> None:  # noqa: ANN001
    # common practice, no source: single-key tool shortcuts work when the canvas has focus
    win.canvas.setFocus()
    qtbot.keyClick(win.canvas, Qt.Key.Key_C)
    assert win.canvas.tool.name == "circle"
    qtbot.keyClick(win.canvas, Qt.Key.Key_S)
    assert win.canvas.tool.name == "select"


def test_copy_paste_between_layouts_and_cut(qtbot, win) -> None:  # noqa: ANN001
    # common practice, no source: copy, cut and paste carry parts whole, one undo step each
    from PySide6.QtGui import QGuiApplication
    lens, lead = win.doc.id_of("Lens"), win.doc.id_of("Lead")
    win.selection.set([lens, lead])
    win.actions_["copy"].trigger()
    win.actions_["paste"].trigger()  # over the originals: offset and renamed
    new = win.selection.ids
    assert [win.doc.part(i).name for i in new] == ["Lens 2", "Lead 2"]
    d = 5 * win.snapper.grid_mm
    assert win.doc.part(new[0]).shape.center == (0.0 + d, 60.0 + d)
    win.stack.undo()
    assert win.doc.to_json() == ORIGINAL
    win.doc.clear()
    win.actions_["paste"].trigger()  # into an empty layout: where they were
    assert [p for _, p in win.doc.parts()] == list(every_shape_layout().parts[2:5:2])
    win.selection.set(win.doc.ids())
    win.actions_["cut"].trigger()
    assert len(win.doc) == 0
    QGuiApplication.clipboard().setText("not parts at all")
    win.actions_["paste"].trigger()
    assert len(win.doc) == 0 and "no Stresslens parts" in win.statusBar().currentMessage()


def test_properties_show_one_shape_form_at_a_time(win) -> None:  # noqa: ANN001
    # common practice, no source: the panel shows the selected part's fields only
    from app.panels.shape_form import ShapeForm
    for name in ("Bar", "Ball", "Lens", "Plate", "Lead", "Bar"):
        win.selection.set([win.doc.id_of(name)])
    forms = win.properties_panel.shape_box.findChildren(ShapeForm)
    assert len(forms) == 1 and forms[0] is win.properties_panel.shape_form


def test_axisymmetric_layouts_mirror_only_up_down(qtbot, tmp_path) -> None:  # noqa: ANN001
    # DESIGN.md section 2: in axisymmetry x is the radius r >= 0
    from editor_window import open_window as open_win

    from solver.layout import Layout, Part, Path
    layout = Layout(parts=(Part("Wire", "electrode", Path(((10.0, 0.0), (30.0, 8.0)), 1.0),
                                volts=1.0),), symmetry="axisymmetric")
    w = open_win(qtbot, tmp_path, layout)
    w.selection.set(w.doc.ids())
    w.actions_["mirror_v"].trigger()
    assert w.stack.count() == 0 and "only up-down" in w.statusBar().currentMessage()
    w.actions_["mirror_h"].trigger()
    assert w.stack.count() == 1


def test_two_selected_parts_show_their_clearance(win) -> None:  # noqa: ANN001
    # from memory: the gap between a circle (centre 30, r 6) and the side x = -20 of the
    # bar is 30 - 6 - (-20) = 44 mm along the line through the centre
    win.selection.set([win.doc.id_of("Bar"), win.doc.id_of("Ball")])
    text = win.properties_panel.caption.text()
    assert "Clearance between 'Bar' and 'Ball': 44 mm." in text
    # the lead wire's end circle (centre (80, 0), radius 1) to the ball: 80 - 1 - 36 = 43 mm
    win.selection.set([win.doc.id_of("Ball"), win.doc.id_of("Lead")])
    assert "43 mm" in win.properties_panel.caption.text()


def test_undo_waits_for_a_drag_to_end(win) -> None:  # noqa: ANN001
    # common practice, no source: one thing at a time; undo acts on finished steps
    win.selection.set([win.doc.id_of("Ball")])
    win.actions_["mirror_h"].trigger()  # a circle mirrored is the same circle: no step
    assert win.stack.count() == 0
    win.selection.set([win.doc.id_of("Lead")])
    win.actions_["mirror_h"].trigger()
    assert win.stack.count() == 1
    win.selection.set([win.doc.id_of("Ball")])
    tool = win.canvas.tools["select"]
    tool.press((30.0, 0.0))
    tool.move((40.0, 5.0), True)
    assert not win.actions_["undo"].isEnabled()
    win.actions_["undo"].trigger()
    tool.release((40.0, 5.0))
    assert win.actions_["undo"].isEnabled() and win.stack.count() == 2


def test_part_edits_wait_for_a_drag_to_end(win) -> None:  # noqa: ANN001
    # common practice, no source: a part being dragged cannot be deleted under the mouse
    ball = win.doc.id_of("Ball")
    win.selection.set([ball])
    win.snapper.enabled = False
    tool = win.canvas.tools["select"]
    tool.press((30.0, 0.0))
    tool.move((40.0, 5.0), True)
    win.actions_["delete"].trigger()
    win.actions_["paste"].trigger()
    assert ball in win.doc and len(win.doc) == 5
    tool.release((40.0, 5.0))
    assert win.actions_["delete"].isEnabled()
    assert win.doc.part(ball).shape.center == (40.0, 5.0)
