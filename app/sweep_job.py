"""The sweep dialog's background job: run one callable off the GUI thread.

``Job`` calls ``work(progress, cancelled)`` on a ``QThreadPool`` thread and emits the
result (or the exception it raised) through a :class:`JobSignals` that lives in the
GUI thread, so the connections are queued and no widget is touched off that thread.
"""

from __future__ import annotations

import logging
import threading
from collections.abc import Callable
from typing import Any

from PySide6.QtCore import QObject, QRunnable, Signal


class JobSignals(QObject):
    """Lives in the GUI thread; the worker emits through it (queued to the GUI)."""

    progress = Signal(int, int)
    finished = Signal(object)


class Job(QRunnable):
    """Runs ``work(progress, cancelled)`` and emits its result (or the exception)."""

    def __init__(self, work: Callable[..., Any], signals: JobSignals,
                 cancel: threading.Event) -> None:
        super().__init__()
        self.work, self.signals, self.cancel = work, signals, cancel

    def run(self) -> None:
        try:
            out: Any = self.work(lambda d, n: self.signals.progress.emit(d, n),
                                 self.cancel.is_set)
        except Exception as exc:  # noqa: BLE001 - shown to the user, never swallowed
            logging.getLogger(__name__).exception("sweep failed")  # details to the log file
            out = exc
        self.signals.finished.emit(out)
