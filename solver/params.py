"""Named parameters of a layout: read one number, or set it and get a new layout.

A parameter is one number of one part, named as on the ``stresslens sweep`` command
line (DESIGN.md section 3).  Lengths are millimetres, potentials volts, permittivity
relative.

============== ====================================================================
``radius``     circle radius; for a path (a wire) half its width, the wire radius
``corner_radius`` rect corner radius; for a polygon the radius of every vertex that
               is already rounded, or of every vertex when none is (in an
               axisymmetric layout never a vertex on the axis); reading it gives
               the largest vertex radius
``width``      full extent along x: rect width, an ellipse's first diameter 2a
               (along its own axis), a path's width, a polygon stretched in x
``height``     full extent along y: rect height, an ellipse's second diameter 2b, a
               polygon stretched in y
``x``, ``y``   position of the centre of the part's bounding box (the part moves)
``volts``      an electrode's potential, V
``permittivity`` a dielectric's relative permittivity
``vertex:K:x`` one coordinate of vertex K (counting from 1) of a polygon's outline
``vertex:K:y`` or of a path's points
============== ====================================================================

A rect or polygon resized in x keeps the centre of its bounding box; in an
axisymmetric layout a part that touches the axis (its smallest r is 0) keeps touching
it and grows outwards instead.  Resizing in y always keeps the centre.

:func:`apply_param` re-validates the new layout through the file parser, so a value
that breaks the geometry (a radius that makes two conductors overlap, a corner radius
larger than half the side) raises :class:`solver.layout.LayoutError` naming the part
and the problem, exactly as opening such a file would.
"""

from __future__ import annotations

import re
from dataclasses import replace

import numpy as np

from .geometry import shape_polygon
from .layout import (
    Circle,
    Ellipse,
    Layout,
    LayoutError,
    Part,
    Path,
    Polygon,
    Rect,
    Shape,
    layout_to_json,
    parse_layout,
)

SIMPLE_PARAMS = ("radius", "corner_radius", "width", "height", "x", "y", "volts",
                 "permittivity")
"""Parameter names other than the vertex coordinates ``vertex:K:x`` / ``vertex:K:y``."""

_VERTEX = re.compile(r"^vertex:(\d+):([xy])$")

PARAM_UNITS = {"volts": "V", "permittivity": ""}
"""Unit of each parameter that is not a length in mm."""


class ParamError(LayoutError):
    """A parameter that does not exist for this part (or a malformed name)."""


def param_unit(param: str) -> str:
    """The unit of ``param``: ``"mm"``, ``"V"`` or ``""`` (relative permittivity)."""
    return PARAM_UNITS.get(param, "mm")


def check_param_name(param: str) -> None:
    """Raise :class:`ParamError` unless ``param`` is a known parameter name."""
    if param in SIMPLE_PARAMS or _VERTEX.match(param):
        return
    raise ParamError(f"'{param}' is not a parameter: use one of {', '.join(SIMPLE_PARAMS)}, "
                     f"vertex:K:x or vertex:K:y (K counts vertices from 1)")


def param_value(layout: Layout, part_name: str, param: str) -> float:
    """The current value of ``param`` of the part ``part_name`` (mm, V or relative)."""
    part = _find(layout, part_name)
    check_param_name(param)
    s = part.shape
    if param == "volts":
        return float(_electrode(part).volts or 0.0)
    if param == "permittivity":
        return float(_dielectric(part).permittivity or 1.0)
    if param in ("x", "y"):
        x0, y0, x1, y1 = _bounds(s)
        return 0.5 * (x0 + x1) if param == "x" else 0.5 * (y0 + y1)
    if param == "radius":
        if isinstance(s, Circle):
            return s.radius
        if isinstance(s, Path):
            return 0.5 * s.width
        raise _not_for(part, param, "a circle's radius or a path's (wire) radius")
    if param == "corner_radius":
        if isinstance(s, Rect):
            return s.corner_radius
        if isinstance(s, Polygon):
            cr = s.corner_radius
            return float(max(cr)) if isinstance(cr, tuple) else float(cr)
        raise _not_for(part, param, "rects and polygons")
    if param in ("width", "height"):
        return _extent(part, param)
    k, axis = _vertex_ref(part, param)
    return float(s.points[k][0 if axis == "x" else 1])  # type: ignore[union-attr]


