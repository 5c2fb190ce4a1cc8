"""Layout file format, version 1: parse, validate, serialise.

A layout is a UTF-8 JSON object (``*.layout.json``) describing a 2D cross-section:
parts (electrodes, floating conductors, dielectric bodies), the symmetry, the outer
boundary, the field limit and the resolution.  Lengths are millimetres, potentials
volts, charges coulombs per metre (planar) or coulombs (axisymmetric).

Everything read from a file is checked here; any problem raises :class:`LayoutError`
with one message naming the part and the problem.  Nothing in a file is executed.
Geometric checks (self-intersection, overlaps, r < 0) live in :mod:`solver.geometry`
and are run by :func:`parse_layout` too, so a parsed :class:`Layout` is always solvable.
"""

from __future__ import annotations

import json
import math
import os
import unicodedata
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from typing import Any, Literal

FORMAT_KEY = "stresslens_layout"
FORMAT_VERSION = 1
MAX_FILE_BYTES = 20_000_000
MAX_PARTS = 500
MAX_VERTICES = 20_000
MAX_COORD_MM = 1.0e6
MIN_LENGTH_MM = 1.0e-4
"""Smallest radius, width or spacing accepted (0.1 um); below it no grid is meaningful."""

Point = tuple[float, float]
Symmetry = Literal["planar", "axisymmetric"]
Kind = Literal["electrode", "floating", "dielectric"]
Resolution = Literal["draft", "normal", "fine"] | float

_BREAKING_CATEGORIES = ("Cc", "Cs", "Zl", "Zp")
"""Unicode categories a part name may not contain: controls, surrogates, line breaks."""

KINDS = ("electrode", "floating", "dielectric")
SYMMETRIES = ("planar", "axisymmetric")
RESOLUTION_NAMES = ("draft", "normal", "fine")


class LayoutError(ValueError):
    """A layout that cannot be solved; the message names the part and the problem."""


# --------------------------------------------------------------------------- shapes


@dataclass(frozen=True)
class Circle:
    """Circle of ``radius`` mm about ``center`` (x, y) mm."""

    center: Point
    radius: float
    type: Literal["circle"] = "circle"


@dataclass(frozen=True)
class Ellipse:
    """Ellipse with semi-axes ``radii`` (a, b) mm, rotated ``angle_deg`` anticlockwise."""

    center: Point
    radii: Point
    angle_deg: float = 0.0
    type: Literal["ellipse"] = "ellipse"


@dataclass(frozen=True)
class Rect:
    """Axis-aligned rectangle from ``min`` to ``max`` (mm) with rounded corners."""

    min: Point
    max: Point
    corner_radius: float = 0.0
    type: Literal["rect"] = "rect"


@dataclass(frozen=True)
class Polygon:
    """Polygon with optional holes; ``corner_radius`` rounds vertices (one or per vertex)."""

    points: tuple[Point, ...]
    holes: tuple[tuple[Point, ...], ...] = ()
    corner_radius: float | tuple[float, ...] = 0.0
    type: Literal["polygon"] = "polygon"


@dataclass(frozen=True)
class Path:
    """A wire or trace: the polyline ``points`` swept by a disc of diameter ``width`` (mm)."""

    points: tuple[Point, ...]
    width: float
    type: Literal["path"] = "path"


Shape = Circle | Ellipse | Rect | Polygon | Path


# --------------------------------------------------------------------------- layout


@dataclass(frozen=True)
class Part:
    """One part of a layout.

    ``volts`` is set for electrodes, ``charge`` for floating conductors (C/m planar,
    C axisymmetric) and ``permittivity`` (relative, >= 1) for dielectrics.
    """

    name: str
    kind: Kind
    shape: Shape
    volts: float | None = None
    charge: float | None = None
    permittivity: float | None = None

    @property
    def is_conductor(self) -> bool:
        return self.kind != "dielectric"


@dataclass(frozen=True)
class Boundary:
    """Outer boundary: ``open`` (field decays far away) or a ``box`` (mm).

    A box with ``volts`` None has insulating walls (zero normal field).
    """

    type: Literal["open", "box"] = "open"
    min: Point | None = None
    max: Point | None = None
    volts: float | None = 0.0


@dataclass(frozen=True)
class FixedLimit:
    """A single permissible surface field, kV/mm."""

    kV_per_mm: float = 3.0
    type: Literal["fixed"] = "fixed"


