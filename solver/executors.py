"""Where the steps of a sweep run: in this process, in local worker processes, on Dask.

An executor maps a picklable, module-level function over a list of items and yields
``(index, result)`` pairs as results arrive, so a caller can show progress and stop
early.  Every executor solves each step with one BLAS thread: the solver's vectors are
small, and on a machine with a few cores threads only fight each other.

``make_executor(spec)`` builds one from a command-line word:

* ``serial``: one step after the other in this process;
* ``processes`` or ``processes:N``: N local worker processes (default: the usable
  cores), started with the ``spawn`` method (no forked copy of a GUI or of threads)
  and fed chunks of a few steps so the per-task overhead stays small;
* ``dask:ADDRESS``: a Dask cluster (``tcp://host:8786``); needs the optional extra
  ``stresslens[dask]`` here *and* Stresslens installed on the workers.
"""

from __future__ import annotations

import logging
import math
import os
from collections.abc import Callable, Iterator, Sequence
from typing import Any, Protocol, TypeVar

log = logging.getLogger(__name__)

T = TypeVar("T")
R = TypeVar("R")

CHUNKS_PER_WORKER = 8
"""A worker process gets about ``steps / (workers * 8)`` steps per task: big enough to
hide the per-task cost, small enough for a smooth progress bar and a prompt cancel."""


class ExecutorError(ValueError):
    """An executor that cannot be made or reached (the message says why)."""


class StepExecutor(Protocol):
    """Runs ``fn`` over items; yields ``(index, fn(items[index]))`` as results arrive."""

    name: str

    def run(self, fn: Callable[[T], R], items: Sequence[T],
            cancelled: Callable[[], bool] | None = None) -> Iterator[tuple[int, R]]: ...

    def close(self) -> None: ...


def usable_cores() -> int:
    """The cores this process may run on (affinity-aware where the OS tells)."""
    try:
        return max(1, len(os.sched_getaffinity(0)))
    except AttributeError:  # not on Linux
        return max(1, os.cpu_count() or 1)


def one_blas_thread() -> None:
    """Limit every BLAS / OpenMP pool of this process to one thread (worker start-up)."""
    for var in ("OMP_NUM_THREADS", "OPENBLAS_NUM_THREADS", "MKL_NUM_THREADS"):
        os.environ[var] = "1"
    from threadpoolctl import threadpool_limits

    threadpool_limits(limits=1)


def _worker_start() -> None:
    """Worker-process start-up: one BLAS thread, and the solver imported once, up front."""
    one_blas_thread()
    import importlib

    for name in ("solver.api", "solver.sweep", "solver.inception"):
        importlib.import_module(name)


class SerialExecutor:
    """Every step in this process, in order."""

    name = "serial"

    def run(self, fn: Callable[[T], R], items: Sequence[T],
            cancelled: Callable[[], bool] | None = None) -> Iterator[tuple[int, R]]:
        for i, item in enumerate(items):
            if cancelled is not None and cancelled():
                return
            yield i, fn(item)

    def close(self) -> None:
        return None


def _run_chunk(fn: Callable[[Any], Any], chunk: list[tuple[int, Any]]) -> list[tuple[int, Any]]:
    return [(i, fn(item)) for i, item in chunk]


class ProcessExecutor:
    """Local worker processes (``spawn``), fed chunks of steps; reused across runs."""

    def __init__(self, workers: int | None = None) -> None:
        self.workers = workers or usable_cores()
        if self.workers < 1:
            raise ExecutorError("processes: the number of workers must be at least 1")
        self.name = f"processes:{self.workers}"
        self._pool: Any = None

    def _ensure_pool(self) -> Any:
        if self._pool is None:
            import multiprocessing
            from concurrent.futures import ProcessPoolExecutor

            self._pool = ProcessPoolExecutor(
                max_workers=self.workers, mp_context=multiprocessing.get_context("spawn"),
                initializer=_worker_start)
        return self._pool

    def start(self) -> None:
        """Start the workers now, without waiting (they import the solver meanwhile).

        A dialog calls this when it opens, so the first sweep finds them ready.
        """
        pool = self._ensure_pool()
        for _ in range(self.workers):
            pool.submit(os.getpid)

    def run(self, fn: Callable[[T], R], items: Sequence[T],
            cancelled: Callable[[], bool] | None = None) -> Iterator[tuple[int, R]]:
        from concurrent.futures import FIRST_COMPLETED, wait

        if not items:
            return
        pool = self._ensure_pool()
        size = max(1, math.ceil(len(items) / (self.workers * CHUNKS_PER_WORKER)))
        indexed = list(enumerate(items))
        pending = {pool.submit(_run_chunk, fn, indexed[k:k + size])
                   for k in range(0, len(indexed), size)}
        try:
            while pending:
                done, pending = wait(pending, timeout=0.1, return_when=FIRST_COMPLETED)
                for fut in done:
                    yield from fut.result()
                if cancelled is not None and cancelled():
                    return
        finally:
            for fut in pending:
                fut.cancel()

    def close(self) -> None:
        if self._pool is not None:
            self._pool.shutdown(wait=True, cancel_futures=True)
            self._pool = None


class DaskExecutor:
    """Steps as tasks on a Dask cluster reached at ``address``."""

    def __init__(self, address: str, connect_timeout_s: float = 10.0) -> None:
        try:
            from distributed import Client
        except ImportError:
            raise ExecutorError("the dask executor needs the optional extra: "
                                "pip install 'stresslens[dask]' (dask[distributed])") from None
        if not address:
            raise ExecutorError("dask: give the scheduler's address, e.g. "
                                "dask:tcp://10.0.0.5:8786")
        self.name = f"dask:{address}"
        try:
            self.client = Client(address, timeout=f"{connect_timeout_s}s",
                                 set_as_default=False)
        except (OSError, TimeoutError) as exc:
            raise ExecutorError(f"cannot reach the Dask scheduler at {address}: {exc}") from None

    def run(self, fn: Callable[[T], R], items: Sequence[T],
            cancelled: Callable[[], bool] | None = None) -> Iterator[tuple[int, R]]:
        from distributed import as_completed

        futures = self.client.map(_run_chunk, [fn] * len(items),
                                  [[(i, item)] for i, item in enumerate(items)], pure=False)
        try:
            with self.client.as_current():  # as_completed looks for the current client
                arrivals = as_completed(futures)
            for fut in arrivals:
                yield from fut.result()
                if cancelled is not None and cancelled():
                    return
        finally:
            self.client.cancel([f for f in futures if not f.done()])

    def close(self) -> None:
        self.client.close()


def make_executor(spec: str | None) -> StepExecutor:
    """An executor from ``serial``, ``processes``, ``processes:N`` or ``dask:ADDRESS``."""
    spec = (spec or "serial").strip()
    if spec == "serial":
        return SerialExecutor()
    if spec == "processes" or spec.startswith("processes:"):
        tail = spec.partition(":")[2]
        if tail and not (tail.isdigit() and int(tail) >= 1):
            raise ExecutorError(f"'{spec}': the number of processes must be a whole number "
                                f"of at least 1")
        return ProcessExecutor(int(tail) if tail else None)
    if spec.startswith("dask:"):
        return DaskExecutor(spec.partition(":")[2])
    raise ExecutorError(f"'{spec}' is not an executor: use serial, processes, processes:N or "
                        f"dask:ADDRESS")
