"""The parts list: every part with its kind and value, selection kept in step with the canvas."""

from __future__ import annotations

from PySide6.QtCore import QSignalBlocker, Qt, Signal
from PySide6.QtGui import QColor, QIcon, QPainter, QPixmap
from PySide6.QtWidgets import QAbstractItemView, QTreeWidget, QTreeWidgetItem, QWidget

from .. import palette
from ..document import Document
from ..selection import Selection
from ..units import part_value_text

KIND_TEXT = {"electrode": "Electrode", "floating": "Floating", "dielectric": "Dielectric"}


def swatch(line: QColor, fill: QColor, size: int = 12) -> QIcon:
    """A small rounded square in a part's colours, for lists and legends."""
    pm = QPixmap(size, size)
    pm.fill(Qt.GlobalColor.transparent)
    p = QPainter(pm)
    p.setRenderHint(QPainter.RenderHint.Antialiasing)
    p.setPen(line)
    p.setBrush(fill)
    p.drawRoundedRect(1, 1, size - 2, size - 2, 3, 3)
    p.end()
    return QIcon(pm)


class PartsPanel(QTreeWidget):
    """A three-column list (name, kind, value); double-click asks the view to show a part."""

    show_part = Signal(int)

    def __init__(self, doc: Document, selection: Selection, parent: QWidget | None = None
                 ) -> None:
        super().__init__(parent)
        self.doc, self.selection = doc, selection
        self.setHeaderLabels(["Part", "Kind", "Value"])
        self.setRootIsDecorated(False)
        self.setUniformRowHeights(True)
        self.setSelectionMode(QAbstractItemView.SelectionMode.ExtendedSelection)
        self.setAlternatingRowColors(True)
        self.header().setStretchLastSection(True)
        self.setColumnWidth(0, 130)
        self.setColumnWidth(1, 80)
        self.itemSelectionChanged.connect(self._to_selection)
        self.itemDoubleClicked.connect(lambda it, _c: self.show_part.emit(it.data(0, 256)))
        doc.changed.connect(lambda _rev: self.refresh())
        selection.changed.connect(self._from_selection)
        self.refresh()

    def refresh(self) -> None:
        """Rebuild the rows from the document."""
        with QSignalBlocker(self):
            self.clear()
            vmax = max((abs(p.volts or 0) for _, p in self.doc.parts()), default=0.0)
            for pid, part in self.doc.parts():
                value = part_value_text(part.kind, part.volts, part.charge, part.permittivity)
                item = QTreeWidgetItem([part.name, KIND_TEXT[part.kind], value])
                item.setData(0, 256, pid)
                item.setIcon(0, swatch(*palette.part_colours(part.kind, part.volts, vmax)))
                self.addTopLevelItem(item)
        self._from_selection()

    def _rows(self) -> dict[int, QTreeWidgetItem]:
        return {self.topLevelItem(i).data(0, 256): self.topLevelItem(i)
                for i in range(self.topLevelItemCount())}

    def _from_selection(self) -> None:
        with QSignalBlocker(self):
            for pid, item in self._rows().items():
                item.setSelected(pid in self.selection)
        self.viewport().update()

    def _to_selection(self) -> None:
        self.selection.set(it.data(0, 256) for it in self.selectedItems())
