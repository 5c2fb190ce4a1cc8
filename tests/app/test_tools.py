"""Tool logic with synthetic points (mm), no mouse: every tool, snapping on and off."""

from __future__ import annotations

import math

import pytest
from editor_layouts import every_shape_layout
from PySide6.QtGui import QUndoStack

from app.document import Document
from app.selection import Selection
from app.snapping import Snapper
from app.tools import (
    CircleTool,
    EllipseTool,
    HoleTool,
    PathTool,
    PolygonTool,
    RectangleTool,
    SelectTool,
    ToolContext,
    VertexTool,
)
from solver.layout import Circle, Ellipse, Layout, Part, Path, Polygon, Rect


def make_ctx(layout: Layout | None = None, snap: bool = False, grid: float = 1.0
             ) -> ToolContext:
    doc = Document(layout or every_shape_layout())
    messages: list[str] = []
    ctx = ToolContext(doc=doc, stack=QUndoStack(), selection=Selection(doc),
                      snapper=Snapper(doc, grid_mm=grid, enabled=snap), tol_mm=1.0,
                      status=messages.append)
    ctx.messages = messages  # type: ignore[attr-defined]
    return ctx


def drag(tool, a, b, steps: int = 3) -> None:  # noqa: ANN001
    tool.press(a)
    for k in range(1, steps + 1):
        t = k / steps
        tool.move((a[0] + t * (b[0] - a[0]), a[1] + t * (b[1] - a[1])), True)
    tool.release(b)


def newest(ctx: ToolContext) -> Part:
    return ctx.doc.part(ctx.doc.ids()[-1])


def test_rectangle_with_corner_radius_and_snapping(qapp) -> None:
    # common practice, no source: corners snap to the nearest grid node (a multiple of the 5 mm
    #   spacing)
    ctx = make_ctx(snap=True, grid=5.0)
    ctx.options.corner_radius_mm = 1.5
    drag(RectangleTool(ctx), (101.2, 49.1), (139.4, 71.3))
    part = newest(ctx)
    assert part.shape == Rect((100.0, 50.0), (140.0, 70.0), 1.5)
    assert part.kind == "electrode" and part.volts == 0.0 and part.name == "Electrode"
    assert ctx.selection.ids == [ctx.doc.ids()[-1]]
    ctx.stack.undo()
    assert len(ctx.doc) == 5


def test_click_without_drag_adds_nothing_and_says_how(qapp) -> None:
    # common practice, no source: a click is not a drag, so nothing is drawn
    ctx = make_ctx()
    drag(CircleTool(ctx), (100.0, 100.0), (100.1, 100.0))
    assert len(ctx.doc) == 5 and "drag" in ctx.messages[-1]


def test_circle_and_ellipse(qapp) -> None:
    # from memory: the rim point (103, 104) lies 5 mm from (100, 100) (a 3-4-5 triangle); an
    #   ellipse inscribed in a box has semi-axes of half its sides
    ctx = make_ctx()
    ctx.options.new_kind = "floating"
    drag(CircleTool(ctx), (100.0, 100.0), (103.0, 104.0))
    assert newest(ctx).shape == Circle((100.0, 100.0), 5.0) and newest(ctx).charge == 0.0
    ctx.options.new_kind = "dielectric"
    drag(EllipseTool(ctx), (100.0, 120.0), (120.0, 110.0))
    assert newest(ctx).shape == Ellipse((110.0, 115.0), (10.0, 5.0))
    assert newest(ctx).permittivity == 4.0


def test_circle_stays_at_positive_radius_in_axisymmetry(qapp) -> None:
    # DESIGN.md section 2: axisymmetric parts lie at r >= 0, so the radius stops at the axis
    from dataclasses import replace
    ctx = make_ctx(replace(every_shape_layout(), symmetry="axisymmetric", parts=()))
    drag(CircleTool(ctx), (3.0, 10.0), (10.0, 10.0))
    assert newest(ctx).shape == Circle((3.0, 10.0), 3.0)


