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

from .. import shape_edit as se
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
    return shape.type, n, tuple(len(h) for h in getattr(shape, "holes", ()))


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
        self.tables: list[tuple[int, QTableWidget]] = []
        if isinstance(shape, (Polygon, Path)):
            self._add_tables(form, shape)
        self.show_shape(shape)

    def _add_tables(self, form: QFormLayout, shape: Polygon | Path) -> None:
        rings = [shape.points, *getattr(shape, "holes", ())]
        for k, ring in enumerate(rings):
            title = "Outline vertices" if k == 0 else f"Hole {k} vertices"
            if len(ring) > se.DENSE_RING:
                form.addRow(QLabel(f"{title}: a traced curve of {len(ring)} points, moved "
                                   "with the part"))
                continue
            radius = k == 0 and isinstance(shape, Polygon)
            cols = ["x (mm)", "y (mm)"] + (["corner r (mm)"] if radius else [])
            t = QTableWidget(len(ring), len(cols))
            t.setHorizontalHeaderLabels(cols)
            t.horizontalHeader().setSectionResizeMode(QHeaderView.ResizeMode.Stretch)
            t.verticalHeader().setDefaultSectionSize(22)
            t.setSelectionMode(QAbstractItemView.SelectionMode.SingleSelection)
            t.setMinimumHeight(min(300, 30 + 22 * len(ring)))
            t.itemChanged.connect(lambda item, k=k: self._on_cell(k, item))
            self.tables.append((k, t))
            form.addRow(QLabel(title))
            form.addRow(t)

    @property
    def table(self) -> QTableWidget | None:
        """The outline's vertex table (None for shapes without one)."""
        return self.tables[0][1] if self.tables and self.tables[0][0] == 0 else None

    def show_shape(self, shape: Shape) -> None:
        """Display ``shape`` (same form key as the one the form was built for)."""
        self.shape = shape
        for f, get in self.fields:
            f.show_value(get(shape))
        rings = [getattr(shape, "points", ()), *getattr(shape, "holes", ())]
        radii = self._radii()
        for k, t in self.tables:
            with QSignalBlocker(t):
                for i, (x, y) in enumerate(rings[k]):
                    row = [x, y] + ([radii[i]] if k == 0 and radii is not None else [])
                    for j, v in enumerate(row):
                        t.setItem(i, j, QTableWidgetItem(f"{v:.6g}"))

    def _radii(self) -> list[float] | None:
        if not isinstance(self.shape, Polygon):
            return None
        cr = self.shape.corner_radius
        return list(cr) if isinstance(cr, tuple) else [cr] * len(self.shape.points)

    def _put(self, put: Callable, v: float) -> None:
        self.commit(put(self.shape, v))

    def _on_cell(self, ring: int, item: QTableWidgetItem) -> None:
        try:
            v = float(item.text().replace(",", "."))
        except ValueError:
            self.status(f"'{item.text()}' is not a number; the vertex is unchanged")
            self.show_shape(self.shape)
            return
        i, j = item.row(), item.column()
        s = self.shape
        try:
            if j < 2:
                old = dict(se.vertices(s))[(ring, i)]
                new = (v, old[1]) if j == 0 else (old[0], v)
                self.commit(se.with_vertex_moved(s, (ring, i), new))
            else:
                self.commit(se.with_corner_radius(s, (0, i), v))
        except se.EditError as exc:
            self.status(f"{exc}; the vertex is unchanged")
            self.show_shape(self.shape)


_NON_NEGATIVE = {"Radius", "Semi-axis a", "Semi-axis b", "Corner radius", "Width"}
