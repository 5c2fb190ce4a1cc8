"""The equipotential step control: a spin box and a unit (percent of the largest
potential difference, or kV), on a small "Field view" tool bar.  Remembered in QSettings
under ``view/equipotential_step`` and ``view/equipotential_unit``."""

from __future__ import annotations

from PySide6.QtCore import QSettings, Signal
from PySide6.QtWidgets import QComboBox, QDoubleSpinBox, QHBoxLayout, QLabel, QWidget

from .solve_runner import EquipotentialStep

UNITS = (("%", "% of \u0394V"), ("kV", "kV"))
DEFAULT_KV = 1.0


class _Spin(QDoubleSpinBox):
    """A spin box that shows 10, 2.5 or 0.125, not 10.000."""

    def textFromValue(self, value: float) -> str:
        return f"{value:.{self.decimals()}f}".rstrip("0").rstrip(".")


class StepControl(QWidget):
    """Emits ``step_changed(EquipotentialStep)`` when the user sets another step.

    Switching the unit converts the value through ``span_V()`` (the largest potential
    difference of the newest result, V) so the lines stay where they were, rounded to
    three significant digits.
    """

    step_changed = Signal(object)

    def __init__(self, settings: QSettings, span_V=lambda: 0.0,  # noqa: ANN001
                 parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.settings, self.span_V = settings, span_V
        self.spin = _Spin()
        self.spin.setDecimals(3)
        self.spin.setRange(0.001, 1.0e6)
        self.spin.setKeyboardTracking(False)  # one change per edit, not per key stroke
        self.spin.setToolTip("Spacing of the equipotential lines")
        self.unit = QComboBox()
        for key, text in UNITS:
            self.unit.addItem(text, key)
        self.unit.setToolTip("Step in percent of the largest potential difference, or in kV")
        lay = QHBoxLayout(self)
        lay.setContentsMargins(4, 0, 4, 0)
        lay.addWidget(QLabel("Equipotentials every"))
        lay.addWidget(self.spin)
        lay.addWidget(self.unit)
        self.set_step(load_step(settings))
        self.spin.valueChanged.connect(lambda _v: self._changed())
        self.unit.currentIndexChanged.connect(lambda _i: self._unit_switched())

    def step(self) -> EquipotentialStep:
        return EquipotentialStep(round(self.spin.value(), 6), str(self.unit.currentData()))

    def set_step(self, step: EquipotentialStep) -> None:
        """Show ``step`` (no signal)."""
        for w in (self.spin, self.unit):
            w.blockSignals(True)
        self.unit.setCurrentIndex([k for k, _ in UNITS].index(step.unit))
        self.spin.setSingleStep(1.0 if step.unit == "%" else 0.5)
        self.spin.setValue(step.value)
        for w in (self.spin, self.unit):
            w.blockSignals(False)

    def _unit_switched(self) -> None:
        unit, span = str(self.unit.currentData()), self.span_V()
        old = self.spin.value()
        if span > 0:
            value = old / 100 * span / 1000 if unit == "kV" else old * 1000 / span * 100
        else:
            value = DEFAULT_KV if unit == "kV" else 10.0
        self.set_step(EquipotentialStep(float(f"{value:.3g}"), unit))
        self._changed()

    def _changed(self) -> None:
        step = self.step()
        self.settings.setValue("view/equipotential_step", step.value)
        self.settings.setValue("view/equipotential_unit", step.unit)
        self.step_changed.emit(step)


def load_step(settings: QSettings) -> EquipotentialStep:
    """The remembered step (10 % when none is, or when what is stored is unusable)."""
    try:
        step = EquipotentialStep(float(settings.value("view/equipotential_step", 10.0)),
                                 str(settings.value("view/equipotential_unit", "%")))
    except (TypeError, ValueError):
        return EquipotentialStep()
    return step if step.value > 0 else EquipotentialStep()
