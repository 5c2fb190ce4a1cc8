"""The sweep dialog: sweep in the background, plot, goal seek, apply as one undo step.

Numbers are checked against the closed-form coaxial field E = U / (r ln(R/r))
(REFERENCES.md section 1.1; standard textbook result).
"""

from __future__ import annotations

import csv
import math
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest
from PySide6.QtGui import QUndoStack
from PySide6.QtWidgets import QFileDialog, QLabel
from report_cases import COAX_B_MM
from scipy.optimize import brentq
from sweep_cases import LIMIT, coax_e, sweep_coax

from app.caution import CAUTION
from app.document import Document
from app.sweep_dialog import SweepDialog
from solver.layout import Circle


@pytest.fixture
def dialog(qtbot) -> SweepDialog:  # noqa: ANN001
    doc = Document(sweep_coax())
    dlg = SweepDialog(doc, QUndoStack())
    qtbot.addWidget(dlg)
    dlg.part_box.setCurrentText("Core")
    dlg.param_box.setCurrentText("radius")
    dlg.resolution.setCurrentText("draft")
    dlg.runner.setCurrentIndex(0)  # this process: no worker start-up in a unit test
    dlg.start.setValue(4.0)
    dlg.stop.setValue(12.0)
    dlg.steps.setValue(5)
    dlg.show()
    return dlg


def _wait(qtbot, dlg: SweepDialog) -> None:  # noqa: ANN001
    qtbot.waitUntil(lambda: not dlg.is_running(), timeout=120_000)


def test_sweep_plots_and_lists_the_analytic_curve(qtbot, dialog: SweepDialog,
                                                   tmp_path: Path) -> None:
    dialog.run_sweep()
    _wait(qtbot, dialog)
    res = dialog.result
    assert res is not None and res.values.tolist() == pytest.approx([4, 6, 8, 10, 12])
    exact = np.array([coax_e(r) for r in res.values])
    # draft grid: within 2 % (the tolerance REFERENCES.md 1.1 suggests for E_max)
    np.testing.assert_allclose(res.peak_field_kV_per_mm, exact, rtol=0.02)
    line = dialog.figure.axes[0].lines[0]
    np.testing.assert_array_equal(line.get_ydata(), res.peak_field_kV_per_mm)
    assert dialog.figure.axes[0].get_xlabel() == "radius (mm)"
    assert dialog.figure.axes[0].get_ylabel() == "peak surface field (kV/mm)"
    assert dialog.table.rowCount() == 5
    assert dialog.table.item(2, 1).text() == f"{res.peak_field_kV_per_mm[2]:.4g}"
    assert dialog.progress.value() == 5
    assert any(lbl.text() == CAUTION for lbl in dialog.findChildren(QLabel))
    dialog.grab().save(str(tmp_path / "sweep_dialog.png"))


def test_goal_apply_is_one_undoable_command(qtbot, dialog: SweepDialog) -> None:
    doc, stack = dialog.doc, dialog.stack
    before = doc.part(doc.id_of("Core"))
    dialog.seek_goal()
    _wait(qtbot, dialog)
    goal = dialog.goal
    # the radius where U / (r ln(R/r)) = 0.8 x limit, r < R/e (REFERENCES.md 1.1);
    # on the draft grid the field is ~1 % high, which moves r by ~2 %
    r_exact = brentq(lambda r: coax_e(r) - 0.8 * LIMIT, 1.0, COAX_B_MM / math.e)
    assert goal is not None and goal.value == pytest.approx(r_exact, rel=0.03)
    assert dialog.apply_button.isEnabled()
    dialog.apply_goal()
    assert stack.count() == 1
    assert dialog.now_label.text() == f"now {goal.value:.4g} mm"  # follows the document
    assert doc.part(doc.id_of("Core")).shape == Circle(center=(0.0, 0.0), radius=goal.value)
    stack.undo()
    assert doc.part(doc.id_of("Core")) == before
    stack.redo()
    assert doc.part(doc.id_of("Core")).shape.radius == goal.value


