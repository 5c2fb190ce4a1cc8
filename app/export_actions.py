"""File > Export: the report (PDF, PNG, SVG) and the CSV exports, from the editor.

The export uses the newest full solve the canvas shows and the same overlay switches
(View menu) and equipotential levels, so the figure shows what the engineer saw.  It
refuses, with a message saying why, while the shown result is a draft (mid-drag),
older than the document, or missing; the user's layout is never touched.  The format
of a report follows the file name's extension (the chosen filter adds one if missing).
"""

from __future__ import annotations

from pathlib import Path

from PySide6.QtCore import QObject
from PySide6.QtGui import QAction, QKeySequence
from PySide6.QtWidgets import QFileDialog, QMenu, QMessageBox

from solver.solution import Solution

from .export import ExportError, write_grid_csv, write_surface_csv
from .inception_view import InceptionOutcome
from .plotting import ReportOverlays
from .report import ReportError, write_report
from .solve_runner import FIELD_LINES

REPORT_FILTERS = {"PDF report, figure and tables (*.pdf)": ".pdf",
                  "PNG picture of the figure (*.png)": ".png",
                  "SVG drawing of the figure (*.svg)": ".svg"}
CSV_FILTER = "Comma-separated values (*.csv)"


class ExportActions(QObject):
    """The export actions of one editor window with a live view (``window.live``)."""

    def __init__(self, window) -> None:  # noqa: ANN001 - MainWindow with .live
        super().__init__(window)
        self.window = window
        self.live = window.live
        self.report_action = self._action("Export &report…", self.export_report,
                                          QKeySequence("Ctrl+E"))
        self.surface_action = self._action("Export &surface field (CSV)…",
                                           self.export_surface)
        self.grid_action = self._action("Export field &grid (CSV)…", self.export_grid)
        self.last_problem = ""
        self._add_to_file_menu()

    def _action(self, text: str, slot, shortcut: QKeySequence | None = None) -> QAction:  # noqa: ANN001
        act = QAction(text, self.window)
        if shortcut is not None:
            act.setShortcut(shortcut)
        act.triggered.connect(lambda _checked=False: slot())
        return act

    def _add_to_file_menu(self) -> None:
        """Put the actions above the File menu's last separator (before Quit)."""
        recent = getattr(self.window, "recent_menu", None)
        menu = recent.parent() if recent is not None else None
        if not isinstance(menu, QMenu):
            return
        acts = [self.report_action, self.surface_action, self.grid_action]
        separators = [a for a in menu.actions() if a.isSeparator()]
        if separators:
            menu.insertActions(separators[-1], acts)
        else:
            menu.addActions(acts)
        menu.insertSeparator(acts[0])

    # ------------------------------------------------------------------ what to export

    def current(self) -> tuple[Solution | None, str]:
        """The solution to export, or None and the reason it cannot be exported now."""
        res = self.live.runner.latest
        if res is None:
            return None, "there is no solved field yet"
        if res.revision != self.window.doc.revision or self.live.runner.busy():
            return None, "the field is still being solved for the latest change; try again " \
                         "when the status says up to date"
        if res.resolution == "draft" and self.window.doc.settings.resolution != "draft":
            return None, "the field shown is a draft solve; release the mouse and wait " \
                         "for the full solve"
        return res.solution, ""

    def overlays(self) -> ReportOverlays:
        """The canvas's overlay switches and its equipotential levels (V)."""
        visible = self.live.overlays.visible
        res = self.live.runner.latest
        levels = tuple(level for level, _ in res.equipotentials) if res else None
        return ReportOverlays(potential_map=visible["potential_map"],
                              equipotentials=visible["equipotentials"],
                              field_lines=visible["field_lines"],
                              hot_spots=visible["hot_spots"], field_strength_map=False,
                              inception_path=visible["inception_path"],
                              equipotential_levels_V=levels, n_field_lines=FIELD_LINES)

    def source_name(self) -> str:
        """The layout's file name, or 'unsaved layout'."""
        path = self.window.doc.path
        return Path(path).name if path else "unsaved layout"

    # ------------------------------------------------------------------ the exports

    def export_report(self, path: str | None = None) -> bool:
        """Write the report to ``path`` (or ask for one); True when written."""
        solution = self._solution_or_say_why()
        if solution is None:
            return False
        if path is None:
            path = self._ask("Export report", ".pdf", REPORT_FILTERS)
            if path is None:
                return False
        try:
            out = write_report(solution, path, self.overlays(), self.source_name(),
                               inception=self._inception_of(solution))
        except ReportError as exc:
            return self._failed(str(exc))
        self.window.show_message(f"Report written to {out}")
        return True

    def export_surface(self, path: str | None = None) -> bool:
        """Write the surface-field CSV to ``path`` (or ask); True when written."""
        return self._export_csv(path, "surface field", write_surface_csv)

    def export_grid(self, path: str | None = None, step_mm: float | None = None) -> bool:
        """Write the grid CSV (default step: 200 points along the view) to ``path``."""
        return self._export_csv(path, "field grid",
                                lambda sol, p: write_grid_csv(sol, p, step_mm))

    def _export_csv(self, path: str | None, what: str, write) -> bool:  # noqa: ANN001
        solution = self._solution_or_say_why()
        if solution is None:
            return False
        if path is None:
            path = self._ask(f"Export {what}", ".csv", {CSV_FILTER: ".csv"})
            if path is None:
                return False
        try:
            rows = write(solution, Path(path))
        except ExportError as exc:
            return self._failed(str(exc))
        self.window.show_message(f"{rows:,} rows of {what} written to {path}")
        return True

    def _inception_of(self, solution: Solution) -> InceptionOutcome | None:
        """The inception estimate the worker already made for ``solution``, if any (else
        the report makes it)."""
        res = self.live.runner.latest
        return res.inception if res is not None and res.solution is solution else None

    def _solution_or_say_why(self) -> Solution | None:
        solution, why = self.current()
        if solution is None:
            self._failed(f"Nothing to export: {why}.")
        return solution

    def _ask(self, title: str, ext: str, filters: dict[str, str]) -> str | None:
        doc_path = self.window.doc.path
        stem = Path(doc_path).name.removesuffix(".layout.json") if doc_path else "layout"
        folder = Path(doc_path).parent if doc_path else Path.home()
        path, chosen = QFileDialog.getSaveFileName(self.window, title,
                                                   str(folder / f"{stem}{ext}"),
                                                   ";;".join(filters))
        if not path:
            return None
        if Path(path).suffix.lower() not in set(filters.values()):
            path += filters.get(chosen, ext)
        return path

    def _failed(self, message: str) -> bool:
        """Say why in the status bar and in a window-modal box that does not block."""
        self.window.show_message(message)
        box = QMessageBox(QMessageBox.Icon.Warning, "Export", message,
                          QMessageBox.StandardButton.Ok, self.window)
        box.setObjectName("export_problem")
        box.open()
        self.last_problem = message
        return False


def attach_export_actions(window) -> ExportActions:  # noqa: ANN001 - MainWindow
    """Add the export actions to a window that has a live view; kept as ``window.exports``."""
    window.exports = ExportActions(window)
    return window.exports