@dataclass(frozen=True)
class PeekLimit:
    """Curvature-dependent corona-onset limit from Peek's law in air."""

    pressure_kPa: float = 101.325
    temperature_C: float = 20.0
    surface_factor: float = 1.0
    type: Literal["peek"] = "peek"


Limit = FixedLimit | PeekLimit


@dataclass(frozen=True)
class Layout:
    """A whole cross-section, as read from a layout file."""

    parts: tuple[Part, ...]
    title: str = ""
    symmetry: Symmetry = "planar"
    boundary: Boundary = field(default_factory=Boundary)
    limit: Limit = field(default_factory=FixedLimit)
    resolution: Resolution = "normal"

    def part(self, name: str) -> Part:
        for p in self.parts:
            if p.name == name:
                return p
        raise KeyError(name)


# --------------------------------------------------------------------------- reading


def load_layout(path: str | os.PathLike[str]) -> Layout:
    """Read and validate a layout file; raise :class:`LayoutError` on any problem."""
    import pathlib

    p = pathlib.Path(path)
    try:
        size = p.stat().st_size
    except OSError as exc:
        raise LayoutError(f"cannot open {p}: {exc.strerror or exc}") from None
    if size > MAX_FILE_BYTES:
        raise LayoutError(f"{p.name}: file is {size / 1e6:.1f} MB, larger than the "
                          f"{MAX_FILE_BYTES / 1e6:.0f} MB a layout may be")
    try:
        raw = p.read_bytes()
    except OSError as exc:
        raise LayoutError(f"cannot read {p}: {exc.strerror or exc}") from None
    return loads_layout(raw, source=p.name)


def loads_layout(data: str | bytes, source: str = "layout") -> Layout:
    """Parse layout JSON text or bytes (UTF-8)."""
    if isinstance(data, bytes):
        try:
            data = data.decode("utf-8-sig")
        except UnicodeDecodeError as exc:
            raise LayoutError(f"{source}: not UTF-8 text (byte {exc.start})") from None
    try:
        obj = json.loads(data, parse_constant=_nonfinite_constant,
                         object_pairs_hook=_JsonObject.from_pairs)
    except RecursionError:
        raise LayoutError(f"{source}: JSON nested too deeply") from None
    except json.JSONDecodeError as exc:
        raise LayoutError(f"{source}: not valid JSON ({exc.msg}, line {exc.lineno} "
                          f"column {exc.colno})") from None
    except ValueError as exc:  # e.g. an integer literal of thousands of digits
        raise LayoutError(f"{source}: not valid JSON ({exc})") from None
    return parse_layout(obj)


def _nonfinite_constant(name: str) -> float:
    """Keep NaN and +-Infinity as floats so the reader refuses them naming the field."""
    return float(name)


class _JsonObject(dict):  # type: ignore[type-arg]
    """A decoded JSON object that remembers keys given more than once.

    Plain ``json`` keeps the last of repeated keys silently; a layout saying
    ``"volts": 0`` and then ``"volts": 30000`` is ambiguous, so the reader refuses it,
    naming the part (see ``_Reader``).
    """

    repeated: tuple[str, ...] = ()

    @classmethod
    def from_pairs(cls, pairs: list[tuple[str, Any]]) -> _JsonObject:
        obj = cls(pairs)
        if len(obj) < len(pairs):
            keys = [k for k, _ in pairs]
            obj.repeated = tuple(sorted({k for k in keys if keys.count(k) > 1}))
        return obj


