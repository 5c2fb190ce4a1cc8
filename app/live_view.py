"""Connect an editor window to the background solver: overlays, results dock, status.

:func:`attach_live_view` wires a :class:`app.main_window.MainWindow` through its hooks
only (``document_changed``, ``interaction_changed``, the canvas layers, the results
dock, the View menu and the ready check): every change of the document schedules a
solve of its validated snapshot (a draft solve while dragging, a full one on release),
and the newest result replaces the overlays and the results table.
"""

from __future__ import annotations

import numpy as np
from PySide6.QtCore import QObject, QPointF, QSettings
from PySide6.QtGui import QAction
from PySide6.QtWidgets import QLabel

import solver
from solver.layout import LayoutError

from .overlays import DEFAULT_OFF, OVERLAY_LABELS, OVERLAY_NAMES, FieldOverlays
from .panels.results_panel import ResultsPanel
from .solve_runner import LiveResult, SolveRunner

ZOOM_TO_HOT_SPOT_MM = 30.0
"""Width in mm of the view after clicking a hot spot (or the current width if smaller)."""
STATE_STYLE = {"solving": "color: #7a5b00;", "ready": "color: #2f6b4a;",
               "failed": "color: #b3410e;", "idle": ""}


class LiveView(QObject):
    """The live field of one window (its runner, overlays, panel and status label)."""

    def __init__(self, window, settings: QSettings | None = None) -> None:  # noqa: ANN001
        super().__init__(window)
        self.window = window
        self.settings = settings or window.settings
        self.runner = SolveRunner(self)
        self.overlays = FieldOverlays(window.canvas.underlay, window.canvas.overlay)
        self.panel = ResultsPanel()
        self.dock = window.add_results_dock(self.panel, "Results")
        self.status = QLabel("no results yet")
        self.status.setObjectName("solve_state")
        self.probe = QLabel()
        self.probe.setObjectName("probe")
        self.probe.setMinimumWidth(250)
        window.statusBar().addPermanentWidget(self.probe)
        window.statusBar().addPermanentWidget(self.status)
        self.shown_revision = -1
        self.actions: dict[str, QAction] = {}
        self._build_menu()
        self.runner.state_changed.connect(self._on_state)
        self.runner.result_ready.connect(self._on_result)
        self.panel.hot_spot_clicked.connect(self.zoom_to)
        window.canvas.cursor_moved.connect(self.probe_at)
        window.document_changed.connect(lambda _r: self.schedule())
        window.interaction_changed.connect(lambda _on: self.schedule())
        window.set_ready_check(self.is_ready)
        window.destroyed.connect(lambda *_: self.runner.wait(2000))
        self.schedule()

    # ------------------------------------------------------------------ behaviour

    def schedule(self) -> None:
        """Ask for a solve of the document as it is now (draft while dragging)."""
        doc = self.window.doc
        try:
            layout = doc.to_layout()
        except LayoutError as exc:
            self.runner.report_invalid(doc.revision, str(exc))
            return
        if not any(p.is_conductor for p in layout.parts):
            self.runner.report_invalid(doc.revision, "no conductor to solve for")
            return
        self.runner.request(layout, doc.revision, draft=doc.interacting)

    def is_ready(self) -> bool:
        """True once a result is shown and nothing newer is pending, or on failure."""
        return (self.runner.state == "failed"
                or (self.shown_revision >= 0 and not self.runner.busy()))

    def zoom_to(self, x_mm: float, y_mm: float) -> None:
        """Centre the canvas on (x, y) mm, zoomed in to about 30 mm across."""
        canvas = self.window.canvas
        target = canvas.viewport().width() / ZOOM_TO_HOT_SPOT_MM
        if target > canvas.px_per_mm():
            canvas.zoom_by(target / canvas.px_per_mm())
        canvas.centerOn(QPointF(x_mm, y_mm))

    def probe_at(self, x_mm: float, y_mm: float) -> None:
        """Show the potential (kV) and field magnitude (kV/mm) of the newest result at
        (x, y) mm; inside a conductor, its potential alone."""
        res = self.runner.latest
        if res is None:
            self.probe.setText("")
            return
        sol = res.solution
        if not (sol.x_mm[0] <= x_mm <= sol.x_mm[-1] and sol.y_mm[0] <= y_mm <= sol.y_mm[-1]):
            self.probe.setText("outside the solved region")
            return
        phi, e = solver.sample(sol, np.array([[x_mm, y_mm]]))
        self.probe.setText(f"\u03c6 = {phi[0] / 1000:.4g} kV   "
                           f"|E| = {float(np.hypot(*e[0])):.3g} kV/mm")

    def _on_result(self, res: LiveResult) -> None:
        self.shown_revision = res.revision
        self.overlays.show(res)
        self.panel.show_result(res)

    def _on_state(self, state: str, message: str) -> None:
        text = {"solving": "\u25cc solving\u2026", "ready": "\u25cf up to date",
                "failed": "\u2716 cannot solve", "idle": ""}[state]
        self.status.setText(text if state != "ready" or not message else f"\u25cf {message}")
        self.status.setToolTip(message)
        self.status.setStyleSheet(STATE_STYLE[state])
        if state == "failed":
            self.window.show_message(f"Cannot solve: {message}")

    def _build_menu(self) -> None:
        menu = getattr(self.window, "view_menu", None)
        if menu is not None:
            menu.addSeparator()
        for name in OVERLAY_NAMES:
            act = QAction(OVERLAY_LABELS[name], self.window)
            act.setCheckable(True)
            default = "false" if name in DEFAULT_OFF else "true"
            on = str(self.settings.value(f"overlays/{name}", default)).lower() == "true"
            act.setChecked(on)
            self.overlays.set_visible(name, on)
            act.toggled.connect(lambda v, n=name: self._toggle(n, v))
            if menu is not None:
                menu.addAction(act)
            self.actions[name] = act

    def _toggle(self, name: str, on: bool) -> None:
        self.overlays.set_visible(name, on)
        self.settings.setValue(f"overlays/{name}", on)


def attach_live_view(window) -> LiveView:  # noqa: ANN001 - MainWindow
    """Give ``window`` a live field view; return it (also kept as ``window.live``)."""
    window.live = LiveView(window)
    return window.live
