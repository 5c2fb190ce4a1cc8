"""What the sweep dialog offers: the parameters of a part and a first range for one."""

from __future__ import annotations

from solver.layout import LayoutError, Polygon
from solver.layout import Path as PathShape
from solver.params import SIMPLE_PARAMS, param_value

from .document import Document


def part_params(doc: Document, name: str) -> list[str]:
    """The parameters the part called ``name`` has (those :func:`param_value` can read)."""
    layout = doc.snapshot()
    out = []
    for p in SIMPLE_PARAMS:
        try:
            param_value(layout, name, p)
            out.append(p)
        except (LayoutError, ValueError):
            continue
    shape = layout.part(name).shape
    if isinstance(shape, (Polygon, PathShape)):
        out += [f"vertex:{k}:{a}" for k in range(1, len(shape.points) + 1) for a in "xy"]
    return out


def default_range(param: str, value: float) -> tuple[float, float]:
    """A first range around the present value: x0.5..x2 for sizes, +-50 % for volts."""
    if param in ("radius", "corner_radius", "width", "height") and value > 0:
        return 0.5 * value, 2.0 * value
    if param == "corner_radius":
        return 0.5, 5.0
    if param == "permittivity":
        return 1.0, max(2.0, 2.0 * value)
    if param == "volts" and value:
        return sorted((0.5 * value, 1.5 * value))  # type: ignore[return-value]
    return value - 10.0, value + 10.0
