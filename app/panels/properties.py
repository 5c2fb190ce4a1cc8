"""The properties of the selected part: name, kind, potential / charge / permittivity, shape.

Every edit is one undo step (:class:`app.commands.ChangePartCommand`).  Potentials are
entered in kV, charges in nC/m (planar) or nC (axisymmetric); the file keeps V and C.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import replace

from PySide6.QtCore import QSignalBlocker
from PySide6.QtGui import QUndoStack
from PySide6.QtWidgets import QComboBox, QFormLayout, QGroupBox, QLabel, QVBoxLayout, QWidget

from solver.layout import KINDS, Part, Shape

from .. import shape_edit as se
from ..commands import ChangePartCommand
from ..document import Document
from ..selection import Selection
from ..tools.base import DEFAULT_VALUES
from .fields import NumberField, TextField
from .shape_form import ShapeForm, form_key

SHAPE_NAMES = {"circle": "Circle", "ellipse": "Ellipse", "rect": "Rectangle",
               "polygon": "Polygon", "path": "Wire"}


class PropertiesPanel(QWidget):
    """Shows and edits the one selected part; says how many are selected otherwise."""

    def __init__(self, doc: Document, selection: Selection, stack: QUndoStack,
                 status: Callable[[str], None], parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.doc, self.selection, self.stack, self.status = doc, selection, stack, status
        self.pid: int | None = None
        outer = QVBoxLayout(self)
        self.caption = QLabel()
        self.caption.setWordWrap(True)
        outer.addWidget(self.caption)
        self.part_box = QGroupBox("Part")
        form = QFormLayout(self.part_box)
        self.name = TextField(self._set_name)
        self.kind = QComboBox()
        self.kind.addItems([k.capitalize() for k in KINDS])
        self.kind.currentIndexChanged.connect(self._set_kind)
        self.volts = NumberField("kV", lambda v: self._set_value("volts", v * 1e3), decimals=3,
                                 step=0.5)
        self.charge = NumberField("nC/m", lambda v: self._set_value("charge", v * 1e-9), step=0.1)
        self.eps = NumberField("", lambda v: self._set_value("permittivity", v), lo=1.0,
                               hi=1e5, step=0.1)
        form.addRow("Name", self.name)
        form.addRow("Kind", self.kind)
        form.addRow("Potential", self.volts)
        form.addRow("Net charge", self.charge)
        form.addRow("Permittivity \u03b5r", self.eps)
        self.value_form = form
        outer.addWidget(self.part_box)
        self.shape_box = QGroupBox("Shape")
        self.shape_layout = QVBoxLayout(self.shape_box)
        self.shape_form: ShapeForm | None = None
        self._shape_key: tuple | None = None
        outer.addWidget(self.shape_box)
        outer.addStretch(1)
        selection.changed.connect(self.refresh)
        doc.changed.connect(lambda _rev: self.refresh())
        self.refresh()

    # ------------------------------------------------------------------ view

    def refresh(self) -> None:
        """Show the current selection."""
        ids = self.selection.ids
        self.pid = ids[0] if len(ids) == 1 and ids[0] in self.doc else None
        self.part_box.setVisible(self.pid is not None)
        self.shape_box.setVisible(self.pid is not None)
        if self.pid is None:
            self.caption.setText("No part selected. Click a part on the canvas or in the list."
                                 if not ids else f"{len(ids)} parts selected."
                                 + (" " + clearance_text(self.doc, ids) if len(ids) == 2
                                    else ""))
            return
        part = self.doc.part(self.pid)
        self.caption.setText(f"{SHAPE_NAMES[part.shape.type]} \u2014 lengths in mm")
        self.name.show_text(part.name)
        with QSignalBlocker(self.kind):
            self.kind.setCurrentIndex(KINDS.index(part.kind))
        axi = self.doc.settings.symmetry == "axisymmetric"
        self.charge.setSuffix(" nC" if axi else " nC/m")
        self.volts.show_value((part.volts or 0.0) / 1e3)
        self.charge.show_value((part.charge or 0.0) / 1e-9)
        self.eps.show_value(part.permittivity or 1.0)
        for w, kind in ((self.volts, "electrode"), (self.charge, "floating"),
                        (self.eps, "dielectric")):
            self.value_form.setRowVisible(w, part.kind == kind)
        self._show_shape(part.shape)

    def _show_shape(self, shape: Shape) -> None:
        key = (self.pid, *form_key(shape))
        if key != self._shape_key or self.shape_form is None:
            if self.shape_form is not None:  # out of the layout now, freed later
                self.shape_layout.removeWidget(self.shape_form)
                self.shape_form.hide()
                self.shape_form.setParent(None)
                self.shape_form.deleteLater()
            self.shape_form = ShapeForm(shape, self._set_shape, self.status)
            self.shape_layout.addWidget(self.shape_form)
            self._shape_key = key
        else:
            self.shape_form.show_shape(shape)

    # ------------------------------------------------------------------ edits

    def _change(self, after: Part, text: str) -> None:
        if self.pid is not None and after != self.doc.part(self.pid):
            self.stack.push(ChangePartCommand(self.doc, self.pid, after, text))

    def _set_name(self, name: str) -> None:
        if self.pid is None:
            return
        name = name.strip()
        other = self.doc.id_of(name)
        if not name or (other is not None and other != self.pid):
            self.status(f"Name '{name}' is empty or already used; the name is unchanged"
                        if name else "A part needs a name; the name is unchanged")
            self.refresh()
            return
        self._change(replace(self.doc.part(self.pid), name=name), f"Rename to {name}")

    def _set_kind(self, index: int) -> None:
        if self.pid is None:
            return
        kind = KINDS[index]
        part = self.doc.part(self.pid)
        values = {"volts": None, "charge": None, "permittivity": None, **DEFAULT_VALUES[kind]}
        self._change(replace(part, kind=kind, **values), f"Make {part.name} {kind}")

    def _set_value(self, field: str, value: float) -> None:
        if self.pid is not None:
            part = self.doc.part(self.pid)
            self._change(replace(part, **{field: value}), f"Set {field} of {part.name}")

    def _set_shape(self, shape: Shape) -> None:
        if self.pid is not None:
            part = self.doc.part(self.pid)
            self._change(replace(part, shape=shape), f"Resize {part.name}")


def clearance_text(doc: Document, ids: list[int]) -> str:
    """The shortest gap between two parts' outlines (mm): the clearance through the medium.

    Shapely's distance between the two regions, holes included, so a part inside an
    enclosure's opening is measured to the opening's edge.
    """
    a, b = (doc.part(i) for i in ids)
    ra, rb = se.region(a.shape), se.region(b.shape)
    if ra is None or rb is None:
        return "(clearance unknown: an outline is not valid)"
    gap = ra.distance(rb)
    if gap == 0.0:
        return f"'{a.name}' and '{b.name}' touch or overlap."
    return f"Clearance between '{a.name}' and '{b.name}': {gap:.4g} mm."