def test_goal_out_of_reach_is_said_and_cannot_be_applied(qtbot, dialog: SweepDialog) -> None:
    # the least field is e U / R = 0.54 kV/mm at r = R/e (REFERENCES.md 1.1) > 0.3 x 1
    dialog.fraction.setValue(0.3)
    dialog.seek_goal()
    _wait(qtbot, dialog)
    assert dialog.goal is not None and dialog.goal.value is None
    assert "keeps the peak field at or below 0.3 x the limit" in dialog.status.text()
    assert not dialog.apply_button.isEnabled()


def test_cancel_stops_and_keeps_what_was_done(qtbot, dialog: SweepDialog) -> None:
    dialog.steps.setValue(200)
    dialog.run_sweep()
    assert dialog.cancel_button.isEnabled() and not dialog.run_button.isEnabled()
    dialog.cancel()
    _wait(qtbot, dialog)
    assert dialog.result is not None and dialog.result.cancelled
    assert "(cancelled: " in dialog.status.text()
    assert dialog.run_button.isEnabled() and not dialog.cancel_button.isEnabled()


def test_export_csv_writes_every_step(qtbot, dialog: SweepDialog, tmp_path: Path,
                                      monkeypatch: pytest.MonkeyPatch) -> None:
    dialog.run_sweep()
    _wait(qtbot, dialog)
    out = tmp_path / "sweep.csv"
    monkeypatch.setattr(QFileDialog, "getSaveFileName",
                        staticmethod(lambda *a, **k: (str(out), "")))
    dialog.export_csv()
    with out.open(newline="") as f:
        rows = list(csv.DictReader(f))
    assert [float(r["radius_mm"]) for r in rows] == pytest.approx([4, 6, 8, 10, 12])
    assert float(rows[0]["peak_field_kV_per_mm"]) == pytest.approx(coax_e(4.0), rel=0.02)


def test_an_invalid_layout_is_refused_with_its_message(qtbot, dialog: SweepDialog) -> None:
    doc = dialog.doc
    pid = doc.id_of("Core")
    doc.replace_part(pid, replace(doc.part(pid), shape=Circle((0.0, 0.0), 55.0)))
    dialog.run_sweep()
    assert not dialog.is_running()
    assert "cannot be solved" in dialog.status.text() and "Core" in dialog.status.text()


def test_main_window_menu_opens_the_dialog(qtbot, tmp_path: Path) -> None:  # noqa: ANN001
    from editor_window import open_window

    w = open_window(qtbot, tmp_path, sweep_coax())
    menus = [a.text() for a in w.menuBar().actions()]
    assert menus.index("&Analysis") == menus.index("&Help") - 1
    w.actions_["sweep"].trigger()
    dlg = w.sweep_dialog
    assert [dlg.part_box.itemText(i) for i in range(dlg.part_box.count())] == ["Core", "Sheath"]
    dlg.close()


def test_part_list_follows_the_document(qtbot, dialog: SweepDialog) -> None:
    doc = dialog.doc
    pid = doc.id_of("Sheath")
    doc.replace_part(pid, replace(doc.part(pid), name="Tube"))
    assert [dialog.part_box.itemText(i) for i in range(dialog.part_box.count())] == \
        ["Core", "Tube"]
    assert (dialog.part_box.currentText(), dialog.param_box.currentText()) == ("Core", "radius")


def test_goal_seek_reuses_the_sweep_on_show(qtbot, dialog: SweepDialog) -> None:
    dialog.run_sweep()
    _wait(qtbot, dialog)
    shown = dialog.result
    dialog.seek_goal()
    _wait(qtbot, dialog)
    assert dialog.goal.coarse is shown  # the same range and layout: no step solved again
    dialog.resolution.setCurrentText("normal")  # another grid: the sweep no longer fits
    dialog.stop.setValue(8.0)
    dialog.seek_goal()
    _wait(qtbot, dialog)
    assert dialog.goal.coarse is not shown and max(dialog.goal.coarse.values) == 8.0
