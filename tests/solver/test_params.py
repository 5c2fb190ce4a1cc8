"""Named layout parameters: reading, setting, and refusing with a clear message.

Geometry is checked against shapely (a general-purpose reference library) and against
elementary plane geometry, never against numbers this module produced itself.
"""

from __future__ import annotations

import math

import pytest
import shapely

from solver.geometry import shape_polygon
from solver.layout import LayoutError, parse_layout
from solver.params import ParamError, apply_param, param_value


def _layout(symmetry: str = "planar") -> object:
    x0 = 0 if symmetry == "axisymmetric" else -10
    return parse_layout({
        "stresslens_layout": 1, "symmetry": symmetry,
        "parts": [
            {"name": "bar", "kind": "electrode", "volts": 5000,
             "shape": {"type": "rect", "min": [x0, 0], "max": [10, 20], "corner_radius": 2}},
            {"name": "ball", "kind": "floating",
             "shape": {"type": "circle", "center": [20, 50], "radius": 4}},
            {"name": "lens", "kind": "dielectric", "permittivity": 3.0,
             "shape": {"type": "ellipse", "center": [30, 10], "radii": [5, 3]}},
            {"name": "wire", "kind": "electrode", "volts": 0,
             "shape": {"type": "path", "points": [[40, 0], [60, 0], [60, 20]], "width": 2}},
            {"name": "plate", "kind": "electrode", "volts": 0,
             "shape": {"type": "polygon", "points": [[70, 0], [90, 0], [90, 8], [70, 8]],
                       "corner_radius": [0, 1, 1, 0]}},
        ]})


def _bounds(layout, name: str) -> tuple[float, float, float, float]:
    return tuple(shape_polygon(layout.part(name).shape).bounds)


@pytest.mark.parametrize(("part", "param", "value"), [
    ("bar", "corner_radius", 2.0), ("bar", "width", 20.0), ("bar", "height", 20.0),
    ("bar", "x", 0.0), ("bar", "y", 10.0), ("bar", "volts", 5000.0),
    ("ball", "radius", 4.0), ("ball", "x", 20.0), ("lens", "width", 10.0),
    ("lens", "height", 6.0), ("lens", "permittivity", 3.0), ("wire", "radius", 1.0),
    ("wire", "width", 2.0), ("plate", "corner_radius", 1.0), ("plate", "vertex:2:x", 90.0),
    ("plate", "vertex:3:y", 8.0), ("wire", "vertex:3:y", 20.0),
])
def test_reads_the_value_written_in_the_layout(part: str, param: str, value: float) -> None:
    # the values are those typed into _layout above (K counts vertices from 1)
    assert param_value(_layout(), part, param) == pytest.approx(value)


@pytest.mark.parametrize(("part", "param", "value"), [
    ("bar", "corner_radius", 3.5), ("bar", "width", 14.0), ("bar", "height", 31.0),
    ("bar", "x", -4.0), ("bar", "y", -7.5), ("bar", "volts", -12000.0), ("ball", "radius", 6.5),
    ("ball", "y", 60.0), ("lens", "width", 7.0), ("lens", "height", 9.0),
    ("lens", "permittivity", 6.2), ("wire", "radius", 0.4), ("wire", "width", 3.0),
    ("plate", "corner_radius", 2.5), ("plate", "width", 12.0), ("plate", "height", 5.0),
    ("plate", "vertex:2:x", 95.0), ("plate", "vertex:3:y", 11.0), ("wire", "vertex:2:y", -5.0),
])
def test_set_then_read_gives_the_value_back(part: str, param: str, value: float) -> None:
    new = apply_param(_layout(), part, param, value)
    assert param_value(new, part, param) == pytest.approx(value, rel=1e-9, abs=1e-9)
    others = [p for p in new.parts if p.name != part]
    assert others == [p for p in _layout().parts if p.name != part]


def test_rect_width_keeps_the_centre_and_matches_shapely_bounds() -> None:
    new = apply_param(_layout(), "bar", "width", 30.0)
    x0, y0, x1, y1 = _bounds(new, "bar")  # shapely's bounds of the rounded outline
    assert (x1 - x0, 0.5 * (x0 + x1), y0, y1) == pytest.approx((30.0, 0.0, 0.0, 20.0), abs=1e-6)


