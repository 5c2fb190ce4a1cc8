"""Probes, profiles, the equipotential step, colour scales and capacitances of the live view.

Reference values:

* Coaxial cylinders (inner radius a at U, grounded bore b): the surface field of the inner
  conductor is the same all round, E = U / (a ln(b/a)), and the capacitance per unit
  length is C' = 2 pi eps0 / ln(b/a) (standard textbook result; REFERENCES.md section 1.1,
  e.g. Jim Lux, "Estimating the magnitude of the Electric Field",
  https://icestuff.com/~energy21/efield1.htm).
* Method of images for a cylinder over a grounded plane (see test_live_field.py).
"""

from __future__ import annotations

import math
from dataclasses import replace

import numpy as np
import pytest
from editor_window import mouse_drag
from live_helpers import WAIT_MS, live_window, wait_settled
from PySide6.QtCore import QRectF, QSettings

import solver
from app.overlays import obstacle_rects
from app.probes import line_profile
from app.solve_runner import EquipotentialStep, equipotential_levels
from app.step_control import load_step
from solver.layout import Circle, FixedLimit, Layout, Part, Polygon, Rect

EPS0 = 8.8541878128e-12  # F/m, CODATA 2018
A_MM, B_MM, U_V = 5.0, 20.0, 10_000.0


def coax(resolution: str = "normal") -> Layout:
    t = np.linspace(0.0, 2 * math.pi, 2000, endpoint=False)
    hole = tuple((B_MM * math.cos(a), B_MM * math.sin(a)) for a in t)
    box = ((-30.0, -30.0), (30.0, -30.0), (30.0, 30.0), (-30.0, 30.0))
    return Layout(parts=(
        Part("Inner", "electrode", Circle((0.0, 0.0), A_MM), volts=U_V),
        Part("Outer", "electrode", Polygon(box, holes=(hole,)), volts=0.0)),
        limit=FixedLimit(3.0), resolution=resolution)


def rod_over_plate(height_mm: float = 20.0, resolution: str = "draft") -> Layout:
    return Layout(parts=(
        Part("Rod", "electrode", Circle((0.0, height_mm), 5.0), volts=10_000.0),
        Part("Plate", "electrode", Rect((-150.0, -20.0), (150.0, 0.0)), volts=0.0)),
        limit=FixedLimit(3.0), resolution=resolution)


def drag_probe(live, a: tuple[float, float], b: tuple[float, float]) -> None:  # noqa: ANN001
    tool = live.probe_tool
    tool.ctx.snapper.enabled = False
    tool.press(a)
    tool.move(b, True)
    tool.release(b)


def test_line_probe_plots_what_the_solver_samples(qtbot, tmp_path) -> None:
    w, live = live_window(qtbot, tmp_path, rod_over_plate())
    drag_probe(live, (0.0, 1.0), (0.0, 14.0))
    qtbot.waitUntil(lambda: "V" in live.profile.series, timeout=WAIT_MS)
    assert live.profile.mode() == "line" and live.profile_dock.isVisible()
    assert live.probe_line.isVisible() and live.probe_line.segment == ((0.0, 1.0), (0.0, 14.0))
    s, e = live.profile.series["E"]
    _, v = live.profile.series["V"]
    pts = np.column_stack([np.zeros_like(s), 1.0 + s])
    phi, field = solver.sample(live.runner.latest.solution, pts)
    np.testing.assert_allclose(v, phi / 1000.0, rtol=1e-9)
    prof = line_profile(live.runner.latest.solution, live.probe_tool.segment)
    clear = ~prof.inside  # the grid cells touching the rod or the plate are shaded, not drawn
    assert clear.sum() > 0.8 * len(s) and np.isnan(e[~clear]).all()
    np.testing.assert_allclose(e[clear], np.hypot(field[clear, 0], field[clear, 1]),
                               rtol=1e-9)
    # method of images, on the axis between rod and plane: E(y) = lambda' (1/(s-y) + 1/(s+y))
    a, h = 5.0, 20.0
    sh = math.sqrt(h * h - a * a)
    y = 1.0 + s
    exact = 10.0 / math.log((h + sh) / a) * (1 / (sh - y) + 1 / (sh + y))
    np.testing.assert_allclose(e[clear], exact[clear], rtol=0.05)

    assert "kV/mm" in live.profile.info.text()
    assert live.profile.ax.get_xlabel() == "distance from A (mm)"
    assert "(kV/mm)" in live.profile.ax.get_ylabel() and "(kV)" in live.profile.ax_v.get_ylabel()


