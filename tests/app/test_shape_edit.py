"""Geometric edits of shapes (Qt-free): inverses, invariants and areas checked generally."""

from __future__ import annotations

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from app import shape_edit as se
from solver.layout import Circle, Ellipse, Path, Polygon, Rect

coord = st.floats(-500, 500, allow_nan=False).map(lambda v: round(v, 3))
size = st.floats(0.5, 200, allow_nan=False).map(lambda v: round(v, 3))


@st.composite
def shapes(draw):  # noqa: ANN001, ANN201
    kind = draw(st.sampled_from(["circle", "ellipse", "rect", "polygon", "path"]))
    x, y = draw(coord), draw(coord)
    if kind == "circle":
        return Circle((x, y), draw(size))
    if kind == "ellipse":
        return Ellipse((x, y), (draw(size), draw(size)), draw(st.floats(-89, 89)))
    if kind == "rect":
        w, h = draw(size), draw(size)
        return Rect((x, y), (x + w, y + h), draw(st.floats(0, 0.45)) * min(w, h))
    w, h = draw(size), draw(size)
    pts = ((x, y), (x + w, y), (x + w, y + h), (x, y + h))
    return Polygon(pts) if kind == "polygon" else Path(pts[:3], draw(size) / 10)


@settings(max_examples=60, deadline=None)
@given(shapes(), coord, coord)
def test_translation_moves_the_region_and_keeps_its_area(s, dx: float, dy: float) -> None:
    # from memory: a translation moves the centroid by (dx, dy) and keeps the area
    a, b = se.region(s), se.region(se.translated(s, dx, dy))
    assert b.area == pytest.approx(a.area, rel=1e-9)
    assert b.centroid.x - a.centroid.x == pytest.approx(dx, abs=1e-6)
    assert b.centroid.y - a.centroid.y == pytest.approx(dy, abs=1e-6)


@settings(max_examples=60, deadline=None)
@given(shapes(), coord, st.booleans())
def test_mirroring_twice_is_the_identity_and_reflects_the_centroid(s, about: float,
                                                                   vertical: bool) -> None:
    # from memory: a reflection x -> 2a - x is its own inverse and keeps the area
    m = se.mirrored(s, vertical, about)
    a, b = se.region(s), se.region(m)
    assert b.area == pytest.approx(a.area, rel=1e-6)
    got = b.centroid.x if vertical else b.centroid.y
    want = 2 * about - (a.centroid.x if vertical else a.centroid.y)
    assert got == pytest.approx(want, abs=1e-6 * (1 + abs(want)))
    back = se.region(se.mirrored(m, vertical, about))
    assert back.symmetric_difference(a).area <= 1e-6 * a.area


@settings(max_examples=40, deadline=None)
@given(shapes(), st.data())
def test_inserting_then_removing_a_vertex_gives_the_outline_back(s, data) -> None:  # noqa: ANN001
    # common practice, no source: a vertex put on an edge and taken away again leaves the
    # outline as it was (a rectangle comes back as the equal polygon)
    if isinstance(s, (Circle, Ellipse)):
        return
    edges = se.edges(s)
    ref, a, b = edges[data.draw(st.integers(0, len(edges) - 1))]
    mid = ((a[0] + b[0]) / 2, (a[1] + b[1]) / 2)
    grown = se.with_vertex_inserted(s, ref, mid)
    back = se.with_vertex_removed(grown, (ref[0], ref[1] + 1))
    assert se.region(back).symmetric_difference(se.region(s)).area <= 1e-9 * se.region(s).area
    # the inserted point lies on the edge, so the region is unchanged even with it
    assert se.region(grown).symmetric_difference(se.region(s)).area <= 1e-9 * \
        se.region(s).area + 1e-9


def test_moving_a_rect_edge_moves_only_that_side() -> None:
    # from memory: a side moved along its normal changes one dimension only
    r = Rect((0.0, 0.0), (10.0, 4.0))
    assert se.with_edge_moved(r, (0, 2), (7.0, 1.5)) == Rect((0.0, 0.0), (10.0, 5.5))
    assert se.with_edge_moved(r, (0, 3), (-2.0, 9.0)) == Rect((-2.0, 0.0), (10.0, 4.0))


def test_slanted_edge_moves_along_its_normal_only() -> None:
    # from memory: the normal of the edge (0,0)-(4,3) is (3,-4)/5; a drag (5, 0) has
    # normal part (5,0).(3,-4)/5 = 3, so both ends move by 3 (3,-4)/5 = (1.8, -2.4)
    p = Polygon(((0.0, 0.0), (4.0, 3.0), (0.0, 6.0)))
    q = se.with_edge_moved(p, (0, 0), (5.0, 0.0))
    assert q.points[0] == pytest.approx((1.8, -2.4))
    assert q.points[1] == pytest.approx((5.8, 0.6))
    assert q.points[2] == (0.0, 6.0)


def test_circle_as_polygon_is_the_same_circle() -> None:
    # from memory: a regular N-gon inscribed in a circle of radius r has area
    # (N/2) r^2 sin(2 pi / N); the rounded square traces exactly such a polygon
    poly = se.as_polygon(Circle((3.0, -2.0), 7.5))
    assert len(poly.points) == 4 and poly.corner_radius == 7.5
    reg = se.region(poly)
    n = len(reg.exterior.coords) - 1
    assert n >= 400
    assert reg.area == pytest.approx(n / 2 * 7.5**2 * math.sin(2 * math.pi / n), rel=1e-9)
    # and it misses the true circle by the relative chord error 1 - sin(x)/x ~ x^2/6
    assert reg.area == pytest.approx(math.pi * 7.5**2, rel=1.01 * (2 * math.pi / n) ** 2 / 6)


def test_ellipse_handle_sets_axis_and_angle() -> None:
    # from memory: the handle at distance d in direction theta sets a = d, angle = theta
    e = Ellipse((0.0, 0.0), (5.0, 2.0))
    f = se.with_vertex_moved(e, (0, 0), (3.0, 4.0))
    assert f.radii == pytest.approx((5.0, 2.0)) and f.angle_deg == pytest.approx(53.130102)
    g = se.with_vertex_moved(f, (0, 1), (0.0, 3.0))
    assert g.radii == pytest.approx((5.0, 3.0))


def test_label_boxes_are_shifted_apart_and_tidy_ones_left_alone() -> None:
    # common practice, no source: overlapping labels move down just clear of each other
    from app.label_layout import GAP_PX, declutter
    tidy = [(0, 0, 50, 20), (60, 0, 110, 20), (0, 30, 50, 50)]
    assert declutter(tidy) == [0.0, 0.0, 0.0]
    stacked = [(0, 0, 50, 20), (10, 5, 60, 25), (20, 10, 70, 30)]
    dy = declutter(stacked)
    assert dy[0] == 0.0 and dy[1] == 20 + GAP_PX - 5
    moved = [(x0, y0 + d, x1, y1 + d) for (x0, y0, x1, y1), d in zip(stacked, dy, strict=True)]
    for i in range(3):
        for j in range(i):
            a, b = moved[i], moved[j]
            assert not (a[0] < b[2] and b[0] < a[2] and a[1] < b[3] and b[1] < a[3])