def test_polygon_clicks_enter_and_escape(qapp) -> None:
    # common practice, no source: Enter closes, Esc cancels, Backspace takes back the last point
    ctx = make_ctx()
    tool = PolygonTool(ctx)
    for p in [(100, 100), (120, 100), (110, 115)]:
        tool.press(p)
        tool.release(p)
    tool.key("Escape")
    assert len(ctx.doc) == 5 and tool.preview() is None
    for p in [(100, 100), (120, 100), (130, 130), (110, 115)]:
        tool.press(p)
        tool.release(p)
    tool.key("Backspace")
    tool.key("Return")
    assert newest(ctx).shape == Polygon(((100, 100), (120, 100), (130, 130)))


def test_polygon_double_click_closes_and_too_few_points_refused(qapp) -> None:
    # common practice, no source: double-click closes; a polygon needs three corners
    ctx = make_ctx()
    tool = PolygonTool(ctx)
    tool.press((100, 100))
    tool.double_click((100, 100))
    assert len(ctx.doc) == 5 and "at least 3" in ctx.messages[-1]
    for p in [(120, 100), (110, 115)]:
        tool.press(p)
    tool.double_click((110, 115))
    assert newest(ctx).shape == Polygon(((100, 100), (120, 100), (110, 115)))


def test_path_with_width(qapp) -> None:
    # DESIGN.md section 2: a path is its points and a width
    ctx = make_ctx()
    ctx.options.path_width_mm = 0.8
    tool = PathTool(ctx)
    for p in [(100, 100), (150, 100)]:
        tool.press(p)
    tool.key("Enter")
    assert newest(ctx).shape == Path(((100, 100), (150, 100)), 0.8)


def test_hole_by_clicks_and_by_drag(qapp) -> None:
    # DESIGN.md section 2: holes are rings of a polygon; a rectangle's corner radius carries over
    ctx = make_ctx()
    tool = HoleTool(ctx)
    for p in [(-35.0, -5.0), (-25.0, -5.0), (-30.0, 5.0)]:
        tool.press(p)
        tool.release(p)
    tool.key("Return")
    bar = ctx.doc.part(ctx.doc.id_of("Bar")).shape
    assert isinstance(bar, Polygon) and bar.holes == (((-35.0, -5.0), (-25.0, -5.0),
                                                        (-30.0, 5.0)),)
    assert bar.corner_radius == 2.0  # the rectangle's rounding is kept
    drag(HoleTool(ctx), (25.0, -2.0), (35.0, 2.0))
    ball = ctx.doc.part(ctx.doc.id_of("Ball")).shape
    assert isinstance(ball, Polygon) and len(ball.holes) == 1
    # from memory: a square of side 2r rounded with radius r is the circle of radius r
    assert ball.points == ((24.0, -6.0), (36.0, -6.0), (36.0, 6.0), (24.0, 6.0))
    assert ball.corner_radius == 6.0
    drag(HoleTool(ctx), (150.0, 150.0), (160.0, 160.0))
    assert "inside" in ctx.messages[-1]


def test_select_click_shift_box_and_move(qapp) -> None:
    # common practice, no source: click selects, shift-click adds, a box selects what it touches,
    #   a drag is one undo step
    ctx = make_ctx(snap=True, grid=1.0)
    tool = SelectTool(ctx)
    bar, ball, lens = (ctx.doc.id_of(n) for n in ("Bar", "Ball", "Lens"))
    tool.press((-30.0, 0.0))
    tool.release((-30.0, 0.0))
    assert ctx.selection.ids == [bar]
    tool.press((30.0, 0.0), shift=True)
    tool.release((30.0, 0.0))
    assert ctx.selection.ids == [bar, ball]
    drag(tool, (-30.2, 0.1), (-27.9, 5.2))
    # anchor snaps to (-30, 0), the cursor to (-28, 5): every part moves by (2, 5) mm
    assert ctx.doc.part(bar).shape.min == (-38.0, -5.0)
    assert ctx.doc.part(ball).shape.center == (32.0, 5.0)
    assert ctx.stack.count() == 1  # the whole drag is one step
    drag(tool, (-20.0, 40.0), (20.0, 70.0))  # box over the lens only
    assert ctx.selection.ids == [lens]
    ctx.stack.undo()
    assert ctx.doc.part(bar).shape.min == (-40.0, -10.0)