def test_with_nothing_selected_the_strongest_part_is_plotted(qtbot, tmp_path) -> None:
    w, live = live_window(qtbot, tmp_path, coax("draft"))
    qtbot.waitUntil(lambda: "E" in live.profile.series, timeout=WAIT_MS)
    # common practice, no source: in a coax the inner conductor carries the higher field
    assert live.profile.mode() == "surface" and "Inner" in live.profile.title
    assert "strongest" in live.profile.info.text()


def test_line_profile_marks_the_inside_of_conductors(qtbot, tmp_path) -> None:
    w, live = live_window(qtbot, tmp_path, rod_over_plate())
    prof = line_profile(live.runner.latest.solution, ((0.0, 10.0), (0.0, 20.0)))
    # common practice, no source: a conductor is an equipotential with no field inside
    inside = prof.inside
    assert inside[-1] and not inside[0]
    deep = prof.s_mm > 6.0  # the rod's surface is at y = 15 mm, 5 mm from A
    assert np.allclose(prof.phi_V[deep], 10_000.0, rtol=1e-9)
    assert np.all(prof.E_kV_per_mm[deep] == 0.0)
    assert inside[deep].all()


def test_coax_surface_profile_is_flat_at_the_analytic_value(qtbot, tmp_path) -> None:
    w, live = live_window(qtbot, tmp_path, coax())
    w.selection.set([w.doc.id_of("Inner")])
    qtbot.waitUntil(lambda: "Inner" in live.profile.title, timeout=WAIT_MS)
    assert live.profile.mode() == "surface"
    s, e = live.profile.series["E"]
    exact = U_V / 1000.0 / (A_MM * math.log(B_MM / A_MM))  # REFERENCES.md 1.1
    # samples cover the whole outline, s from 0 to the circumference 2 pi a
    assert 0.0 <= s[0] < 0.02 * 2 * math.pi * A_MM
    assert s[-1] == pytest.approx(2 * math.pi * A_MM, rel=0.02)
    assert (e.max() - e.min()) / exact < 0.01
    np.testing.assert_allclose(e, exact, rtol=0.01)
    _, limit = live.profile.series["limit"]
    assert np.all(limit == 3.0)
    assert "arc length" in live.profile.ax.get_xlabel() and "(mm)" in live.profile.ax.get_xlabel()
    assert "(kV/mm)" in live.profile.ax.get_ylabel()


def test_capacitance_matrix_in_pF_per_m_matches_the_coax(qtbot, tmp_path) -> None:
    w, live = live_window(qtbot, tmp_path, coax())
    c = live.panel.capacitance_pF()
    exact = 2 * math.pi * EPS0 / math.log(B_MM / A_MM) * 1e12  # pF/m, REFERENCES.md 1.1
    assert c.shape == (2, 2)
    assert c[0, 0] == pytest.approx(exact, rel=0.01)
    assert c[0, 1] == pytest.approx(-exact, rel=0.01)  # all of the inner's flux ends on the outer
    assert "pF/m" in live.panel.cap_label.text()


def test_results_table_fits_the_dock_without_a_horizontal_scroll(qtbot, tmp_path) -> None:
    w, live = live_window(qtbot, tmp_path, coax())
    qtbot.wait(50)
    assert not live.panel.table.horizontalScrollBar().isVisible()
    for col in range(1, live.panel.table.columnCount()):
        assert "(" in live.panel.table.horizontalHeaderItem(col).text()  # a unit on every column


