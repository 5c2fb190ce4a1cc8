"""Helpers for editor tests that drive the real window with the mouse."""

from __future__ import annotations

from pathlib import Path

from PySide6.QtCore import QPoint, QPointF, QSettings, Qt

from app.main_window import MainWindow
from solver.layout import Layout


def open_window(qtbot, tmp_path: Path, layout: Layout | None = None,  # noqa: ANN001
                path: str | None = None) -> MainWindow:
    """A shown editor window with private settings (recent files) under ``tmp_path``."""
    settings = QSettings(str(tmp_path / "settings.ini"), QSettings.Format.IniFormat)
    w = MainWindow(layout, path, settings=settings)
    # closing at teardown must not stop at the unsaved-changes question
    qtbot.addWidget(w, before_close_func=lambda win: win.doc.mark_saved(
        win.doc.path or tmp_path / "teardown.layout.json"))
    w.resize(1200, 800)
    w.show()
    qtbot.waitExposed(w)
    w.canvas.zoom_to_fit()
    return w


def px(w: MainWindow, x_mm: float, y_mm: float) -> QPoint:
    """Viewport pixel of the scene point (x, y) mm."""
    return w.canvas.mapFromScene(QPointF(x_mm, y_mm))


def mouse_drag(qtbot, w: MainWindow, a: tuple[float, float], b: tuple[float, float],  # noqa: ANN001
               steps: int = 4) -> None:
    """Press at ``a`` (mm), move in steps, release at ``b``: real events on the viewport."""
    vp = w.canvas.viewport()
    pa, pb = px(w, *a), px(w, *b)
    qtbot.mousePress(vp, Qt.MouseButton.LeftButton, pos=pa)
    try:
        for k in range(1, steps + 1):
            t = k / steps
            qtbot.mouseMove(vp, QPoint(round(pa.x() + t * (pb.x() - pa.x())),
                                       round(pa.y() + t * (pb.y() - pa.y()))))
    finally:
        qtbot.mouseRelease(vp, Qt.MouseButton.LeftButton, pos=pb)


def click(qtbot, w: MainWindow, at: tuple[float, float]) -> None:  # noqa: ANN001
    qtbot.mouseClick(w.canvas.viewport(), Qt.MouseButton.LeftButton, pos=px(w, *at))
