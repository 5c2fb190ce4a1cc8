"""File > Export in the editor: what the canvas shows is what the files hold.

The layout is the coaxial check case (REFERENCES.md §1.1, standard textbook result:
E(a) = V0 / (a ln(b/a)) on the core).
"""

from __future__ import annotations

import csv
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest
from pypdf import PdfReader
from PySide6.QtCore import QSettings
from report_cases import COAX_A_MM, coax_field, coax_layout

from app.export_actions import attach_export_actions
from app.live_view import attach_live_view
from app.main_window import MainWindow

WAIT_MS = 60_000


@pytest.fixture
def window(qtbot, tmp_path: Path):  # noqa: ANN001, ANN201
    settings = QSettings(str(tmp_path / "settings.ini"), QSettings.Format.IniFormat)
    w = MainWindow(replace(coax_layout(), resolution="draft"), settings=settings)
    w.files.confirm_discard = lambda: True  # no modal question when the test closes it
    qtbot.addWidget(w)
    attach_live_view(w)
    attach_export_actions(w)
    w.show()
    qtbot.waitExposed(w)
    yield w
    w.live.runner.wait(WAIT_MS)


def wait_solved(qtbot, w) -> None:  # noqa: ANN001
    qtbot.waitUntil(lambda: w.live.is_ready() and w.live.runner.state == "ready",
                    timeout=WAIT_MS)


def test_export_menu_entries_sit_in_the_file_menu(window) -> None:  # noqa: ANN001
    menu = window.recent_menu.parent()
    texts = [a.text() for a in menu.actions()]
    for expected in ("Export &report…", "Export &surface field (CSV)…",
                     "Export field &grid (CSV)…"):
        assert expected in texts
    assert texts.index("Export &report…") < len(texts) - 1  # above Quit


def test_nothing_is_written_before_the_field_is_solved(window, qtbot,  # noqa: ANN001
                                                      tmp_path: Path) -> None:
    if window.live.runner.latest is None:
        assert not window.exports.export_report(str(tmp_path / "early.pdf"))
        assert "Nothing to export" in window.exports.last_problem
        assert not (tmp_path / "early.pdf").exists()
    wait_solved(qtbot, window)
    doc = window.doc  # a newer revision than the one shown
    doc.set_settings(replace(doc.settings, title="Coaxial check, edited"))
    assert not window.exports.export_surface(str(tmp_path / "stale.csv"))
    assert not (tmp_path / "stale.csv").exists()
    wait_solved(qtbot, window)
    assert window.exports.export_surface(str(tmp_path / "fresh.csv"))


def test_report_and_csv_from_the_editor(window, qtbot, tmp_path: Path) -> None:  # noqa: ANN001
    wait_solved(qtbot, window)
    pdf = tmp_path / "coax.pdf"
    assert window.exports.export_report(str(pdf)), window.exports.last_problem
    assert len(PdfReader(pdf).pages) >= 2  # figure, tables (continued when they overflow)
    surface = tmp_path / "coax_surface.csv"
    assert window.exports.export_surface(str(surface))
    with surface.open(newline="") as f:
        core = [float(r["E_kV_per_mm"]) for r in csv.DictReader(f) if r["part"] == "Core"]
    # E(a) = V0 / (a ln(b/a)) (REFERENCES.md §1.1); a draft grid, so 2 %
    assert np.allclose(core, coax_field(np.array(COAX_A_MM)), rtol=0.02)
    grid = tmp_path / "coax_grid.csv"
    assert window.exports.export_grid(str(grid), step_mm=5.0)
    assert grid.read_text().startswith("x_mm,y_mm,region,V,")


def test_export_uses_the_canvas_overlays_and_levels(window, qtbot) -> None:  # noqa: ANN001
    wait_solved(qtbot, window)
    window.live.actions["field_lines"].setChecked(False)
    window.live.actions["potential_map"].setChecked(False)
    ov = window.exports.overlays()
    assert (ov.field_lines, ov.potential_map, ov.equipotentials, ov.hot_spots) == (
        False, False, True, True)
    shown = [level for level, _ in window.live.runner.latest.equipotentials]
    assert ov.equipotential_levels_V == pytest.approx(shown)
    from app.report import render_figure

    fig = render_figure(window.live.runner.latest.solution, ov, "coax")
    ax = fig.axes[0]
    assert not ax.images, "no colour map when the canvas shows none"
    assert len(fig.axes) == 1, "and so no colour bar"
    dashed = [ln for ln in ax.lines if ln.get_linestyle() not in ("-", "None", "none")
              and ln.get_gid() != "inception_path"]  # dotted, its own overlay
    assert not dashed, "no field lines when the canvas hides them"
