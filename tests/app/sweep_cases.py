"""The coaxial case the sweep tests share, and its closed-form field.

E = U / (r ln(R/r)) at the core of radius r in a sheath of bore R (REFERENCES.md
section 1.1; standard textbook result).  The layout is ``report_cases.coax_layout``
with a fixed limit of 1 kV/mm.
"""

from __future__ import annotations

import math
from dataclasses import replace

from report_cases import COAX_B_MM, COAX_V, coax_layout

from solver.layout import FixedLimit, Layout

LIMIT = 1.0  # kV/mm


def coax_e(r: float) -> float:
    """kV/mm at the core of radius r mm (REFERENCES.md 1.1: E = U / (r ln(R/r)))."""
    return COAX_V / 1e3 / (r * math.log(COAX_B_MM / r))


def sweep_coax() -> Layout:
    """The coaxial layout with the fixed limit the sweep tests use."""
    return replace(coax_layout(), limit=FixedLimit(LIMIT))
