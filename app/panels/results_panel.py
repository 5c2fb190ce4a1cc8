"""The results dock: per-part peak surface field, margins, potentials, charges, the
capacitance matrix, the hot spots and the discharge-inception estimate with its caution.

Fed on the GUI thread with each :class:`app.solve_runner.LiveResult`.  Clicking a hot
spot asks (``hot_spot_clicked(x_mm, y_mm)``) for the canvas to zoom there.  Headers are
short, with their units on a second line; the full meaning is in each header's tooltip,
so the table fits the dock's default width without a horizontal scroll bar.
"""

from __future__ import annotations

import math

import numpy as np
from PySide6.QtCore import Qt, Signal
from PySide6.QtGui import QBrush, QColor, QFont
from PySide6.QtWidgets import (
    QAbstractItemView,
    QHeaderView,
    QLabel,
    QListWidget,
    QListWidgetItem,
    QTableWidget,
    QTableWidgetItem,
    QTextBrowser,
    QVBoxLayout,
    QWidget,
)

from ..inception_view import HEADING, INCEPTION_CAUTION, summary_lines
from ..overlays import INCEPTION, hot_spot_text
from ..palette import HOT_SPOT
from ..solve_runner import LiveResult

COLUMNS = (("Part", "Part name; hover for its kind"),
           ("V\n(kV)", "Potential in kV: given for electrodes, solved for floating parts "
                       "(in italics)"),
           ("Peak |E|\n(kV/mm)", "Largest surface field in kV/mm (dielectrics: inside the "
                                 "body); \u2220 marks a sharp corner"),
           ("\u00b1\n(%)", "Estimated error of the peak field, percent"),
           ("At\n(mm)", "Where the peak lies, mm"),
           ("Limit\n(kV/mm)", "Field the insulation withstands at the peak, kV/mm"),
           ("Margin\n(%)", "Margin to the limit, percent (negative: above the limit)"),
           ("Q\n(nC/m)", "Charge on the part, nC per metre of length (planar) or nC "
                         "(axisymmetric)"))


def charge_text(q: float | None, axisymmetric: bool) -> str:
    """Charge with its unit: nC/m in a planar layout, nC in an axisymmetric one."""
    if q is None or not math.isfinite(q):
        return "\u2013"
    return f"{q * 1e9:.4g} {'nC' if axisymmetric else 'nC/m'}"


def round_off_zero(q: float | None, scale: float) -> float | None:
    """0 for a charge below 1e-9 of the largest one (solver round-off on a floating part
    of zero net charge), else ``q``."""
    if q is None or not math.isfinite(q):
        return q
    return 0.0 if abs(q) <= 1e-9 * scale else q


def capacitance_unit(axisymmetric: bool) -> tuple[str, float]:
    """('pF/m', 1e12) for a planar layout (F/m), ('pF', 1e12) for an axisymmetric one (F)."""
    return ("pF" if axisymmetric else "pF/m"), 1.0e12


def _mm(v: float) -> str:
    """A coordinate in mm, short: to 0.1 mm, or to 1 mm from 100 mm up (the cell's
    tooltip has it to 0.001 mm)."""
    text = f"{v:.0f}" if abs(v) >= 100 else f"{v:.1f}"
    return "0.0" if text == "-0.0" else text


def _html(text: str) -> str:
    return text.replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;")


def _table(rows: int, cols: int) -> QTableWidget:
    t = QTableWidget(rows, cols)
    t.setEditTriggers(QAbstractItemView.EditTrigger.NoEditTriggers)
    t.setWordWrap(False)
    t.setStyleSheet("QTableView::item { padding: 0px 3px; }")
    t.verticalHeader().setDefaultSectionSize(22)
    t.horizontalHeader().setSectionResizeMode(QHeaderView.ResizeMode.ResizeToContents)
    return t


