"""Help > Keys and mouse: the editor's shortcuts, read from the actions themselves."""

from __future__ import annotations

from html import escape
from typing import TYPE_CHECKING

from PySide6.QtGui import QKeySequence
from PySide6.QtWidgets import QMessageBox

if TYPE_CHECKING:
    from .main_window import MainWindow

GESTURES = (
    ("Wheel", "zoom about the cursor"),
    ("Middle drag, or Space + drag", "pan"),
    ("Click / Shift+click", "select a part / add it to the selection"),
    ("Drag on empty canvas", "select the parts the box touches"),
    ("Drag a selected part", "move the selection (one undo step)"),
    ("Arrow keys (Shift: \u00d710)", "nudge the selection by one grid step"),
    ("Double-click a part", "edit its outline"),
    ("Edit outline: drag a vertex or edge", "move it (an edge moves along its normal)"),
    ("Edit outline: double-click", "add a vertex on an edge / remove a vertex"),
    ("Polygon, wire, hole: click points", "Enter or double-click finishes, Backspace "
                                          "takes back a point, Esc cancels"),
    ("Hole: Shift+drag", "a round hole from its centre out to its rim"),
)


def keys_html(w: MainWindow) -> str:
    """A two-column table: every action with a shortcut, then the mouse gestures."""
    rows = []
    for action in w.actions_.values():
        key = action.shortcut().toString(QKeySequence.SequenceFormat.NativeText)
        if key:
            rows.append((key, action.text().replace("&", "").rstrip("\u2026")))
    rows += GESTURES
    body = "".join(f"<tr><td style='padding-right:14px'><b>{escape(k)}</b></td>"
                   f"<td>{escape(v)}</td></tr>" for k, v in rows)
    return f"<table>{body}</table>"


def show_keys(w: MainWindow) -> None:
    """Show the table (a static QMessageBox call, so tests can replace it)."""
    QMessageBox.information(w, "Keys and mouse", keys_html(w))
