"""Background solving for the live view: one worker thread, latest revision wins.

Every document change asks for a solve of an immutable :class:`solver.layout.Layout`
snapshot tagged with the document's revision.  At most one solve runs at a time (on a
private ``QThreadPool`` of one thread); a request made while one runs replaces the
pending request, so a burst of edits costs at most two solves.  A result whose
revision is older than the newest request is dropped, never shown, with one exception:
while a part is dragged, a finished draft newer than the one on screen is shown and
the status says it follows the drag (the next draft is already on its way).

The worker computes everything heavy off the GUI thread: the solve itself and the
overlay geometry (equipotential polylines, field lines, the potential resampled to a
regular raster).  It touches no widget: it hands a plain :class:`LiveResult` back
through a queued Qt signal, and the GUI thread builds the graphics items.

The solve runs in a separate solver process (one, started with ``spawn`` and shared
by every window), not merely in a thread: some library calls (SuperLU's
factorisation in scipy, for one) hold Python's global interpreter lock for 100-200 ms,
and in a thread that froze the GUI for as long.  The worker thread waits on the
process, which costs the GUI nothing; the result (a few MB of arrays) comes back
pickled.  A solver process that dies is replaced at the next request.

While the user drags (``Document.interacting``) the ``draft`` resolution is used
without the error estimate; otherwise the layout's own resolution with it, and the
discharge-inception estimate (:mod:`app.inception_view`) is made on the worker too.
"""

from __future__ import annotations

import logging
import math
import time
from collections.abc import Callable
from dataclasses import dataclass, field, replace

import numpy as np
from PySide6.QtCore import QObject, QRunnable, QThreadPool, Signal

import solver
from solver.layout import Layout, LayoutError, Resolution
from solver.solution import Solution

from .colour_maps import map_rgba
from .inception_view import InceptionOutcome, assess
from .solver_process import in_solver_process, warm_up

log = logging.getLogger(__name__)

RASTER_PX = 360
"""Longest side, in pixels, of the regular raster the colour map is drawn from."""
EQUIPOTENTIAL_STEP_PERCENT = 10.0
MAX_LEVELS = 50
"""Most equipotential lines drawn; a finer step is widened (and the user told)."""
FIELD_LINES = 32


@dataclass(frozen=True)
class EquipotentialStep:
    """Spacing of the equipotential lines: ``value`` in kV, or in percent of the largest
    potential difference between the conductors and the far boundary."""

    value: float = EQUIPOTENTIAL_STEP_PERCENT
    unit: str = "%"
    """``"%"`` or ``"kV"``."""

    def __post_init__(self) -> None:
        if self.unit not in ("%", "kV"):
            raise ValueError(f"equipotential step unit must be % or kV, not {self.unit!r}")

    def text(self) -> str:
        return f"{self.value:g} {self.unit}"


@dataclass(frozen=True)
class LiveResult:
    """One finished solve and the overlay geometry derived from it (mm, V, kV/mm)."""

    revision: int
    resolution: str
    solution: Solution
    equipotentials: list[tuple[float, list[np.ndarray]]]
    field_lines: list[np.ndarray]
    raster_phi: np.ndarray
    """Potential in V on a regular raster, ``[row = y index, col = x index]``; NaN inside
    conductors."""
    raster_box_mm: tuple[float, float, float, float]
    """(x0, y0, x1, y1) of the raster's outer pixel edges."""
    raster_E: np.ndarray
    """Field magnitude in kV/mm on the same raster; NaN inside conductors."""
    rgba_potential: np.ndarray
    """(ny, nx, 4) uint8 colours of the potential map (made on the worker)."""
    rgba_field: np.ndarray
    """(ny, nx, 4) uint8 colours of the field-strength map, 0 to the smallest limit at
    any conductor's peak (kV/mm)."""
    seconds: float
    notes: tuple[str, ...] = field(default_factory=tuple)
    step: EquipotentialStep = field(default_factory=lambda: EquipotentialStep())
    """The equipotential step the lines were drawn at."""
    potential_range_V: tuple[float, float] = (0.0, 1.0)
    """(low, high) ends of the potential colour scale, V."""
    field_top_kV_per_mm: float = 1.0
    """Top of the field-strength colour scale, kV/mm (its bottom is 0)."""
    inception: InceptionOutcome | None = None
    """The discharge-inception estimate, or why there is none; None for a draft solve
    (it costs 30-300 ms, too much for every step of a drag)."""


