"""Property-based checks of the layout loader (hypothesis).

- Random valid layouts (every shape, kind, boundary, limit, both symmetries) parse and
  survive a round trip through JSON text exactly.
- Random damage to a valid layout (wrong types, missing or unknown keys, NaN and
  infinities, huge numbers, empty and degenerate shapes, self-intersections,
  overlapping conductors, deep nesting) and random bytes always end in a
  ``LayoutError`` with a non-empty message, never another exception.

The default run draws a little over 1,000 examples in all; ``-m slow`` runs
``SLOW_FACTOR`` times as many.  The properties are the format's own rules
(DESIGN.md section 2); common practice, no source.
"""

from __future__ import annotations

import copy
import json
import math
from collections.abc import Callable
from typing import Any

import pytest
from hypothesis import HealthCheck, event, given, settings
from hypothesis import strategies as st

from solver.layout import Layout, LayoutError, dumps_layout, loads_layout, parse_layout

CELL_MM = 20.0
"""Each generated part lives in its own cell of this size, so parts never overlap."""

SLOW_FACTOR = 20

NAME_CHARACTERS = st.characters(exclude_categories=("Cc", "Cs", "Zl", "Zp"))
"""Anything but controls and line breaks, which part names may not hold."""
coord = st.floats(-4.0, 4.0, allow_nan=False)
size = st.floats(0.5, 7.0, allow_nan=False)


# --------------------------------------------------------------------------- valid layouts


def fraction(top: float) -> st.SearchStrategy[float]:
    """0 (a sharp corner) or a fraction of the largest corner radius, at least 1%."""
    return st.just(0.0) | st.floats(0.01, top)


@st.composite
def shapes(draw: st.DrawFn, cx: float, cy: float) -> dict[str, Any]:
    """One shape that fits inside the cell centred on (cx, cy), JSON form (mm)."""
    kind = draw(st.sampled_from(["circle", "ellipse", "rect", "polygon", "path"]))
    x, y = cx + draw(coord), cy + draw(coord)
    if kind == "circle":
        return {"type": "circle", "center": [x, y], "radius": draw(size) / 1.2}
    if kind == "ellipse":
        return {"type": "ellipse", "center": [x, y], "radii": [draw(size) / 1.2, draw(size) / 1.2],
                "angle_deg": draw(st.floats(-360, 360))}
    if kind == "rect":
        w, h = draw(size), draw(size)
        cr = draw(fraction(0.5)) * min(w, h)
        return {"type": "rect", "min": [x - w / 2, y - h / 2], "max": [x + w / 2, y + h / 2],
                "corner_radius": cr}
    if kind == "polygon":
        return draw(regular_polygons(x, y))
    n = draw(st.integers(2, 6))
    pts = [[x + draw(coord) / 1.5, y + draw(coord) / 1.5] for _ in range(n)]
    if all(p == pts[0] for p in pts):
        pts[-1][0] += 1.0
    return {"type": "path", "points": pts, "width": draw(st.floats(0.05, 2.0))}


@st.composite
def regular_polygons(draw: st.DrawFn, x: float, y: float) -> dict[str, Any]:
    """A regular n-gon, optionally rounded and with a smaller regular hole."""
    n = draw(st.integers(3, 9))
    r = draw(size) / 1.2
    a0 = draw(st.floats(0.0, 2 * math.pi))
    pts = [[x + r * math.cos(a0 + 2 * math.pi * k / n), y + r * math.sin(a0 + 2 * math.pi * k / n)]
           for k in range(n)]
    side = 2 * r * math.sin(math.pi / n)
    # a tangent arc at a corner turning by 2 pi / n takes rc tan(pi / n) of each edge
    rc_max = 0.5 * side / math.tan(math.pi / n)
    d: dict[str, Any] = {"type": "polygon", "points": pts}
    if draw(st.booleans()):
        d["corner_radius"] = draw(fraction(0.99)) * rc_max
    elif draw(st.booleans()):
        d["corner_radius"] = [draw(fraction(0.49)) * rc_max for _ in range(n)]
    if draw(st.booleans()):
        h = 0.4 * r * math.cos(math.pi / n)
        d["holes"] = [[[x + h * math.cos(a), y + h * math.sin(a)]
                       for a in (0.0, 2 * math.pi / 3, 4 * math.pi / 3)]]
    return d