class ResultsPanel(QWidget):
    """Table of parts, capacitance matrix and list of hot spots for the newest result."""

    hot_spot_clicked = Signal(float, float)

    def __init__(self, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.summary = QLabel("No results yet.")
        self.summary.setWordWrap(True)
        self.table = _table(0, len(COLUMNS))
        for col, (text, tip) in enumerate(COLUMNS):
            item = QTableWidgetItem(text)
            item.setToolTip(tip)
            self.table.setHorizontalHeaderItem(col, item)
        self.table.verticalHeader().setVisible(False)
        self.table.horizontalHeader().setStretchLastSection(True)
        self.cap_label = QLabel()
        self.cap_label.setWordWrap(True)
        self.cap_table = _table(0, 0)
        self.hot_list = QListWidget()
        self.hot_list.setWordWrap(True)
        self.hot_list.setHorizontalScrollBarPolicy(Qt.ScrollBarPolicy.ScrollBarAlwaysOff)
        self.hot_list.itemClicked.connect(self._on_hot_clicked)
        lay = QVBoxLayout(self)
        lay.addWidget(self.summary)
        lay.addWidget(self.table, 3)
        lay.addWidget(self.cap_label)
        lay.addWidget(self.cap_table, 2)
        lay.addWidget(QLabel("Hot spots (surface field above the limit); click to zoom:"))
        lay.addWidget(self.hot_list, 2)
        self.inception = QTextBrowser()
        self.inception.setObjectName("inception")
        self.inception.setMinimumHeight(20)  # the window must still fit small screens
        self.inception.setToolTip("The voltages at which a discharge is expected to start, "
                                  "scaled from the applied ones; the dotted violet path on "
                                  "the canvas is the field line it is computed along.\n\n"
                                  + INCEPTION_CAUTION)
        lay.addWidget(self.inception, 2)

    def show_result(self, res: LiveResult) -> None:
        sol = res.solution
        axisym = sol.layout.symmetry == "axisymmetric"
        err = (f" \u00b1 {sol.estimated_error_percent:.1f} %"
               if sol.estimated_error_percent is not None else " (draft, no error estimate)")
        lim = sol.layout.limit
        limit = (f"limit {lim.kV_per_mm:.3g} kV/mm" if lim.type == "fixed"
                 else "limit from Peek's law at each surface point")
        self.summary.setText(
            f"Peak surface field {sol.peak_field_kV_per_mm:.3f} kV/mm{err} ({limit}); "
            f"{len(sol.hot_spots)} hot spot(s); grid {len(sol.x_mm)} \u00d7 {len(sol.y_mm)} "
            f"({res.resolution}), {res.seconds:.2f} s."
            + "".join(f"\n{n}" for n in (*sol.notes, *res.notes)))
        self._parts(res, axisym)
        self._capacitance(res, axisym)
        self._hot_spots(res)
        self._inception(res)

    def _inception(self, res: LiveResult) -> None:
        """The streamer estimate's block: its numbers (with units) or why there is none."""
        outcome = res.inception
        if outcome is None:
            body = ["Made by the full solve (not while dragging)."]
        elif outcome.inception is None:
            body = [f"No estimate: {outcome.reason}"]
        else:
            body = summary_lines(outcome.inception)
        self.inception.setHtml(
            f"<b style='color:{INCEPTION.name()}'>{HEADING}</b>"
            "<span style='color:#6b5200'> \u00b7 see the caution below</span><br>"
            + "<br>".join(_html(line) for line in body)
            + f"<p style='color:#6b5200; font-size:small'>{_html(INCEPTION_CAUTION)}</p>")

    def inception_scale(self) -> float | None:
        """The displayed inception scale (x applied), for tests; None when none is shown."""
        text = self.inception.toPlainText()
        marker = "Scale: "
        if marker not in text:
            return None
        return float(text.split(marker, 1)[1].split(" ", 1)[0])

    def _parts(self, res: LiveResult, axisym: bool) -> None:
        sol = res.solution
        a, b = ("r", "z") if axisym else ("x", "y")
        self.table.horizontalHeaderItem(4).setText(f"At {a}, {b}\n(mm)")
        self.table.horizontalHeaderItem(7).setText("Q\n(nC)" if axisym else "Q\n(nC/m)")
        self.table.setRowCount(len(sol.parts))
        # a fixed limit is the same everywhere: said once in the summary, not per row
        self.table.setColumnHidden(5, sol.layout.limit.type == "fixed")
        italic = QFont()
        italic.setItalic(True)
        q_big = max((abs(p.charge) for p in sol.parts
                     if p.charge is not None and math.isfinite(p.charge)), default=0.0)
        for row, p in enumerate(sol.parts):
            q = charge_text(round_off_zero(p.charge, q_big), axisym)
            cells = (
                p.name,
                "\u2013" if p.volts is None else f"{p.volts / 1000:.4g}",
                f"{p.peak_field_kV_per_mm:.3f}" + (" \u2220" if p.sharp_corner else ""),
                "\u2013" if p.error_percent is None else f"{p.error_percent:.1f}",
                f"{_mm(p.peak_at_mm[0])}, {_mm(p.peak_at_mm[1])}",
                f"{p.limit_at_peak_kV_per_mm:.2f}",
                f"{p.margin_percent:.0f}",
                q.split()[0],
            )
            for col, text in enumerate(cells):
                item = QTableWidgetItem(text)
                if col > 0:
                    item.setTextAlignment(Qt.AlignmentFlag.AlignRight
                                          | Qt.AlignmentFlag.AlignVCenter)
                if col == 0:
                    item.setToolTip(f"{p.name}: {p.kind}")
                if col == 1 and p.kind == "floating":
                    item.setFont(italic)
                    item.setToolTip("solved potential of the floating conductor")
                if col == 2 and p.sharp_corner:
                    item.setToolTip("the peak sits on a sharp corner: the true field there "
                                    "is unbounded; this value belongs to this grid")
                if col == 4:
                    item.setToolTip(f"peak at ({p.peak_at_mm[0]:.3f}, {p.peak_at_mm[1]:.3f}) mm")
                if col == 6 and p.margin_percent < 0:
                    item.setForeground(QBrush(HOT_SPOT))
                self.table.setItem(row, col, item)

    def _capacitance(self, res: LiveResult, axisym: bool) -> None:
        """The Maxwell capacitance matrix C_ij = Q_i / V_j (other conductors at 0 V)."""
        sol = res.solution
        c = np.asarray(sol.capacitance, float)
        unit, scale = capacitance_unit(axisym)
        names = list(sol.conductor_names)
        if c.size == 0 or c.shape != (len(names), len(names)):
            self.cap_label.setText("Capacitance matrix: computed by the full solve (not "
                                   "while dragging).")
            self.cap_table.setRowCount(0)
            self.cap_table.setColumnCount(0)
            self.cap_table.hide()
            return
        self.cap_label.setText(f"Capacitance matrix ({unit}): charge on the row's "
                               f"conductor per volt on the column's, the others at 0 V.")
        self.cap_table.show()
        self.cap_table.setRowCount(len(names))
        self.cap_table.setColumnCount(len(names))
        self.cap_table.setHorizontalHeaderLabels(names)
        self.cap_table.setVerticalHeaderLabels(names)
        for i in range(len(names)):
            for j in range(len(names)):
                item = QTableWidgetItem(f"{c[i, j] * scale:.4g}")
                item.setTextAlignment(Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter)
                item.setToolTip(f"C[{names[i]}, {names[j]}] = {c[i, j] * scale:.6g} {unit}")
                self.cap_table.setItem(i, j, item)
        t = self.cap_table
        t.resizeRowsToContents()
        t.setFixedHeight(t.horizontalHeader().sizeHint().height() + 2 * t.frameWidth()
                         + sum(t.rowHeight(i) for i in range(len(names))) + 2)

    def _hot_spots(self, res: LiveResult) -> None:
        sol = res.solution
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

    def capacitance_pF(self) -> np.ndarray:
        """The displayed capacitance matrix (pF/m or pF), for tests; empty when none."""
        n = self.cap_table.rowCount()
        return np.array([[float(self.cap_table.item(i, j).text()) for j in range(n)]
                         for i in range(n)]).reshape(n, n)

    def _on_hot_clicked(self, item: QListWidgetItem) -> None:
        at = item.data(Qt.ItemDataRole.UserRole)
        if at is not None:
            self.hot_spot_clicked.emit(float(at[0]), float(at[1]))
