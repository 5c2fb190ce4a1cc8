"""The solver process of the live view: one worker process, shared by every window.

Solving in a thread of the GUI process is not enough: some library calls (SuperLU's
factorisation in scipy, for one) hold Python's global interpreter lock for 100-200 ms,
and the GUI froze for as long.  So the solve runs in a separate process, started with
``spawn`` (no forked copy of Qt or of threads) and with one BLAS thread; the runner's
worker thread waits on it, which costs the GUI nothing.

Robustness: the process ends itself as soon as the program that started it is gone
(killed or crashed), so no orphan keeps its terminal or pipes open.  When it cannot be
started (a script without the ``if __name__ == "__main__"`` guard that ``spawn``
needs) or dies, the solve runs in the calling thread instead, and after two failures in
a row every later one does: slower to give way to the GUI, but the user gets results.
"""

from __future__ import annotations

import logging
import multiprocessing
import os
import threading
import time
from collections.abc import Callable
from concurrent.futures import ProcessPoolExecutor
from concurrent.futures.process import BrokenProcessPool
from typing import TypeVar

from solver.executors import one_blas_thread

R = TypeVar("R")

log = logging.getLogger(__name__)

_SOLVER_PROCESS: ProcessPoolExecutor | None = None
_IN_THREAD = False
"""Set when no solver process can be started: solves then run in the worker thread."""
_PROCESS_LOCK = threading.Lock()
_FAILURES = [0]


def solver_process() -> ProcessPoolExecutor:
    """The shared solver process (started on first use, with one BLAS thread)."""
    global _SOLVER_PROCESS
    with _PROCESS_LOCK:
        if _SOLVER_PROCESS is None:
            _SOLVER_PROCESS = ProcessPoolExecutor(
                max_workers=1, mp_context=multiprocessing.get_context("spawn"),
                initializer=_start_solver_process, initargs=(os.getpid(),))
        return _SOLVER_PROCESS


def in_solver_process(fn: Callable[..., R], *args: object) -> R:
    """``fn(*args)`` run in the solver process; blocks the calling (worker) thread only.

    When the process cannot start (a script without the ``if __name__ == "__main__"``
    guard that ``spawn`` needs) or dies, it is dropped and this solve, like the later
    ones after a second failure, runs here in the worker thread instead: slower to
    give way to the GUI, but the user gets the result.
    """
    global _SOLVER_PROCESS, _IN_THREAD
    if not _IN_THREAD:
        try:
            # a RuntimeError from submit is spawn refusing; one from result() is the
            # solve's own error and passes through like any other
            result = solver_process().submit(fn, *args).result()
            _FAILURES[0] = 0
            return result
        except BrokenProcessPool as exc:
            _dropped(exc)
        except RuntimeError as exc:
            if not _is_spawn_refusal(exc):
                raise
            _dropped(exc)
    return fn(*args)


def _dropped(exc: BaseException) -> None:
    global _SOLVER_PROCESS, _IN_THREAD
    with _PROCESS_LOCK:
        _FAILURES[0] += 1
        _IN_THREAD = _FAILURES[0] >= 2
        _SOLVER_PROCESS = None
    log.warning("solver process unavailable (%s); solving in a thread", _first_line(exc))


def _is_spawn_refusal(exc: RuntimeError) -> bool:
    return "bootstrapping phase" in str(exc) or "cannot schedule new futures" in str(exc)


def warm_up() -> None:
    """Start the solver process and import the solver there, ahead of the first solve.

    Called in a spawned process (which happens when a script without the ``__main__``
    guard is run again there as it starts), it raises, so that process ends at once
    instead of running the script's window hidden; the parent then solves in a thread.
    """
    if multiprocessing.parent_process() is not None:
        raise RuntimeError("a live view is being built inside a spawned process: the "
                           "script that started Stresslens needs an "
                           "'if __name__ == \"__main__\"' guard")
    if not _IN_THREAD:
        solver_process().submit(_import_solver)


def _start_solver_process(parent_pid: int) -> None:
    """Set-up of the solver process: one BLAS thread, and a watch that ends it as soon
    as the program that started it is gone (killed, crashed), so no orphan is left
    holding its terminal or pipes."""
    one_blas_thread()

    def watch() -> None:
        while os.getppid() == parent_pid:
            time.sleep(0.5)
        os._exit(0)

    threading.Thread(target=watch, name="parent-watch", daemon=True).start()


def _first_line(exc: BaseException) -> str:
    text = str(exc).strip()
    return text.splitlines()[0] if text else type(exc).__name__


def _import_solver() -> None:
    import solver  # noqa: F401 - the import is the work