def test_axisymmetric_part_on_the_axis_grows_outwards() -> None:
    new = apply_param(_layout("axisymmetric"), "bar", "width", 25.0)
    x0, _, x1, _ = _bounds(new, "bar")
    assert (x0, x1) == pytest.approx((0.0, 25.0), abs=1e-9)


def test_rounded_rect_area_follows_the_corner_radius() -> None:
    # area of a w x h rectangle with four corners of radius r: w h - (4 - pi) r^2
    # (elementary plane geometry, from memory); shapely measures the outline drawn
    for r in (0.5, 3.0, 7.0):
        new = apply_param(_layout(), "bar", "corner_radius", r)
        area = shapely.area(shape_polygon(new.part("bar").shape))
        assert area == pytest.approx(20 * 20 - (4 - math.pi) * r * r, rel=2e-3)


def test_polygon_corner_radius_sets_the_rounded_vertices() -> None:
    new = apply_param(_layout(), "plate", "corner_radius", 1.5)
    assert new.part("plate").shape.corner_radius == (0.0, 1.5, 1.5, 0.0)
    square = apply_param(apply_param(_layout(), "plate", "corner_radius", 0.0), "plate",
                         "corner_radius", 0.5)
    assert square.part("plate").shape.corner_radius == 0.5  # none rounded: every vertex


def test_axisymmetric_polygon_is_never_rounded_on_the_axis() -> None:
    layout = parse_layout({
        "stresslens_layout": 1, "symmetry": "axisymmetric",
        "parts": [{"name": "rod", "kind": "electrode", "volts": 1,
                   "shape": {"type": "polygon", "points": [[0, 0], [5, 0], [5, 50], [0, 50]]}}]})
    new = apply_param(layout, "rod", "corner_radius", 2.0)
    assert new.part("rod").shape.corner_radius == (0.0, 2.0, 2.0, 0.0)


def test_polygon_stretch_scales_the_area() -> None:
    # stretching by a factor k along one axis multiplies the area by k (from memory);
    # the rounded corners stretch with it only approximately, hence square corners here
    layout = apply_param(_layout(), "plate", "corner_radius", 0.0)
    before = shapely.area(shape_polygon(layout.part("plate").shape))
    after = shapely.area(shape_polygon(apply_param(layout, "plate", "height", 12.0)
                                       .part("plate").shape))
    assert after / before == pytest.approx(12.0 / 8.0, rel=1e-9)


def test_move_keeps_the_shape() -> None:
    layout = _layout()
    new = apply_param(layout, "lens", "x", 45.0)
    a, b = (shape_polygon(lay.part("lens").shape) for lay in (layout, new))
    # shapely: the moved outline equals the old one shifted by +15 mm in x
    assert shapely.equals_exact(shapely.affinity.translate(a, 15.0, 0.0), b, tolerance=1e-9)


@pytest.mark.parametrize(("part", "param", "value", "words"), [
    ("ball", "volts", 100.0, "only an electrode"),
    ("bar", "permittivity", 2.0, "only a dielectric"),
    ("bar", "radius", 2.0, "applies to a circle"),
    ("ball", "width", 2.0, "sweep a circle's radius"),
    ("wire", "height", 2.0, "a path has a width"),
    ("plate", "vertex:5:x", 1.0, "vertex 5 does not exist"),
    ("bar", "vertex:1:x", 1.0, "polygons and paths"),
    ("bar", "length", 1.0, "not a parameter"),
    ("nobody", "x", 1.0, "no part is called 'nobody'"),
])
def test_a_parameter_the_part_lacks_is_refused(part: str, param: str, value: float,
                                                words: str) -> None:
    with pytest.raises(ParamError, match=words):
        apply_param(_layout(), part, param, value)


@pytest.mark.parametrize(("part", "param", "value", "words"), [
    ("bar", "corner_radius", 11.0, "half the shorter side"),
    ("ball", "radius", -1.0, "must be positive"),
    ("ball", "radius", 33.0, "touch or overlap"),
    ("bar", "x", 20.0, "partly inside dielectric .lens."),
    ("bar", "corner_radius", float("nan"), "finite"),
])
def test_a_value_that_breaks_the_layout_names_the_problem(part: str, param: str, value: float,
                                                          words: str) -> None:
    with pytest.raises(LayoutError, match=words):
        apply_param(_layout(), part, param, value)
