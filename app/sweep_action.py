"""The main window's entry for the sweep dialog: an *Analysis* menu before *Help*.

Kept apart from :mod:`app.sweep_dialog` so opening the editor does not import the
dialog's matplotlib canvas; the dialog is built on first use.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from PySide6.QtGui import QAction

from .icons import icon

if TYPE_CHECKING:
    from .main_window import MainWindow


def add_sweep_action(w: MainWindow) -> QAction:
    """Add *Analysis > Sweep and goal seek...* to ``w`` (also in ``w.actions_``)."""
    act = QAction(icon("sweep"), "&Sweep and goal seek\u2026", w)
    act.setToolTip("Sweep one parameter of a part, plot the peak field, find the value "
                   "that meets a target")
    act.triggered.connect(lambda _checked=False: _open(w))
    bar = w.menuBar()
    help_menu = next((a for a in bar.actions() if a.text().replace("&", "") == "Help"), None)
    menu = bar.addMenu("&Analysis") if help_menu is None else None
    if menu is None:
        from PySide6.QtWidgets import QMenu

        menu = QMenu("&Analysis", bar)
        bar.insertMenu(help_menu, menu)
    menu.addAction(act)
    w.actions_["sweep"] = act
    return act


def _open(w: MainWindow) -> None:
    from .sweep_dialog import open_sweep_dialog

    open_sweep_dialog(w)