def parse_layout(obj: Any, check_geometry: bool = True) -> Layout:
    """Build a :class:`Layout` from a decoded JSON object, validating every field."""
    r = _Reader(obj, "layout")
    version = r.get(FORMAT_KEY, "int")
    if version is None:
        raise LayoutError(f"not a Stresslens layout: the key '{FORMAT_KEY}' is missing")
    if version > FORMAT_VERSION:
        shown = version if version < 10**6 else "far above 1"
        raise LayoutError(f"layout format version {shown} is newer than this program "
                          f"understands (version {FORMAT_VERSION}); please update Stresslens")
    if version < 1:
        raise LayoutError(f"layout format version {version} is not valid")
    title = r.get("title", "str", default="")
    symmetry = r.choice("symmetry", SYMMETRIES, default="planar")
    boundary = _parse_boundary(r.get("boundary", "dict", default={"type": "open"}))
    limit = _parse_limit(r.get("limit", "dict", default={"type": "fixed", "kV_per_mm": 3.0}))
    resolution = _parse_resolution(r.raw("resolution", "normal"))
    if symmetry == "axisymmetric" and boundary.min is not None and boundary.min[0] != 0:
        raise LayoutError(f"boundary: in an axisymmetric layout x is the radius and the box "
                          f"starts at the axis: its 'min' r must be 0, not "
                          f"{boundary.min[0]:g} mm")
    parts_raw = r.get("parts", "list")
    if parts_raw is None:
        raise LayoutError("layout: the key 'parts' is missing")
    r.done()
    if len(parts_raw) > MAX_PARTS:
        raise LayoutError(f"layout has {len(parts_raw)} parts; at most {MAX_PARTS} are allowed")
    parts = tuple(_parse_part(p, i) for i, p in enumerate(parts_raw))
    names = [p.name for p in parts]
    for n in names:
        if names.count(n) > 1:
            raise LayoutError(f"part '{n}': the name is used by more than one part")
    layout = Layout(parts=parts, title=title, symmetry=symmetry, boundary=boundary,
                    limit=limit, resolution=resolution)
    if check_geometry:
        from .geometry import validate_geometry

        validate_geometry(layout)
    return layout


def _parse_boundary(d: Mapping[str, Any]) -> Boundary:
    r = _Reader(d, "boundary")
    kind = r.choice("type", ("open", "box"))
    if kind == "open":
        r.done()
        return Boundary()
    lo = r.point("min")
    hi = r.point("max")
    if "volts" not in d:
        raise LayoutError("boundary: a box needs 'volts' (a number, or null for insulating walls)")
    volts = r.get("volts", "number_or_null")
    r.done()
    if not (hi[0] > lo[0] and hi[1] > lo[1]):
        raise LayoutError("boundary: box 'max' must be above and right of 'min'")
    return Boundary(type="box", min=lo, max=hi, volts=volts)


def _parse_limit(d: Mapping[str, Any]) -> Limit:
    r = _Reader(d, "limit")
    kind = r.choice("type", ("fixed", "peek"))
    if kind == "fixed":
        kv = r.get("kV_per_mm", "number", default=3.0)
        r.done()
        if not kv > 0:
            raise LayoutError("limit: 'kV_per_mm' must be positive")
        return FixedLimit(kV_per_mm=kv)
    p = r.get("pressure_kPa", "number", default=101.325)
    t = r.get("temperature_C", "number", default=20.0)
    m = r.get("surface_factor", "number", default=1.0)
    r.done()
    if not 1.0 <= p <= 1.0e4:
        raise LayoutError("limit: 'pressure_kPa' must lie between 1 and 10000 kPa")
    if not -100.0 <= t <= 500.0:
        raise LayoutError("limit: 'temperature_C' must lie between -100 and 500 degC")
    if not 0.1 <= m <= 1.0:
        raise LayoutError("limit: 'surface_factor' must lie between 0.1 and 1")
    return PeekLimit(pressure_kPa=p, temperature_C=t, surface_factor=m)


def _parse_resolution(v: Any) -> Resolution:
    if isinstance(v, str):
        if v not in RESOLUTION_NAMES:
            raise LayoutError(f"layout: 'resolution' must be one of {', '.join(RESOLUTION_NAMES)} "
                              f"or a spacing in mm, not '{v}'")
        return v  # type: ignore[return-value]
    x = _Reader.as_number(v, "layout: 'resolution'") if not isinstance(v, bool) else -1.0
    if not MIN_LENGTH_MM <= x <= MAX_COORD_MM:
        raise LayoutError(f"layout: 'resolution' must be draft, normal, fine or a grid "
                          f"spacing in mm between {MIN_LENGTH_MM:g} and {MAX_COORD_MM:g}")
    return x


