"""Background solving for the live view: one worker thread, latest revision wins.

Every document change asks for a solve of an immutable :class:`solver.layout.Layout`
snapshot tagged with the document's revision.  At most one solve runs at a time (on a
private ``QThreadPool`` of one thread); a request made while one runs replaces the
pending request, so a burst of edits costs at most two solves.  A result whose
revision is older than the newest request is dropped, never shown.

The worker computes everything heavy off the GUI thread: the solve itself and the
overlay geometry (equipotential polylines, field lines, the potential resampled to a
regular raster).  It touches no widget: it hands a plain :class:`LiveResult` back
through a queued Qt signal, and the GUI thread builds the graphics items.

While the user drags (``Document.interacting``) the ``draft`` resolution is used
without the error estimate; otherwise the layout's own resolution with it.
"""

from __future__ import annotations

import time
import traceback
from dataclasses import dataclass, field

import numpy as np
from PySide6.QtCore import QObject, QRunnable, QThreadPool, Signal

import solver
from solver.layout import Layout, LayoutError, Resolution
from solver.solution import Solution

from .colour_maps import map_rgba

RASTER_PX = 360
"""Longest side, in pixels, of the regular raster the colour map is drawn from."""
EQUIPOTENTIAL_STEP_PERCENT = 10.0
FIELD_LINES = 32


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


def equipotential_levels(solution: Solution, step_percent: float) -> list[float]:
    """Levels (V) at ``step_percent`` of the largest potential difference, ends excluded.

    The largest difference is taken over the conductor potentials and the outer edge,
    :math:`\\Delta V = V_{max} - V_{min}`; levels are :math:`V_{min} + k\\,s\\,\\Delta V`.
    """
    volts = [p.volts for p in solution.parts if p.volts is not None] + [0.0]
    lo, hi = min(volts), max(volts)
    if hi - lo <= 0 or step_percent <= 0:
        return []
    n = int(round(100.0 / step_percent))
    return [lo + k * (hi - lo) * step_percent / 100.0 for k in range(1, n)]


def resample(solution: Solution, px: int = RASTER_PX
             ) -> tuple[np.ndarray, np.ndarray, tuple[float, float, float, float]]:
    """Potential (V) and field magnitude (kV/mm) bilinearly resampled on a regular
    raster over the view box.

    The solver's grid is graded (fine near the parts), so the node values are first
    mapped to fractional grid indices per axis, then interpolated.  Nodes inside a
    conductor give NaN (drawn transparent).
    """
    from scipy.ndimage import map_coordinates

    x0, y0, x1, y1 = solution.view_box_mm
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


def compute(layout: Layout, revision: int, resolution: Resolution, estimate_error: bool,
            step_percent: float = EQUIPOTENTIAL_STEP_PERCENT,
            n_lines: int = FIELD_LINES) -> LiveResult:
    """Solve and derive the overlay geometry (runs on the worker thread; no Qt)."""
    t0 = time.perf_counter()
    sol = solver.solve(layout, resolution, estimate_error=estimate_error,
                       capacitance=estimate_error)
    notes: list[str] = []
    eq = solver.equipotentials(sol, equipotential_levels(sol, step_percent))
    try:
        lines = solver.field_lines(sol, n_lines)
    except Exception as exc:  # noqa: BLE001 - a tracer failure must not hide the solve
        lines = []
        notes.append(f"field lines could not be traced: {exc}")
    eq = [(v, [thin(ln) for ln in lns]) for v, lns in eq]
    lines = [thin(ln) for ln in lines]
    raster, emag, box = resample(sol)
    volts = [p.volts for p in sol.parts if p.volts is not None] + [0.0]
    limits = [p.limit_at_peak_kV_per_mm for p in sol.parts
              if p.kind != "dielectric" and p.limit_at_peak_kV_per_mm > 0]
    top = min(limits) if limits else float(np.nanmax(emag))
    return LiveResult(revision, resolution, sol, eq, lines, raster, box, emag,
                      map_rgba(raster, min(volts), max(volts)),
                      map_rgba(emag, 0.0, top, "magma_r", fade_low=True),
                      time.perf_counter() - t0, tuple(notes))


class _Relay(QObject):
    """Lives in the GUI thread; the worker emits through it (queued to the GUI)."""

    done = Signal(int, object)
    failed = Signal(int, str)


class _Job(QRunnable):
    def __init__(self, relay: _Relay, layout: Layout, revision: int, resolution: Resolution,
                 estimate_error: bool) -> None:
        super().__init__()
        self.relay, self.layout, self.revision = relay, layout, revision
        self.resolution, self.estimate_error = resolution, estimate_error

    def run(self) -> None:
        try:
            res = compute(self.layout, self.revision, self.resolution, self.estimate_error)
        except LayoutError as exc:
            self.relay.failed.emit(self.revision, str(exc))
        except Exception as exc:  # noqa: BLE001 - reported to the user, never swallowed
            traceback.print_exc()
            self.relay.failed.emit(self.revision, f"{type(exc).__name__}: {exc}")
        else:
            self.relay.done.emit(self.revision, res)


@dataclass
class _Request:
    layout: Layout
    revision: int
    resolution: Resolution
    estimate_error: bool


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
        self.latest_requested = -1
        self.latest: LiveResult | None = None
        self.state = "idle"
        self.message = ""
        self.dropped = 0

    # ------------------------------------------------------------------ requests

    def request(self, layout: Layout, revision: int, draft: bool = False) -> None:
        """Ask for a solve of ``layout`` (revision ``revision``); ``draft`` while dragging."""
        resolution: Resolution = "draft" if draft else layout.resolution
        self.latest_requested = max(self.latest_requested, revision)
        self._pending = _Request(layout, revision, resolution, not draft)
        self._set_state("solving", f"solving ({resolution})")
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
        self.pool.start(_Job(self._relay, req.layout, req.revision, req.resolution,
                             req.estimate_error))

    def _finish(self) -> None:
        self._running = None
        self._start_next()

    def _on_done(self, revision: int, res: LiveResult) -> None:
        self._finish()
        if revision < self.latest_requested:
            self.dropped += 1
            return
        self.latest = res
        if self._running is None:
            self._set_state("ready", f"up to date ({res.resolution}, {res.seconds:.1f} s)")
        self.result_ready.emit(res)

    def _on_failed(self, revision: int, message: str) -> None:
        self._finish()
        if revision < self.latest_requested:
            self.dropped += 1
            return
        self._set_state("failed", message)

    def _set_state(self, state: str, message: str) -> None:
        self.state, self.message = state, message
        self.state_changed.emit(state, message)
