"""Real mouse events on the canvas viewport: draw every shape kind, edit, select, move.

Coordinates are checked in the layout JSON, within the snapping tolerance: one grid
step at the current zoom (snapping is on, as a user has it).
"""

from __future__ import annotations

import math
import re

import pytest
from editor_layouts import every_shape_layout
from editor_window import click, mouse_drag, open_window, px
from PySide6.QtCore import Qt

from solver.layout import Layout


@pytest.fixture
def empty(qtbot, tmp_path):  # noqa: ANN001, ANN201
    w = open_window(qtbot, tmp_path, Layout(parts=()))
    return w


def _grid(w) -> float:  # noqa: ANN001
    return w.snapper.grid_mm


def _last_shape(w) -> dict:  # noqa: ANN001
    return w.doc.to_json()["parts"][-1]["shape"]


def test_draw_rectangle(qtbot, empty) -> None:  # noqa: ANN001
    # common practice, no source: what is drawn lands where the mouse went, within one grid step
    #   of snapping
    empty.actions_["tool_rectangle"].trigger()
    mouse_drag(qtbot, empty, (-40.0, -20.0), (30.0, 25.0))
    s, g = _last_shape(empty), _grid(empty)
    assert s["type"] == "rect"
    assert s["min"] == pytest.approx([-40.0, -20.0], abs=g)
    assert s["max"] == pytest.approx([30.0, 25.0], abs=g)


def test_draw_circle_and_ellipse(qtbot, empty) -> None:  # noqa: ANN001
    # common practice, no source: what is drawn lands where the mouse went, within snapping
    empty.actions_["tool_circle"].trigger()
    mouse_drag(qtbot, empty, (0.0, 0.0), (30.0, 0.0))
    s, g = _last_shape(empty), _grid(empty)
    assert s["type"] == "circle" and s["center"] == pytest.approx([0, 0], abs=g)
    assert s["radius"] == pytest.approx(30.0, abs=2 * g)
    empty.actions_["tool_ellipse"].trigger()
    mouse_drag(qtbot, empty, (-60.0, 40.0), (-20.0, 60.0))
    s = _last_shape(empty)
    assert s["type"] == "ellipse"
    assert s["center"] == pytest.approx([-40, 50], abs=g)
    assert s["radii"] == pytest.approx([20, 10], abs=g)


def test_draw_polygon_by_clicks_and_double_click(qtbot, empty) -> None:  # noqa: ANN001
    # common practice, no source: what is drawn lands where the mouse went, within snapping
    empty.actions_["tool_polygon"].trigger()
    corners = [(-50.0, -40.0), (40.0, -40.0), (0.0, 40.0)]
    for p in corners[:-1]:
        click(qtbot, empty, p)
    click(qtbot, empty, corners[-1])
    qtbot.mouseDClick(empty.canvas.viewport(), Qt.MouseButton.LeftButton,
                      pos=px(empty, *corners[-1]))
    s, g = _last_shape(empty), _grid(empty)
    assert s["type"] == "polygon" and len(s["points"]) == 3
    for got, want in zip(s["points"], corners, strict=True):
        assert got == pytest.approx(list(want), abs=g)


def test_draw_wire_with_enter_and_cancel_polygon_with_escape(qtbot, empty) -> None:  # noqa: ANN001
    # common practice, no source: Esc cancels, Enter finishes
    empty.actions_["tool_polygon"].trigger()
    for p in [(-50.0, -40.0), (40.0, -40.0), (0.0, 40.0)]:
        click(qtbot, empty, p)
    qtbot.keyClick(empty.canvas, Qt.Key.Key_Escape)
    assert len(empty.doc) == 0
    empty.actions_["tool_path"].trigger()
    for p in [(-50.0, 0.0), (50.0, 0.0)]:
        click(qtbot, empty, p)
    qtbot.keyClick(empty.canvas, Qt.Key.Key_Return)
    s = _last_shape(empty)
    assert s["type"] == "path" and s["width"] == 2.0
    assert s["points"][1] == pytest.approx([50.0, 0.0], abs=_grid(empty))


def test_cut_hole_by_drag(qtbot, empty) -> None:  # noqa: ANN001
    # DESIGN.md section 2: a hole is a ring inside a polygon
    empty.actions_["tool_rectangle"].trigger()
    mouse_drag(qtbot, empty, (-50.0, -40.0), (50.0, 40.0))
    empty.actions_["tool_hole"].trigger()
    mouse_drag(qtbot, empty, (-20.0, -10.0), (20.0, 10.0))
    s, g = _last_shape(empty), _grid(empty)
    assert s["type"] == "polygon" and len(s["holes"]) == 1
    xs = [p[0] for p in s["holes"][0]]
    assert min(xs) == pytest.approx(-20.0, abs=g) and max(xs) == pytest.approx(20.0, abs=g)


