"""The editable layout: a Qt-free document model that emits events.

The document holds what a layout file holds, in an editable form: an ordered list of
parts, each a frozen :class:`solver.layout.Part` (replaced, never mutated, on every
edit) under a stable integer id, and the layout-wide :class:`Settings`.  Views
subscribe to its psygnal signals; undo commands (``app.commands``) are the only
callers of its mutating methods apart from tools previewing a drag.

The document may hold an invalid, in-progress state (two conductors touching while the
user drags, a corner radius too large for its edge).  :meth:`Document.to_layout`
validates through the file parser, so the snapshot handed to the solver is exactly what
saving and re-opening the file would give, and :meth:`Document.problem` gives the
message for the status bar instead of raising.

Units as in the layout format: millimetres, volts, C/m (planar) or C (axisymmetric).
"""

from __future__ import annotations

import re
from collections.abc import Iterable, Iterator
from dataclasses import dataclass, field, replace
from pathlib import Path

from psygnal import Signal

from solver.layout import (
    Boundary,
    FixedLimit,
    Layout,
    LayoutError,
    Limit,
    Part,
    Resolution,
    Symmetry,
    layout_to_json,
    parse_layout,
)


@dataclass(frozen=True)
class Settings:
    """Layout-wide settings: everything in a layout except the parts."""

    title: str = ""
    symmetry: Symmetry = "planar"
    boundary: Boundary = field(default_factory=Boundary)
    limit: Limit = field(default_factory=FixedLimit)
    resolution: Resolution = "normal"

    @classmethod
    def of(cls, layout: Layout) -> Settings:
        """The settings of an existing layout."""
        return cls(title=layout.title, symmetry=layout.symmetry, boundary=layout.boundary,
                   limit=layout.limit, resolution=layout.resolution)


