"""Connect an editor window to the background solver: overlays, results dock, status.

:func:`attach_live_view` wires a :class:`app.main_window.MainWindow` through its hooks
only (``document_changed``, ``interaction_changed``, the canvas layers, the results
dock, the View menu and the ready check): every change of the document schedules a
solve of its validated snapshot (a draft solve while dragging, a full one on release),
and the newest result replaces the overlays and the results table.
"""

from __future__ import annotations

import logging

import numpy as np
from PySide6.QtCore import QObject, QPointF, QRectF, QSettings, Qt, QTimer
from PySide6.QtGui import QAction
from PySide6.QtWidgets import QLabel, QToolBar

import solver
from solver.layout import LayoutError

from .colour_scale import ColourScale, seen_colours
from .overlays import DEFAULT_OFF, OVERLAY_LABELS, OVERLAY_NAMES, OVERLAY_SHORT, FieldOverlays
from .panels.profile_panel import ProfilePanel
from .panels.results_panel import ResultsPanel
from .probes import ProbeLineItem, line_profile
from .solve_runner import EquipotentialStep, LiveResult, SolveRunner
from .step_control import StepControl

log = logging.getLogger(__name__)

ZOOM_TO_HOT_SPOT_MM = 30.0
"""Width in mm of the view after clicking a hot spot (or the current width if smaller)."""
RIGHT_DOCK_PX = 490
"""Default width of the results and profile docks: the parts table fits without scrolling."""
STATE_STYLE = {"solving": "color: #7a5b00;", "ready": "color: #2f6b4a;",
               "failed": "color: #b3410e;", "idle": ""}