def equipotential_levels(solution: Solution, step: EquipotentialStep | float
                         ) -> tuple[list[float], bool]:
    """Levels (V) strictly between the lowest and highest potential, and a coarsened flag.

    The range is taken over the conductor potentials and the far boundary (0 V),
    :math:`\\Delta V = V_{max} - V_{min}`.  A step of :math:`s` percent gives
    :math:`V_{min} + k\\,s\\,\\Delta V/100`; a step of :math:`s` kV gives the multiples
    :math:`k\\,s`.  A step giving more than :data:`MAX_LEVELS` levels is widened to
    :math:`\\Delta V / MAX\\_LEVELS` rounded up to a whole percent, and the flag is True.
    A bare number is a percent step.
    """
    if not isinstance(step, EquipotentialStep):
        step = EquipotentialStep(float(step), "%")
    volts = [p.volts for p in solution.parts if p.volts is not None] + [0.0]
    lo, hi = min(volts), max(volts)
    span = hi - lo
    if span <= 0 or not step.value > 0:
        return [], False
    step_V = step.value * 1000.0 if step.unit == "kV" else step.value / 100.0 * span
    coarsened = span / step_V > MAX_LEVELS + 1
    if coarsened:
        step_V = math.ceil(100.0 / MAX_LEVELS) / 100.0 * span
    if step.unit == "kV" and not coarsened:
        k0, k1 = math.floor(lo / step_V) + 1, math.ceil(hi / step_V) - 1
        levels = [k * step_V for k in range(k0, k1 + 1)]
    else:
        levels = [lo + k * step_V for k in range(1, int(span / step_V) + 2)]
    tol = 1e-9 * span
    return [v for v in levels if lo + tol < v < hi - tol], coarsened


def resample(solution: Solution, px: int = RASTER_PX
             ) -> tuple[np.ndarray, np.ndarray, tuple[float, float, float, float]]:
    """Potential (V) and field magnitude (kV/mm) bilinearly resampled on a regular
    raster over the view box (over the whole box of a layout with a boundary box).

    The solver's grid is graded (fine near the parts), so the node values are first
    mapped to fractional grid indices per axis, then interpolated.  Nodes inside a
    conductor give NaN (drawn transparent).
    """
    from scipy.ndimage import map_coordinates

    x0, y0, x1, y1 = solution.view_box_mm
    b = solution.layout.boundary
    if b.type == "box" and b.min is not None and b.max is not None:
        x0, y0, x1, y1 = (*b.min, *b.max)  # the whole solved box, not just round the parts
    gx, gy = solution.x_mm, solution.y_mm
    x0, x1 = max(x0, gx[0]), min(x1, gx[-1])
    y0, y1 = max(y0, gy[0]), min(y1, gy[-1])
    w, h = x1 - x0, y1 - y0
    scale = px / max(w, h)
    nx, ny = max(2, int(round(w * scale))), max(2, int(round(h * scale)))
    xc = x0 + (np.arange(nx) + 0.5) * w / nx
    yc = y0 + (np.arange(ny) + 0.5) * h / ny
    fx = np.interp(xc, gx, np.arange(len(gx)))
    fy = np.interp(yc, gy, np.arange(len(gy)))
    FY, FX = np.meshgrid(fy, fx, indexing="ij")
    coords = np.array([FY.ravel(), FX.ravel()])
    phi = map_coordinates(solution.phi, coords, order=1).reshape(ny, nx)
    inside = map_coordinates((solution.conductor >= 0).astype(float), coords,
                             order=1).reshape(ny, nx)
    emag = map_coordinates(np.hypot(solution.Ex_kV_per_mm, solution.Ey_kV_per_mm),
                           coords, order=1).reshape(ny, nx)
    phi[inside > 0.5] = np.nan
    emag[inside > 0.5] = np.nan
    return phi, emag, (x0, y0, x1, y1)


