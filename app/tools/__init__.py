"""Canvas tools, one class per tool; ``TOOL_CLASSES`` lists them in tool-bar order."""

from __future__ import annotations

from .base import Preview, Tool, ToolContext, ToolOptions
from .click_points import HoleTool, PathTool, PolygonTool
from .drag_shape import CircleTool, EllipseTool, RectangleTool
from .probe import ProbeTool
from .select import SelectTool
from .vertex import VertexTool

TOOL_CLASSES: tuple[type[Tool], ...] = (SelectTool, VertexTool, RectangleTool, CircleTool,
                                         EllipseTool, PolygonTool, PathTool, HoleTool,
                                         ProbeTool)

__all__ = ["TOOL_CLASSES", "Preview", "Tool", "ToolContext", "ToolOptions", "SelectTool",
           "VertexTool", "RectangleTool", "CircleTool", "EllipseTool", "PolygonTool",
           "PathTool", "HoleTool", "ProbeTool"]
