"""The profile dock: potential and field along the line probe, or the surface field of
the selected part against arc length with its limit.

A matplotlib :class:`~matplotlib.figure.Figure` in a ``FigureCanvasQTAgg`` (no pyplot).
The panel only draws what it is given; :class:`app.live_view.LiveView` decides what to
show and when.  Redraws go through ``draw_idle``, so a new result never renders the
plot in the same event-loop pass that builds the canvas overlays.
"""

from __future__ import annotations

import numpy as np
from matplotlib.backends.backend_qtagg import FigureCanvasQTAgg
from matplotlib.figure import Figure
from PySide6.QtCore import Qt, Signal
from PySide6.QtWidgets import (
    QComboBox,
    QFileDialog,
    QHBoxLayout,
    QLabel,
    QMessageBox,
    QPushButton,
    QVBoxLayout,
    QWidget,
)

from solver.solution import SurfaceTrace

from ..probes import LineProfile
from ..profile_export import FILTERS, ProfileExportError, line_rows, save_profile, surface_rows

MODES = (("line", "Along the line probe"), ("surface", "Surface field of the selected part"))
FIELD_COLOUR = "#9c3410"
POTENTIAL_COLOUR = "#2d4a6a"
LIMIT_COLOUR = "#d1203a"
INSIDE_COLOUR = "#d9d5cc"


