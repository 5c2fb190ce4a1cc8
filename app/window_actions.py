"""Menus, tool bars and keyboard shortcuts of the editor window.

Shortcuts follow the platform's standard keys where one exists (New, Open, Save, Undo,
Delete, zoom); the drawing tools have single-letter keys of our own.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import replace
from typing import TYPE_CHECKING

from PySide6.QtCore import Qt
from PySide6.QtGui import QAction, QActionGroup, QGuiApplication, QIcon, QKeySequence
from PySide6.QtWidgets import QComboBox, QInputDialog, QLabel, QToolBar

from solver.layout import KINDS, LayoutError

from . import shape_edit as se
from .about import show_about
from .clipboard import parts_from_text, parts_to_text
from .commands import (
    AddPartsCommand,
    DuplicatePartsCommand,
    MirrorPartsCommand,
    RemovePartsCommand,
)
from .help_keys import show_keys
from .icons import icon
from .panels.fields import NumberField
from .tools.vertex import VertexTool

if TYPE_CHECKING:
    from .main_window import MainWindow

TOOL_KEYS = {"select": ("select", "S"), "vertex": ("vertex", "E"),
             "rectangle": ("rectangle", "B"), "circle": ("circle", "C"),
             "ellipse": ("ellipse", "L"), "polygon": ("polygon", "P"), "path": ("path", "W"),
             "hole": ("hole", "H"), "probe": ("probe", "M")}
Std = QKeySequence.StandardKey


def _action(w: MainWindow, text: str, slot: Callable[[], object],
            icon_name: str | None = None,
            key: QKeySequence | QKeySequence.StandardKey | str | None = None,
            tip: str | None = None) -> QAction:
    a = QAction(icon(icon_name) if icon_name else QIcon(), text, w)
    if key is not None:
        a.setShortcut(QKeySequence(key))
    a.setToolTip(tip or text.replace("&", "").replace("\u2026", ""))
    a.triggered.connect(lambda _checked=False: slot())
    return a


def build_actions(w: MainWindow) -> dict[str, QAction]:
    """Create every action, menu and tool bar of ``w``; return the actions by name."""
    acts = _file_actions(w) | _edit_actions(w) | _view_actions(w) | _tool_actions(w)
    acts["about"] = _action(w, "&About Stresslens", lambda: show_about(w), "about")
    acts["keys"] = _action(w, "&Keys and mouse\u2026", lambda: show_keys(w), "keys", "F1")
    _menus(w, acts)
    _toolbars(w, acts)
    _lock_during_drags(w, acts)
    return acts


EDITS = ("new", "open", "cut", "paste", "duplicate", "delete", "mirror_v", "mirror_h",
         "corner", "select_all")


def _lock_during_drags(w: MainWindow, acts: dict[str, QAction]) -> None:
    """Edits that add, remove or replace parts wait until a drag in progress ends."""
    def on_drag(dragging: bool) -> None:
        for name in EDITS:
            acts[name].setEnabled(not dragging)
    w.doc.interaction_changed.connect(on_drag)


def _file_actions(w: MainWindow) -> dict[str, QAction]:
    return {
        "new": _action(w, "&New layout", w.files.new, "new", Std.New),
        "open": _action(w, "&Open\u2026", w.files.open, "open", Std.Open),
        "save": _action(w, "&Save", w.files.save, "save", Std.Save),
        "save_as": _action(w, "Save &as\u2026", w.files.save_as, "save_as", Std.SaveAs),
        "quit": _action(w, "&Quit", w.close, "quit", Std.Quit),
    }


def _edit_actions(w: MainWindow) -> dict[str, QAction]:
    undo = w.stack.createUndoAction(w, "&Undo")
    undo.setIcon(icon("undo"))
    undo.setShortcut(QKeySequence(Std.Undo))
    redo = w.stack.createRedoAction(w, "&Redo")
    redo.setIcon(icon("redo"))
    redo.setShortcut(QKeySequence(Std.Redo))

    def during_drag(dragging: bool) -> None:  # no undo under a drag in progress
        undo.setEnabled(not dragging and w.stack.canUndo())
        redo.setEnabled(not dragging and w.stack.canRedo())
    w.doc.interaction_changed.connect(during_drag)
    return {
        "undo": undo, "redo": redo,
        "cut": _action(w, "Cu&t", lambda: copy_parts(w, cut=True), "cut", Std.Cut),
        "copy": _action(w, "&Copy", lambda: copy_parts(w), "copy", Std.Copy),
        "paste": _action(w, "&Paste", lambda: paste_parts(w), "paste", Std.Paste),
        "duplicate": _action(w, "D&uplicate", lambda: duplicate(w), "duplicate", "Ctrl+D"),
        "delete": _action(w, "&Delete", lambda: delete(w), "delete", Std.Delete),
        "mirror_v": _action(w, "Mirror &left-right", lambda: mirror(w, True),
                            "mirror_vertical", "Ctrl+Shift+M",
                            "Mirror the selection about a vertical line through its centre"),
        "mirror_h": _action(w, "Mirror &up-down", lambda: mirror(w, False),
                            "mirror_horizontal", "Ctrl+Alt+M",
                            "Mirror the selection about a horizontal line through its centre"),
        "corner": _action(w, "Corner &radius\u2026", lambda: corner_radius(w), "corner_radius",
                          "Shift+R", "Round the corner at the current vertex (Edit outline)"),
        "select_all": _action(w, "Select &all", lambda: w.selection.set(w.doc.ids()), "select_all",
                              Std.SelectAll),
    }


def _view_actions(w: MainWindow) -> dict[str, QAction]:
    snap = _action(w, "S&nap to grid and parts", lambda: None, "snap", "Ctrl+G")
    snap.setCheckable(True)
    snap.setChecked(w.snapper.enabled)
    snap.toggled.connect(lambda on: setattr(w.snapper, "enabled", on))
    return {
        "zoom_fit": _action(w, "Zoom to &fit", w.canvas.zoom_to_fit, "zoom_fit", "Ctrl+0"),
        "zoom_in": _action(w, "Zoom &in", lambda: w.canvas.zoom_by(1.25), "zoom_in", Std.ZoomIn),
        "zoom_out": _action(w, "Zoom &out", lambda: w.canvas.zoom_by(0.8), "zoom_out",
                            Std.ZoomOut),
        "snap": snap,
    }


def _tool_actions(w: MainWindow) -> dict[str, QAction]:
    group = QActionGroup(w)
    group.setExclusive(True)
    acts = {}
    for name, tool in w.canvas.tools.items():
        icon_name, key = TOOL_KEYS[name]
        a = _action(w, tool.label, lambda n=name: w.canvas.set_tool(n), icon_name, key,
                    f"{tool.label} ({key}): {tool.hint}")
        a.setCheckable(True)
        group.addAction(a)
        acts[f"tool_{name}"] = a
    acts["tool_select"].setChecked(True)
    w.canvas.tool_changed.connect(lambda n: acts[f"tool_{n}"].setChecked(True))
    return acts


def _menus(w: MainWindow, a: dict[str, QAction]) -> None:
    bar = w.menuBar()
    m = bar.addMenu("&File")
    m.addActions([a["new"], a["open"]])
    w.recent_menu = m.addMenu("Open &recent")
    w.recent_menu.aboutToShow.connect(lambda: _fill_recent(w))
    m.addActions([a["save"], a["save_as"]])
    m.addSeparator()
    m.addAction(a["quit"])
    m = bar.addMenu("&Edit")
    m.addActions([a["undo"], a["redo"]])
    m.addSeparator()
    m.addActions([a["cut"], a["copy"], a["paste"]])
    m.addSeparator()
    m.addActions([a["duplicate"], a["delete"], a["mirror_v"], a["mirror_h"], a["corner"]])
    m.addSeparator()
    m.addAction(a["select_all"])
    m = bar.addMenu("&Draw")
    m.addActions([a[k] for k in a if k.startswith("tool_")])
    m = bar.addMenu("&View")
    m.addActions([a["zoom_fit"], a["zoom_in"], a["zoom_out"]])
    m.addSeparator()
    m.addAction(a["snap"])
    w.view_menu = m
    bar.addMenu("&Help").addActions([a["keys"], a["about"]])


def _fill_recent(w: MainWindow) -> None:
    w.recent_menu.clear()
    recent = w.files.recent()
    for path in recent:
        w.recent_menu.addAction(path, lambda p=path: w.files.open(p))
    if not recent:
        w.recent_menu.addAction("(none yet)").setEnabled(False)


def _toolbars(w: MainWindow, a: dict[str, QAction]) -> None:
    main = QToolBar("File and view", w)
    main.setObjectName("file_toolbar")
    main.addActions([a["new"], a["open"], a["save"]])
    main.addSeparator()
    main.addActions([a["undo"], a["redo"]])
    main.addSeparator()
    main.addActions([a["duplicate"], a["delete"], a["mirror_v"], a["mirror_h"], a["corner"]])
    main.addSeparator()
    main.addActions([a["zoom_fit"], a["snap"]])
    w.addToolBar(Qt.ToolBarArea.TopToolBarArea, main)
    tools = QToolBar("Drawing tools", w)
    tools.setObjectName("tools_toolbar")
    tools.addActions([a[k] for k in a if k.startswith("tool_")])
    w.addToolBar(Qt.ToolBarArea.TopToolBarArea, tools)
    w.addToolBar(Qt.ToolBarArea.TopToolBarArea, _options_bar(w))


def _options_bar(w: MainWindow) -> QToolBar:
    bar = QToolBar("New part options", w)
    bar.setObjectName("options_toolbar")
    opts = w.ctx.options
    kind = QComboBox()
    kind.addItems([k.capitalize() for k in KINDS])
    kind.setToolTip("Kind of the next part drawn")
    kind.currentIndexChanged.connect(lambda i: setattr(opts, "new_kind", KINDS[i]))
    radius = NumberField("mm", lambda v: setattr(opts, "corner_radius_mm", v), decimals=2,
                         lo=0.0, hi=1e4, step=0.5)
    radius.setToolTip("Corner radius of new rectangles")
    width = NumberField("mm", lambda v: setattr(opts, "path_width_mm", v), decimals=2,
                        lo=0.01, hi=1e4, step=0.5)
    width.setToolTip("Width of new wires")
    radius.show_value(opts.corner_radius_mm)
    width.show_value(opts.path_width_mm)
    for label, widget in (("New part:", kind), ("  Corner radius", radius),
                          ("  Wire width", width)):
        bar.addWidget(QLabel(label))
        bar.addWidget(widget)
    w.kind_combo = kind
    return bar


# ---------------------------------------------------------------------- edit commands


def delete(w: MainWindow) -> None:
    """Delete: the current tool first (a vertex, a clicked point), else the selected parts."""
    if w.canvas.tool.name != "select" and w.canvas.tool.key("Delete"):
        return
    if w.selection.ids:
        w.ctx.push(lambda: RemovePartsCommand(w.doc, w.selection.ids))


def copy_parts(w: MainWindow, cut: bool = False) -> None:
    """Put the selected parts on the clipboard as layout JSON (and delete them for Cut)."""
    ids = w.selection.ids
    if not ids:
        w.show_message("Copy: select the parts to copy first")
        return
    QGuiApplication.clipboard().setText(parts_to_text(w.doc.part(i) for i in ids))
    if cut:
        w.ctx.push(lambda: RemovePartsCommand(w.doc, ids))
    w.show_message(f"{'Cut' if cut else 'Copied'} {len(ids)} part(s)")


def paste_parts(w: MainWindow) -> None:
    """Add the parts on the clipboard (one undo step), offset when they would cover
    identical parts, and select them."""
    try:
        parts = parts_from_text(QGuiApplication.clipboard().text())
    except LayoutError as exc:
        w.show_message(f"Paste: {exc}")
        return
    shapes = {p.shape for _, p in w.doc.parts()}
    if any(p.shape in shapes for p in parts):
        d = 5 * w.snapper.grid_mm
        parts = [replace(p, shape=se.translated(p.shape, d, d)) for p in parts]
    cmd = w.ctx.push(lambda: AddPartsCommand(w.doc, parts, f"Paste {len(parts)} part(s)"))
    if isinstance(cmd, AddPartsCommand):
        w.selection.set(cmd.new_ids)


def duplicate(w: MainWindow) -> None:
    """Copy the selected parts five grid steps up and to the right, and select the copies."""
    if not w.selection.ids:
        w.show_message("Duplicate: select the parts to copy first")
        return
    d = 5 * w.snapper.grid_mm
    cmd = w.ctx.push(lambda: DuplicatePartsCommand(w.doc, w.selection.ids, d, d))
    if isinstance(cmd, DuplicatePartsCommand):
        w.selection.set(cmd.new_ids)


def mirror(w: MainWindow, vertical_line: bool) -> None:
    """Mirror the selection about its centre line; in axisymmetry only up-down."""
    if not w.selection.ids:
        w.show_message("Mirror: select the parts to mirror first")
        return
    if vertical_line and w.doc.settings.symmetry == "axisymmetric":
        w.show_message("Mirror: in an axisymmetric layout x is the radius; only up-down "
                       "mirroring keeps the parts at r >= 0")
        return
    w.ctx.push(lambda: MirrorPartsCommand(w.doc, w.selection.ids, vertical_line))


def corner_radius(w: MainWindow) -> None:
    """Ask for the corner radius (mm) of the current vertex of the Edit outline tool."""
    tool = w.canvas.tools["vertex"]
    assert isinstance(tool, VertexTool)
    current = tool.current_radius()
    if w.canvas.tool is not tool or current is None:
        w.canvas.set_tool("vertex")
        w.show_message("Corner radius: click a corner with Edit outline, then press Shift+R")
        return
    value, ok = QInputDialog.getDouble(w, "Corner radius", "Radius of this corner (mm):",
                                       current, 0.0, 1e4, 3)
    if ok:
        tool.set_corner_radius(value)
