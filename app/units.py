"""Numbers as the UI shows them, each with its unit (mm, V or kV, kV/mm)."""

from __future__ import annotations


def format_volts(v: float) -> str:
    """A potential with a sensible unit: ``'0 V'``, ``'450 V'``, ``'12.5 kV'``, ``'-3 kV'``."""
    if abs(v) >= 1000.0:
        return f"{v / 1000.0:.4g} kV"
    return f"{v:.4g} V"


def format_mm(x: float) -> str:
    """A length in millimetres with up to four significant decimals."""
    return f"{x:.4g} mm"


def part_value_text(kind: str, volts: float | None, charge: float | None,
                    permittivity: float | None) -> str:
    """The one-line value shown beside a part's name (potential, charge or permittivity)."""
    if kind == "electrode":
        return format_volts(volts or 0.0)
    if kind == "floating":
        q = charge or 0.0
        return "floating" if q == 0 else f"floating, Q = {q:.3g} C"
    return f"\u03b5r = {permittivity or 1.0:.4g}"
