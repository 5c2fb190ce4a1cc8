"""New, open, save, save as, recent files and the unsaved-changes prompt.

Dialogs are the static ``QFileDialog`` / ``QMessageBox`` functions, so tests replace
them with ``monkeypatch``.  Saving is atomic (temporary file in the same folder, then
``os.replace``): a failed save leaves the old file whole.  Opening a bad file shows its
:class:`solver.layout.LayoutError` message and leaves the current document untouched.
"""

from __future__ import annotations

import json
from pathlib import Path

from PySide6.QtCore import QObject, QSettings, Signal
from PySide6.QtWidgets import QFileDialog, QMessageBox, QWidget

from solver.layout import Layout, LayoutError, dumps_layout, load_layout, parse_layout

from .atomic_file import write_atomically
from .document import Document

FILE_FILTER = "Stresslens layouts (*.layout.json);;JSON files (*.json);;All files (*)"
RECENT_KEY = "recent_files"
MAX_RECENT = 8


class SaveError(OSError):
    """A layout could not be written; the message names the path and the reason."""


class FileActions(QObject):
    """File handling for one window: ``parent`` owns the dialogs, ``doc`` the content.

    ``recent_changed`` fires when the recent-files list changes; ``opened(path)`` after
    a file was loaded.
    """

    recent_changed = Signal()
    opened = Signal(str)

    def __init__(self, parent: QWidget, doc: Document, settings: QSettings) -> None:
        super().__init__(parent)
        self.window, self.doc, self.settings = parent, doc, settings

    # ------------------------------------------------------------------ commands

    def new(self) -> bool:
        """Start an empty layout (after asking about unsaved changes)."""
        if not self.confirm_discard():
            return False
        self.doc.clear()
        return True

    def open(self, path: str | None = None) -> bool:
        """Open ``path`` (or ask for one); False when cancelled or the file is bad."""
        if not self.confirm_discard():
            return False
        if path is None:
            path, _ = QFileDialog.getOpenFileName(self.window, "Open layout", self._folder(),
                                                  FILE_FILTER)
            if not path:
                return False
        return self.load(path)

    def load(self, path: str) -> bool:
        """Load ``path`` without asking about unsaved changes.

        A file that is not a readable layout gets a message box and changes nothing.  A
        well-formed layout whose geometry breaks a rule (parts overlapping, an outline
        crossing itself) can still be opened for repair, after a question naming the
        problem: the editor is where it gets fixed.
        """
        layout: Layout | None
        try:
            layout = load_layout(path)
        except LayoutError as exc:
            layout = self._open_for_repair(path, exc)
        if layout is None:
            return False
        self.doc.load(layout, path)
        self._remember(path)
        self.opened.emit(str(path))
        return True

    def save(self) -> bool:
        """Save to the current file (or ask where, for a new layout)."""
        if self.doc.path is None:
            return self.save_as()
        return self._write(self.doc.path)

    def save_as(self) -> bool:
        """Ask for a file name and save there."""
        start = str(self.doc.path) if self.doc.path else str(Path(self._folder()) /
                                                              "untitled.layout.json")
        path, _ = QFileDialog.getSaveFileName(self.window, "Save layout as", start, FILE_FILTER)
        if not path:
            return False
        if not path.endswith(".json"):
            path += ".layout.json"
        return self._write(Path(path))

    def confirm_discard(self) -> bool:
        """True when there are no unsaved changes, or the user saved or discarded them."""
        if not self.doc.dirty:
            return True
        name = self.doc.path.name if self.doc.path else "the new layout"
        answer = QMessageBox.question(
            self.window, "Unsaved changes", f"Save the changes to {name}?",
            QMessageBox.StandardButton.Save | QMessageBox.StandardButton.Discard
            | QMessageBox.StandardButton.Cancel, QMessageBox.StandardButton.Save)
        if answer == QMessageBox.StandardButton.Save:
            return self.save()
        return answer == QMessageBox.StandardButton.Discard

    # ------------------------------------------------------------------ recent files

    def recent(self) -> list[str]:
        """Recently opened or saved layouts that still exist, newest first."""
        raw = self.settings.value(RECENT_KEY, []) or []
        items = [raw] if isinstance(raw, str) else list(raw)
        return [p for p in items if Path(p).is_file()][:MAX_RECENT]

    def _remember(self, path: str | Path) -> None:
        p = str(Path(path).resolve())
        self.settings.setValue(RECENT_KEY, [p, *[q for q in self.recent() if q != p]][:MAX_RECENT])
        self.settings.sync()
        self.recent_changed.emit()

    # ------------------------------------------------------------------ internals

    def _open_for_repair(self, path: str, exc: LayoutError) -> Layout | None:
        try:
            layout = loads_layout_unchecked(Path(path).read_bytes(), Path(path).name)
        except (LayoutError, OSError):
            QMessageBox.warning(self.window, "Cannot open layout",
                                f"{Path(path).name} was not opened:\n\n{exc}")
            return None
        answer = QMessageBox.question(
            self.window, "Layout has a problem",
            f"{Path(path).name} cannot be solved as it is:\n\n{exc}\n\n"
            "Open it anyway to fix it?",
            QMessageBox.StandardButton.Open | QMessageBox.StandardButton.Cancel,
            QMessageBox.StandardButton.Open)
        return layout if answer == QMessageBox.StandardButton.Open else None

    def _write(self, path: Path) -> bool:
        text = dumps_layout(self.doc.snapshot())
        try:
            write_atomically(Path(path), lambda f: f.write(text), text=True, error=SaveError)
        except SaveError as exc:
            QMessageBox.critical(self.window, "Cannot save layout",
                                 f"The layout was not saved:\n\n{exc}\n\n"
                                 "Your drawing is still open; save it somewhere else.")
            return False
        self.doc.mark_saved(path)
        self._remember(path)
        return True

    def _folder(self) -> str:
        if self.doc.path is not None:
            return str(self.doc.path.parent)
        recent = self.recent()
        return str(Path(recent[0]).parent) if recent else str(Path.cwd())


def loads_layout_unchecked(data: bytes, source: str) -> Layout:
    """Parse layout bytes with every check but the geometric ones (for repair)."""
    try:
        obj = json.loads(data.decode("utf-8-sig"))
    except (UnicodeDecodeError, json.JSONDecodeError, RecursionError) as exc:
        raise LayoutError(f"{source}: {exc}") from None
    return parse_layout(obj, check_geometry=False)
