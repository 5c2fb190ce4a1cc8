"""The live field view: background solves shown on the canvas and in the results dock.

The layout is a 5 mm radius rod at 10 kV above a wide grounded plate (planar).  Its peak
surface field has a closed form by the method of images: a cylinder of radius a whose
axis is h above a grounded plane is the equipotential of line charges at
+-s, s = sqrt(h^2 - a^2), so at the point nearest the plane

    E_max = V s / (a (h - a) ln((h + s) / a)).

(Method of images for a cylinder over a plane; e.g. E. Kuffel, W. S. Zaengl, J. Kuffel,
High Voltage Engineering: Fundamentals, 2nd ed., ch. 4, field of a cylinder above a
plane -- from memory.)  The plate is finite (300 mm wide), so the check allows 5 %.
"""

from __future__ import annotations

import math
from dataclasses import replace

import numpy as np
import pytest
from live_helpers import WAIT_MS, live_window, open_window, wait_settled
from PySide6.QtCore import QSettings

import solver
from app.live_view import attach_live_view
from solver.layout import Circle, FixedLimit, Layout, Part, Rect

ROD_V = 10_000.0
ROD_R = 5.0


def rod_over_plate(height_mm: float, limit: float = 3.0) -> Layout:
    return Layout(parts=(
        Part("Rod", "electrode", Circle((0.0, height_mm), ROD_R), volts=ROD_V),
        Part("Plate", "electrode", Rect((-150.0, -20.0), (150.0, 0.0)), volts=0.0)),
        limit=FixedLimit(limit), resolution="draft")


def image_peak_kV_per_mm(height_mm: float) -> float:
    """Cylinder over a plane by the method of images (see the module docstring)."""
    a, h = ROD_R, height_mm
    s = math.sqrt(h * h - a * a)
    return ROD_V / 1000.0 * s / (a * (h - a) * math.log((h + s) / a))


def shown_peak(live) -> float:  # noqa: ANN001
    """The rod's peak field as the results table displays it (kV/mm)."""
    return float(live.panel.peak_text(0).split()[0])


def move_rod(w, height_mm: float) -> None:  # noqa: ANN001
    pid = w.doc.id_of("Rod")
    part = w.doc.part(pid)
    w.doc.replace_part(pid, replace(part, shape=Circle((0.0, height_mm), ROD_R)))


def test_closer_ground_raises_displayed_peak(qtbot, tmp_path) -> None:
    w, live = live_window(qtbot, tmp_path, rod_over_plate(20.0))
    far = shown_peak(live)
    assert far == pytest.approx(image_peak_kV_per_mm(20.0), rel=0.05)
    move_rod(w, 12.0)
    wait_settled(qtbot, w)
    near = shown_peak(live)
    assert near == pytest.approx(image_peak_kV_per_mm(12.0), rel=0.05)
    assert near > far * 1.3
    assert live.status.text().startswith("\u25cf")


def test_burst_of_edits_ends_with_the_last_one(qtbot, tmp_path) -> None:
    w, live = live_window(qtbot, tmp_path, rod_over_plate(30.0))
    shown: list[int] = []
    live.runner.result_ready.connect(lambda r: shown.append(r.revision))
    heights = [28.0, 25.0, 22.0, 19.0, 16.0, 13.0]
    for h in heights:
        move_rod(w, h)
    wait_settled(qtbot, w)
    assert live.overlays.result.solution.layout.parts[0].shape == Circle((0.0, 13.0), ROD_R)
    assert shown_peak(live) == pytest.approx(image_peak_kV_per_mm(13.0), rel=0.05)
    # latest wins: the intermediate requests were replaced, never all solved and shown
    assert shown[-1] == w.doc.revision
    assert len(shown) < len(heights)
    assert shown == sorted(shown)


def test_hot_spot_appears_above_the_limit_and_goes_below(qtbot, tmp_path) -> None:
    w, live = live_window(qtbot, tmp_path, rod_over_plate(20.0, limit=3.0))
    peak = image_peak_kV_per_mm(20.0)  # about 1.25 kV/mm
    assert live.overlays.hot_spot_count() == 0
    w.doc.update_settings(limit=FixedLimit(1.0))
    wait_settled(qtbot, w)
    assert live.overlays.hot_spot_count() >= 1
    hs = live.overlays.result.solution.hot_spots[0]
    assert hs.part == "Rod" and hs.field_kV_per_mm > 1.0
    assert hs.field_kV_per_mm == pytest.approx(peak, rel=0.05)
    assert hs.at_mm[1] < 20.0  # on the side facing the plate
    assert "kV/mm" in live.panel.hot_list.item(0).text()
    assert live.overlays.groups["hot_spots"].childItems()
    w.doc.update_settings(limit=FixedLimit(2.0))
    wait_settled(qtbot, w)
    assert live.overlays.hot_spot_count() == 0
    assert not live.overlays.groups["hot_spots"].childItems()


