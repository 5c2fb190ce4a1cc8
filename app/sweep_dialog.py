"""The sweep dialog: sweep one parameter, plot the peak field, seek a goal, apply it.

Choose a part and one of its parameters (``solver.params``), a range and a number of
steps; the sweep runs off the GUI thread (one private ``QThreadPool`` thread driving
``solver.sweep.sweep``, which may farm the steps out to worker processes), with a
progress bar and Cancel.  The result is plotted (peak surface field and its limit
against the parameter, kV/mm) and listed step by step; it exports as CSV.  *Seek goal*
finds the smallest (or largest, as the response dictates) value keeping the peak at or
below the chosen fraction of the limit; *Apply* then sets that value in the document as
one undoable command.

The worker touches no widget: it reports through a signal holder that lives in the
GUI thread (queued connections), as every background job in the app does.
"""

from __future__ import annotations

import threading
from collections.abc import Callable
from typing import Any

import numpy as np
from matplotlib.backends.backend_qtagg import FigureCanvasQTAgg
from matplotlib.figure import Figure
from PySide6.QtCore import Qt, QThreadPool
from PySide6.QtGui import QCloseEvent, QShowEvent, QUndoStack
from PySide6.QtWidgets import (
    QComboBox,
    QDialog,
    QDoubleSpinBox,
    QFileDialog,
    QFormLayout,
    QHBoxLayout,
    QLabel,
    QMessageBox,
    QProgressBar,
    QPushButton,
    QSpinBox,
    QTableWidget,
    QTableWidgetItem,
    QVBoxLayout,
    QWidget,
)

from solver.executors import ProcessExecutor, SerialExecutor, StepExecutor, usable_cores
from solver.layout import RESOLUTION_NAMES, LayoutError
from solver.params import apply_param, param_unit, param_value
from solver.sweep import GoalResult, SweepResult, goal_seek, sweep

from .caution import CAUTION
from .commands import ChangePartCommand
from .document import Document
from .sweep_choices import default_range, part_params
from .sweep_export import SweepExportError, goal_lines, write_sweep_csv
from .sweep_job import Job, JobSignals
from .sweep_plot import draw_sweep, fmt, summary_text

TABLE_COLUMNS = ("value", "peak kV/mm", "limit kV/mm", "margin %", "inception x", "message")


