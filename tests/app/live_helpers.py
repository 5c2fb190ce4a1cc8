"""Helpers for tests of the live field view: a shown window with the live view attached."""

from __future__ import annotations

from PySide6.QtCore import QSettings

from app.live_view import attach_live_view
from app.main_window import MainWindow
from solver.layout import Layout

WAIT_MS = 60_000


def open_window(qtbot, tmp_path, layout: Layout) -> MainWindow:  # noqa: ANN001
    """A shown editor window with private settings under ``tmp_path``."""
    settings = QSettings(str(tmp_path / "settings.ini"), QSettings.Format.IniFormat)
    w = MainWindow(layout, settings=settings)
    w.files.confirm_discard = lambda: True  # no modal question when the test closes it
    qtbot.addWidget(w)
    w.resize(1200, 800)
    w.show()
    qtbot.waitExposed(w)
    w.canvas.zoom_to_fit()
    return w


def live_window(qtbot, tmp_path, layout: Layout):  # noqa: ANN001, ANN201
    w = open_window(qtbot, tmp_path, layout)
    live = attach_live_view(w)
    wait_settled(qtbot, w)
    return w, live


def wait_settled(qtbot, w) -> None:  # noqa: ANN001
    """Until the result for the document's current revision is shown."""
    live = w.live
    qtbot.waitUntil(lambda: live.shown_revision == w.doc.revision
                    and not live.runner.busy(), timeout=WAIT_MS)
