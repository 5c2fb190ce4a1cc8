"""The results dock: per-part peak surface field, margins, potentials, charges, hot spots.

Fed on the GUI thread with each :class:`app.solve_runner.LiveResult`.  Clicking a hot
spot asks (``hot_spot_clicked(x_mm, y_mm)``) for the canvas to zoom there.
"""

from __future__ import annotations

import math

from PySide6.QtCore import Qt, Signal
from PySide6.QtGui import QBrush, QColor
from PySide6.QtWidgets import (
    QAbstractItemView,
    QHeaderView,
    QLabel,
    QListWidget,
    QListWidgetItem,
    QTableWidget,
    QTableWidgetItem,
    QVBoxLayout,
    QWidget,
)

from ..overlays import hot_spot_text
from ..palette import HOT_SPOT
from ..solve_runner import LiveResult

COLUMNS = ("Part", "Potential (kV)", "Peak |E| (kV/mm)", "Error (%)", "At x, y (mm)",
           "Limit (kV/mm)", "Margin (%)", "Charge")


def charge_text(q: float | None, axisymmetric: bool) -> str:
    """Charge with its unit: nC/m in a planar layout, nC in an axisymmetric one."""
    if q is None or not math.isfinite(q):
        return "\u2013"
    return f"{q * 1e9:.4g} {'nC' if axisymmetric else 'nC/m'}"


class ResultsPanel(QWidget):
    """Table of parts and list of hot spots for the newest result."""

    hot_spot_clicked = Signal(float, float)

    def __init__(self, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.summary = QLabel("No results yet.")
        self.summary.setWordWrap(True)
        self.table = QTableWidget(0, len(COLUMNS))
        self.table.setHorizontalHeaderLabels(COLUMNS)
        self.table.verticalHeader().setVisible(False)
        self.table.setEditTriggers(QAbstractItemView.EditTrigger.NoEditTriggers)
        self.table.horizontalHeader().setSectionResizeMode(
            QHeaderView.ResizeMode.ResizeToContents)
        self.hot_list = QListWidget()
        self.hot_list.itemClicked.connect(self._on_hot_clicked)
        lay = QVBoxLayout(self)
        lay.addWidget(self.summary)
        lay.addWidget(self.table, 3)
        lay.addWidget(QLabel("Hot spots (surface field above the limit); click to zoom:"))
        lay.addWidget(self.hot_list, 1)

    def show_result(self, res: LiveResult) -> None:
        sol = res.solution
        axisym = sol.layout.symmetry == "axisymmetric"
        a, b = ("r", "z") if axisym else ("x", "y")
        self.table.setHorizontalHeaderItem(4, QTableWidgetItem(f"At {a}, {b} (mm)"))
        err = (f" \u00b1 {sol.estimated_error_percent:.1f} %"
               if sol.estimated_error_percent is not None else " (draft, no error estimate)")
        self.summary.setText(
            f"Peak surface field {sol.peak_field_kV_per_mm:.3f} kV/mm{err}; "
            f"{len(sol.hot_spots)} hot spot(s); grid {len(sol.x_mm)} \u00d7 {len(sol.y_mm)} "
            f"({res.resolution}), {res.seconds:.2f} s."
            + "".join(f"\n{n}" for n in (*sol.notes, *res.notes)))
        self.table.setRowCount(len(sol.parts))
        for row, p in enumerate(sol.parts):
            cells = (
                p.name + ("" if p.kind == "electrode" else f" ({p.kind})"),
                "\u2013" if p.volts is None else f"{p.volts / 1000:.4g}"
                + (" (solved)" if p.kind == "floating" else ""),
                f"{p.peak_field_kV_per_mm:.3f}" + (" (sharp corner)" if p.sharp_corner else ""),
                "\u2013" if p.error_percent is None else f"{p.error_percent:.1f}",
                f"{p.peak_at_mm[0]:.2f}, {p.peak_at_mm[1]:.2f}",
                f"{p.limit_at_peak_kV_per_mm:.2f}",
                f"{p.margin_percent:.0f}",
                charge_text(p.charge, axisym),
            )
            for col, text in enumerate(cells):
                item = QTableWidgetItem(text)
                if col == 6 and p.margin_percent < 0:
                    item.setForeground(QBrush(HOT_SPOT))
                self.table.setItem(row, col, item)
        self.hot_list.clear()
        for hs in sol.hot_spots:
            item = QListWidgetItem(f"{hs.part}: {hot_spot_text(hs)} at "
                                   f"({hs.at_mm[0]:.2f}, {hs.at_mm[1]:.2f}) mm")
            item.setForeground(QBrush(HOT_SPOT))
            item.setToolTip(item.text())
            item.setData(Qt.ItemDataRole.UserRole, hs.at_mm)
            self.hot_list.addItem(item)
        if not sol.hot_spots:
            none = QListWidgetItem("None: every surface is below its limit.")
            none.setForeground(QBrush(QColor("#3a7a5b")))
            none.setFlags(Qt.ItemFlag.NoItemFlags)
            self.hot_list.addItem(none)

    def peak_text(self, row: int) -> str:
        """The displayed peak field text of a row (for tests)."""
        return self.table.item(row, 2).text()

    def _on_hot_clicked(self, item: QListWidgetItem) -> None:
        at = item.data(Qt.ItemDataRole.UserRole)
        if at is not None:
            self.hot_spot_clicked.emit(float(at[0]), float(at[1]))
