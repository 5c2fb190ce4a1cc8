"""Autosave and recovery: unsaved changes survive a crash or a killed process.

While a window's document has unsaved changes, its content is written to a recovery
file a few seconds after the last change (a single-shot ``QTimer`` restarted by every
change), and at least every ``MAX_WAIT_S`` seconds while changes keep coming (a long
drag).  The write is atomic (``app.atomic_file``), so a crash during it leaves the
previous recovery file whole.  When the document becomes clean again (saved, or edits
undone to the saved state) and when the window closes normally, the file is removed.

Recovery files live in ``<data>/recovery/``, where ``<data>`` is
``platformdirs.user_data_dir("stresslens")`` or ``$STRESSLENS_DATA_DIR`` when set.  A
file is named for the process that wrote it and records that process's id and start
time; at the next start, :meth:`Autosave.offer_recovery` finds files whose writer is
gone and asks (a static ``QMessageBox.question`` call) whether to restore the newest.
"Not now" keeps it for the next start; "Discard" deletes it.

The recovery file format is our own JSON object::

    {"stresslens_recovery": 1, "pid": 4242, "process_start": "123456",
     "saved_at": "2026-12-01T22:50:00+00:00", "original_path": "/x/a.layout.json",
     "layout": {...layout file object, version 1...}}

``layout`` may hold an in-progress, invalid drawing: it is read back with every check
but the geometric ones, so the user can finish the repair in the editor.
"""

from __future__ import annotations

import json
import logging
import os
import sys
from dataclasses import dataclass
from datetime import datetime, timezone
from itertools import count
from pathlib import Path
from time import monotonic

from PySide6.QtCore import QObject, QTimer
from PySide6.QtWidgets import QMessageBox

from solver.layout import Layout, LayoutError, layout_to_json, parse_layout

from .atomic_file import write_atomically
from .user_dirs import ENV, user_folder

DATA_DIR_ENV = ENV["data"]
FORMAT_KEY = "stresslens_recovery"
DELAY_MS = 3000
"""Quiet time after the last change before the recovery file is written (ms)."""
MAX_WAIT_S = 15.0
"""Longest time (s) changes may go unwritten while they keep coming."""

log = logging.getLogger(__name__)
_window_numbers = count(1)


class RecoveryError(OSError):
    """A recovery file could not be written or read; the message names it and why."""


def data_dir() -> Path:
    """``$STRESSLENS_DATA_DIR`` or the platform's per-user data folder for Stresslens."""
    return user_folder("data")


def recovery_dir() -> Path:
    """The folder that holds recovery files."""
    return data_dir() / "recovery"


@dataclass(frozen=True)
class RecoveryFile:
    """A recovery file left by a process that is gone."""

    path: Path
    saved_at: datetime
    original_path: Path | None
    layout: Layout

    def describe(self) -> str:
        """'bus_bar.layout.json, autosaved 2026-12-01 22:50' (local time)."""
        name = self.original_path.name if self.original_path else "an untitled layout"
        return f"{name}, autosaved {self.when()}"

    def when(self) -> str:
        """The time of the autosave, local, to the minute."""
        return self.saved_at.astimezone().strftime("%Y-%m-%d %H:%M")


# ---------------------------------------------------------------------- processes


def process_start(pid: int) -> str | None:
    """The start time of process ``pid`` as the kernel reports it (Linux; else None).

    Stored beside the pid so that a new process that got the same id does not pass for
    the writer of an old file.
    """
    try:
        stat = Path(f"/proc/{pid}/stat").read_text()
    except OSError:
        return None
    return stat.rsplit(")", 1)[-1].split()[19]  # field 22, counted after the name


def process_alive(pid: int, start: str | None = None) -> bool:
    """True while process ``pid`` runs (and, when ``start`` is given and known, it is
    the same process that had that start time)."""
    if pid <= 0:
        return False
    if sys.platform == "win32":
        return _windows_alive(pid)
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except PermissionError:
        return True  # someone else's process
    if start is not None:
        now = process_start(pid)
        return now is None or now == start
    return True