@pytest.mark.parametrize(("step", "count"), [
    (EquipotentialStep(10.0, "%"), 9),   # 1, 2, ... 9 kV
    (EquipotentialStep(5.0, "%"), 19),
    (EquipotentialStep(30.0, "%"), 3),   # 3, 6, 9 kV
    (EquipotentialStep(2.0, "kV"), 4),   # 2, 4, 6, 8 kV
    (EquipotentialStep(2.5, "kV"), 3),   # 2.5, 5, 7.5 kV
])
def test_equipotential_step_sets_the_levels(qtbot, tmp_path, step, count) -> None:  # noqa: ANN001
    w, live = live_window(qtbot, tmp_path, coax("draft"))
    before = live.runner.latest.solution
    live.step_control.set_step(step)
    live.step_control._changed()
    qtbot.waitUntil(lambda: live.overlays.result.step == step and not live.runner.busy(),
                    timeout=WAIT_MS)
    res = live.overlays.result
    assert res.solution is before  # redrawn from the same solve, not solved again
    assert len(res.equipotentials) == count
    paths = [it for it in live.overlays.groups["equipotentials"].childItems()
             if type(it).__name__ == "QGraphicsPathItem"]
    assert len(paths) == count
    # common practice, no source: the coax potential is U ln(b/r)/ln(b/a), so the level V
    # is the circle r = b (a/b)^(V/U)
    level, lines = res.equipotentials[0]
    r = np.hypot(*np.vstack(lines).T)
    np.testing.assert_allclose(r, B_MM * (A_MM / B_MM) ** (level / U_V), rtol=0.02)
    again = QSettings(str(tmp_path / "settings.ini"), QSettings.Format.IniFormat)
    assert load_step(again) == step


def test_too_fine_a_step_is_widened_and_said(qtbot, tmp_path) -> None:
    w, live = live_window(qtbot, tmp_path, coax("draft"))
    levels, coarse = equipotential_levels(live.runner.latest.solution,
                                          EquipotentialStep(0.01, "kV"))
    assert coarse and 0 < len(levels) <= 51


def test_switching_the_unit_keeps_the_lines(qtbot, tmp_path) -> None:
    w, live = live_window(qtbot, tmp_path, coax("draft"))
    live.step_control.set_step(EquipotentialStep(20.0, "%"))
    live.step_control.unit.setCurrentIndex(1)  # kV: 20 % of 10 kV
    assert live.step_control.step() == EquipotentialStep(2.0, "kV")


def test_colour_scales_follow_the_maps_shown(qtbot, tmp_path) -> None:
    w, live = live_window(qtbot, tmp_path, rod_over_plate())
    scale = live.scale
    assert scale.isVisible()
    assert [t for t, *_ in scale.scales] == ["Potential (kV)"]
    _, lo, hi, _, _ = scale.scales[0]
    assert (lo, hi) == (0.0, 10.0)
    live.actions["field_map"].setChecked(True)
    titles = [t for t, *_ in scale.scales]
    assert len(titles) == 2 and "(kV/mm)" in titles[1]
    assert scale.scales[1][2] == pytest.approx(3.0)  # darkest at the limit
    live.actions["potential_map"].setChecked(False)
    live.actions["field_map"].setChecked(False)
    assert not scale.isVisible()
    image = scale.grab().toImage()  # it paints without error
    assert image.width() > 100


def test_equipotential_labels_cover_no_other_label(qtbot, tmp_path) -> None:
    w, live = live_window(qtbot, tmp_path, replace(rod_over_plate(), limit=FixedLimit(0.5)))
    canvas = w.canvas
    vt = canvas.viewportTransform()
    tags = [t for t in live.overlays.tags if t.isVisible()]
    assert tags
    boxes = [t.deviceTransform(vt).mapRect(t.boundingRect()) for t in tags]
    others = obstacle_rects(canvas, live.overlays.groups["hot_spots"])
    assert others  # part labels and hot-spot markers are there to avoid
    assert live.scale.isVisible()
    others.append(QRectF(live.scale.geometry()))  # and the colour scale
    for i, box in enumerate(boxes):
        assert QRectF(canvas.viewport().rect()).contains(box)
        assert not any(box.intersects(o) for o in others)
        assert not any(box.intersects(b) for b in boxes[i + 1:])


def test_a_real_mouse_drag_ends_with_a_full_solve_of_the_new_place(qtbot, tmp_path) -> None:
    w, live = live_window(qtbot, tmp_path, rod_over_plate(20.0, "normal"))
    start = live.overlays.result.solution.peak_field_kV_per_mm
    seen: list[str] = []
    live.runner.result_ready.connect(lambda r: seen.append(r.resolution))
    w.snapper.enabled = False
    mouse_drag(qtbot, w, (0.0, 20.0), (0.0, 11.0), steps=6)
    wait_settled(qtbot, w)
    qtbot.waitUntil(lambda: live.overlays.result.resolution == "normal"
                    and not live.runner.busy(), timeout=WAIT_MS)
    rod = w.doc.part(w.doc.id_of("Rod")).shape
    assert rod.center[1] == pytest.approx(11.0, abs=0.5)
    end = live.overlays.result.solution
    assert end.layout.parts[0].shape == rod
    assert end.peak_field_kV_per_mm > 1.3 * start  # the gap shrank from 15 mm to about 6 mm
    assert seen[-1] == "normal"
    assert w.stack.count() == 1  # one undoable move


