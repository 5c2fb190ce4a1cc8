"""The editor window: canvas in the centre, parts and properties on the left, status below.

Hooks for views built on top of the editor (the live solve and its overlays):

* ``document_changed(revision)``: a Qt signal after every change of the document;
  ``interaction_changed(dragging)`` when a drag starts or ends; ``closed()`` after a
  normal close (changes saved or knowingly discarded).
* ``canvas.underlay`` / ``canvas.overlay``: scene groups below / above the parts.
* :meth:`MainWindow.add_results_dock`: a dock on the right-hand side.
* :meth:`MainWindow.set_ready_check`: what "ready for a screenshot" means (by default,
  ready at once; a solve runner makes it "the first results are shown").
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

from PySide6.QtCore import QSettings, Qt, QTimer, Signal
from PySide6.QtGui import QCloseEvent, QUndoStack
from PySide6.QtWidgets import (
    QComboBox,
    QDockWidget,
    QLabel,
    QMainWindow,
    QMenu,
    QScrollArea,
    QWidget,
)

from solver.layout import Layout

from .canvas import Canvas
from .document import Document
from .file_actions import FileActions
from .icons import APP_ICON, icon
from .panels.layout_settings import LayoutSettingsPanel
from .panels.parts_list import PartsPanel
from .panels.properties import PropertiesPanel
from .selection import Selection
from .snapping import Snapper
from .sweep_action import add_sweep_action
from .tools import ToolContext, ToolOptions
from .window_actions import build_actions


class MainWindow(QMainWindow):
    """One layout being edited.

    ``settings`` holds the recent files and window state (tests pass a private file).
    """

    recent_menu: QMenu
    view_menu: QMenu
    kind_combo: QComboBox

    document_changed = Signal(int)
    interaction_changed = Signal(bool)
    closed = Signal()
    """The window was closed and its changes saved or knowingly discarded."""

    def __init__(self, layout: Layout | None = None, path: str | Path | None = None,
                 settings: QSettings | None = None, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.settings = settings or QSettings()
        self.doc = Document(layout, path)
        self.stack = QUndoStack(self)
        self.selection = Selection(self.doc)
        self.snapper = Snapper(self.doc)
        self.ctx = ToolContext(doc=self.doc, stack=self.stack, selection=self.selection,
                               snapper=self.snapper, options=ToolOptions(),
                               status=self.show_message)
        self.canvas = Canvas(self.ctx, self)
        self.setCentralWidget(self.canvas)
        self.files = FileActions(self, self.doc, self.settings)
        self._ready_check: Callable[[], bool] = lambda: True
        self._problem_timer = QTimer(self)
        self._problem_timer.setSingleShot(True)
        self._problem_timer.setInterval(60)
        self._problem_timer.timeout.connect(self._update_problem)
        self._build_docks()
        self._build_status_bar()
        self.actions_ = build_actions(self)
        add_sweep_action(self)
        self._connect()
        self.setWindowIcon(icon(APP_ICON))
        self.resize(1400, 900)
        self._update_title()
        self._update_problem()

    # ------------------------------------------------------------------ building

    def _build_docks(self) -> None:
        self.parts_panel = PartsPanel(self.doc, self.selection)
        self.parts_panel.show_part.connect(self.show_part)
        self.properties_panel = PropertiesPanel(self.doc, self.selection, self.stack,
                                                self.show_message)
        self.settings_panel = LayoutSettingsPanel(self.doc, self.stack)
        left = Qt.DockWidgetArea.LeftDockWidgetArea
        self.parts_dock = self._dock("Parts", self.parts_panel, left)
        self.properties_dock = self._dock("Properties", _scrolled(self.properties_panel), left)
        self.settings_dock = self._dock("Layout settings", _scrolled(self.settings_panel), left)
        self.tabifyDockWidget(self.properties_dock, self.settings_dock)
        self.properties_dock.raise_()
        self.resizeDocks([self.parts_dock, self.properties_dock], [220, 480],
                         Qt.Orientation.Vertical)
        self.resizeDocks([self.parts_dock], [330], Qt.Orientation.Horizontal)

    def _dock(self, title: str, widget: QWidget, area: Qt.DockWidgetArea) -> QDockWidget:
        dock = QDockWidget(title, self)
        dock.setObjectName(title.replace(" ", "_"))
        dock.setWidget(widget)
        dock.setFeatures(QDockWidget.DockWidgetFeature.DockWidgetMovable
                         | QDockWidget.DockWidgetFeature.DockWidgetFloatable)
        self.addDockWidget(area, dock)
        return dock

    def add_results_dock(self, widget: QWidget, title: str) -> QDockWidget:
        """Put ``widget`` in a dock on the right-hand side (for results views)."""
        return self._dock(title, widget, Qt.DockWidgetArea.RightDockWidgetArea)

    def _build_status_bar(self) -> None:
        bar = self.statusBar()
        self.problem_label = QLabel()
        self.problem_label.setObjectName("problem")
        self.position_label = QLabel()
        self.position_label.setMinimumWidth(190)
        self.position_label.setAlignment(Qt.AlignmentFlag.AlignRight
                                         | Qt.AlignmentFlag.AlignVCenter)
        bar.addPermanentWidget(self.problem_label, 1)
        bar.addPermanentWidget(self.position_label)

    def _connect(self) -> None:
        self.doc.changed.connect(self._on_doc_changed)
        self.doc.interaction_changed.connect(self.interaction_changed.emit)
        self.doc.dirty_changed.connect(lambda _d: self._update_title())
        self.doc.path_changed.connect(lambda _p: self._update_title())
        self.doc.reset.connect(lambda: self.stack.clear())
        self.canvas.cursor_moved.connect(self._show_position)

    # ------------------------------------------------------------------ behaviour

    def _on_doc_changed(self, revision: int) -> None:
        self._problem_timer.start()  # validation coalesced: at most one per event-loop pass
        self._update_title()
        self.document_changed.emit(revision)

    def _update_problem(self) -> None:
        msg = self.doc.problem()
        self.canvas.show_problem(msg)
        self.problem_label.setText(f"\u26a0 {msg}" if msg else "")
        self.problem_label.setToolTip(msg or "")
        self.problem_label.setStyleSheet("color: #b3410e;" if msg else "")

    def _update_title(self) -> None:
        name = self.doc.path.name if self.doc.path else "Untitled layout"
        self.setWindowModified(self.doc.dirty)
        self.setWindowTitle(f"{name}[*] \u2014 Stresslens")

    def _show_position(self, x: float, y: float) -> None:
        a, b = ("r", "z") if self.doc.settings.symmetry == "axisymmetric" else ("x", "y")
        self.position_label.setText(f"{a} = {x:.2f} mm   {b} = {y:.2f} mm")

    def show_message(self, text: str) -> None:
        """A passing message in the status bar."""
        self.statusBar().showMessage(text, 8000)

    def show_part(self, pid: int) -> None:
        """Select a part and bring it into view."""
        self.selection.set([pid])
        from . import shape_edit as se
        x0, y0, x1, y1 = se.bounds(self.doc.part(pid).shape)
        self.canvas.centerOn((x0 + x1) / 2, (y0 + y1) / 2)

    # ------------------------------------------------------------------ screenshots

    def set_ready_check(self, check: Callable[[], bool]) -> None:
        """Set what :meth:`is_ready` asks (e.g. 'the first solve has been shown')."""
        self._ready_check = check

    def is_ready(self) -> bool:
        """True when the window shows what a screenshot should show."""
        return bool(self._ready_check())

    # ------------------------------------------------------------------ closing

    def restore_window_state(self) -> None:
        """Put docks, tool bars and the window's size back as the user last left them."""
        geometry = self.settings.value("window/geometry")
        state = self.settings.value("window/state")
        if geometry is not None:
            self.restoreGeometry(geometry)
        if state is not None:
            self.restoreState(state)

    def closeEvent(self, event: QCloseEvent) -> None:
        if self.files.confirm_discard():
            self.settings.setValue("window/geometry", self.saveGeometry())
            self.settings.setValue("window/state", self.saveState())
            event.accept()
            self.closed.emit()
        else:
            event.ignore()


def _scrolled(widget: QWidget) -> QScrollArea:
    area = QScrollArea()
    area.setWidget(widget)
    area.setWidgetResizable(True)
    area.setFrameShape(QScrollArea.Shape.NoFrame)
    return area