class SweepDialog(QDialog):
    """Sweep and goal seek on the layout of ``doc``; *Apply* pushes onto ``stack``."""

    def __init__(self, doc: Document, stack: QUndoStack, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.setWindowTitle("Sweep and goal seek \u2014 Stresslens")
        self.doc, self.stack = doc, stack
        self.result: SweepResult | None = None
        self.goal: GoalResult | None = None
        self._cancel = threading.Event()
        self._pool = QThreadPool(self)
        self._pool.setMaxThreadCount(1)
        self._signals = JobSignals(self)
        self._signals.progress.connect(self._on_progress)
        self._signals.finished.connect(self._on_finished)
        self._processes: ProcessExecutor | None = None
        self._running: str | None = None
        self._job_layout: Any = None
        self._result_layout: Any = None
        """(layout, resolution) the shown sweep was made with (a goal seek may re-use it)."""
        self._build()
        self._fill_parts()
        self.doc.changed.connect(self._on_doc_changed)
        self.resize(900, 780)

    # ------------------------------------------------------------------ building

    def _build(self) -> None:
        self.part_box, self.param_box = QComboBox(), QComboBox()
        self.now_label = QLabel()
        self.start, self.stop = self._spin(), self._spin()
        self.steps = QSpinBox()
        self.steps.setRange(2, 500)
        self.steps.setValue(12)
        self.resolution = QComboBox()
        self.resolution.addItems(["the layout's own", *RESOLUTION_NAMES])
        self.runner = QComboBox()
        self.runner.addItems(["this process, one step at a time",
                              f"{usable_cores()} worker processes"])
        self.runner.setCurrentIndex(1 if usable_cores() > 1 else 0)
        self.fraction = QDoubleSpinBox()
        self.fraction.setRange(0.05, 2.0)
        self.fraction.setSingleStep(0.05)
        self.fraction.setValue(0.8)
        self.fraction.setSuffix(" x limit")
        form = QFormLayout()
        form.addRow("Part", self.part_box)
        row = QHBoxLayout()
        row.addWidget(self.param_box, 1)
        row.addWidget(self.now_label)
        form.addRow("Parameter", row)
        rng = QHBoxLayout()
        for w in (QLabel("from"), self.start, QLabel("to"), self.stop, QLabel("steps"),
                  self.steps):
            rng.addWidget(w)
        form.addRow("Range", rng)
        form.addRow("Resolution", self.resolution)
        form.addRow("Run on", self.runner)
        form.addRow("Goal: peak field at most", self.fraction)
        self.run_button = QPushButton("Run sweep")
        self.goal_button = QPushButton("Seek goal")
        self.cancel_button = QPushButton("Cancel")
        self.cancel_button.setEnabled(False)
        self.progress = QProgressBar()
        self.progress.setFormat("%v / %m steps")
        buttons = QHBoxLayout()
        for w in (self.run_button, self.goal_button, self.cancel_button):
            buttons.addWidget(w)
        buttons.addWidget(self.progress, 1)
        self.figure = Figure(figsize=(7.5, 3.6), dpi=100)
        self.canvas = FigureCanvasQTAgg(self.figure)
        draw_sweep(self.figure, None)
        self.table = QTableWidget(0, len(TABLE_COLUMNS))
        self.table.setHorizontalHeaderLabels(TABLE_COLUMNS)
        header = self.table.horizontalHeader()
        header.setStretchLastSection(True)
        for j in range(len(TABLE_COLUMNS) - 1):
            header.setSectionResizeMode(j, header.ResizeMode.ResizeToContents)
        self.table.verticalHeader().setVisible(False)
        self.table.setEditTriggers(QTableWidget.EditTrigger.NoEditTriggers)
        self.status = QLabel()
        self.status.setWordWrap(True)
        self.status.setTextInteractionFlags(Qt.TextInteractionFlag.TextSelectableByMouse)
        self.apply_button = QPushButton("Apply value")
        self.apply_button.setEnabled(False)
        self.export_button = QPushButton("Export CSV\u2026")
        self.export_button.setEnabled(False)
        close = QPushButton("Close")
        bottom = QHBoxLayout()
        bottom.addWidget(self.apply_button)
        bottom.addWidget(self.export_button)
        bottom.addStretch(1)
        bottom.addWidget(close)
        caution = QLabel(CAUTION)
        caution.setWordWrap(True)
        caution.setStyleSheet("color: #6b4a00; font-size: 8pt;")
        lay = QVBoxLayout(self)
        lay.addLayout(form)
        lay.addLayout(buttons)
        lay.addWidget(self.canvas, 3)
        lay.addWidget(self.table, 2)
        lay.addWidget(self.status)
        lay.addLayout(bottom)
        lay.addWidget(caution)
        self.part_box.currentTextChanged.connect(self._fill_params)
        self.param_box.currentTextChanged.connect(self._on_param)
        self.run_button.clicked.connect(self.run_sweep)
        self.goal_button.clicked.connect(self.seek_goal)
        self.cancel_button.clicked.connect(self.cancel)
        self.apply_button.clicked.connect(self.apply_goal)
        self.export_button.clicked.connect(self.export_csv)
        close.clicked.connect(self.close)

    @staticmethod
    def _spin() -> QDoubleSpinBox:
        s = QDoubleSpinBox()
        s.setRange(-1.0e7, 1.0e7)
        s.setDecimals(4)
        s.setKeyboardTracking(False)
        return s

    def _fill_parts(self) -> None:
        """List the document's parts, keeping the chosen part and parameter if they remain."""
        names = [p.name for _, p in self.doc.parts()]
        if names == [self.part_box.itemText(i) for i in range(self.part_box.count())]:
            return
        part, param = self.part_box.currentText(), self.param_box.currentText()
        self.part_box.clear()
        self.part_box.addItems(names)
        if part in names:
            self.part_box.setCurrentText(part)
            self.param_box.setCurrentText(param)

    def _on_doc_changed(self, _revision: int) -> None:
        """Follow edits made while the dialog is open (names, the present value)."""
        if self.is_running() or not self.isVisible():
            return
        self._fill_parts()
        part, param = self.part_box.currentText(), self.param_box.currentText()
        if part and param and self.doc.id_of(part) is not None:
            try:
                value = param_value(self.doc.snapshot(), part, param)
            except (LayoutError, ValueError):
                return
            unit = param_unit(param)
            self.now_label.setText(f"now {value:.4g}{' ' + unit if unit else ''}")

    def _fill_params(self, name: str) -> None:
        self.param_box.clear()
        if name:
            self.param_box.addItems(part_params(self.doc, name))

    def _on_param(self, param: str) -> None:
        part = self.part_box.currentText()
        if not (part and param):
            self.now_label.setText("")
            return
        value = param_value(self.doc.snapshot(), part, param)
        unit = param_unit(param)
        suffix = f" {unit}" if unit else ""
        self.now_label.setText(f"now {value:.4g}{suffix}")
        lo, hi = default_range(param, value)
        for spin, v in ((self.start, lo), (self.stop, hi)):
            spin.setSuffix(suffix)
            spin.setValue(v)

    # ------------------------------------------------------------------ running

    def _settings(self) -> tuple[Any, str, str, Any, StepExecutor] | None:
        try:
            layout = self.doc.to_layout()
        except LayoutError as exc:
            self._say(f"The layout cannot be solved as it is: {exc}", error=True)
            return None
        part, param = self.part_box.currentText(), self.param_box.currentText()
        if not (part and param):
            self._say("Choose a part and a parameter first.", error=True)
            return None
        if self.start.value() == self.stop.value():
            self._say("'from' and 'to' must differ.", error=True)
            return None
        res = None if self.resolution.currentIndex() == 0 else self.resolution.currentText()
        return layout, part, param, res, self._executor()

    def _executor(self) -> StepExecutor:
        if self.runner.currentIndex() == 0:
            return SerialExecutor()
        if self._processes is None:
            self._processes = ProcessExecutor()
            self._processes.start()
        return self._processes

    def showEvent(self, event: QShowEvent) -> None:
        """Start the worker processes while the user sets the range (first sweep warm)."""
        super().showEvent(event)
        if self.runner.currentIndex() == 1:
            self._executor()

    def run_sweep(self) -> None:
        """Start a sweep over the chosen range (off the GUI thread)."""
        s = self._settings()
        if s is None:
            return
        layout, part, param, res, ex = s
        values = np.linspace(self.start.value(), self.stop.value(), self.steps.value()).tolist()
        self._job_layout = (layout, res)
        self._start("sweep", lambda progress, cancelled: sweep(
            layout, part, param, values, ex, res, progress=progress, cancelled=cancelled))

    def seek_goal(self) -> None:
        """Seek the goal, re-using the shown sweep when it covers the same range."""
        s = self._settings()
        if s is None:
            return
        layout, part, param, res, ex = s
        lo, hi, f = self.start.value(), self.stop.value(), self.fraction.value()
        r = self.result
        coarse = r if (r is not None and not r.cancelled and (r.part, r.param) == (part, param)
                       and min(r.values) == min(lo, hi) and max(r.values) == max(lo, hi)
                       and self._result_layout == (layout, res)) else None
        self._job_layout = (layout, res)
        n = self.steps.value()  # read here: the job runs off the GUI thread
        self._start("goal", lambda progress, cancelled: goal_seek(
            layout, part, param, lo, hi, f, ex, res, coarse_steps=n,
            progress=progress, cancelled=cancelled, coarse=coarse))

    def _start(self, kind: str, work: Callable[..., Any]) -> None:
        if self._running:
            return
        self._running = kind
        self._cancel.clear()
        self._busy(True)
        self.progress.setRange(0, max(1, self.steps.value()))
        self.progress.setValue(0)
        self._say("Seeking the goal\u2026" if kind == "goal" else "Sweeping\u2026")
        self._pool.start(Job(work, self._signals, self._cancel))

    def cancel(self) -> None:
        """Ask the running job to stop after the steps in progress."""
        self._cancel.set()
        self._say("Cancelling after the steps in progress\u2026")

    def is_running(self) -> bool:
        return self._running is not None

    def _busy(self, on: bool) -> None:
        for w in (self.run_button, self.goal_button, self.part_box, self.param_box):
            w.setEnabled(not on)
        self.cancel_button.setEnabled(on)

    def _on_progress(self, done: int, total: int) -> None:
        self.progress.setRange(0, total)
        self.progress.setValue(done)
        if done == total and self._running == "goal":
            self._say("Closing in on the goal with Brent's method\u2026")

    def _on_finished(self, out: object) -> None:
        kind, self._running = self._running, None
        self._busy(False)
        if self.progress.maximum() == 0:  # a busy bar: leave it readable
            self.progress.setRange(0, 1)
        if not self._cancel.is_set():
            self.progress.setValue(self.progress.maximum())
        if isinstance(out, Exception):
            self._say(f"The {kind} stopped: {out}", error=True)
            return
        if isinstance(out, GoalResult):
            self.goal = out
            if out.coarse is not None:
                self.result, self._result_layout = out.coarse, self._job_layout
            self.apply_button.setEnabled(out.value is not None)
            self._say("\n".join(goal_lines(out, self.result.param if self.result else "",
                                           self.result.unit if self.result else "")),
                      error=out.value is None)
        else:
            assert isinstance(out, SweepResult)
            self.result, self.goal, self._result_layout = out, None, self._job_layout
            self.apply_button.setEnabled(False)
            self._say(summary_text(out))
        self._show_result()

    def _show_result(self) -> None:
        res = self.result
        draw_sweep(self.figure, res, self.goal, self.fraction.value())
        self.canvas.draw_idle()
        self.export_button.setEnabled(res is not None)
        self.table.setRowCount(0 if res is None else len(res.steps))
        if res is None:
            return
        unit = f" {res.unit}" if res.unit else ""
        self.table.setHorizontalHeaderItem(0, QTableWidgetItem(f"{res.param}{unit}".strip()))
        for i, s in enumerate(res.steps):
            cells = (fmt(s.value), fmt(s.peak_field_kV_per_mm), fmt(s.limit_kV_per_mm),
                     fmt(s.margin_percent, ".1f"), fmt(s.inception_scale, ".3g"),
                     s.error or s.inception_message or "")
            for j, text in enumerate(cells):
                self.table.setItem(i, j, QTableWidgetItem(text))

    def _say(self, text: str, error: bool = False) -> None:
        self.status.setText(text)
        self.status.setStyleSheet("color: #b3410e;" if error else "")

    # ------------------------------------------------------------------ results

    def apply_goal(self) -> None:
        """Set the goal's value in the document: one undoable command."""
        g, res = self.goal, self.result
        if g is None or g.value is None or res is None:
            return
        pid = self.doc.id_of(res.part)
        if pid is None:
            self._say(f"The part '{res.part}' is no longer in the layout.", error=True)
            return
        try:
            after = apply_param(self.doc.to_layout(), res.part, res.param, g.value)
        except LayoutError as exc:
            self._say(f"Cannot apply {res.param} = {g.value:.4g}: {exc}", error=True)
            return
        unit = f" {res.unit}" if res.unit else ""
        self.stack.push(ChangePartCommand(self.doc, pid, after.part(res.part),
                                          f"Set {res.part} {res.param} to {g.value:.4g}{unit}"))
        self._say(f"{res.part} {res.param} set to {g.value:.4g}{unit} (Edit > Undo takes it "
                  f"back).")
        self._on_param(self.param_box.currentText())

    def export_csv(self) -> None:
        """Write the shown sweep as CSV (a file chosen by the user)."""
        if self.result is None:
            return
        path, _ = QFileDialog.getSaveFileName(self, "Export sweep as CSV",
                                              f"sweep_{self.result.param}.csv",
                                              "CSV files (*.csv)")
        if not path:
            return
        try:
            write_sweep_csv(self.result, path)
        except SweepExportError as exc:
            QMessageBox.warning(self, "Export sweep", str(exc))
            return
        self._say(f"Sweep written to {path}")

    def closeEvent(self, event: QCloseEvent) -> None:
        self._cancel.set()
        self._pool.waitForDone(60_000)
        if self._processes is not None:
            self._processes.close()
            self._processes = None
        super().closeEvent(event)


def open_sweep_dialog(window: Any) -> SweepDialog:
    """Show the sweep dialog for a main window's document (one per window, re-used)."""
    dlg = getattr(window, "sweep_dialog", None)
    if dlg is None:
        dlg = SweepDialog(window.doc, window.stack, window)
        window.sweep_dialog = dlg
    dlg._fill_parts()
    dlg.show()
    dlg.raise_()
    return dlg
