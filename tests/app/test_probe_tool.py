"""The line probe tool with synthetic points (mm): a segment, snapping, cancel, clear."""

from __future__ import annotations

import pytest
from editor_layouts import every_shape_layout
from PySide6.QtGui import QUndoStack

from app.document import Document
from app.selection import Selection
from app.snapping import Snapper
from app.tools import TOOL_CLASSES, ProbeTool, ToolContext


def probe_tool(snap: bool = False) -> tuple[ProbeTool, list]:
    doc = Document(every_shape_layout())
    ctx = ToolContext(doc=doc, stack=QUndoStack(), selection=Selection(doc),
                      snapper=Snapper(doc, grid_mm=5.0, enabled=snap), tol_mm=1.0)
    tool = ProbeTool(ctx)
    seen: list = []
    tool.segment_changed.connect(seen.append)
    return tool, seen


def drag(tool: ProbeTool, a: tuple[float, float], b: tuple[float, float]) -> None:
    tool.press(a)
    tool.move(((a[0] + b[0]) / 2, (a[1] + b[1]) / 2), True)
    assert tool.preview() is not None and len(tool.preview().points) == 2
    tool.move(b, True)
    tool.release(b)


def test_a_drag_makes_the_probe_segment_and_leaves_the_document_alone(qapp) -> None:
    tool, seen = probe_tool()
    before = tool.ctx.doc.to_layout()
    drag(tool, (1.0, 2.0), (31.0, 42.0))
    assert tool.segment == ((1.0, 2.0), (31.0, 42.0))
    assert seen == [tool.segment]
    assert tool.preview() is None
    assert tool.ctx.doc.to_layout() == before and tool.ctx.stack.count() == 0


def test_ends_snap_to_the_grid(qapp) -> None:
    # common practice, no source: with snapping on, each end lands on the nearest 5 mm node
    tool, _ = probe_tool(snap=True)
    drag(tool, (101.2, 49.1), (139.4, 71.3))
    assert tool.segment == ((100.0, 50.0), (140.0, 70.0))


def test_a_click_keeps_the_old_segment_and_escape_removes_it(qapp) -> None:
    tool, seen = probe_tool()
    drag(tool, (0.0, 0.0), (10.0, 0.0))
    drag(tool, (5.0, 5.0), (5.2, 5.0))  # shorter than the 1 mm pick tolerance
    assert tool.segment == ((0.0, 0.0), (10.0, 0.0)) and len(seen) == 1
    tool.press((3.0, 3.0))
    tool.move((8.0, 8.0), True)
    assert tool.key("Escape")  # first Escape: the drag in progress only
    assert tool.preview() is None and tool.segment is not None
    assert tool.key("Escape")
    assert tool.segment is None and seen[-1] is None


def test_the_probe_survives_a_change_of_tool(qapp) -> None:
    tool, _ = probe_tool()
    drag(tool, (0.0, 0.0), (10.0, 0.0))
    tool.deactivate()
    assert tool.segment == ((0.0, 0.0), (10.0, 0.0))


def test_the_probe_is_a_canvas_tool() -> None:
    assert ProbeTool in TOOL_CLASSES
    assert ProbeTool.name == "probe"


@pytest.mark.parametrize("key", ["Delete", "Backspace"])
def test_delete_removes_the_probe(qapp, key: str) -> None:
    tool, _ = probe_tool()
    drag(tool, (0.0, 0.0), (10.0, 0.0))
    assert tool.key(key) and tool.segment is None
