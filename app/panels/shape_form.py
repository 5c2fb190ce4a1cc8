"""Exact numeric editing of one part's shape: a form of fields per shape type.

Every field commits a new, whole shape (``dataclasses.replace`` on the frozen shape) to
a callback; the caller turns it into one undo step.  Lengths in mm, angles in degrees.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import replace

from PySide6.QtCore import QSignalBlocker
from PySide6.QtWidgets import (
    QAbstractItemView,
    QFormLayout,
    QHeaderView,
    QLabel,
    QTableWidget,
    QTableWidgetItem,
    QWidget,
)

from solver.layout import Path, Polygon, Shape

from .fields import NumberField

Commit = Callable[[Shape], None]

# (label, unit, getter, setter) for the scalar fields of each shape type
_CENTRE: list[tuple[str, str, Callable, Callable]] = [
    ("Centre x", "mm", lambda s: s.center[0], lambda s, v: replace(s, center=(v, s.center[1]))),
    ("Centre y", "mm", lambda s: s.center[1], lambda s, v: replace(s, center=(s.center[0], v))),
]
_FIELDS: dict[str, list[tuple[str, str, Callable, Callable]]] = {
    "circle": [
        *_CENTRE,
        ("Radius", "mm", lambda s: s.radius, lambda s, v: replace(s, radius=v)),
    ],
    "ellipse": [
        *_CENTRE,
        ("Semi-axis a", "mm", lambda s: s.radii[0], lambda s, v: replace(s, radii=(v, s.radii[1]))),
        ("Semi-axis b", "mm", lambda s: s.radii[1], lambda s, v: replace(s, radii=(s.radii[0], v))),
        ("Angle of a", "\u00b0", lambda s: s.angle_deg, lambda s, v: replace(s, angle_deg=v)),
    ],
    "rect": [
        ("Left x", "mm", lambda s: s.min[0], lambda s, v: replace(s, min=(v, s.min[1]))),
        ("Bottom y", "mm", lambda s: s.min[1], lambda s, v: replace(s, min=(s.min[0], v))),
        ("Right x", "mm", lambda s: s.max[0], lambda s, v: replace(s, max=(v, s.max[1]))),
        ("Top y", "mm", lambda s: s.max[1], lambda s, v: replace(s, max=(s.max[0], v))),
        ("Corner radius", "mm", lambda s: s.corner_radius,
         lambda s, v: replace(s, corner_radius=v)),
    ],
    "polygon": [],
    "path": [("Width", "mm", lambda s: s.width, lambda s, v: replace(s, width=v))],
}


def form_key(shape: Shape) -> tuple:
    """Shapes with the same key share a form layout (same fields, same table rows)."""
    n = len(getattr(shape, "points", ()))
    return shape.type, n, len(getattr(shape, "holes", ()))


class ShapeForm(QWidget):
    """Fields for one shape; :meth:`show_shape` refreshes them without committing."""

    def __init__(self, shape: Shape, commit: Commit, status: Callable[[str], None],
                 parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.shape, self.commit, self.status = shape, commit, status
        form = QFormLayout(self)
        form.setContentsMargins(0, 0, 0, 0)
        self.fields: list[tuple[NumberField, Callable]] = []
        for label, unit, get, put in _FIELDS[shape.type]:
            f = NumberField(unit, lambda v, put=put: self._put(put, v),
                            lo=0.0 if unit == "mm" and label in _NON_NEGATIVE else -1e6)
            self.fields.append((f, get))
            form.addRow(label, f)
        self.table: QTableWidget | None = None
        if isinstance(shape, (Polygon, Path)):
            self._add_table(form, shape)
        self.show_shape(shape)

    def _add_table(self, form: QFormLayout, shape: Polygon | Path) -> None:
        cols = ["x (mm)", "y (mm)"] + (["corner r (mm)"] if isinstance(shape, Polygon) else [])
        t = QTableWidget(len(shape.points), len(cols))
        t.setHorizontalHeaderLabels(cols)
        t.horizontalHeader().setSectionResizeMode(QHeaderView.ResizeMode.Stretch)
        t.verticalHeader().setDefaultSectionSize(22)
        t.setSelectionMode(QAbstractItemView.SelectionMode.SingleSelection)
        t.setMinimumHeight(min(300, 30 + 22 * len(shape.points)))
        t.itemChanged.connect(self._on_cell)
        self.table = t
        form.addRow(QLabel("Outline vertices"))
        form.addRow(t)
        if isinstance(shape, Polygon) and shape.holes:
            form.addRow(QLabel(f"{len(shape.holes)} hole(s): edit their vertices on the canvas"))

    def show_shape(self, shape: Shape) -> None:
        """Display ``shape`` (same form key as the one the form was built for)."""
        self.shape = shape
        for f, get in self.fields:
            f.show_value(get(shape))
        if self.table is None:
            return
        radii = self._radii()
        with QSignalBlocker(self.table):
            for i, (x, y) in enumerate(shape.points):  # type: ignore[union-attr]
                row = [x, y] + ([radii[i]] if radii is not None else [])
                for j, v in enumerate(row):
                    self.table.setItem(i, j, QTableWidgetItem(f"{v:.6g}"))

    def _radii(self) -> list[float] | None:
        if not isinstance(self.shape, Polygon):
            return None
        cr = self.shape.corner_radius
        return list(cr) if isinstance(cr, tuple) else [cr] * len(self.shape.points)

    def _put(self, put: Callable, v: float) -> None:
        self.commit(put(self.shape, v))

    def _on_cell(self, item: QTableWidgetItem) -> None:
        try:
            v = float(item.text().replace(",", "."))
        except ValueError:
            self.status(f"'{item.text()}' is not a number; the vertex is unchanged")
            self.show_shape(self.shape)
            return
        i, j = item.row(), item.column()
        s = self.shape
        assert isinstance(s, (Polygon, Path))
        if j < 2:
            pts = list(s.points)
            pts[i] = (v, pts[i][1]) if j == 0 else (pts[i][0], v)
            self.commit(replace(s, points=tuple(pts)))
            return
        radii = self._radii()
        assert radii is not None and isinstance(s, Polygon)
        radii[i] = v
        self.commit(replace(s, corner_radius=radii[0] if len(set(radii)) == 1 else tuple(radii)))


_NON_NEGATIVE = {"Radius", "Semi-axis a", "Semi-axis b", "Corner radius", "Width"}