def test_select_escape_during_drag_restores(qapp) -> None:
    # common practice, no source: Esc during a drag puts everything back
    ctx = make_ctx()
    tool = SelectTool(ctx)
    ball = ctx.doc.id_of("Ball")
    tool.press((30.0, 0.0))
    tool.move((40.0, 0.0), True)
    assert ctx.doc.part(ball).shape.center == (40.0, 0.0) and ctx.doc.interacting
    tool.key("Escape")
    assert ctx.doc.part(ball).shape.center == (30.0, 0.0) and not ctx.doc.interacting
    assert ctx.stack.count() == 0


def test_nudge_and_delete(qapp) -> None:
    # common practice, no source: arrow keys move by one grid step, ten with shift
    ctx = make_ctx(grid=0.5)
    tool = SelectTool(ctx)
    ball = ctx.doc.id_of("Ball")
    ctx.selection.set([ball])
    tool.key("Right")
    tool.key("Up", shift=True)
    assert ctx.doc.part(ball).shape.center == (30.5, 5.0)
    tool.key("Delete")
    assert ball not in ctx.doc
    ctx.stack.undo()
    assert ctx.doc.part(ctx.doc.id_of("Ball")).shape.center == (30.5, 5.0)


def test_axisymmetric_move_stops_at_the_axis(qapp) -> None:
    # DESIGN.md section 2: a disc of radius 4 mm kept at r >= 0 stops with its centre at r = 4 mm
    from dataclasses import replace
    layout = replace(every_shape_layout(), symmetry="axisymmetric",
                     parts=(Part("Disc", "electrode", Circle((10.0, 0.0), 4.0), volts=1.0),))
    ctx = make_ctx(layout)
    drag(SelectTool(ctx), (10.0, 0.0), (-20.0, 3.0))
    assert ctx.doc.part(ctx.doc.ids()[0]).shape.center == pytest.approx((4.0, 3.0))


def test_vertex_drag_edge_drag_insert_remove_and_radius(qapp) -> None:
    # from memory: shifting an edge along its normal keeps its direction and leaves the other
    #   vertices
    ctx = make_ctx(snap=True, grid=1.0)
    tool = VertexTool(ctx)
    plate = ctx.doc.id_of("Plate")
    ctx.selection.set([plate])
    drag(tool, (60.2, -59.8), (70.3, -50.2))  # vertex 2 of the outline
    assert ctx.doc.part(plate).shape.points[2] == (70.0, -50.0)
    drag(tool, (0.0, -80.3), (0.0, -90.4))  # bottom edge, down by 10 mm
    pts = ctx.doc.part(plate).shape.points
    assert pts[0] == (-60.0, -90.0) and pts[1] == (60.0, -90.0)
    assert ctx.stack.count() == 2
    tool.double_click((0.0, -90.0))
    assert len(ctx.doc.part(plate).shape.points) == 5
    assert ctx.doc.part(plate).shape.points[1] == (0.0, -90.0)
    tool.double_click((0.0, -90.0))
    assert len(ctx.doc.part(plate).shape.points) == 4
    tool.press((-60.0, -60.0))
    tool.release((-60.0, -60.0))
    assert tool.set_corner_radius(3.0)
    assert ctx.doc.part(plate).shape.corner_radius == (1.0, 1.0, 0.0, 3.0)
    assert tool.current_radius() == 3.0
    for _ in range(5):
        ctx.stack.undo()
    assert ctx.doc.to_json() == Document(every_shape_layout()).to_json()


def test_vertex_tool_circle_handle_and_rect_edge(qapp) -> None:
    # from memory: a rim handle's distance from the centre is the radius (30 -> 39 mm: 9 mm)
    ctx = make_ctx()
    tool = VertexTool(ctx)
    ball, bar = ctx.doc.id_of("Ball"), ctx.doc.id_of("Bar")
    ctx.selection.set([ball, bar])
    drag(tool, (36.0, 0.0), (39.0, 0.0))
    assert ctx.doc.part(ball).shape.radius == pytest.approx(9.0)
    drag(tool, (-20.0, 3.0), (-15.0, 7.0))  # right side of the bar moves right only
    assert ctx.doc.part(bar).shape.max == (-15.0, 10.0)


def test_vertex_tool_escape_restores(qapp) -> None:
    # common practice, no source: Esc during a drag puts everything back
    ctx = make_ctx()
    tool = VertexTool(ctx)
    plate = ctx.doc.id_of("Plate")
    ctx.selection.set([plate])
    tool.press((60.0, -60.0))
    tool.move((80.0, -40.0), True)
    assert ctx.doc.part(plate).shape.points[2] == (80.0, -40.0)
    tool.key("Escape")
    assert ctx.doc.part(plate).shape.points[2] == (60.0, -60.0) and ctx.stack.count() == 0