class LiveView(QObject):
    """The live field of one window (its runner, overlays, panel and status label)."""

    def __init__(self, window, settings: QSettings | None = None) -> None:  # noqa: ANN001
        super().__init__(window)
        self.window = window
        self.settings = settings or window.settings
        canvas = window.canvas
        self.runner = SolveRunner(self)
        self.overlays = FieldOverlays(canvas.underlay, canvas.overlay, canvas)
        self.panel = ResultsPanel()
        self.dock = window.add_results_dock(self.panel, "Results")
        self.profile = ProfilePanel()
        self.profile_dock = window.add_results_dock(self.profile, "Profile")
        window.resizeDocks([self.dock], [RIGHT_DOCK_PX], Qt.Orientation.Horizontal)
        window.resizeDocks([self.dock, self.profile_dock], [470, 360], Qt.Orientation.Vertical)
        self.scale = ColourScale(canvas.viewport())
        self.overlays.keep_clear = lambda: ([QRectF(self.scale.geometry())]
                                            if self.scale.isVisible() else [])
        self.probe_tool = canvas.tools["probe"]
        self.probe_line = ProbeLineItem()
        self.probe_line.setParentItem(canvas.overlay)
        self.probe_line.setZValue(5.0)
        self.probe_line.set_segment(None)
        self._profile_timer = QTimer(self)
        self._profile_timer.setSingleShot(True)
        self._profile_timer.timeout.connect(self.update_profile)
        self.profile.set_mode("surface")  # until a probe is drawn
        self.status = QLabel("no results yet")
        self.status.setObjectName("solve_state")
        self.probe = QLabel()
        self.probe.setObjectName("probe")
        self.probe.setMinimumWidth(250)
        window.statusBar().addPermanentWidget(self.probe)
        window.statusBar().addPermanentWidget(self.status)
        self.shown_revision = -1
        self._numbers_for: LiveResult | None = None
        self.usable: LiveResult | None = None
        """The newest converged result shown (kept on show when a later solve fails to
        converge)."""
        self.actions: dict[str, QAction] = {}
        self._build_menu()
        self._build_field_bar()
        self.runner.state_changed.connect(self._on_state)
        self.runner.result_ready.connect(self._on_result)
        self.panel.hot_spot_clicked.connect(self.zoom_to)
        canvas.cursor_moved.connect(self.probe_at)
        canvas.view_changed.connect(self.overlays.place_labels)
        self.probe_tool.segment_changed.connect(self._on_probe_segment)
        window.selection.changed.connect(self._on_selection)
        self.profile.mode_changed.connect(lambda _m: self.schedule_profile())
        self.profile_dock.visibilityChanged.connect(lambda _v: self.schedule_profile())
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

    def set_step(self, step: EquipotentialStep) -> None:
        """Draw the equipotential lines at ``step`` (redrawn on the worker)."""
        self.runner.set_step(step)

    def schedule_profile(self) -> None:
        """Redraw the profile dock soon: in the next event-loop pass, or at most five
        times a second while the user drags (the draft results come faster)."""
        if not self._profile_timer.isActive():
            self._profile_timer.start(200 if self.window.doc.interacting else 0)

    def update_profile(self) -> None:
        """Plot the line probe or the selected part's surface field from the newest result."""
        if not self.profile_dock.isVisible():
            return
        res, panel = self.runner.latest, self.profile
        if res is None:
            panel.show_message("No results yet.")
            return
        sol = res.solution
        if panel.mode() == "line":
            seg = self.probe_tool.segment
            if seg is None:
                panel.show_message("Choose the line probe (M) and drag a segment across "
                                   "the field to plot the potential and |E| along it.")
            else:
                panel.show_line(line_profile(sol, seg), self._axis_names())
            return
        ids = self.window.selection.ids
        if ids:
            name = self.window.doc.part(ids[0]).name
        elif sol.parts:  # nothing selected: the part with the strongest surface field
            name = max(sol.parts, key=_surface_peak).name
        else:
            panel.show_message("No parts.")
            return
        traces = [t for t in sol.surfaces if t.part == name and len(t.s_mm) > 1]
        if traces:
            panel.show_surface(name, traces, self._axis_names())
            if not ids:
                panel.info.setText(panel.info.text() + "  (The part with the strongest "
                                   "surface field; select a part to see another.)")
        else:
            panel.show_message(f"{name}: no surface field in the newest result (it was "
                               "solved before this part existed, or under another name).")

    def _axis_names(self) -> tuple[str, str]:
        return ("r", "z") if self.window.doc.settings.symmetry == "axisymmetric" else ("x", "y")

    def _on_probe_segment(self, seg) -> None:  # noqa: ANN001 - Segment | None
        self.probe_line.set_segment(seg)
        if seg is not None:
            self.profile.set_mode("line")
            self.profile_dock.show()
            self.profile_dock.raise_()
        self.schedule_profile()

    def _on_selection(self) -> None:
        if self.window.selection.ids and self.probe_tool.segment is None:
            self.profile.set_mode("surface")
        if self.profile.mode() == "surface":
            self.schedule_profile()

    def _on_result(self, res: LiveResult) -> None:
        """Show a new result: the canvas overlays now, the numbers in a later pass of the
        event loop (so no single pass keeps the GUI thread busy for long)."""
        if not res.solution.converged and self._keep_usable(res):
            self.shown_revision = res.revision
            return
        self.usable = res if res.solution.converged else None
        self.overlays.show(res)
        self._numbers_for = res
        QTimer.singleShot(0, self._show_numbers)

    def _show_numbers(self) -> None:
        """The results table, colour scales and profile of the result just drawn; only
        then is its revision counted as shown."""
        res, self._numbers_for = self._numbers_for, None
        if res is None or res is not self.overlays.result:
            return
        self.panel.show_result(res)
        self._update_scale()
        self.shown_revision = res.revision
        self.schedule_profile()

    def _keep_usable(self, res: LiveResult) -> bool:
        """A solve that missed its tolerance: keep the last converged result on show,
        marked as such, and say so (True); with none, show this one marked (False)."""
        why = (f"the solver did not converge (relative residual {res.solution.residual:.1e}"
               f" at revision {res.revision})")
        kept = self.usable
        text = (f"\u26a0 not converged: showing the last converged result "
                f"(revision {kept.revision}), not the current drawing" if kept is not None
                else "\u26a0 NOT CONVERGED: the field shown is unreliable")
        self.status.setText(text)
        self.status.setToolTip(why)
        self.status.setStyleSheet(STATE_STYLE["failed"])
        self.window.show_message(f"Warning: {why}. " + (
            "The field shown is that of an earlier drawing." if kept is not None
            else "The field shown is unreliable."))
        log.warning("%s", why)
        if kept is None:
            return False
        self.runner.latest = kept  # the probe reads the same result the overlays show
        return True

    def _update_scale(self) -> None:
        """Show the colour scales of the maps switched on (and keep labels off them)."""
        self._set_scales()
        self.overlays.place_labels()

    def _set_scales(self) -> None:
        res = self.overlays.result
        scales = []
        if res is not None and self.overlays.visible["potential_map"]:
            lo, hi = res.potential_range_V
            scales.append(("Potential (kV)", lo / 1000, hi / 1000,
                           seen_colours("cividis", False), ""))
        if res is not None and self.overlays.visible["field_map"]:
            scales.append(("Field strength |E| (kV/mm), darkest at the limit", 0.0,
                           res.field_top_kV_per_mm, seen_colours("magma_r", True), ""))
        self.scale.set_scales(scales)

    def _build_field_bar(self) -> None:
        """A tool bar row of its own: the overlay switches and the equipotential step."""
        self.step_control = StepControl(self.settings, self._span_V)
        self.runner.step = self.step_control.step()
        self.step_control.step_changed.connect(self.set_step)
        bar = QToolBar("Field view", self.window)
        bar.setObjectName("field_view_toolbar")
        bar.setToolButtonStyle(Qt.ToolButtonStyle.ToolButtonTextOnly)
        bar.addWidget(QLabel(" Show: "))
        for name in OVERLAY_NAMES:
            bar.addAction(self.actions[name])
        bar.addSeparator()
        bar.addWidget(self.step_control)
        self.window.addToolBarBreak(Qt.ToolBarArea.TopToolBarArea)
        self.window.addToolBar(Qt.ToolBarArea.TopToolBarArea, bar)
        self.field_bar = bar

    def _span_V(self) -> float:
        res = self.runner.latest
        return res.potential_range_V[1] - res.potential_range_V[0] if res else 0.0

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
            act.setIconText(OVERLAY_SHORT[name])
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
        self._update_scale()


def _surface_peak(p) -> float:  # noqa: ANN001 - solver.solution.PartResult
    """The strongest field along a part's outline, kV/mm (gas side for a dielectric)."""
    if p.kind == "dielectric":
        return p.surface_field_kV_per_mm or 0.0
    return p.peak_field_kV_per_mm


def attach_live_view(window) -> LiveView:  # noqa: ANN001 - MainWindow
    """Give ``window`` a live field view; return it (also kept as ``window.live``)."""
    window.live = LiveView(window)
    return window.live