def apply_param(layout: Layout, part_name: str, param: str, value: float) -> Layout:
    """A new, validated layout with ``param`` of part ``part_name`` set to ``value``.

    Raises
    ------
    ParamError
        The part has no such parameter, or the name is malformed.
    LayoutError
        The new value makes the layout invalid (the message names part and problem).
    """
    part = _find(layout, part_name)
    check_param_name(param)
    v = float(value)
    if not np.isfinite(v):
        raise ParamError(f"part '{part_name}': {param} must be a finite number, not {value}")
    new = _changed(layout, part, param, v)
    parts = tuple(new if p.name == part_name else p for p in layout.parts)
    return parse_layout(layout_to_json(replace(layout, parts=parts)))


# --------------------------------------------------------------------------- editing


def _changed(layout: Layout, part: Part, param: str, v: float) -> Part:
    s = part.shape
    if param == "volts":
        return replace(_electrode(part), volts=v)
    if param == "permittivity":
        return replace(_dielectric(part), permittivity=v)
    if param in ("x", "y"):
        cur = param_value(layout, part.name, param)
        d = v - cur
        return replace(part, shape=translated_shape(s, d if param == "x" else 0.0,
                                               d if param == "y" else 0.0))
    if param == "radius":
        _positive(part, param, v)
        if isinstance(s, Circle):
            return replace(part, shape=replace(s, radius=v))
        if isinstance(s, Path):
            return replace(part, shape=replace(s, width=2.0 * v))
        raise _not_for(part, param, "a circle's radius or a path's (wire) radius")
    if param == "corner_radius":
        if v < 0:
            raise LayoutError(f"part '{part.name}': corner_radius must not be negative, "
                              f"not {v:g} mm")
        if isinstance(s, Rect):
            return replace(part, shape=replace(s, corner_radius=v))
        if isinstance(s, Polygon):
            return replace(part, shape=replace(s, corner_radius=_polygon_radii(layout, s, v)))
        raise _not_for(part, param, "rects and polygons")
    if param in ("width", "height"):
        _positive(part, param, v)
        return replace(part, shape=_resized(layout, part, param, v))
    k, axis = _vertex_ref(part, param)
    assert isinstance(s, (Polygon, Path))
    pts = list(s.points)
    pts[k] = (v, pts[k][1]) if axis == "x" else (pts[k][0], v)
    moved: Shape = replace(s, points=tuple(pts))  # type: ignore[arg-type]
    return replace(part, shape=moved)


def _polygon_radii(layout: Layout, s: Polygon, v: float) -> float | tuple[float, ...]:
    """Radius ``v`` at the rounded vertices (all when none is), none on the axis."""
    cr = s.corner_radius
    if isinstance(cr, tuple) and any(r > 0 for r in cr):
        return tuple(v if r > 0 else 0.0 for r in cr)
    if layout.symmetry == "axisymmetric" and any(abs(x) <= 1e-12 for x, _ in s.points):
        return tuple(0.0 if abs(x) <= 1e-12 else v for x, _ in s.points)
    return v


def _resized(layout: Layout, part: Part, param: str, v: float) -> Shape:
    s = part.shape
    along_x = param == "width"
    if isinstance(s, Ellipse):
        a, b = s.radii
        return replace(s, radii=(0.5 * v, b) if along_x else (a, 0.5 * v))
    if isinstance(s, Path):
        if not along_x:
            raise _not_for(part, param, "rects, ellipses and polygons (a path has a width)")
        return replace(s, width=v)
    if isinstance(s, Circle):
        raise _not_for(part, param, "rects, ellipses, paths and polygons (sweep a circle's "
                       "radius)")
    x0, y0, x1, y1 = _bounds(s)
    lo, hi = (x0, x1) if along_x else (y0, y1)
    anchor = 0.5 * (lo + hi)
    if along_x and layout.symmetry == "axisymmetric" and abs(x0) <= 1e-12:
        anchor = 0.0
    factor = v / (hi - lo)

    def stretch(c: float) -> float:
        return anchor + (c - anchor) * factor

    if isinstance(s, Rect):
        if along_x:
            return replace(s, min=(stretch(s.min[0]), s.min[1]), max=(stretch(s.max[0]), s.max[1]))
        return replace(s, min=(s.min[0], stretch(s.min[1])), max=(s.max[0], stretch(s.max[1])))
    assert isinstance(s, Polygon)

    def ring(pts: tuple[tuple[float, float], ...]) -> tuple[tuple[float, float], ...]:
        return tuple((stretch(x), y) if along_x else (x, stretch(y)) for x, y in pts)

    return replace(s, points=ring(s.points), holes=tuple(ring(h) for h in s.holes))