def _parse_part(obj: Any, index: int) -> Part:
    label = f"part {index + 1}"
    if isinstance(obj, dict) and isinstance(obj.get("name"), str) and obj["name"].strip():
        label = f"part '{obj['name']}'"
    r = _Reader(obj, label)
    name = r.get("name", "str")
    if name is None or not name.strip():
        raise LayoutError(f"{label}: needs a non-empty 'name'")
    if len(name) > 200:
        raise LayoutError(f"{label}: name longer than 200 characters")
    if any(unicodedata.category(c) in _BREAKING_CATEGORIES for c in name):
        raise LayoutError(f"{label}: the name contains a control character (a line break, "
                          f"tab or similar); use plain text")
    kind = r.choice("kind", KINDS)
    volts = charge = eps = None
    if kind == "electrode":
        volts = r.get("volts", "number")
        if volts is None:
            raise LayoutError(f"{label}: an electrode needs 'volts'")
    elif kind == "floating":
        charge = r.get("charge", "number", default=0.0)
    else:
        eps = r.get("permittivity", "number")
        if eps is None:
            raise LayoutError(f"{label}: a dielectric needs 'permittivity'")
        if not 1.0 <= eps <= 1.0e5:
            raise LayoutError(f"{label}: 'permittivity' must lie between 1 and 100000 "
                              f"(relative), not {eps:g}")
    shape = _parse_shape(r.get("shape", "dict"), label)
    r.done()
    return Part(name=name, kind=kind, shape=shape, volts=volts, charge=charge, permittivity=eps)


def _parse_shape(d: Mapping[str, Any] | None, label: str) -> Shape:
    if d is None:
        raise LayoutError(f"{label}: needs a 'shape'")
    r = _Reader(d, f"{label} shape")
    kind = r.choice("type", ("circle", "ellipse", "rect", "polygon", "path"))
    shape: Shape
    if kind == "circle":
        shape = Circle(center=r.point("center"), radius=r.positive("radius"))
    elif kind == "ellipse":
        radii = r.point("radii")
        if not (radii[0] > 0 and radii[1] > 0):
            raise LayoutError(f"{label} shape: both 'radii' must be positive")
        _check_length(min(radii), f"{label} shape: 'radii'")
        shape = Ellipse(center=r.point("center"), radii=radii,
                        angle_deg=r.get("angle_deg", "number", default=0.0))
    elif kind == "rect":
        lo, hi = r.point("min"), r.point("max")
        if not (hi[0] > lo[0] and hi[1] > lo[1]):
            raise LayoutError(f"{label} shape: rect 'max' must be above and right of 'min' "
                              f"(it has no area)")
        cr = r.get("corner_radius", "number", default=0.0)
        if cr < 0 or cr > 0.5 * min(hi[0] - lo[0], hi[1] - lo[1]) * (1 + 1e-12):
            raise LayoutError(f"{label} shape: 'corner_radius' must lie between 0 and half "
                              f"the shorter side ({0.5 * min(hi[0] - lo[0], hi[1] - lo[1]):g}"
                              f" mm), not {cr:g}")
        if cr:
            _check_length(cr, f"{label} shape: 'corner_radius'")
        shape = Rect(min=lo, max=hi, corner_radius=cr)
    elif kind == "polygon":
        pts = r.ring("points", 3)
        holes_raw = r.get("holes", "list", default=[])
        holes = tuple(_Reader.as_ring(h, f"{label} shape hole {i + 1}", 3)
                      for i, h in enumerate(holes_raw))
        cr_raw = r.raw("corner_radius", 0.0)
        shape = Polygon(points=pts, holes=holes, corner_radius=_corner_radii(cr_raw, len(pts),
                                                                               label))
    else:
        pts = r.ring("points", 2)
        if all(p == pts[0] for p in pts):
            raise LayoutError(f"{label} shape: all points of the path coincide (it has no "
                              f"length); use a circle for a round wire")
        shape = Path(points=pts, width=r.positive("width"))
    r.done()
    nverts = len(getattr(shape, "points", ())) + sum(len(h) for h in getattr(shape, "holes", ()))
    if nverts > MAX_VERTICES:
        raise LayoutError(f"{label} shape: {nverts} vertices; at most {MAX_VERTICES} allowed")
    return shape


