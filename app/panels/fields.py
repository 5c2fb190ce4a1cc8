"""Small input widgets the panels share: numbers with units that commit on Enter or focus-out."""

from __future__ import annotations

from collections.abc import Callable

from PySide6.QtCore import QSignalBlocker
from PySide6.QtWidgets import QDoubleSpinBox, QLineEdit, QWidget


class NumberField(QDoubleSpinBox):
    """A number with its unit as suffix; calls ``on_commit(value)`` once per finished edit.

    The range is wide (layouts are validated by the parser, not by the widget), and the
    value shown is updated from the model without triggering a commit.
    """

    def __init__(self, unit: str, on_commit: Callable[[float], None], decimals: int = 3,
                 lo: float = -1.0e6, hi: float = 1.0e6, step: float = 1.0,
                 parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.setDecimals(decimals)
        self.setRange(lo, hi)
        self.setSingleStep(step)
        self.setSuffix(f" {unit}" if unit else "")
        self.setKeyboardTracking(False)
        self.setAccelerated(True)
        self._on_commit = on_commit
        self._shown = 0.0
        self.editingFinished.connect(self._commit)
        self.valueChanged.connect(self._on_value_changed)

    def show_value(self, v: float) -> None:
        """Display ``v`` without committing it."""
        with QSignalBlocker(self):
            self.setValue(v)
        self._shown = self.value()

    def _on_value_changed(self, _v: float) -> None:
        if not self.hasFocus():  # arrow buttons or wheel without focus
            self._commit()

    def _commit(self) -> None:
        if self.value() != self._shown:
            self._shown = self.value()
            self._on_commit(self.value())


class TextField(QLineEdit):
    """Text that calls ``on_commit(text)`` when editing finishes with a changed value."""

    def __init__(self, on_commit: Callable[[str], None], parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self._on_commit = on_commit
        self._shown = ""
        self.editingFinished.connect(self._commit)

    def show_text(self, text: str) -> None:
        with QSignalBlocker(self):
            self.setText(text)
            self.setCursorPosition(0)  # a long title shows its beginning
        self._shown = text

    def _commit(self) -> None:
        if self.text() != self._shown:
            self._shown = self.text()
            self._on_commit(self.text())