class Document:
    """An editable layout with stable part ids, a dirty flag and a revision counter.

    Signals
    -------
    part_added(id), part_removed(id), part_changed(id): one part.
    settings_changed(): the layout-wide settings.
    changed(revision): after every change of content, once per change.
    reset(): the whole content was replaced (new or opened file).
    dirty_changed(bool), path_changed(str).
    interaction_changed(bool): a drag started (True) or ended (False); a live solver
        may use a coarse grid while it is True.
    """

    part_added = Signal(int)
    part_removed = Signal(int)
    part_changed = Signal(int)
    settings_changed = Signal()
    changed = Signal(int)
    reset = Signal()
    dirty_changed = Signal(bool)
    path_changed = Signal(str)
    interaction_changed = Signal(bool)

    def __init__(self, layout: Layout | None = None, path: str | Path | None = None) -> None:
        self._parts: dict[int, Part] = {}
        self._order: list[int] = []
        self._next_id = 1
        self._settings = Settings()
        self._path: Path | None = None
        self._saved: tuple[tuple[Part, ...], Settings] | None = ((), Settings())
        self._was_dirty = False
        self._interacting = False
        self._problem_cache: tuple[int, str | None] = (-1, None)
        self.revision = 0
        if layout is not None:
            self.load(layout, path)

    # ------------------------------------------------------------------ reading

    @property
    def settings(self) -> Settings:
        return self._settings

    @property
    def path(self) -> Path | None:
        return self._path

    @property
    def dirty(self) -> bool:
        """True when the content differs from what was last loaded or saved."""
        return self._content() != self._saved

    @property
    def interacting(self) -> bool:
        return self._interacting

    def ids(self) -> list[int]:
        """Part ids in layout order (later parts are drawn on top)."""
        return list(self._order)

    def part(self, pid: int) -> Part:
        return self._parts[pid]

    def parts(self) -> Iterator[tuple[int, Part]]:
        return ((pid, self._parts[pid]) for pid in self._order)

    def index(self, pid: int) -> int:
        return self._order.index(pid)

    def __contains__(self, pid: object) -> bool:
        return pid in self._parts

    def __len__(self) -> int:
        return len(self._order)

    def id_of(self, name: str) -> int | None:
        """The id of the part called ``name``, or None."""
        for pid, p in self.parts():
            if p.name == name:
                return pid
        return None

    def unique_name(self, base: str, taken: Iterable[str] = ()) -> str:
        """``base`` if no part (and nothing in ``taken``) has that name, else ``base 2``, ..."""
        names = {p.name for p in self._parts.values()} | set(taken)
        if base not in names:
            return base
        stem = re.sub(r"\s+\d+$", "", base) or base
        n = 2
        while f"{stem} {n}" in names:
            n += 1
        return f"{stem} {n}"

    def snapshot(self) -> Layout:
        """The current content as a :class:`Layout`, *not* validated."""
        s = self._settings
        return Layout(parts=tuple(self._parts[i] for i in self._order), title=s.title,
                      symmetry=s.symmetry, boundary=s.boundary, limit=s.limit,
                      resolution=s.resolution)

    def to_json(self) -> dict:
        """The layout-file JSON object of the current content (format v1)."""
        return layout_to_json(self.snapshot())

    def to_layout(self) -> Layout:
        """The validated, immutable layout; raises :class:`LayoutError` when invalid.

        Runs the file parser on the serialised content, so the result equals what
        saving and re-opening would give.
        """
        return parse_layout(self.to_json())

    def problem(self) -> str | None:
        """The LayoutError message of the current content, or None when it is valid."""
        if self._problem_cache[0] != self.revision:
            try:
                self.to_layout()
                msg = None
            except LayoutError as exc:
                msg = str(exc)
            self._problem_cache = (self.revision, msg)
        return self._problem_cache[1]

    # ------------------------------------------------------------------ editing

    def insert_part(self, part: Part, index: int | None = None, pid: int | None = None) -> int:
        """Insert ``part`` at ``index`` (default: on top); return its id.

        ``pid`` re-uses an id (undo of a removal); a new id is drawn otherwise.
        """
        if pid is None:
            pid = self._next_id
        if pid in self._parts:
            raise ValueError(f"part id {pid} is already in use")
        self._next_id = max(self._next_id, pid + 1)
        self._parts[pid] = part
        self._order.insert(len(self._order) if index is None else index, pid)
        self.part_added.emit(pid)
        self._touch()
        return pid

    def remove_part(self, pid: int) -> tuple[int, Part]:
        """Remove a part; return (its index, the part) so it can be re-inserted."""
        index = self._order.index(pid)
        self._order.pop(index)
        part = self._parts.pop(pid)
        self.part_removed.emit(pid)
        self._touch()
        return index, part

    def replace_part(self, pid: int, part: Part) -> None:
        """Replace the part with id ``pid`` (no signal when nothing changed)."""
        if self._parts[pid] == part:
            return
        self._parts[pid] = part
        self.part_changed.emit(pid)
        self._touch()

    def set_settings(self, settings: Settings) -> None:
        if settings == self._settings:
            return
        self._settings = settings
        self.settings_changed.emit()
        self._touch()

    def update_settings(self, **changes: object) -> None:
        """Replace some fields of the settings (``dataclasses.replace`` semantics)."""
        self.set_settings(replace(self._settings, **changes))

    def set_interacting(self, on: bool) -> None:
        """Mark the start (True) or end (False) of a drag."""
        if on != self._interacting:
            self._interacting = on
            self.interaction_changed.emit(on)

    # ------------------------------------------------------------------ whole content

    def load(self, layout: Layout, path: str | Path | None = None) -> None:
        """Replace the whole content with ``layout`` (marked clean)."""
        self._parts.clear()
        self._order.clear()
        for part in layout.parts:
            pid = self._next_id
            self._next_id += 1
            self._parts[pid] = part
            self._order.append(pid)
        self._settings = Settings.of(layout)
        self._saved = self._content()
        self.set_path(path)
        self.reset.emit()
        self._touch()

    def clear(self) -> None:
        """An empty, clean, untitled document."""
        self.load(Layout(parts=()), None)

    def set_path(self, path: str | Path | None) -> None:
        self._path = Path(path) if path is not None else None
        self.path_changed.emit(str(self._path or ""))

    def mark_unsaved(self) -> None:
        """Record that the current content is on no disk (restored from a recovery
        file): it stays dirty until saved."""
        self._saved = None
        self._emit_dirty()

    def mark_saved(self, path: str | Path) -> None:
        """Record that the current content was written to ``path``."""
        self._saved = self._content()
        self.set_path(path)
        self._emit_dirty()

    # ------------------------------------------------------------------ internals

    def _content(self) -> tuple[tuple[Part, ...], Settings]:
        return tuple(self._parts[i] for i in self._order), self._settings

    def _touch(self) -> None:
        self.revision += 1
        self.changed.emit(self.revision)
        self._emit_dirty()

    def _emit_dirty(self) -> None:
        d = self.dirty
        if d != self._was_dirty:
            self._was_dirty = d
            self.dirty_changed.emit(d)