def _corner_radii(v: Any, n: int, label: str) -> float | tuple[float, ...]:
    if isinstance(v, list):
        if len(v) != n:
            raise LayoutError(f"{label} shape: 'corner_radius' has {len(v)} values for {n} "
                              f"vertices")
        vals = tuple(_Reader.as_number(x, f"{label} shape: 'corner_radius'") for x in v)
        if any(x < 0 for x in vals):
            raise LayoutError(f"{label} shape: 'corner_radius' values must not be negative")
        for x in vals:
            if x:
                _check_length(x, f"{label} shape: 'corner_radius'")
        return vals
    x = _Reader.as_number(v, f"{label} shape: 'corner_radius'")
    if x < 0:
        raise LayoutError(f"{label} shape: 'corner_radius' must not be negative")
    if x:
        _check_length(x, f"{label} shape: 'corner_radius'")
    return x


def _check_length(x: float, where: str) -> None:
    """Refuse a length (mm) outside [MIN_LENGTH_MM, MAX_COORD_MM]."""
    if x < MIN_LENGTH_MM:
        raise LayoutError(f"{where} is {x:g} mm, below the smallest length Stresslens "
                          f"handles ({MIN_LENGTH_MM:g} mm)")
    if x > MAX_COORD_MM:
        raise LayoutError(f"{where} is {x:g} mm, larger than {MAX_COORD_MM:g} mm")


class _Reader:
    """Typed access to one JSON object that remembers which keys were read."""

    def __init__(self, obj: Any, label: str) -> None:
        if not isinstance(obj, dict):
            raise LayoutError(f"{label}: expected an object, got {_typename(obj)}")
        self.obj, self.label = obj, label
        self.seen: set[str] = set()
        repeated = getattr(obj, "repeated", ())
        if repeated:
            raise LayoutError(f"{label}: the key '{repeated[0]}' is given more than once")

    def raw(self, key: str, default: Any = None) -> Any:
        self.seen.add(key)
        return self.obj.get(key, default)

    def get(self, key: str, kind: str, default: Any = None) -> Any:
        self.seen.add(key)
        if key not in self.obj:
            return default
        v = self.obj[key]
        where = f"{self.label}: '{key}'"
        if kind == "number":
            return self.as_number(v, where)
        if kind == "number_or_null":
            return None if v is None else self.as_number(v, where)
        if kind == "int":
            if isinstance(v, bool) or not isinstance(v, int):
                raise LayoutError(f"{where} must be a whole number, got {_typename(v)}")
            return v
        if kind == "str":
            if not isinstance(v, str):
                raise LayoutError(f"{where} must be text, got {_typename(v)}")
            return v
        want = {"dict": dict, "list": list}[kind]
        if not isinstance(v, want):
            raise LayoutError(f"{where} must be {'an object' if kind == 'dict' else 'a list'}, "
                              f"got {_typename(v)}")
        return v

    def choice(self, key: str, options: Sequence[str], default: str | None = None) -> Any:
        v = self.get(key, "str", default=default)
        if v is None:
            raise LayoutError(f"{self.label}: needs '{key}' (one of {', '.join(options)})")
        if v not in options:
            raise LayoutError(f"{self.label}: '{key}' must be one of {', '.join(options)}, "
                              f"not '{v}'")
        return v

    def point(self, key: str) -> Point:
        v = self.get(key, "list")
        if v is None:
            raise LayoutError(f"{self.label}: needs '{key}'")
        return self.as_point(v, f"{self.label}: '{key}'")

    def positive(self, key: str) -> float:
        v = self.get(key, "number")
        if v is None:
            raise LayoutError(f"{self.label}: needs '{key}'")
        if v <= 0:
            raise LayoutError(f"{self.label}: '{key}' must be positive, not {v:g}")
        _check_length(v, f"{self.label}: '{key}'")
        return v

    def ring(self, key: str, minimum: int) -> tuple[Point, ...]:
        v = self.get(key, "list")
        if v is None:
            raise LayoutError(f"{self.label}: needs '{key}'")
        return self.as_ring(v, f"{self.label} '{key}'", minimum)

    def done(self) -> None:
        extra = sorted(set(self.obj) - self.seen)
        if extra:
            raise LayoutError(f"{self.label}: unknown key '{extra[0]}'")

    @staticmethod
    def as_number(v: Any, where: str) -> float:
        if isinstance(v, bool) or not isinstance(v, (int, float)):
            raise LayoutError(f"{where} must be a number, got {_typename(v)}")
        try:
            x = float(v)
        except OverflowError:
            raise LayoutError(f"{where} is out of range") from None
        if not math.isfinite(x):
            raise LayoutError(f"{where} must be a finite number")
        if abs(x) > 1e300:
            raise LayoutError(f"{where} is out of range")
        return x

    @staticmethod
    def as_point(v: Any, where: str) -> Point:
        if not isinstance(v, list) or len(v) != 2:
            raise LayoutError(f"{where} must be a pair [x, y] of numbers")
        x, y = (_Reader.as_number(c, where) for c in v)
        if abs(x) > MAX_COORD_MM or abs(y) > MAX_COORD_MM:
            raise LayoutError(f"{where} lies more than {MAX_COORD_MM:g} mm from the origin")
        return (x, y)

    @staticmethod
    def as_ring(v: Any, where: str, minimum: int) -> tuple[Point, ...]:
        if not isinstance(v, list):
            raise LayoutError(f"{where} must be a list of [x, y] points")
        if len(v) > MAX_VERTICES:
            raise LayoutError(f"{where} has {len(v)} points; at most {MAX_VERTICES} allowed")
        pts = tuple(_Reader.as_point(p, where) for p in v)
        if len(pts) > minimum and pts[0] == pts[-1] and minimum >= 3:
            pts = pts[:-1]
        if len(pts) < minimum:
            raise LayoutError(f"{where} needs at least {minimum} points, has {len(pts)}")
        return pts