def test_drag_vertex_and_edge(qtbot, tmp_path) -> None:  # noqa: ANN001
    # from memory: an edge dragged along its normal stays parallel to itself
    w = open_window(qtbot, tmp_path, every_shape_layout())
    plate = w.doc.id_of("Plate")
    w.selection.set([plate])
    w.actions_["tool_vertex"].trigger()
    mouse_drag(qtbot, w, (60.0, -60.0), (75.0, -45.0))
    pts = w.doc.part(plate).shape.points
    g = _grid(w)
    assert pts[2] == pytest.approx((75.0, -45.0), abs=g)
    mouse_drag(qtbot, w, (-20.0, -80.0), (-20.0, -95.0))  # bottom edge down 15 mm
    pts = w.doc.part(plate).shape.points
    assert pts[0] == pytest.approx((-60.0, -95.0), abs=g)
    assert pts[1][0] == 60.0 and pts[0][1] == pts[1][1]
    assert w.stack.count() == 2


def test_box_select_then_move(qtbot, tmp_path) -> None:  # noqa: ANN001
    # common practice, no source: a box selects what it touches; a drag moves the whole selection
    #   as one undo step
    w = open_window(qtbot, tmp_path, every_shape_layout())
    bar, ball = w.doc.id_of("Bar"), w.doc.id_of("Ball")
    mouse_drag(qtbot, w, (-50.0, 30.0), (45.0, 20.0))  # empty start, touches nothing
    assert w.selection.ids == []
    mouse_drag(qtbot, w, (-50.0, 25.0), (45.0, -5.0))
    assert set(w.selection.ids) == {bar, ball}
    mouse_drag(qtbot, w, (30.0, 0.0), (30.0, 20.0))
    g = _grid(w)
    assert w.doc.part(ball).shape.center == pytest.approx((30.0, 20.0), abs=g)
    dy = w.doc.part(bar).shape.min[1] - (-10.0)
    assert dy == pytest.approx(w.doc.part(ball).shape.center[1], abs=1e-9)
    assert w.stack.count() == 1
    w.stack.undo()
    assert w.doc.to_json() == every_shape_layout_json()


def test_wheel_zoom_keeps_the_point_under_the_cursor(qtbot, empty) -> None:  # noqa: ANN001
    # common practice, no source: zooming about the cursor keeps the point under it fixed
    c = empty.canvas
    at = px(empty, 20.0, 10.0)
    before = c.mapToScene(at)
    s0 = c.px_per_mm()
    c.zoom_by(1.15 ** 3, at.toPointF())
    after = c.mapToScene(at)
    assert c.px_per_mm() == pytest.approx(s0 * 1.15 ** 3)
    assert math.hypot(after.x() - before.x(), after.y() - before.y()) < 2.0 / c.px_per_mm()


def test_cursor_position_in_status_bar(qtbot, empty) -> None:  # noqa: ANN001
    # common practice, no source: the readout shows the scene point under the cursor, to a pixel
    qtbot.mouseMove(empty.canvas.viewport(), px(empty, 12.0, -7.0))
    text = empty.position_label.text()
    m = re.fullmatch(r"x = (-?[\d.]+) mm\s+y = (-?[\d.]+) mm", text)
    assert m is not None, text
    one_px = 1.0 / empty.canvas.px_per_mm()
    assert float(m.group(1)) == pytest.approx(12.0, abs=one_px)
    assert float(m.group(2)) == pytest.approx(-7.0, abs=one_px)


def every_shape_layout_json() -> dict:
    from solver.layout import layout_to_json
    return layout_to_json(every_shape_layout())


def test_double_click_a_part_edits_its_outline(qtbot, tmp_path) -> None:  # noqa: ANN001
    # common practice, no source: double-click on an object opens it for editing
    w = open_window(qtbot, tmp_path, every_shape_layout())
    click(qtbot, w, (-30.0, 0.0))
    qtbot.mouseDClick(w.canvas.viewport(), Qt.MouseButton.LeftButton, pos=px(w, -30.0, 0.0))
    assert w.canvas.tool.name == "vertex" and w.actions_["tool_vertex"].isChecked()
    assert w.selection.ids == [w.doc.id_of("Bar")]


def test_middle_button_and_space_drag_pan_the_view(qtbot, empty) -> None:  # noqa: ANN001
    # common practice, no source: panning moves the content with the mouse, pixel for pixel
    vp = empty.canvas.viewport()
    a, b = px(empty, 0.0, 0.0), px(empty, 20.0, 10.0)
    s0 = empty.canvas.px_per_mm()
    qtbot.mousePress(vp, Qt.MouseButton.MiddleButton, pos=a)
    try:
        qtbot.mouseMove(vp, b)
    finally:
        qtbot.mouseRelease(vp, Qt.MouseButton.MiddleButton, pos=b)
    # the scene point that was under a is now under b: origin moved with the mouse
    assert empty.canvas.mapFromScene(0.0, 0.0) == b
    assert empty.canvas.px_per_mm() == s0 and len(empty.doc) == 0
    qtbot.keyPress(empty.canvas, Qt.Key.Key_Space)
    try:
        mouse_drag(qtbot, empty, (20.0, 10.0), (0.0, 0.0))
    finally:
        qtbot.keyRelease(empty.canvas, Qt.Key.Key_Space)
    assert empty.canvas.mapFromScene(0.0, 0.0) == a
    assert len(empty.doc) == 0 and empty.selection.ids == []