def test_the_probe_is_drawn_with_the_real_mouse(qtbot, tmp_path) -> None:
    w, live = live_window(qtbot, tmp_path, rod_over_plate())
    w.snapper.enabled = False
    w.actions_["tool_probe"].trigger()
    assert w.canvas.tool is live.probe_tool
    mouse_drag(qtbot, w, (-20.0, 8.0), (20.0, 8.0))
    (ax, ay), (bx, by) = live.probe_tool.segment
    px_mm = 1.0 / w.canvas.px_per_mm()  # a mouse lands on whole pixels
    assert abs(ax + 20.0) < 2 * px_mm and abs(bx - 20.0) < 2 * px_mm
    assert abs(ay - 8.0) < 2 * px_mm and abs(by - 8.0) < 2 * px_mm
    qtbot.waitUntil(lambda: "V" in live.profile.series, timeout=WAIT_MS)
    s, e = live.profile.series["E"]
    # common practice, no source: on a line parallel to the plate, under the rod's axis,
    # the field is strongest right below the rod (the middle of the segment)
    k = int(np.nanargmax(e))
    assert abs(s[k] - s[-1] / 2) < 0.1 * s[-1]
    assert w.doc.to_layout() == rod_over_plate()  # probing edits nothing


def test_the_profile_is_saved_as_csv_and_as_a_plot(qtbot, tmp_path) -> None:
    import csv

    w, live = live_window(qtbot, tmp_path, coax("draft"))
    w.selection.set([w.doc.id_of("Inner")])
    qtbot.waitUntil(lambda: "Inner" in live.profile.title, timeout=WAIT_MS)
    out = tmp_path / "inner.csv"
    assert live.profile.save(str(out))
    rows = list(csv.reader(out.open(encoding="utf-8")))
    assert rows[0] == ["part", "ring", "arc_length_mm", "x_mm", "y_mm", "E_kV_per_mm",
                       "limit_kV_per_mm"]
    e = np.array([float(r[5]) for r in rows[1:]])
    np.testing.assert_allclose(e, live.profile.series["E"][1], rtol=1e-5)
    png = tmp_path / "inner.png"
    assert live.profile.save(str(png))
    assert png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    assert not live.profile.figure.texts  # the caution went on the saved file only
    drag_probe(live, (6.0, 0.0), (19.0, 0.0))
    qtbot.waitUntil(lambda: "V" in live.profile.series, timeout=WAIT_MS)
    assert live.profile.save(str(out))
    rows = list(csv.reader(out.open(encoding="utf-8")))
    assert rows[0] == ["distance_mm", "x_mm", "y_mm", "V_kV", "E_kV_per_mm", "at_conductor"]
    # REFERENCES.md 1.1: V(r) = U ln(b/r) / ln(b/a) between the conductors
    r = np.array([float(row[1]) for row in rows[1:]])
    v = np.array([float(row[3]) for row in rows[1:]])
    np.testing.assert_allclose(v, U_V / 1000 * np.log(B_MM / r) / math.log(B_MM / A_MM),
                               atol=0.02 * U_V / 1000)


def test_saving_refuses_an_unknown_type_and_an_empty_profile(qapp, tmp_path) -> None:
    # common practice, no source: a refused save names the problem and writes nothing
    from app.panels.profile_panel import ProfilePanel
    from app.profile_export import ProfileExportError, save_profile

    panel = ProfilePanel()
    with pytest.raises(ProfileExportError, match="no profile"):
        save_profile(panel, tmp_path / "x.csv")
    panel.rows = [["a"], [1]]
    with pytest.raises(ProfileExportError, match=r"\.csv, \.png"):
        save_profile(panel, tmp_path / "x.txt")
    assert not list(tmp_path.iterdir())
