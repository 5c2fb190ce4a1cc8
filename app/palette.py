"""Stresslens colours: one place, chosen for this program.

Colour says the kind of part: electrodes are drawn in a rust outline whose fill runs
from a cool grey at 0 V to amber at the layout's highest positive potential (steel
blue for negative); floating conductors in indigo; dielectrics in sage green, lightly
translucent so what lies inside them stays visible.  The canvas is a warm off-white
with a quiet grid, so overlays of the field stand out against it.
"""

from __future__ import annotations

from PySide6.QtGui import QColor

CANVAS = QColor("#fbfaf7")
GRID_MINOR = QColor("#eeebe4")
GRID_MAJOR = QColor("#dedad0")
AXIS = QColor("#a59f92")
AXIS_OF_SYMMETRY = QColor("#6d7f91")
FORBIDDEN_SIDE = QColor(109, 127, 145, 26)
RULER_BG = QColor("#f6f4ef")
RULER_TEXT = QColor("#5b574f")
RULER_LINE = QColor("#c8c3b8")
LABEL_TEXT = QColor("#26231f")
LABEL_HALO = QColor(251, 250, 247, 210)

SELECTION = QColor("#1c74d4")
HANDLE_FILL = QColor("#ffffff")
PREVIEW = QColor("#1c74d4")
SNAP = QColor("#0f8a6c")
PREVIEW_FILL = QColor(28, 116, 212, 36)
INVALID = QColor("#c2410c")
HOT_SPOT = QColor("#d1203a")

ELECTRODE_LINE = QColor("#8a3a1c")
ELECTRODE_GROUND = QColor("#bcc2c9")
ELECTRODE_HIGH = QColor("#eba35a")
ELECTRODE_NEGATIVE = QColor("#7ea6c8")
FLOATING_LINE = QColor("#4f4386")
FLOATING_FILL = QColor("#cbc4e6")
DIELECTRIC_LINE = QColor("#3a7a5b")
DIELECTRIC_FILL = QColor(197, 226, 205, 190)


def mix(a: QColor, b: QColor, t: float) -> QColor:
    """Linear blend ``(1 - t) a + t b`` in RGB, ``t`` clipped to [0, 1]."""
    t = min(1.0, max(0.0, t))
    return QColor.fromRgbF(*(ca + t * (cb - ca) for ca, cb in zip(
        a.getRgbF(), b.getRgbF(), strict=True)))


def part_colours(kind: str, volts: float | None, max_abs_volts: float) -> tuple[QColor, QColor]:
    """(outline, fill) of a part.  An electrode's fill hints at its potential.

    The fill of an electrode at :math:`V` is the blend from ground grey towards amber
    (or steel blue when :math:`V < 0`) by :math:`|V| / \\max|V|` over the layout.
    """
    if kind == "floating":
        return FLOATING_LINE, FLOATING_FILL
    if kind == "dielectric":
        return DIELECTRIC_LINE, DIELECTRIC_FILL
    v = volts or 0.0
    t = abs(v) / max_abs_volts if max_abs_volts > 0 else 0.0
    return ELECTRODE_LINE, mix(ELECTRODE_GROUND, ELECTRODE_NEGATIVE if v < 0 else
                               ELECTRODE_HIGH, t)