def test_snapping_can_be_switched_off(qtbot, empty) -> None:  # noqa: ANN001
    # common practice, no source: with snapping off a point lands where it is clicked
    empty.actions_["snap"].trigger()
    assert not empty.snapper.enabled
    empty.actions_["tool_circle"].trigger()
    c = empty.canvas
    # a point between grid nodes stays where it is (to the pixel)
    target = (3.3 * _grid(empty), 1.7 * _grid(empty))
    mouse_drag(qtbot, empty, target, (target[0] + 20.0, target[1]))
    s = _last_shape(empty)
    assert s["center"] == pytest.approx(list(target), abs=1.0 / c.px_per_mm())


def test_drawing_tools_show_where_a_click_snaps(qtbot, tmp_path) -> None:  # noqa: ANN001
    # common practice, no source: the snap target is shown before the click
    w = open_window(qtbot, tmp_path, every_shape_layout())
    w.actions_["tool_polygon"].trigger()
    qtbot.mouseMove(w.canvas.viewport(), px(w, -20.3, 10.2))  # near the bar's corner
    assert w.canvas.preview_item.snap == ((-20.0, 10.0), "vertex")
    qtbot.mouseMove(w.canvas.viewport(), px(w, 95.0, -45.0))  # open canvas: grid, no mark
    assert w.canvas.preview_item.snap is None


def test_a_new_window_fits_its_parts_once_shown(qtbot, tmp_path) -> None:  # noqa: ANN001
    # common practice, no source: a layout opens with all its parts in view
    from PySide6.QtCore import QSettings

    from app.main_window import MainWindow
    w = MainWindow(every_shape_layout(), settings=QSettings(
        str(tmp_path / "s.ini"), QSettings.Format.IniFormat))
    qtbot.addWidget(w)
    w.resize(1000, 700)
    w.show()
    qtbot.waitExposed(w)
    vp = w.canvas.viewport().rect()
    # the extent is the 400 mm boundary box around the parts: all of it in view, filling it
    for x, y in [(-200.0, -200.0), (200.0, 200.0)]:
        assert vp.contains(px(w, x, y)), (x, y)
    span = px(w, 200.0, 200.0) - px(w, -200.0, -200.0)
    assert span.x() >= 0.6 * vp.width() or -span.y() >= 0.6 * vp.height()


def test_boundary_box_is_drawn_and_follows_the_settings(qtbot, tmp_path) -> None:  # noqa: ANN001
    # DESIGN.md section 2: a box boundary is grounded (volts) or insulating (volts null)
    from dataclasses import replace as dc_replace

    from solver.layout import Boundary
    w = open_window(qtbot, tmp_path, every_shape_layout())
    item = w.canvas.boundary_item
    assert item.isVisible() and item.rect().getCoords() == (-200.0, -200.0, 200.0, 200.0)
    assert "0 V" in item.label.lines[0]
    w.doc.update_settings(boundary=dc_replace(w.doc.settings.boundary, volts=None))
    assert "insulating" in item.label.lines[0]
    w.doc.update_settings(boundary=Boundary())
    assert not item.isVisible()


def test_problem_parts_and_place_are_marked(qtbot, tmp_path) -> None:  # noqa: ANN001
    # DESIGN.md section 2: different conductors may not touch; the message names both
    from dataclasses import replace as dc_replace

    from solver.layout import Circle
    w = open_window(qtbot, tmp_path, every_shape_layout())
    ball = w.doc.id_of("Ball")
    original = w.doc.part(ball)
    w.doc.replace_part(ball, dc_replace(original, shape=Circle((-21.0, 0.0), 6.0)))
    items = w.canvas.items_by_id
    qtbot.waitUntil(lambda: items[ball].problem, timeout=2000)
    assert items[w.doc.id_of("Bar")].problem and not items[w.doc.id_of("Lens")].problem
    at = w.canvas.preview_item.problem_at
    assert at is not None and -27.0 <= at[0] <= -15.0 and abs(at[1]) <= 6.0
    w.doc.replace_part(ball, original)
    qtbot.waitUntil(lambda: not items[ball].problem, timeout=2000)
    assert w.canvas.preview_item.problem_at is None


def test_the_part_under_the_cursor_is_hinted(qtbot, tmp_path) -> None:  # noqa: ANN001
    # common practice, no source: the select tool shows what a click would pick
    w = open_window(qtbot, tmp_path, every_shape_layout())
    items = w.canvas.items_by_id
    bar, ball = w.doc.id_of("Bar"), w.doc.id_of("Ball")
    qtbot.mouseMove(w.canvas.viewport(), px(w, -30.0, 0.0))
    assert items[bar].hover and not items[ball].hover
    qtbot.mouseMove(w.canvas.viewport(), px(w, 30.0, 0.0))
    assert items[ball].hover and not items[bar].hover
    qtbot.mouseMove(w.canvas.viewport(), px(w, 95.0, -45.0))
    assert not any(i.hover for i in items.values())