def test_snapping_prefers_vertices_then_outlines_then_grid(qapp) -> None:
    # from memory: the nearest point of a circle lies on the ray from its centre through the
    #   cursor
    ctx = make_ctx(snap=True, grid=10.0)
    assert ctx.snapper.snap((-20.4, 10.3), 1.0) == ((-20.0, 10.0), "vertex")
    q, what = ctx.snapper.snap((30.2, 6.4), 1.0)  # top of the ball, r = 6 mm
    # the nearest rim point lies on the ray from the centre through the cursor
    assert what == "outline" and math.hypot(q[0] - 30.0, q[1]) == pytest.approx(6.0, abs=1e-3)
    assert math.atan2(q[1], q[0] - 30.0) == pytest.approx(math.atan2(6.4, 0.2), abs=1e-3)
    assert ctx.snapper.snap((123.0, 47.0), 1.0) == ((120.0, 50.0), "grid")
    ctx.snapper.enabled = False
    assert ctx.snapper.snap((123.0, 47.0), 1.0) == ((123.0, 47.0), "")


def test_sizes_are_shown_while_drawing_and_moving(qapp) -> None:
    # common practice, no source: the status bar reads out what is being drawn, in mm
    ctx = make_ctx()
    tool = RectangleTool(ctx)
    tool.press((100.0, 100.0))
    tool.move((140.0, 120.0), True)
    assert ctx.messages[-1] == "Rectangle: 40 \u00d7 20 mm from (100, 100) mm"
    tool.release((140.0, 120.0))
    tool = CircleTool(ctx)
    tool.press((100.0, 150.0))
    tool.move((106.0, 158.0), True)
    assert ctx.messages[-1] == "Circle: centre (100, 150) mm, r = 10 mm"  # 6-8-10 triangle
    tool.cancel()
    sel = SelectTool(ctx)
    sel.press((30.0, 0.0))
    sel.move((32.5, -1.0), True)
    assert ctx.messages[-1] == "Move by \u0394x = 2.5 mm, \u0394y = -1 mm"
    sel.cancel()


def test_shift_drag_cuts_a_round_hole_making_a_coaxial_ring(qapp) -> None:
    # from memory: an annulus of radii R and r has area pi (R^2 - r^2); the traced
    # circles lose a relative 1 - cos(pi/560) ~ 1.6e-5 of it, far below the 1e-4 allowed
    from app.shape_edit import region
    ctx = make_ctx(Layout(parts=(Part("Sheath", "electrode", Circle((0.0, 0.0), 20.0),
                                      volts=0.0),)))
    tool = HoleTool(ctx)
    tool.press((0.0, 0.0), shift=True)
    tool.move((14.0, 0.0), True)
    tool.release((14.0, 0.0))
    sheath = ctx.doc.part(ctx.doc.ids()[0]).shape
    assert isinstance(sheath, Polygon) and len(sheath.holes) == 1
    assert region(sheath).area == pytest.approx(math.pi * (20.0**2 - 14.0**2), rel=1e-4)
    assert ctx.doc.problem() is None
    # the traced hole offers no handles; the four outer corners do
    ctx.selection.set(ctx.doc.ids())
    assert len(VertexTool(ctx).preview().handles) == 4


def test_a_part_grabbed_at_a_corner_snaps_that_corner(qapp) -> None:
    # common practice, no source: a part carried by its corner lands with that corner on
    # the target vertex exactly, wherever in the tolerance the mouse was let go
    ctx = make_ctx(snap=True, grid=7.0)
    tool = SelectTool(ctx)
    bar = ctx.doc.id_of("Bar")
    # grab the bar's top-right corner (-20, 10) a little off and let go near the plate's
    # corner (60, -60): the corner lands on it, though the grid (7 mm) would say otherwise
    drag(tool, (-20.3, 9.8), (59.6, -59.7))
    assert ctx.doc.part(bar).shape.max == (60.0, -60.0)
    assert ctx.doc.part(bar).shape.min == (40.0, -80.0)