def _windows_alive(pid: int) -> bool:  # pragma: no cover - not run on Linux CI
    import ctypes

    kernel32 = ctypes.windll.kernel32  # type: ignore[attr-defined]
    handle = kernel32.OpenProcess(0x1000, False, pid)  # PROCESS_QUERY_LIMITED_INFORMATION
    if not handle:
        return False
    code = ctypes.c_ulong()
    ok = kernel32.GetExitCodeProcess(handle, ctypes.byref(code))
    kernel32.CloseHandle(handle)
    return bool(ok) and code.value == 259  # STILL_ACTIVE


# ---------------------------------------------------------------------- files


def write_recovery(path: Path, layout: Layout, original: Path | None) -> None:
    """Write the recovery object for ``layout`` to ``path`` atomically."""
    obj = {FORMAT_KEY: 1, "pid": os.getpid(), "process_start": process_start(os.getpid()),
           "saved_at": datetime.now(timezone.utc).isoformat(timespec="seconds"),
           "original_path": str(original) if original else None,
           "layout": layout_to_json(layout)}
    text = json.dumps(obj, indent=1, allow_nan=False)
    path.parent.mkdir(parents=True, exist_ok=True)
    write_atomically(path, lambda f: f.write(text), text=True, error=RecoveryError)


def read_recovery(path: Path) -> RecoveryFile:
    """Read a recovery file; :class:`RecoveryError` names the file and the problem."""
    try:
        obj = json.loads(path.read_bytes().decode("utf-8"))
        if not isinstance(obj, dict) or obj.get(FORMAT_KEY) != 1:
            raise ValueError("not a Stresslens recovery file of version 1")
        saved = datetime.fromisoformat(str(obj["saved_at"]))
        original = Path(obj["original_path"]) if obj.get("original_path") else None
        layout = parse_layout(obj["layout"], check_geometry=False)
    except (OSError, UnicodeDecodeError, ValueError, KeyError, TypeError, RecursionError,
            LayoutError) as exc:
        raise RecoveryError(f"{path}: {exc}") from None
    return RecoveryFile(path, saved, original, layout)


def orphaned_files(folder: Path | None = None, own: set[Path] | None = None
                   ) -> list[RecoveryFile]:
    """Readable recovery files whose writing process is gone, newest first.

    Unreadable ones are logged and left where they are (never deleted unasked).
    """
    folder = folder or recovery_dir()
    out = []
    for path in sorted(folder.glob("recovery-*.json")) if folder.is_dir() else []:
        if own and path in own:
            continue
        try:
            head = json.loads(path.read_text(encoding="utf-8"))
            pid, start = int(head.get("pid", -1)), head.get("process_start")
        except (OSError, ValueError, AttributeError, TypeError):
            pid, start = -1, None
        if pid != os.getpid() and process_alive(pid, start):
            continue  # another running Stresslens owns it
        try:
            out.append(read_recovery(path))
        except RecoveryError as exc:
            log.warning("recovery file skipped: %s", exc)
    return sorted(out, key=lambda r: r.saved_at, reverse=True)


# ---------------------------------------------------------------------- the watcher