def thin(line: np.ndarray, max_points: int = 400) -> np.ndarray:
    """Every k-th point of a polyline (ends kept) so it has at most ``max_points``.

    The tracer steps half a grid cell, far finer than a screen pixel at a fitting zoom;
    thinning keeps the painter paths built on the GUI thread small.
    """
    if len(line) <= max_points:
        return line
    step = int(np.ceil(len(line) / max_points))
    return np.vstack([line[::step], line[-1:]])


def contours(solution: Solution, step: EquipotentialStep
             ) -> tuple[list[tuple[float, list[np.ndarray]]], tuple[str, ...]]:
    """Thinned equipotential polylines at ``step`` and a note when the step was widened."""
    levels, coarsened = equipotential_levels(solution, step)
    eq = solver.equipotentials(solution, levels)
    notes = (f"equipotential step {step.text()} gives more than {MAX_LEVELS} lines; "
             f"drawn {len(levels)} instead",) if coarsened else ()
    return [(v, [thin(ln) for ln in lns]) for v, lns in eq], notes


def compute(layout: Layout, revision: int, resolution: Resolution, estimate_error: bool,
            step: EquipotentialStep | None = None, n_lines: int = FIELD_LINES) -> LiveResult:
    """Solve and derive the overlay geometry (runs on the worker thread; no Qt)."""
    t0 = time.perf_counter()
    step = step or EquipotentialStep()
    sol = solver.solve(layout, resolution, estimate_error=estimate_error,
                       capacitance=estimate_error)
    eq, notes = contours(sol, step)
    try:
        lines = solver.field_lines(sol, n_lines)
    except Exception as exc:  # noqa: BLE001 - a tracer failure must not hide the solve
        lines = []
        notes += (f"field lines could not be traced: {exc}",)
    lines = [thin(ln) for ln in lines]
    raster, emag, box = resample(sol)
    volts = [p.volts for p in sol.parts if p.volts is not None] + [0.0]
    top = field_scale_top(sol, emag)
    inception = assess(sol) if estimate_error else None  # full solves only
    # float32 rasters: display precision, and a quarter less to carry back from the
    # solver process
    return LiveResult(revision, resolution, sol, eq, lines, raster.astype(np.float32), box,
                      emag.astype(np.float32),
                      map_rgba(raster, min(volts), max(volts)),
                      map_rgba(emag, 0.0, top, "magma_r", fade_low=True),
                      time.perf_counter() - t0, notes, step,
                      (min(volts), max(volts)), top, inception)


def recontour(res: LiveResult, step: EquipotentialStep) -> LiveResult:
    """``res`` with its equipotentials redrawn at ``step`` (no new solve; worker thread)."""
    eq, eq_notes = contours(res.solution, step)
    notes = tuple(n for n in res.notes if not n.startswith("equipotential step"))
    return replace(res, equipotentials=eq, step=step, notes=eq_notes + notes)


def field_scale_top(sol: Solution, emag: np.ndarray) -> float:
    """Top of the field-strength colour scale (kV/mm): the smallest limit at any
    conductor's peak, or the largest field on the raster when no limit applies."""
    limits = [p.limit_at_peak_kV_per_mm for p in sol.parts
              if p.kind != "dielectric" and p.limit_at_peak_kV_per_mm > 0]
    if limits:
        return float(min(limits))
    top = float(np.nanmax(emag)) if np.isfinite(emag).any() else 1.0
    return top if top > 0 else 1.0


class _Relay(QObject):
    """Lives in the GUI thread; the worker emits through it (queued to the GUI)."""

    done = Signal(int, object)
    failed = Signal(int, str)


class _Job(QRunnable):
    """Runs ``work()`` on the pool's thread and reports through the relay."""

    def __init__(self, relay: _Relay, revision: int, work: Callable[[], LiveResult]) -> None:
        super().__init__()
        self.relay, self.revision, self.work = relay, revision, work

    def run(self) -> None:
        try:
            res = self.work()
        except LayoutError as exc:
            self.relay.failed.emit(self.revision, str(exc))
        except Exception as exc:  # noqa: BLE001 - reported to the user, never swallowed
            log.exception("solve of revision %d failed", self.revision)  # to the log file
            self.relay.failed.emit(self.revision, f"{type(exc).__name__}: {exc}")
        else:
            self.relay.done.emit(self.revision, res)


