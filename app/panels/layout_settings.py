"""The layout-wide settings: title, symmetry, outer boundary, field limit, resolution.

Each edit is one undo step (:class:`app.commands.ChangeSettingsCommand`).  The box
boundary is in mm and its potential in kV; the fixed limit in kV/mm; Peek's law takes
the air pressure (kPa), temperature (degC) and the surface factor m (1 for a polished
surface, lower for rough or weathered ones).
"""

from __future__ import annotations

from dataclasses import replace

from PySide6.QtCore import QSignalBlocker
from PySide6.QtGui import QUndoStack
from PySide6.QtWidgets import QComboBox, QFormLayout, QGroupBox, QVBoxLayout, QWidget

from solver.layout import Boundary, FixedLimit, PeekLimit

from ..commands import ChangeSettingsCommand
from ..document import Document, Settings
from .fields import NumberField, TextField

BOUNDARIES = ("Open (far field decays)", "Grounded box", "Insulating box (symmetry walls)")
RESOLUTIONS = ("draft", "normal", "fine")


class LayoutSettingsPanel(QWidget):
    """Edits :class:`app.document.Settings` through the undo stack."""

    def __init__(self, doc: Document, stack: QUndoStack, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.doc, self.stack = doc, stack
        outer = QVBoxLayout(self)
        general = QGroupBox("Layout")
        g = QFormLayout(general)
        self.title = TextField(lambda t: self._apply(title=t))
        self.symmetry = QComboBox()
        self.symmetry.addItems(["Planar (x, y)", "Axisymmetric (r, z)"])
        self.symmetry.currentIndexChanged.connect(self._set_symmetry)
        self.resolution = QComboBox()
        self.resolution.addItems(["Draft", "Normal", "Fine", "Finest spacing"])
        self.resolution.currentIndexChanged.connect(self._set_resolution)
        self.spacing = NumberField("mm", lambda v: self._apply(resolution=v), decimals=4,
                                   lo=1e-4, hi=1e3, step=0.05)
        g.addRow("Title", self.title)
        g.addRow("Symmetry", self.symmetry)
        g.addRow("Resolution", self.resolution)
        g.addRow("Finest spacing", self.spacing)
        self.general = g
        outer.addWidget(general)
        outer.addWidget(self._boundary_box())
        outer.addWidget(self._limit_box())
        outer.addStretch(1)
        doc.settings_changed.connect(self.refresh)
        doc.reset.connect(self.refresh)
        self.refresh()

    def _boundary_box(self) -> QGroupBox:
        box = QGroupBox("Outer boundary")
        f = QFormLayout(box)
        self.boundary = QComboBox()
        self.boundary.addItems(BOUNDARIES)
        self.boundary.currentIndexChanged.connect(self._set_boundary_type)
        self.bx0 = NumberField("mm", lambda v: self._box(0, v))
        self.by0 = NumberField("mm", lambda v: self._box(1, v))
        self.bx1 = NumberField("mm", lambda v: self._box(2, v))
        self.by1 = NumberField("mm", lambda v: self._box(3, v))
        self.bvolts = NumberField("kV", lambda v: self._apply(
            boundary=replace(self.doc.settings.boundary, volts=v * 1e3)), step=0.5)
        f.addRow("Type", self.boundary)
        for label, w in (("Left", self.bx0), ("Bottom", self.by0), ("Right", self.bx1),
                         ("Top", self.by1), ("Potential", self.bvolts)):
            f.addRow(label, w)
        self.boundary_form = f
        return box

    def _limit_box(self) -> QGroupBox:
        box = QGroupBox("Surface field limit")
        f = QFormLayout(box)
        self.limit = QComboBox()
        self.limit.addItems(["Fixed value", "Peek's law (air)"])
        self.limit.currentIndexChanged.connect(self._set_limit_type)
        self.kv = NumberField("kV/mm", lambda v: self._apply(limit=FixedLimit(v)), lo=1e-3,
                              hi=1e3, step=0.1)
        self.pressure = NumberField("kPa", lambda v: self._peek(pressure_kPa=v), lo=1, hi=1e4)
        self.temperature = NumberField("\u00b0C", lambda v: self._peek(temperature_C=v),
                                       lo=-100, hi=500)
        self.surface = NumberField("", lambda v: self._peek(surface_factor=v), lo=0.1, hi=1.0,
                                   step=0.05)
        f.addRow("Kind", self.limit)
        f.addRow("Limit", self.kv)
        f.addRow("Pressure", self.pressure)
        f.addRow("Temperature", self.temperature)
        f.addRow("Surface factor m", self.surface)
        self.limit_form = f
        return box

    # ------------------------------------------------------------------ view

    def refresh(self) -> None:
        s = self.doc.settings
        self.title.show_text(s.title)
        res = s.resolution
        for combo, index in ((self.symmetry, 0 if s.symmetry == "planar" else 1),
                             (self.resolution, RESOLUTIONS.index(res) if isinstance(res, str)
                              else 3),
                             (self.boundary, 0 if s.boundary.type == "open" else
                              1 if s.boundary.volts is not None else 2),
                             (self.limit, 0 if isinstance(s.limit, FixedLimit) else 1)):
            with QSignalBlocker(combo):
                combo.setCurrentIndex(index)
        self.general.setRowVisible(self.spacing, not isinstance(res, str))
        if not isinstance(res, str):
            self.spacing.show_value(res)
        b = s.boundary
        box = b.type == "box"
        for w, v in ((self.bx0, b.min and b.min[0]), (self.by0, b.min and b.min[1]),
                     (self.bx1, b.max and b.max[0]), (self.by1, b.max and b.max[1])):
            self.boundary_form.setRowVisible(w, box)
            w.show_value(v or 0.0)
        self.boundary_form.setRowVisible(self.bvolts, box and b.volts is not None)
        self.bvolts.show_value((b.volts or 0.0) / 1e3)
        fixed = isinstance(s.limit, FixedLimit)
        self.limit_form.setRowVisible(self.kv, fixed)
        for w in (self.pressure, self.temperature, self.surface):
            self.limit_form.setRowVisible(w, not fixed)
        if isinstance(s.limit, FixedLimit):
            self.kv.show_value(s.limit.kV_per_mm)
        else:
            self.pressure.show_value(s.limit.pressure_kPa)
            self.temperature.show_value(s.limit.temperature_C)
            self.surface.show_value(s.limit.surface_factor)

    # ------------------------------------------------------------------ edits

    def _apply(self, **changes: object) -> None:
        after = replace(self.doc.settings, **changes)
        if after != self.doc.settings:
            self.stack.push(ChangeSettingsCommand(self.doc, after))

    def _set_symmetry(self, index: int) -> None:
        """Planar or axisymmetric; an axisymmetric box boundary starts at the axis (r = 0)."""
        symmetry = ("planar", "axisymmetric")[index]
        b = self.doc.settings.boundary
        if symmetry == "axisymmetric" and b.type == "box" and b.min is not None:
            b = replace(b, min=(0.0, b.min[1]))
        self._apply(symmetry=symmetry, boundary=b)

    def _set_resolution(self, index: int) -> None:
        if index < 3:
            self._apply(resolution=RESOLUTIONS[index])
        else:
            self._apply(resolution=0.5)

    def _set_boundary_type(self, index: int) -> None:
        if index == 0:
            self._apply(boundary=Boundary())
            return
        old = self.doc.settings.boundary
        lo, hi = (old.min, old.max) if old.type == "box" else _box_around(self.doc.settings,
                                                                           self.doc)
        self._apply(boundary=Boundary(type="box", min=lo, max=hi,
                                      volts=0.0 if index == 1 else None))

    def _box(self, k: int, v: float) -> None:
        b = self.doc.settings.boundary
        c = [*(b.min or (0.0, 0.0)), *(b.max or (0.0, 0.0))]
        c[k] = v
        self._apply(boundary=replace(b, min=(c[0], c[1]), max=(c[2], c[3])))

    def _set_limit_type(self, index: int) -> None:
        self._apply(limit=FixedLimit() if index == 0 else PeekLimit())

    def _peek(self, **changes: float) -> None:
        lim = self.doc.settings.limit
        if isinstance(lim, PeekLimit):
            self._apply(limit=replace(lim, **changes))


def _box_around(settings: Settings, doc: Document) -> tuple[tuple[float, float],
                                                             tuple[float, float]]:
    """A box 50 % larger than the parts' extent (x from 0 in axisymmetry), mm."""
    from .. import shape_edit as se
    bb = [se.bounds(p.shape) for _, p in doc.parts()] or [(-50.0, -50.0, 50.0, 50.0)]
    x0, y0 = min(b[0] for b in bb), min(b[1] for b in bb)
    x1, y1 = max(b[2] for b in bb), max(b[3] for b in bb)
    mx, my = 0.25 * (x1 - x0) + 1.0, 0.25 * (y1 - y0) + 1.0
    left = 0.0 if settings.symmetry == "axisymmetric" else round(x0 - mx)
    return (left, round(y0 - my)), (round(x1 + mx), round(y1 + my))