def _typename(v: Any) -> str:
    return {dict: "an object", list: "a list", str: "text", bool: "true/false",
            type(None): "null", int: "a number", float: "a number"}.get(type(v), type(v).__name__)


# --------------------------------------------------------------------------- writing


def shape_to_json(s: Shape) -> dict[str, Any]:
    """The JSON object of one shape (format v1)."""
    if isinstance(s, Circle):
        return {"type": "circle", "center": list(s.center), "radius": s.radius}
    if isinstance(s, Ellipse):
        d: dict[str, Any] = {"type": "ellipse", "center": list(s.center), "radii": list(s.radii)}
        if s.angle_deg:
            d["angle_deg"] = s.angle_deg
        return d
    if isinstance(s, Rect):
        d = {"type": "rect", "min": list(s.min), "max": list(s.max)}
        if s.corner_radius:
            d["corner_radius"] = s.corner_radius
        return d
    if isinstance(s, Polygon):
        d = {"type": "polygon", "points": [list(p) for p in s.points]}
        if s.holes:
            d["holes"] = [[list(p) for p in h] for h in s.holes]
        if isinstance(s.corner_radius, tuple):
            d["corner_radius"] = list(s.corner_radius)
        elif s.corner_radius:
            d["corner_radius"] = s.corner_radius
        return d
    return {"type": "path", "points": [list(p) for p in s.points], "width": s.width}


def part_to_json(p: Part) -> dict[str, Any]:
    d: dict[str, Any] = {"name": p.name, "kind": p.kind}
    if p.kind == "electrode":
        d["volts"] = p.volts
    elif p.kind == "floating":
        d["charge"] = p.charge or 0.0
    else:
        d["permittivity"] = p.permittivity
    d["shape"] = shape_to_json(p.shape)
    return d


def layout_to_json(layout: Layout) -> dict[str, Any]:
    """The JSON object of a layout (format v1); ``parse_layout`` inverts it exactly."""
    b = layout.boundary
    boundary: dict[str, Any] = {"type": "open"} if b.type == "open" else {
        "type": "box", "min": list(b.min or (0, 0)), "max": list(b.max or (0, 0)),
        "volts": b.volts}
    lim = layout.limit
    limit: dict[str, Any] = ({"type": "fixed", "kV_per_mm": lim.kV_per_mm}
                             if isinstance(lim, FixedLimit) else
                             {"type": "peek", "pressure_kPa": lim.pressure_kPa,
                              "temperature_C": lim.temperature_C,
                              "surface_factor": lim.surface_factor})
    return {FORMAT_KEY: FORMAT_VERSION, "title": layout.title, "symmetry": layout.symmetry,
            "boundary": boundary, "limit": limit, "resolution": layout.resolution,
            "parts": [part_to_json(p) for p in layout.parts]}


def dumps_layout(layout: Layout) -> str:
    """Layout as pretty JSON text (a trailing newline included)."""
    return json.dumps(layout_to_json(layout), indent=2) + "\n"
