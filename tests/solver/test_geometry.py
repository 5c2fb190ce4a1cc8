"""Outlines from shapes, checked against plane-geometry facts.

Each discretised outline's area must equal the exact area of the true shape to 1e-4
relative; rings must be oriented with the material on the left; tangent or nearly
tangent conductors must be caught whatever the discretisation.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
import shapely

from solver.geometry import (
    ARC_STEP_RAD,
    part_outline,
    rounded_ring,
    same_conductor,
    shape_polygon,
    validate_geometry,
)
from solver.layout import (
    Boundary,
    Circle,
    Ellipse,
    Layout,
    LayoutError,
    Part,
    Path,
    Polygon,
    Rect,
    Shape,
)

REL = 1e-4


def _signed_area(ring: np.ndarray) -> float:
    """Shoelace formula, positive for an anticlockwise ring (mm^2)."""
    x, y = ring[:, 0], ring[:, 1]
    return 0.5 * float(np.sum(x * np.roll(y, -1) - np.roll(x, -1) * y))


def _corner_cut(r: float, interior_angle: float) -> float:
    """Area removed by rounding a convex corner of the given interior angle with radius r.

    Between the two tangents and the arc: :math:`r^2/\\tan(\\alpha/2) - r^2(\\pi-\\alpha)/2`.
    Derived from plane geometry, from memory; at 90 degrees it is :math:`r^2(1-\\pi/4)`.
    """
    return r * r / math.tan(interior_angle / 2) - r * r * (math.pi - interior_angle) / 2


AREA_CASES: list[tuple[str, Shape, float]] = [
    # circle: pi r^2 (common practice, no source)
    ("circle", Circle((3.0, -2.0), 7.5), math.pi * 7.5**2),
    ("small circle", Circle((0.0, 0.0), 0.01), math.pi * 0.01**2),
    # ellipse: pi a b (common practice, no source)
    ("ellipse", Ellipse((1.0, 1.0), (6.0, 2.0), 30.0), math.pi * 12.0),
    ("thin ellipse 100:1", Ellipse((0.0, 0.0), (50.0, 0.5), -10.0), math.pi * 25.0),
    # rounded rectangle: w h - (4 - pi) r^2 (common practice, no source)
    ("rounded rect", Rect((-10.0, 0.0), (10.0, 40.0), 2.0), 20 * 40 - (4 - math.pi) * 4.0),
    ("stadium rect", Rect((0.0, 0.0), (10.0, 4.0), 2.0), 40.0 - (4 - math.pi) * 4.0),
    ("sharp rect", Rect((0.0, 0.0), (3.0, 2.0), 0.0), 6.0),
    # equilateral triangle of side s: sqrt(3)/4 s^2, corners of 60 degrees (from memory)
    ("rounded triangle", Polygon(((0.0, 0.0), (10.0, 0.0), (5.0, 5.0 * math.sqrt(3))),
                                 corner_radius=1.0),
     math.sqrt(3) / 4 * 100 - 3 * _corner_cut(1.0, math.pi / 3)),
    ("square with per-vertex radii",
     Polygon(((0.0, 0.0), (8.0, 0.0), (8.0, 8.0), (0.0, 8.0)), corner_radius=(1.0, 0.0, 2.0, 0.5)),
     64.0 - (1 - math.pi / 4) * (1.0 + 4.0 + 0.25)),
    ("square with a square hole",
     Polygon(((0.0, 0.0), (10.0, 0.0), (10.0, 10.0), (0.0, 10.0)),
             holes=(((2.0, 2.0), (4.0, 2.0), (4.0, 4.0), (2.0, 4.0)),)), 96.0),
    # a straight wire of length L and width w: L w + pi (w/2)^2 (common practice, no source)
    ("straight path", Path(((0.0, 0.0), (30.0, 40.0)), 2.0), 50.0 * 2.0 + math.pi),
    # an L-shaped trace with one 90-degree bend: L w + pi r^2 - r^2 (tan(t/2) - t/2),
    # the inner overlap minus the outer round join (derived, from memory)
    ("bent path", Path(((0.0, 0.0), (20.0, 0.0), (20.0, 10.0)), 1.0),
     30.0 * 1.0 + math.pi * 0.25 - 0.25 * (1 - math.pi / 4)),
]


@pytest.mark.parametrize("shape, exact", [(s, a) for _, s, a in AREA_CASES],
                         ids=[i for i, _, _ in AREA_CASES])
def test_outline_area_matches_the_exact_area(shape: Shape, exact: float) -> None:
    poly = shape_polygon(shape)
    assert poly.is_valid
    assert poly.area == pytest.approx(exact, rel=REL)


@pytest.mark.parametrize("shape", [s for _, s, _ in AREA_CASES], ids=[i for i, _, _ in AREA_CASES])
def test_rings_have_material_on_the_left(shape: Shape) -> None:
    outline = part_outline(Part("P", "electrode", shape, volts=1.0))
    assert _signed_area(outline.rings[0]) > 0
    for hole in outline.rings[1:]:
        assert _signed_area(hole) < 0
    # the outward normal (dy, -dx) of the exterior's first edge points away from the part
    ring = outline.rings[0]
    mid = 0.5 * (ring[0] + ring[1])
    d = ring[1] - ring[0]
    normal = np.array([d[1], -d[0]]) / np.hypot(*d)
    probe = shapely.Point(*(mid + 1e-3 * largest_scale(shape) * normal))
    assert not outline.polygon.contains(probe)


def largest_scale(shape: Shape) -> float:
    x0, y0, x1, y1 = shape_polygon(shape).bounds
    return max(x1 - x0, y1 - y0)


@pytest.mark.parametrize("shape", [Circle((2.0, 1.0), 3.0), Ellipse((0.0, 0.0), (5.0, 2.0), 40.0)])
def test_vertices_lie_on_the_true_curve(shape: Shape) -> None:
    # the circle x^2 + y^2 = r^2 and the ellipse (x'/a)^2 + (y'/b)^2 = 1 (from memory)
    ring = np.asarray(shape_polygon(shape).exterior.coords)
    if isinstance(shape, Circle):
        r = np.hypot(ring[:, 0] - shape.center[0], ring[:, 1] - shape.center[1])
        np.testing.assert_allclose(r, shape.radius, rtol=1e-12)
    else:
        assert isinstance(shape, Ellipse)
        c, s = math.cos(math.radians(shape.angle_deg)), math.sin(math.radians(shape.angle_deg))
        dx, dy = ring[:, 0] - shape.center[0], ring[:, 1] - shape.center[1]
        u, v = c * dx + s * dy, -s * dx + c * dy
        np.testing.assert_allclose((u / shape.radii[0]) ** 2 + (v / shape.radii[1]) ** 2, 1.0,
                                   rtol=1e-12)


def test_chords_turn_by_at_most_the_arc_step() -> None:
    ring = np.asarray(shape_polygon(Ellipse((0.0, 0.0), (20.0, 1.0), 0.0)).exterior.coords)[:-1]
    d = np.roll(ring, -1, axis=0) - ring
    heading = np.unwrap(np.arctan2(d[:, 1], d[:, 0]))
    assert np.max(np.abs(np.diff(heading))) <= ARC_STEP_RAD * (1 + 1e-9)


def test_rounded_corner_arc_is_tangent_and_of_the_given_radius() -> None:
    # a corner rounded with radius r: its arc points lie r from a centre r inside both
    # edges (common practice, no source)
    ring = rounded_ring(np.array([[0.0, 0.0], [10.0, 0.0], [10.0, 10.0], [0.0, 10.0]]),
                        [0.0, 2.0, 0.0, 0.0])
    near = ring[(ring[:, 0] > 8.0 - 1e-9) & (ring[:, 1] < 2.0 + 1e-9)]
    r = np.hypot(near[:, 0] - 8.0, near[:, 1] - 2.0)
    np.testing.assert_allclose(r, 2.0, rtol=1e-12)
    assert [8.0, 0.0] in near.round(12).tolist() and [10.0, 2.0] in near.round(12).tolist()


def test_same_conductor_only_for_electrodes_at_one_voltage() -> None:
    c = Circle((0.0, 0.0), 1.0)
    assert same_conductor(Part("a", "electrode", c, volts=5.0),
                          Part("b", "electrode", c, volts=5.0))
    assert not same_conductor(Part("a", "electrode", c, volts=5.0),
                              Part("b", "electrode", c, volts=6.0))
    assert not same_conductor(Part("a", "floating", c, charge=0.0),
                              Part("b", "floating", c, charge=0.0))


@pytest.mark.parametrize("angle_deg", [0.0, 13.0, 45.0, 90.0, 137.5])
def test_tangent_circles_at_any_angle_are_caught(angle_deg: float) -> None:
    # two circles of radii 1 and 3 with centres 4 mm apart touch at one point
    # (common practice, no source); discretisation must not open a false gap
    t = math.radians(angle_deg)
    parts = (Part("Inner", "electrode", Circle((0.0, 0.0), 1.0), volts=100.0),
             Part("Outer", "floating", Circle((4 * math.cos(t), 4 * math.sin(t)), 3.0)))
    with pytest.raises(LayoutError, match="'Inner' and 'Outer'.*touch or overlap"):
        validate_geometry(Layout(parts=parts))


def test_circle_tangent_inside_a_hole_is_caught() -> None:
    # a rod of radius 2 resting against the wall of a round bore of radius 5
    shell = Polygon(((-10.0, -10.0), (10.0, -10.0), (10.0, 10.0), (-10.0, 10.0)),
                    holes=(tuple((5 * math.cos(a), 5 * math.sin(a))
                                 for a in np.linspace(0, 2 * math.pi, 720, endpoint=False)),))
    parts = (Part("Shell", "electrode", shell, volts=0.0),
             Part("Rod", "electrode", Circle((3.0, 0.0), 2.0), volts=1000.0))
    with pytest.raises(LayoutError, match="touch or overlap"):
        validate_geometry(Layout(parts=parts))


def test_a_real_gap_of_a_micrometre_is_allowed() -> None:
    # 1 um between a 1 mm radius rod and a plate: well above the outline's sagitta
    parts = (Part("Rod", "electrode", Circle((0.0, 1.001), 1.0), volts=100.0),
             Part("Plate", "electrode", Rect((-5.0, -1.0), (5.0, 0.0)), volts=0.0))
    assert len(validate_geometry(Layout(parts=parts))) == 2


def test_electrode_enclosed_by_a_grounded_shell_is_accepted() -> None:
    shell = Polygon(((-10.0, -10.0), (10.0, -10.0), (10.0, 10.0), (-10.0, 10.0)),
                    holes=(((-8.0, -8.0), (8.0, -8.0), (8.0, 8.0), (-8.0, 8.0)),))
    parts = (Part("Shell", "electrode", shell, volts=0.0),
             Part("Core", "electrode", Circle((0.0, 0.0), 2.0), volts=1000.0))
    outlines = validate_geometry(Layout(parts=parts))
    assert len(outlines[0].rings) == 2


def test_empty_layout_is_a_blank_sketch() -> None:
    # a new document has no parts yet; it may be saved and reopened
    assert validate_geometry(Layout(parts=())) == ()


def _in_box(volts: float | None, part_volts: float = 500.0) -> Layout:
    """A rod of radius 2 resting on the bottom wall (y = -10) of a 20 mm box."""
    rod = Part("Rod", "electrode", Circle((5.0, -8.0), 2.0), volts=part_volts)
    return Layout(parts=(rod,), boundary=Boundary("box", (-10.0, -10.0), (10.0, 10.0), volts))


def test_conductor_touching_a_grounded_wall_is_refused() -> None:
    with pytest.raises(LayoutError, match="'Rod': touches the bottom wall.*0 V"):
        validate_geometry(_in_box(0.0))


def test_conductor_touching_an_insulating_wall_is_accepted() -> None:
    # a symmetry plane through a conductor is legitimate (DESIGN.md section 2)
    assert len(validate_geometry(_in_box(None))) == 1


def test_electrode_at_the_box_voltage_may_touch_its_wall() -> None:
    assert len(validate_geometry(_in_box(0.0, part_volts=0.0))) == 1


def test_axis_side_of_an_axisymmetric_box_is_no_wall() -> None:
    tip = Part("Tip", "electrode", Polygon(((0.0, 0.0), (2.0, 0.0), (2.0, 5.0), (0.0, 5.0))),
               volts=100.0)
    layout = Layout(parts=(tip,), symmetry="axisymmetric",
                    boundary=Boundary("box", (0.0, -10.0), (10.0, 10.0), 0.0))
    assert len(validate_geometry(layout)) == 1


@pytest.mark.parametrize("shape, exact", [
    # half a disc of radius R: pi R^2 / 2 (common practice, no source)
    (Circle((0.0, 10.0), 4.0), math.pi * 16.0 / 2),
    # half an ellipse: pi a b / 2, for either orientation of its axes (common practice)
    (Ellipse((0.0, 0.0), (3.0, 5.0)), math.pi * 15.0 / 2),
    (Ellipse((0.0, 0.0), (3.0, 5.0), 90.0), math.pi * 15.0 / 2),
    (Ellipse((0.0, 0.0), (3.0, 5.0), -270.0), math.pi * 15.0 / 2),
], ids=["sphere", "spheroid", "spheroid turned 90", "spheroid turned -270"])
def test_round_shape_centred_on_the_axis_is_a_solid_of_revolution(shape: Shape,
                                                                  exact: float) -> None:
    layout = Layout(parts=(Part("Ball", "electrode", shape, volts=1.0),),
                    symmetry="axisymmetric")
    (outline,) = validate_geometry(layout)
    assert outline.polygon.bounds[0] == pytest.approx(0.0, abs=1e-12)
    assert outline.polygon.area == pytest.approx(exact, rel=REL)


def test_tilted_ellipse_on_the_axis_is_refused() -> None:
    # tilted, its revolution would not be the ellipse drawn: no half is taken
    layout = Layout(parts=(Part("Egg", "electrode", Ellipse((0.0, 0.0), (3.0, 5.0), 30.0),
                                volts=1.0),), symmetry="axisymmetric")
    with pytest.raises(LayoutError, match="'Egg': reaches r = "):
        validate_geometry(layout)