def test_clicking_a_hot_spot_zooms_there(qtbot, tmp_path) -> None:
    w, live = live_window(qtbot, tmp_path, rod_over_plate(20.0, limit=1.0))
    item = live.panel.hot_list.item(0)
    before = w.canvas.px_per_mm()
    live.panel.hot_list.itemClicked.emit(item)
    x, y = live.overlays.result.solution.hot_spots[0].at_mm
    centre = w.canvas.mapToScene(w.canvas.viewport().rect().center())
    assert w.canvas.px_per_mm() > before
    assert abs(centre.x() - x) < 2.0 and abs(centre.y() - y) < 2.0


def test_overlay_toggles_are_remembered(qtbot, tmp_path) -> None:
    w, live = live_window(qtbot, tmp_path, rod_over_plate(20.0))
    assert live.overlays.groups["equipotentials"].childItems()
    live.actions["equipotentials"].setChecked(False)
    assert not live.overlays.groups["equipotentials"].isVisible()
    w.settings.sync()
    w.live.runner.wait()
    again = QSettings(str(tmp_path / "settings.ini"), QSettings.Format.IniFormat)
    assert str(again.value("overlays/equipotentials")).lower() == "false"
    w2 = open_window(qtbot, tmp_path, rod_over_plate(20.0))
    live2 = attach_live_view(w2)
    assert not live2.actions["equipotentials"].isChecked()
    assert live2.actions["potential_map"].isChecked()
    live2.runner.wait()


def test_invalid_layout_is_reported_not_solved(qtbot, tmp_path) -> None:
    w, live = live_window(qtbot, tmp_path, rod_over_plate(20.0))
    move_rod(w, 3.0)  # the rod now overlaps the grounded plate
    qtbot.waitUntil(lambda: live.runner.state == "failed", timeout=WAIT_MS)
    assert live.status.text().startswith("\u2716")
    assert live.status.toolTip()
    assert live.overlays.result is not None  # the last good field stays shown


def test_drafts_while_dragging_then_full_solve_on_release(qtbot, tmp_path) -> None:
    w, live = live_window(qtbot, tmp_path, replace(rod_over_plate(20.0), resolution="normal"))
    assert live.overlays.result.resolution == "normal"
    assert live.overlays.result.solution.estimated_error_percent is not None
    w.doc.set_interacting(True)
    move_rod(w, 16.0)
    wait_settled(qtbot, w)
    draft = live.overlays.result
    assert draft.resolution == "draft"
    assert draft.solution.estimated_error_percent is None
    w.doc.set_interacting(False)
    qtbot.waitUntil(lambda: live.overlays.result.resolution == "normal"
                    and not live.runner.busy(), timeout=WAIT_MS)
    full = live.overlays.result.solution
    assert len(full.x_mm) > len(draft.solution.x_mm)
    assert full.estimated_error_percent is not None
    assert shown_peak(live) == pytest.approx(image_peak_kV_per_mm(16.0), rel=0.05)


def test_cursor_readout_matches_the_solver_and_the_image_field(qtbot, tmp_path) -> None:
    w, live = live_window(qtbot, tmp_path, rod_over_plate(20.0))
    x, y = 0.0, 10.0  # on the axis, midway between the rod and the plate
    w.canvas.cursor_moved.emit(x, y)
    text = live.probe.text()
    phi_shown = float(text.split("=")[1].split()[0])
    e_shown = float(text.split("=")[2].split()[0])
    phi, e = solver.sample(live.runner.latest.solution, np.array([[x, y]]))
    assert phi_shown == pytest.approx(phi[0] / 1000, rel=1e-3)
    assert e_shown == pytest.approx(float(np.hypot(*e[0])), rel=2e-3)
    # method of images on the axis: E(y) = lambda/(2 pi eps) * (1/(s - y) + 1/(s + y))
    a, h = ROD_R, 20.0
    s = math.sqrt(h * h - a * a)
    per_lambda = ROD_V / 1000.0 / math.log((h + s) / a)
    assert e_shown == pytest.approx(per_lambda * (1 / (s - y) + 1 / (s + y)), rel=0.05)
    assert "kV" in text and "kV/mm" in text


def test_field_map_is_off_by_default_and_brightest_near_the_rod(qtbot, tmp_path) -> None:
    w, live = live_window(qtbot, tmp_path, rod_over_plate(20.0))
    assert not live.actions["field_map"].isChecked()
    assert not live.overlays.groups["field_map"].isVisible()
    live.actions["field_map"].setChecked(True)
    assert live.overlays.groups["field_map"].isVisible()
    res = live.overlays.result
    e = res.raster_E
    iy, ix = np.unravel_index(np.nanargmax(e), e.shape)
    x0, y0, x1, y1 = res.raster_box_mm
    x = x0 + (ix + 0.5) * (x1 - x0) / e.shape[1]
    y = y0 + (iy + 0.5) * (y1 - y0) / e.shape[0]
    # the strongest field lies in the gap just under the rod (image-charge geometry); the
    # field along the rod's underside is nearly flat, so on a draft raster the brightest
    # pixel may sit anywhere below the rod, |x| < its radius
    assert abs(x) < ROD_R and 10.0 < y < 17.0
    assert np.nanmax(e) == pytest.approx(image_peak_kV_per_mm(20.0), rel=0.15)
