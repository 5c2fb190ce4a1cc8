"""Numbers and titles as reports print them: significant figures, points, SI prefixes."""

from __future__ import annotations

import math


def fmt_num(v: float | None, digits: int = 4) -> str:
    """A number to ``digits`` significant figures; an en dash for missing values."""
    if v is None or not math.isfinite(v):
        return "–"
    return f"{v:.{digits}g}"


def point_decimals(span_mm: float) -> int:
    """Decimals for coordinates in a drawing ``span_mm`` across: about 1/1000 of it.

    :math:`d = \\max(0, 3 - \\lceil\\log_{10} s\\rceil)`: 350 mm gives 0, 66 mm 1, 9 mm 2.
    """
    if not span_mm > 0 or not math.isfinite(span_mm):
        return 3
    return max(0, 3 - math.ceil(math.log10(span_mm)))


def fmt_point(p: tuple[float, float] | None, decimals: int | None = None) -> str:
    """A point in mm as '(x, y)': fixed ``decimals``, or 4 significant figures."""
    if p is None:
        return "–"
    if decimals is None:
        return f"({p[0]:.4g}, {p[1]:.4g})"
    x, y = (round(v, decimals) + 0.0 for v in p)  # + 0.0 turns -0.0 into 0.0
    return f"({x:.{decimals}f}, {y:.{decimals}f})"


def fmt_si(v: float | None, unit: str) -> str:
    """A value with an SI prefix chosen so the mantissa lies in [1, 1000)."""
    if v is None or not math.isfinite(v):
        return "–"
    if v == 0:
        return f"0 {unit}"
    prefixes = [(1e-15, "f"), (1e-12, "p"), (1e-9, "n"), (1e-6, "µ"), (1e-3, "m"), (1.0, "")]
    scale, pre = prefixes[0]
    for s, p in prefixes:
        if abs(v) >= s * 0.9995:
            scale, pre = s, p
    return f"{v / scale:.4g} {pre}{unit}"


def fitted_title(title: str, chars_at_15pt: int) -> tuple[str, float]:
    """(text, font size in pt) so a bold title fits a line of ``chars_at_15pt`` characters.

    The size shrinks in proportion to the length, down to 9 pt; a longer title is cut
    with an ellipsis.
    """
    size = min(15.0, 15.0 * chars_at_15pt / max(len(title), 1))
    if size >= 9.0:
        return title, size
    keep = int(chars_at_15pt * 15.0 / 9.0) - 1
    return title[:keep].rstrip() + "…", 9.0