@st.composite
def parts(draw: st.DrawFn, index: int, cx: float, cy: float) -> dict[str, Any]:
    kind = draw(st.sampled_from(["electrode", "floating", "dielectric"]))
    d: dict[str, Any] = {"name": draw(st.text(NAME_CHARACTERS, min_size=1,
                                              max_size=12).filter(str.strip))
                         + f" #{index}", "kind": kind}
    if kind == "electrode":
        d["volts"] = draw(st.floats(-5e5, 5e5))
    elif kind == "floating":
        d["charge"] = draw(st.floats(-1e-6, 1e-6))
    else:
        d["permittivity"] = draw(st.floats(1.0, 100.0))
    d["shape"] = draw(shapes(cx, cy))
    return d


@st.composite
def valid_layouts(draw: st.DrawFn) -> dict[str, Any]:
    """A valid layout object: 1-6 parts, one per cell, at least one electrode."""
    symmetry = draw(st.sampled_from(["planar", "axisymmetric"]))
    n = draw(st.integers(1, 6))
    x0 = CELL_MM if symmetry == "axisymmetric" else 0.0
    cells = [(x0 + CELL_MM * (k % 3), CELL_MM * (k // 3)) for k in range(n)]
    ps = [draw(parts(k, cx, cy)) for k, (cx, cy) in enumerate(cells)]
    if not any(p["kind"] == "electrode" for p in ps):
        ps[0] = {"name": "Anchor", "kind": "electrode", "volts": 1000.0,
                 "shape": {"type": "circle", "center": list(cells[0]), "radius": 1.0}}
    obj: dict[str, Any] = {"stresslens_layout": 1, "title": draw(st.text(max_size=30)),
                           "symmetry": symmetry, "parts": ps}
    lo, hi = [x0 - CELL_MM, -CELL_MM], [x0 + 4 * CELL_MM, 3 * CELL_MM]  # lo[0] = 0 if axisym.
    obj["boundary"] = draw(st.sampled_from([
        {"type": "open"},
        {"type": "box", "min": lo, "max": hi, "volts": 0.0},
        {"type": "box", "min": lo, "max": hi, "volts": None},
    ]))
    obj["limit"] = draw(st.one_of(
        st.builds(lambda kv: {"type": "fixed", "kV_per_mm": kv}, st.floats(0.1, 50.0)),
        st.builds(lambda p, t, m: {"type": "peek", "pressure_kPa": p, "temperature_C": t,
                                   "surface_factor": m},
                  st.floats(10.0, 1000.0), st.floats(-40.0, 150.0), st.floats(0.1, 1.0))))
    obj["resolution"] = draw(st.one_of(st.sampled_from(["draft", "normal", "fine"]),
                                       st.floats(0.01, 2.0)))
    return obj


def check_round_trip(obj: dict[str, Any]) -> None:
    layout = parse_layout(obj)
    assert isinstance(layout, Layout)
    assert len(layout.parts) == len(obj["parts"])
    assert loads_layout(dumps_layout(layout)) == layout


# --------------------------------------------------------------------------- damage

JUNK = st.one_of(
    st.none(), st.booleans(), st.integers(-(10**30), 10**30), st.text(max_size=8),
    st.floats(allow_nan=True, allow_infinity=True), st.sampled_from([1e308, -1e308, 1e-320]),
    st.lists(st.integers(), max_size=3), st.dictionaries(st.text(max_size=3), st.integers(),
                                                          max_size=2))


def _paths(obj: Any, prefix: tuple[Any, ...] = ()) -> list[tuple[Any, ...]]:
    """Every key path into a JSON value (dict keys and list indices)."""
    out = [prefix]
    if isinstance(obj, dict):
        for k, v in obj.items():
            out += _paths(v, prefix + (k,))
    elif isinstance(obj, list):
        for i, v in enumerate(obj):
            out += _paths(v, prefix + (i,))
    return out


def _container(obj: Any, path: tuple[Any, ...]) -> Any:
    for key in path[:-1]:
        obj = obj[key]
    return obj


def _dict_paths(obj: dict[str, Any]) -> list[tuple[Any, ...]]:
    return [p for p in _paths(obj) if p and isinstance(_container(obj, p), dict)]


@st.composite
def damaged_layouts(draw: st.DrawFn) -> tuple[str, dict[str, Any]]:
    """A valid layout with one change that the format forbids; (what was done, object)."""
    obj = copy.deepcopy(draw(valid_layouts()))
    how = draw(st.sampled_from(sorted(DAMAGE)))
    DAMAGE[how](draw, obj)
    return how, obj


def _drop_required_key(draw: st.DrawFn, obj: dict[str, Any]) -> None:
    i = draw(st.integers(0, len(obj["parts"]) - 1))
    part = obj["parts"][i]
    required = ["name", "kind", "shape"] + [k for k in ("volts", "permittivity") if k in part]
    key = draw(st.sampled_from(required + ["shape.type", "top.parts", "top.version"]))
    if key == "top.parts":
        del obj["parts"]
    elif key == "top.version":
        del obj["stresslens_layout"]
    elif key == "shape.type":
        del part["shape"]["type"]
    else:
        del part[key]


def _add_unknown_key(draw: st.DrawFn, obj: dict[str, Any]) -> None:
    path = draw(st.sampled_from(_dict_paths(obj) + [()]))
    target = obj if path == () else _container(obj, path)
    if path != () and not isinstance(target, dict):
        target = obj
    target["x-" + draw(st.text(max_size=10))] = draw(JUNK)


def _wrong_type(draw: st.DrawFn, obj: dict[str, Any]) -> None:
    i = draw(st.integers(0, len(obj["parts"]) - 1))
    part = obj["parts"][i]
    key = draw(st.sampled_from(sorted(part)))
    wrong = [[], {}, True, None, [1, 2]] + ([] if key == "name" else ["1e3"])
    part[key] = draw(st.sampled_from(wrong))


def _bad_number(draw: st.DrawFn, obj: dict[str, Any]) -> None:
    numeric = [p for p in _paths(obj) if p and isinstance(_container(obj, p), (dict, list))
               and isinstance(_container(obj, p)[p[-1]], float)
               and p[0] != "title"]
    path = draw(st.sampled_from(numeric))
    value = draw(st.sampled_from([math.nan, math.inf, -math.inf, 10**400]))
    _container(obj, path)[path[-1]] = value


def _empty_shape(draw: st.DrawFn, obj: dict[str, Any]) -> None:
    i = draw(st.integers(0, len(obj["parts"]) - 1))
    obj["parts"][i]["shape"] = draw(st.sampled_from([
        {"type": "circle", "center": [0, 0], "radius": 0},
        {"type": "ellipse", "center": [0, 0], "radii": [2, 0]},
        {"type": "rect", "min": [1, 1], "max": [1, 5]},
        {"type": "rect", "min": [1, 1], "max": [0, 5]},
        {"type": "polygon", "points": []},
        {"type": "polygon", "points": [[0, 0], [1, 1]]},
        {"type": "polygon", "points": [[0, 0], [1, 1], [2, 2]]},
        {"type": "polygon", "points": [[0, 0], [0, 0], [0, 0], [0, 0]]},
        {"type": "path", "points": [[3, 3]], "width": 1},
        {"type": "path", "points": [[3, 3], [3, 3], [3, 3]], "width": 1},
        {"type": "path", "points": [[0, 0], [5, 0]], "width": 0},
        {"type": "path", "points": [[0, 0], [5, 0]], "width": -2},
        {"type": "circle", "center": [0, 0], "radius": 1e-9},
        {"type": "circle", "center": [0, 0], "radius": 1e30},
    ]))


def _self_intersection(draw: st.DrawFn, obj: dict[str, Any]) -> None:
    i = draw(st.integers(0, len(obj["parts"]) - 1))
    x = CELL_MM * (i % 3) + (CELL_MM if obj["symmetry"] == "axisymmetric" else 0.0)
    y = CELL_MM * (i // 3)
    bow = [[x - 3, y - 3], [x + 3, y + 3], [x + 3, y - 3], [x - 3, y + 3]]
    if draw(st.booleans()):
        bow = bow + [[x - 3.0, y + 1.0]]
    obj["parts"][i]["shape"] = {"type": "polygon", "points": bow}


def _overlap_conductors(draw: st.DrawFn, obj: dict[str, Any]) -> None:
    volts = draw(st.floats(1.0, 1e4))
    first = obj["parts"][0]
    x0, y0 = (CELL_MM if obj["symmetry"] == "axisymmetric" else 0.0), 0.0
    first.clear()
    first.update(name="Hot", kind="electrode", volts=volts,
                 shape={"type": "circle", "center": [x0, y0], "radius": 6.0})
    other: dict[str, Any] = draw(st.sampled_from([
        {"name": "Cold", "kind": "electrode", "volts": 0.0},
        {"name": "Island", "kind": "floating", "charge": 0.0}]))
    dx = draw(st.floats(0.0, 8.5))  # centres at most sqrt(8.5^2 + 0.5^2) < 9 = 6 + 3 apart
    other["shape"] = {"type": "circle", "center": [x0 + dx, y0 + 0.5], "radius": 3.0}
    obj["parts"].append(other)


def _duplicate_name(draw: st.DrawFn, obj: dict[str, Any]) -> None:
    obj["parts"].append(copy.deepcopy(obj["parts"][0]))


def _deep_nesting(draw: st.DrawFn, obj: dict[str, Any]) -> None:
    depth = draw(st.integers(50, 5000))
    nested: Any = 1.0
    for _ in range(depth):
        nested = [nested]
    path = draw(st.sampled_from(["title", "part", "center"]))
    if path == "title":
        obj["title"] = nested
    elif path == "part":
        obj["parts"][0]["volts" if "volts" in obj["parts"][0] else "name"] = nested
    else:
        obj["parts"][0]["shape"] = {"type": "circle", "center": nested, "radius": 1}


def _negative_radius_axisymmetric(draw: st.DrawFn, obj: dict[str, Any]) -> None:
    """Move part 1 so that it reaches r < 0 in an axisymmetric layout."""
    obj["symmetry"] = "axisymmetric"
    obj["boundary"] = {"type": "open"}
    # centred on the axis (x = 0) a circle is a sphere, whose r >= 0 half is kept
    x = draw(st.floats(-50.0, -0.01) | st.floats(0.01, 0.9))
    obj["parts"][0]["shape"] = {"type": "circle", "center": [x, 0.0], "radius": 1.0}


DAMAGE: dict[str, Callable[[st.DrawFn, dict[str, Any]], None]] = {
    "drop a required key": _drop_required_key,
    "add an unknown key": _add_unknown_key,
    "wrong type": _wrong_type,
    "non-finite or huge number": _bad_number,
    "empty or degenerate shape": _empty_shape,
    "self-intersecting outline": _self_intersection,
    "overlapping conductors": _overlap_conductors,
    "duplicate name": _duplicate_name,
    "deep nesting": _deep_nesting,
    "axisymmetric part at r < 0": _negative_radius_axisymmetric,
}


def check_refused(case: tuple[str, dict[str, Any]]) -> None:
    how, obj = case
    event(how)
    with pytest.raises(LayoutError) as info:
        parse_layout(obj)
    assert str(info.value).strip(), f"empty message after: {how}"
    try:
        text = json.dumps(obj)
    except (ValueError, RecursionError):
        return  # 10**400 and the like have no JSON text form to test
    with pytest.raises(LayoutError, match=r"\S"):
        loads_layout(text)


def check_junk(value: Any) -> None:
    """Any JSON value whatsoever: a Layout or a LayoutError with a message, nothing else."""
    try:
        layout = parse_layout(value)
    except LayoutError as exc:
        assert str(exc).strip()
    else:
        assert isinstance(layout, Layout)


def check_bytes(raw: bytes) -> None:
    try:
        loads_layout(raw)
    except LayoutError as exc:
        assert str(exc).strip()


JSON_VALUES = st.recursive(
    st.none() | st.booleans() | st.floats() | st.integers() | st.text(max_size=6),
    lambda inner: st.lists(inner, max_size=4) | st.dictionaries(
        st.sampled_from(["stresslens_layout", "parts", "shape", "type", "name", "kind",
                         "volts", "center", "radius", "points", "boundary", "x"]), inner,
        max_size=5),
    max_leaves=25)

FAST = settings(deadline=None, suppress_health_check=[HealthCheck.too_slow])


def _run(check: Callable[[Any], None], strategy: st.SearchStrategy[Any], n: int) -> None:
    settings(FAST, max_examples=n)(given(strategy)(check))()


# (name, check, strategy, examples in the default run): 1,050 in all
PROPERTIES = [
    ("valid layouts round-trip", check_round_trip, valid_layouts(), 250),
    ("damaged layouts are refused", check_refused, damaged_layouts(), 400),
    ("any JSON value", check_junk, JSON_VALUES, 200),
    ("random bytes", check_bytes, st.binary(max_size=200), 200),
]


@pytest.mark.parametrize("check, strategy, n", [p[1:] for p in PROPERTIES],
                         ids=[p[0] for p in PROPERTIES])
def test_property(check: Callable[[Any], None], strategy: st.SearchStrategy[Any], n: int) -> None:
    _run(check, strategy, n)


@pytest.mark.slow
@pytest.mark.parametrize("check, strategy, n", [p[1:] for p in PROPERTIES],
                         ids=[p[0] for p in PROPERTIES])
def test_property_long_run(check: Callable[[Any], None], strategy: st.SearchStrategy[Any],
                           n: int) -> None:
    _run(check, strategy, n * SLOW_FACTOR)