class Autosave(QObject):
    """Keeps the recovery file of one window's document up to date.

    ``window`` is a :class:`app.main_window.MainWindow` (its ``doc``, ``show_message``
    and ``closed`` are used).  ``delay_ms`` is the quiet time before a write.
    """

    def __init__(self, window, delay_ms: int = DELAY_MS, folder: Path | None = None) -> None:  # noqa: ANN001
        super().__init__(window)
        self.window, self.doc = window, window.doc
        self.folder = folder or recovery_dir()
        self.path = self.folder / f"recovery-{os.getpid()}-{next(_window_numbers)}.json"
        self.max_wait_s = MAX_WAIT_S
        self.writes = 0
        self._first_unsaved: float | None = None
        self._failed_once = False
        self.delay_ms = delay_ms
        self._timer = QTimer(self)
        self._timer.setSingleShot(True)
        self._timer.timeout.connect(self.write_now)
        self.doc.changed.connect(self._on_changed)
        self.doc.dirty_changed.connect(self._on_dirty)
        self._watching = True
        closed = getattr(window, "closed", None)
        if closed is not None:
            closed.connect(self.finish)

    def _on_changed(self, _revision: int) -> None:
        if not self.doc.dirty:
            return
        now = monotonic()
        if self._first_unsaved is None:
            self._first_unsaved = now
        left_ms = int(1000 * (self._first_unsaved + self.max_wait_s - now))
        self._timer.start(max(0, min(self.delay_ms, left_ms)))

    def _on_dirty(self, dirty: bool) -> None:
        if not dirty:
            self._timer.stop()
            self._first_unsaved = None
            self.remove()

    def write_now(self) -> bool:
        """Write the recovery file now if there are unsaved changes; False on failure.

        A failure is logged and shown once in the status bar; it never interrupts work.
        """
        self._first_unsaved = None
        if not self.doc.dirty:
            self.remove()
            return True
        try:
            write_recovery(self.path, self.doc.snapshot(), self.doc.path)
        except (RecoveryError, OSError, ValueError) as exc:
            log.warning("autosave failed: %s", exc)
            if not self._failed_once:
                self._failed_once = True
                self.window.show_message(f"Autosave failed: {exc}")
            return False
        self.writes += 1
        self._failed_once = False
        log.debug("autosaved to %s", self.path)
        return True

    def remove(self) -> None:
        """Delete this window's recovery file (nothing left to recover)."""
        try:
            self.path.unlink(missing_ok=True)
        except OSError as exc:
            log.warning("could not remove %s: %s", self.path, exc)

    def finish(self) -> None:
        """The window closed normally (or a script wants no autosave): stop watching
        and remove the recovery file."""
        if self._watching:
            self._watching = False
            self.doc.changed.disconnect(self._on_changed)
            self.doc.dirty_changed.disconnect(self._on_dirty)
        self._timer.stop()
        self.remove()

    # ------------------------------------------------------------------ recovery

    def offer_recovery(self) -> bool:
        """Ask about the newest recovery file a crashed session left; True if restored.

        Yes restores it into this window's document (marked unsaved, with the file it
        came from as its path); No keeps it for the next start; Discard deletes it.
        """
        found = orphaned_files(self.folder, own={self.path})
        if not found:
            return False
        rec = found[0]
        where = (f"{rec.original_path.name} (in {rec.original_path.parent})"
                 if rec.original_path else "an untitled layout")
        more = (f"\n\n({len(found) - 1} older recovery file(s) will be offered next time.)"
                if len(found) > 1 else "")
        SB = QMessageBox.StandardButton
        answer = QMessageBox.question(
            self.window, "Recover unsaved work",
            f"Stresslens did not close normally last time, and unsaved changes were "
            f"kept:\n\n    {where}\n    autosaved {rec.when()}\n\nYes restores them. "
            f"No keeps them for next time. Discard deletes them.{more}",
            SB.Yes | SB.No | SB.Discard, SB.Yes)
        if answer == SB.Discard:
            rec.path.unlink(missing_ok=True)
            return False
        if answer != SB.Yes:
            return False
        self.doc.load(rec.layout, rec.original_path)
        self.doc.mark_unsaved()
        if self.write_now():  # our own copy first, then the old one may go
            rec.path.unlink(missing_ok=True)
        self.window.show_message(f"Restored {rec.describe()}: save it to keep it.")
        log.info("restored %s", rec.path)
        return True


def attach_autosave(window, delay_ms: int = DELAY_MS) -> Autosave:  # noqa: ANN001
    """Give ``window`` an autosave (also kept as ``window.autosave``); return it."""
    window.autosave = Autosave(window, delay_ms)
    return window.autosave
