"""Which parts are selected: a small Qt-free model the canvas and panels share."""

from __future__ import annotations

from collections.abc import Iterable

from psygnal import Signal

from .document import Document


class Selection:
    """An ordered set of part ids; emits ``changed`` when it changes.

    Removed parts leave the selection; a reset document clears it.
    """

    changed = Signal()

    def __init__(self, doc: Document) -> None:
        self.doc = doc
        self._ids: list[int] = []
        doc.part_removed.connect(self._on_part_removed)
        doc.reset.connect(self.clear)

    @property
    def ids(self) -> list[int]:
        return list(self._ids)

    def __contains__(self, pid: object) -> bool:
        return pid in self._ids

    def __len__(self) -> int:
        return len(self._ids)

    def set(self, ids: Iterable[int]) -> None:
        new = [i for i in dict.fromkeys(ids) if i in self.doc]
        if new != self._ids:
            self._ids = new
            self.changed.emit()

    def add(self, ids: Iterable[int]) -> None:
        self.set([*self._ids, *ids])

    def toggle(self, pid: int) -> None:
        self.set([i for i in self._ids if i != pid] if pid in self._ids else [*self._ids, pid])

    def clear(self) -> None:
        self.set([])

    def _on_part_removed(self, pid: int) -> None:
        if pid in self._ids:
            self.set([i for i in self._ids if i != pid])