class ProfilePanel(QWidget):
    """One plot of a profile; ``mode_changed("line" | "surface")`` when the user switches.

    ``series`` holds the arrays last plotted, by name (``"E"``, ``"V"``, ``"limit"``;
    with a ring number for outlines with holes), as (abscissa mm, values) in the units
    on the axes: kV/mm for fields, kV for the potential.  Along the probe, |E| is NaN
    (not drawn) inside conductors and in the grid cells at their surfaces.
    """

    mode_changed = Signal(str)

    def __init__(self, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.mode_box = QComboBox()
        for key, text in MODES:
            self.mode_box.addItem(text, key)
        self.mode_box.setToolTip("What to plot: the line probe (tool M) or the surface "
                                 "field along the outline of the part selected")
        self.mode_box.currentIndexChanged.connect(lambda _i: self.mode_changed.emit(self.mode()))
        self.info = QLabel()
        self.info.setWordWrap(True)
        self.info.setAlignment(Qt.AlignmentFlag.AlignTop | Qt.AlignmentFlag.AlignLeft)
        self.info.setMinimumHeight(int(3.2 * self.info.fontMetrics().height()))
        # fixed margins: a constrained layout re-measured every tick label on each redraw,
        # which doubled the time the GUI thread spent drawing the plot
        self.figure = Figure(figsize=(4.0, 2.8), dpi=90)
        self.figure.subplots_adjust(left=0.13, right=0.86, bottom=0.17, top=0.95)
        self.figure.set_facecolor("#fbfaf7")
        self.plot = FigureCanvasQTAgg(self.figure)
        self.plot.setMinimumHeight(120)
        self.ax = self.figure.add_subplot()
        self.ax_v = self.ax.twinx()
        self.series: dict[str, tuple[np.ndarray, np.ndarray]] = {}
        self.title = ""
        """What the plot shows, in words (the title of a saved plot)."""
        self.rows: list[list[object]] | None = None
        """Header and rows of the profile shown, for saving as CSV (None: nothing shown)."""
        self.save_button = QPushButton("Save\u2026")
        self.save_button.setToolTip("Save the profile's numbers (CSV) or its plot (PNG, "
                                    "SVG, PDF)")
        self.save_button.clicked.connect(lambda: self.save())
        top = QHBoxLayout()
        top.addWidget(QLabel("Plot:"))
        top.addWidget(self.mode_box, 1)
        top.addWidget(self.save_button)
        lay = QVBoxLayout(self)
        lay.addLayout(top)
        lay.addWidget(self.info)
        lay.addWidget(self.plot, 1)
        self.show_message("No results yet.")

    def save(self, path: str | None = None) -> bool:
        """Save the profile (asking where when ``path`` is None); True when written."""
        if path is None:
            path, _ = QFileDialog.getSaveFileName(self, "Save profile", "profile.csv",
                                                  FILTERS)
            if not path:
                return False
        try:
            save_profile(self, path)
        except ProfileExportError as exc:
            QMessageBox.warning(self, "Save profile", str(exc))
            return False
        return True

    def mode(self) -> str:
        return str(self.mode_box.currentData())

    def set_mode(self, mode: str) -> None:
        self.mode_box.setCurrentIndex([k for k, _ in MODES].index(mode))

    # ------------------------------------------------------------------ content

    def show_message(self, text: str) -> None:
        """An empty plot and ``text`` saying why (or what to do)."""
        if not self.series and self.info.text() == text and not self.ax.axison:
            return  # already shown: no redraw
        self._reset()
        self.info.setText(text)
        self.ax.set_axis_off()
        self.ax_v.set_axis_off()
        self.plot.draw_idle()

    def show_line(self, prof: LineProfile, names: tuple[str, str] = ("x", "y")) -> None:
        """|E| (kV/mm, left axis) and the potential (kV, right axis) from A to B."""
        self._reset()
        s, v = prof.s_mm, prof.phi_V / 1000.0
        e = np.where(prof.inside, np.nan, prof.E_kV_per_mm)  # not resolved at a surface
        self.series = {"E": (s, e), "V": (s, v)}
        ax, axv = self.ax, self.ax_v
        for lo, hi in _runs(s, prof.inside):
            ax.axvspan(lo, hi, color=INSIDE_COLOUR, alpha=0.6, lw=0)
        ax.plot(s, e, color=FIELD_COLOUR, lw=1.6, label="|E|")
        axv.plot(s, v, color=POTENTIAL_COLOUR, lw=1.3, ls=(0, (5, 2)), label="potential")
        ax.set_xlabel("distance from A (mm)")
        ax.set_ylabel("|E| (kV/mm)", color=FIELD_COLOUR)
        axv.set_ylabel("potential (kV)", color=POTENTIAL_COLOUR)
        axv.set_axis_on()
        for a in (ax, axv):
            a.relim()
            a.autoscale_view()
        ax.set_ylim(bottom=0.0)
        ax.set_xlim(s[0], s[-1])
        (a0, a1), (b0, b1) = prof.segment
        k = int(np.nanargmax(e)) if np.isfinite(e).any() else 0
        self.rows = line_rows(prof, names)
        self.title = (f"Potential and |E| along the probe from A ({a0:.4g}, {a1:.4g}) mm "
                      f"to B ({b0:.4g}, {b1:.4g}) mm ({names[0]}, {names[1]})")
        self.info.setText(
            f"A ({a0:.2f}, {a1:.2f}) mm \u2192 B ({b0:.2f}, {b1:.2f}) mm, {s[-1]:.2f} mm long "
            f"({names[0]}, {names[1]}).  Largest |E| {e[k]:.3g} kV/mm at {s[k]:.2f} mm from A; "
            f"potential {np.nanmin(v):.4g} to {np.nanmax(v):.4g} kV.  Grey: inside a "
            "conductor or its surface cell (for the field at a surface, plot the part's "
            "surface field).")
        self._style()

    def show_surface(self, part: str, traces: list[SurfaceTrace],
                     names: tuple[str, str] = ("x", "y")) -> None:
        """|E| next to the outline (kV/mm) against arc length (mm), and the limit."""
        self._reset()
        self.rows = surface_rows(part, traces, names)
        self.title = f"Surface field of {part} against arc length along its outline"
        ax = self.ax
        best = max(traces, key=lambda t: float(np.max(t.E_kV_per_mm)))
        for tr in traces:
            tag = "" if len(traces) == 1 else f" ring {tr.ring}"
            self.series[f"E{tag}"] = (tr.s_mm, tr.E_kV_per_mm)
            self.series[f"limit{tag}"] = (tr.s_mm, tr.limit_kV_per_mm)
            ax.plot(tr.s_mm, tr.E_kV_per_mm, lw=1.6, color=FIELD_COLOUR if tr is best else None,
                    label=f"|E|{tag or ''}")
            ax.plot(tr.s_mm, tr.limit_kV_per_mm, color=LIMIT_COLOUR, lw=1.1, ls="--",
                    label="limit" if tr is best else None)
        k = int(np.argmax(best.E_kV_per_mm))
        peak, at = float(best.E_kV_per_mm[k]), best.xy_mm[k]
        ax.plot([best.s_mm[k]], [peak], "o", color=FIELD_COLOUR, ms=5)
        ax.annotate(f"{peak:.3g} kV/mm", (best.s_mm[k], peak), textcoords="offset points",
                    xytext=(6, -2), fontsize=8, color=FIELD_COLOUR)
        ax.set_xlabel("arc length along the outline (mm)")
        ax.set_ylabel("|E| at the surface (kV/mm)", color="black")
        top = max(float(np.max(t.E_kV_per_mm)) for t in traces)
        lim = max(float(np.max(t.limit_kV_per_mm)) for t in traces)
        # with every electrode at one potential the field is zero: keep the limit line in view
        ax.set_ylim(0.0, 1.12 * (max(top, min(lim, 3 * top)) or lim or 1.0))
        ax.set_xlim(0.0, max(float(t.s_mm[-1]) for t in traces))
        ax.legend(loc="best", fontsize=7, framealpha=0.8)
        limit_here = float(best.limit_kV_per_mm[k])
        self.info.setText(
            f"{part}: peak surface field {peak:.3g} kV/mm at s = {best.s_mm[k]:.2f} mm, "
            f"({at[0]:.2f}, {at[1]:.2f}) mm; limit there {limit_here:.3g} kV/mm "
            f"(margin {100 * (1 - peak / limit_here):.0f} %).  Field on the outside of the "
            "outline.")
        self._style()

    # ------------------------------------------------------------------ drawing

    def _reset(self) -> None:
        """Remove the plotted artists (cheaper than ``Axes.clear``, which rebuilds the
        axis and tick objects); labels and limits are set again by the caller."""
        self.series = {}
        self.rows = None
        for ax in (self.ax, self.ax_v):
            for art in [*ax.lines, *ax.patches, *ax.texts]:
                art.remove()
            if ax.legend_ is not None:
                ax.legend_.remove()
            ax.set_ylabel("")
            ax.set_autoscale_on(True)
        self.ax.set_axis_on()
        self.ax_v.set_axis_off()

    def _style(self) -> None:
        self.ax.grid(True, color="#e4e0d6", lw=0.6)
        for ax in (self.ax, self.ax_v):
            ax.tick_params(labelsize=8)
            ax.xaxis.label.set_size(9)
            ax.yaxis.label.set_size(9)
        self.plot.draw_idle()


def _runs(s: np.ndarray, mask: np.ndarray) -> list[tuple[float, float]]:
    """(start, end) of each run of True in ``mask`` along ``s``."""
    if not mask.any():
        return []
    edges = np.flatnonzero(np.diff(np.r_[0, mask.astype(np.int8), 0]))
    return [(float(s[a]), float(s[min(b, len(s)) - 1])) for a, b in zip(edges[::2], edges[1::2],
                                                                        strict=True)]