@dataclass
class _Request:
    revision: int
    work: Callable[[], LiveResult]
    label: str
    draft: bool = False


class SolveRunner(QObject):
    """Schedules solves of a document; emits results for the newest revision only.

    Signals: ``state_changed(state, message)`` with state ``"solving"``, ``"ready"`` or
    ``"failed"``; ``result_ready(LiveResult)``.
    """

    state_changed = Signal(str, str)
    result_ready = Signal(object)

    def __init__(self, parent: QObject | None = None) -> None:
        super().__init__(parent)
        self.pool = QThreadPool(self)
        self.pool.setMaxThreadCount(1)
        self._relay = _Relay(self)
        self._relay.done.connect(self._on_done)
        self._relay.failed.connect(self._on_failed)
        self._pending: _Request | None = None
        self._running: int | None = None
        self._running_draft = False
        self.latest_requested = -1
        self.latest: LiveResult | None = None
        self.state = "idle"
        self.message = ""
        self.dropped = 0
        self.step = EquipotentialStep()
        warm_up()

    # ------------------------------------------------------------------ requests

    def request(self, layout: Layout, revision: int, draft: bool = False) -> None:
        """Ask for a solve of ``layout`` (revision ``revision``); ``draft`` while dragging."""
        resolution: Resolution = "draft" if draft else layout.resolution
        step = self.step
        self.latest_requested = max(self.latest_requested, revision)
        self._pending = _Request(revision, lambda: in_solver_process(
            compute, layout, revision, resolution, not draft, step), f"solving ({resolution})",
            draft)
        self._set_state("solving", self._pending.label)
        self._start_next()

    def set_step(self, step: EquipotentialStep) -> None:
        """Draw the equipotentials at ``step`` from now on; the newest result is redrawn
        on the worker (no new solve) unless a newer solve is on its way anyway."""
        self.step = step
        res = self.latest
        if res is None or res.step == step or self.busy() \
                or res.revision < self.latest_requested:
            return  # _on_done redraws a result that arrives with an older step
        self._pending = _Request(res.revision, lambda: recontour(res, step),
                                 "drawing equipotentials")
        self._set_state("solving", self._pending.label)
        self._start_next()

    def report_invalid(self, revision: int, message: str) -> None:
        """The document cannot be solved as it is (shown as failed; nothing runs)."""
        self.latest_requested = max(self.latest_requested, revision)
        self._pending = None
        self._set_state("failed", message)

    def busy(self) -> bool:
        return self._running is not None or self._pending is not None

    def wait(self, timeout_ms: int = 60000) -> bool:
        """Block until the worker is idle (tests and shutdown only, never in the GUI)."""
        return self.pool.waitForDone(timeout_ms)

    # ------------------------------------------------------------------ internals

    def _start_next(self) -> None:
        if self._running is not None or self._pending is None:
            return
        req, self._pending = self._pending, None
        self._running = req.revision
        self._running_draft = req.draft
        self.pool.start(_Job(self._relay, req.revision, req.work))

    def _finish(self) -> None:
        self._running = None
        self._start_next()

    def _on_done(self, revision: int, res: LiveResult) -> None:
        following = self._running_draft and revision < self.latest_requested and (
            self.latest is None or revision > self.latest.revision)
        self._finish()
        if following:
            # mid-drag: the newest finished draft is a moment behind the mouse; showing it
            # (labelled as such) is what lets the peak be watched while dragging
            self.latest = res
            self.result_ready.emit(res)
            self._set_state("solving", "following the drag (draft of a moment ago)")
            return
        if revision < self.latest_requested:
            self.dropped += 1
            return
        self.latest = res
        if self._running is None:
            self._set_state("ready", f"up to date ({res.resolution}, {res.seconds:.1f} s)")
        self.result_ready.emit(res)
        if res.step != self.step:
            self.set_step(self.step)  # the step changed while this was being solved

    def _on_failed(self, revision: int, message: str) -> None:
        self._finish()
        if revision < self.latest_requested:
            self.dropped += 1
            return
        self._set_state("failed", message)

    def _set_state(self, state: str, message: str) -> None:
        self.state, self.message = state, message
        self.state_changed.emit(state, message)