def translated_shape(s: Shape, dx: float, dy: float) -> Shape:
    """The shape moved by (dx, dy) mm (the editor's moves use this too)."""

    def mv(p: tuple[float, float]) -> tuple[float, float]:
        return (p[0] + dx, p[1] + dy)

    if isinstance(s, (Circle, Ellipse)):
        return replace(s, center=mv(s.center))
    if isinstance(s, Rect):
        return replace(s, min=mv(s.min), max=mv(s.max))
    if isinstance(s, Polygon):
        return replace(s, points=tuple(mv(p) for p in s.points),
                       holes=tuple(tuple(mv(p) for p in h) for h in s.holes))
    return replace(s, points=tuple(mv(p) for p in s.points))


# --------------------------------------------------------------------------- helpers


def _find(layout: Layout, name: str) -> Part:
    try:
        return layout.part(name)
    except KeyError:
        names = ", ".join(f"'{p.name}'" for p in layout.parts) or "none"
        raise ParamError(f"no part is called '{name}' (the parts are {names})") from None


def _bounds(s: Shape) -> tuple[float, float, float, float]:
    """Bounding box (x0, y0, x1, y1) mm of the exact outline."""
    if isinstance(s, Rect):
        return (s.min[0], s.min[1], s.max[0], s.max[1])
    if isinstance(s, Circle):
        (cx, cy), r = s.center, s.radius
        return (cx - r, cy - r, cx + r, cy + r)
    return tuple(float(b) for b in shape_polygon(s).bounds)  # type: ignore[return-value]


def _extent(part: Part, param: str) -> float:
    s = part.shape
    along_x = param == "width"
    if isinstance(s, Ellipse):
        return 2.0 * s.radii[0 if along_x else 1]
    if isinstance(s, Path):
        if along_x:
            return s.width
        raise _not_for(part, param, "rects, ellipses and polygons (a path has a width)")
    if isinstance(s, Circle):
        raise _not_for(part, param, "rects, ellipses, paths and polygons (sweep a circle's "
                       "radius)")
    x0, y0, x1, y1 = _bounds(s)
    return x1 - x0 if along_x else y1 - y0


def _vertex_ref(part: Part, param: str) -> tuple[int, str]:
    m = _VERTEX.match(param)
    assert m is not None
    k, axis = int(m.group(1)), m.group(2)
    s = part.shape
    if not isinstance(s, (Polygon, Path)):
        raise _not_for(part, "vertex:K", "polygons and paths")
    if not 1 <= k <= len(s.points):
        raise ParamError(f"part '{part.name}': vertex {k} does not exist (its outline has "
                         f"vertices 1 to {len(s.points)})")
    return k - 1, axis


def _electrode(part: Part) -> Part:
    if part.kind != "electrode":
        raise ParamError(f"part '{part.name}' is a {part.kind} part: only an electrode has "
                         f"a set potential (volts)")
    return part


def _dielectric(part: Part) -> Part:
    if part.kind != "dielectric":
        raise ParamError(f"part '{part.name}' is a {part.kind} part: only a dielectric has "
                         f"a permittivity")
    return part


def _positive(part: Part, param: str, v: float) -> None:
    if not v > 0:
        raise LayoutError(f"part '{part.name}': {param} must be positive, not {v:g} mm")


def _not_for(part: Part, param: str, which: str) -> ParamError:
    return ParamError(f"part '{part.name}' is a {part.shape.type}: the parameter {param} "
                      f"applies to {which}")
