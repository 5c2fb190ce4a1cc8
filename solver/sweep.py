"""Parameter sweeps and goal seek: how big must the radius be, how far the gap?

A *sweep* solves the layout once per value of one parameter (:mod:`solver.params`) and
records, per step, the peak surface field of every part, the overall peak, the worst
use of the limit and, when it can be made, the streamer-inception scale.  A value that
makes the layout invalid (an overlap, a negative size) becomes that step's message; the
sweep goes on.

The response the goal seek works on is the *utilisation*

.. math:: u(p) = \\max_{\\text{outlines}} \\frac{E(s)}{E_{lim}(s)},

the largest ratio of surface field to the local limit over every conductor outline
and every dielectric's gas side (with a fixed limit simply :math:`E_{peak}/E_{lim}`).
The margin is :math:`100\\,(1 - u)` percent.  Per part, the peak is the surface field of
a conductor and the gas-side surface field of a dielectric, kV/mm.

:func:`goal_seek` looks for the boundary of :math:`\\{p \\in [lo, hi] : u(p) \\le f\\}`,
f the target fraction: a coarse sweep brackets the crossing, then Brent's method
(``scipy.optimize.brentq``, safeguarded: it never leaves the bracket) refines
:math:`u(p) - f = 0`.  Which boundary is wanted follows from the response: when the
field falls as p grows (a radius, a gap) the *smallest* p that meets the target is the
answer; when it rises (a voltage) the *largest*.  When only a window inside the range
meets it (the field falls, then rises again), the smallest value is reported and a note
gives the window as the coarse steps saw it.  The value reported is one that was
solved and meets the target, within ``xtol`` of the crossing.

Each step is solved without the coarse-grid error estimate and without the capacitance
matrix: a sweep wants the trend and the crossing, and that halves its cost.
"""

from __future__ import annotations

import math
import time
from collections.abc import Callable, Sequence
from dataclasses import dataclass, field
from typing import Literal

import numpy as np

from .executors import SerialExecutor, StepExecutor
from .layout import Layout, Resolution
from .params import apply_param, check_param_name, param_unit, param_value

NOT_RUN = "not run: the sweep was cancelled"
"""The message of a step a cancelled sweep never started."""

Progress = Callable[[int, int], None]
"""``progress(done, total)``: steps finished so far and the steps planned."""


@dataclass(frozen=True)
class StepResult:
    """One solved (or refused) value of the swept parameter."""

    value: float
    peak_field_kV_per_mm: float = math.nan
    """Largest surface field of any part (gas side of dielectrics), kV/mm."""
    limit_kV_per_mm: float = math.nan
    """The limit where the field is nearest to (or furthest over) it, kV/mm."""
    utilisation: float = math.nan
    """Largest surface field / local limit over every outline (1 = at the limit)."""
    part_peaks: tuple[tuple[str, float], ...] = ()
    inception_scale: float | None = None
    inception_message: str | None = None
    error: str | None = None
    seconds: float = 0.0
    unknowns: int = 0

    @property
    def ok(self) -> bool:
        return self.error is None

    @property
    def margin_percent(self) -> float:
        return 100.0 * (1.0 - self.utilisation)


@dataclass(frozen=True)
class SweepResult:
    """A whole sweep: one :class:`StepResult` per value (in the order of the values)."""

    part: str
    param: str
    unit: str
    steps: tuple[StepResult, ...]
    cancelled: bool = False
    executor: str = "serial"
    seconds: float = 0.0

    def column(self, attr: str) -> np.ndarray:
        """One float attribute of every step as an array (NaN for None)."""
        return np.array([math.nan if (v := getattr(s, attr)) is None else float(v)
                         for s in self.steps])

    values = property(lambda self: self.column("value"), doc="Parameter values.")
    peak_field_kV_per_mm = property(lambda self: self.column("peak_field_kV_per_mm"),
                                    doc="Overall peak surface field per step, kV/mm.")
    limit_kV_per_mm = property(lambda self: self.column("limit_kV_per_mm"),
                               doc="Limit at the most used point per step, kV/mm.")
    utilisation = property(lambda self: self.column("utilisation"),
                           doc="Largest field / limit per step.")
    margin_percent = property(lambda self: self.column("margin_percent"),
                              doc="100 (1 - utilisation) per step, %.")
    inception_scale = property(lambda self: self.column("inception_scale"),
                               doc="Streamer-inception voltage scale per step (NaN: none).")

    @property
    def part_names(self) -> list[str]:
        names: list[str] = []
        for s in self.steps:
            names += [n for n, _ in s.part_peaks if n not in names]
        return names

    def part_peak(self, name: str) -> np.ndarray:
        """The peak field (kV/mm) of one part at every step (NaN where a step failed)."""
        return np.array([dict(s.part_peaks).get(name, math.nan) for s in self.steps])


@dataclass(frozen=True)
class GoalResult:
    """The answer of a goal seek; ``value`` is None (and ``message`` says why) on failure."""

    fraction: float
    value: float | None
    peak_field_kV_per_mm: float | None
    limit_kV_per_mm: float | None
    utilisation: float | None
    direction: Literal["smallest", "largest"] | None
    message: str | None
    note: str | None = None
    evaluations: int = 0
    coarse: SweepResult | None = None
    history: tuple[StepResult, ...] = field(default_factory=tuple)


class Cancelled(Exception):
    """The caller asked to stop."""


# --------------------------------------------------------------------------- one step


def evaluate(layout: Layout, value: float, resolution: Resolution | None = None,
             inception: bool = True) -> StepResult:
    """Solve one layout and summarise it as a :class:`StepResult` (never raises)."""
    import solver

    t0 = time.perf_counter()
    try:
        sol = solver.solve(layout, resolution, estimate_error=False, capacitance=False)
    except (ValueError, RuntimeError, MemoryError) as exc:
        return StepResult(value=value, error=f"the solve failed: {exc}",
                          seconds=time.perf_counter() - t0)
    peaks = tuple((p.name, float(p.surface_field_kV_per_mm or 0.0) if p.kind == "dielectric"
                   else float(p.peak_field_kV_per_mm)) for p in sol.parts)
    u, lim = 0.0, math.nan
    for tr in sol.surfaces:
        ok = np.isfinite(tr.limit_kV_per_mm) & (tr.limit_kV_per_mm > 0)
        if ok.any():
            ratio = np.where(ok, tr.E_kV_per_mm / np.where(ok, tr.limit_kV_per_mm, 1.0), 0.0)
            i = int(np.argmax(ratio))
            if ratio[i] > u or math.isnan(lim):
                u, lim = max(u, float(ratio[i])), float(tr.limit_kV_per_mm[i])
    scale, inc_msg = None, None
    if inception:
        from .inception import estimate_inception

        try:
            scale = float(estimate_inception(sol).scale)
        except ValueError as exc:  # InceptionError included
            inc_msg = f"no estimate: {exc}"
    return StepResult(value=value, peak_field_kV_per_mm=max((v for _, v in peaks), default=0.0),
                      limit_kV_per_mm=lim, utilisation=u, part_peaks=peaks,
                      inception_scale=scale, inception_message=inc_msg,
                      seconds=time.perf_counter() - t0, unknowns=sol.unknowns)


def _run_task(task: tuple[float, Layout | str, Resolution | None, bool]) -> StepResult:
    value, layout, resolution, inception = task
    if isinstance(layout, str):
        return StepResult(value=value, error=layout)
    return evaluate(layout, value, resolution, inception)


def _task(layout: Layout, part: str, param: str, value: float,
          resolution: Resolution | None, inception: bool
          ) -> tuple[float, Layout | str, Resolution | None, bool]:
    from .layout import LayoutError

    try:
        return (value, apply_param(layout, part, param, value), resolution, inception)
    except LayoutError as exc:
        unit = param_unit(param)
        return (value, f"not a valid layout at {param} = {value:g}{' ' + unit if unit else ''}:"
                f" {exc}", resolution, inception)


# --------------------------------------------------------------------------- sweep


def sweep(layout: Layout, part: str, param: str, values: Sequence[float],
          executor: StepExecutor | None = None, resolution: Resolution | None = None,
          inception: bool = True, progress: Progress | None = None,
          cancelled: Callable[[], bool] | None = None) -> SweepResult:
    """Solve the layout for every value of ``param`` of ``part``.

    Raises :class:`solver.params.ParamError` when the part has no such parameter (the
    whole sweep is meaningless); a value that breaks the layout is that step's message.
    """
    check_param_name(param)
    param_value(layout, part, param)  # raises ParamError for a parameter the part lacks
    t0 = time.perf_counter()
    ex = executor or SerialExecutor()
    tasks = [_task(layout, part, param, float(v), resolution, inception) for v in values]
    found: dict[int, StepResult] = {}
    if progress is not None:
        progress(0, len(tasks))
    for i, res in ex.run(_run_task, tasks, cancelled):
        found[i] = res
        if progress is not None:
            progress(len(found), len(tasks))
    stopped = len(found) < len(tasks)
    steps = tuple(found.get(i, StepResult(value=t[0], error=NOT_RUN))
                  for i, t in enumerate(tasks))
    return SweepResult(part=part, param=param, unit=param_unit(param), steps=steps,
                       cancelled=stopped, executor=ex.name,
                       seconds=time.perf_counter() - t0)


# --------------------------------------------------------------------------- goal seek


def goal_seek(layout: Layout, part: str, param: str, lo: float, hi: float,
              fraction: float = 0.8, executor: StepExecutor | None = None,
              resolution: Resolution | None = None, coarse_steps: int = 9,
              xtol: float | None = None, progress: Progress | None = None,
              cancelled: Callable[[], bool] | None = None,
              coarse: SweepResult | None = None) -> GoalResult:
    """The smallest (or largest) value in [lo, hi] with utilisation u <= ``fraction``.

    ``coarse`` re-uses a sweep already made over [lo, hi]; otherwise ``coarse_steps``
    values are solved (on ``executor``).  ``xtol`` (default 1/1000 of the range, in
    the parameter's unit) is the width of the final bracket.
    """
    if not 0.0 < fraction <= 10.0:
        raise ValueError(f"the goal fraction must lie between 0 and 10 (of the limit), "
                         f"not {fraction:g}")
    lo, hi = sorted((float(lo), float(hi)))
    if not hi > lo:
        raise ValueError("the goal seek needs a range: 'from' and 'to' must differ")
    if coarse is None:
        coarse = sweep(layout, part, param, np.linspace(lo, hi, max(3, coarse_steps)).tolist(),
                       executor, resolution, inception=False, progress=progress,
                       cancelled=cancelled)
    unit = param_unit(param)
    if coarse.cancelled:
        return _failed(fraction, coarse, "cancelled")
    steps = sorted((s for s in coarse.steps if s.ok), key=lambda s: s.value)
    if not steps:
        return _failed(fraction, coarse, f"no value of {param} in [{lo:g}, {hi:g}] {unit} gives "
                       f"a valid layout: {coarse.steps[0].error}")
    meets = [s.utilisation <= fraction for s in steps]
    if not any(meets):
        best = min(steps, key=lambda s: s.utilisation)
        return _failed(fraction, coarse, (
            f"no value of {param} in [{lo:g}, {hi:g}] {unit} keeps the peak field at or below "
            f"{fraction:g} x the limit: the best, at {best.value:g} {unit}, is "
            f"{best.peak_field_kV_per_mm:.4g} kV/mm = {best.utilisation:.3g} x the limit "
            f"({best.limit_kV_per_mm:.4g} kV/mm)"))
    return _refine(layout, part, param, steps, meets, fraction, resolution,
                   xtol if xtol is not None else 1e-3 * (hi - lo), cancelled, coarse)


def _refine(layout: Layout, part: str, param: str, steps: list[StepResult], meets: list[bool],
            fraction: float, resolution: Resolution | None, xtol: float,
            cancelled: Callable[[], bool] | None, coarse: SweepResult) -> GoalResult:
    """Pick the boundary the response asks for and close in on it with Brent's method."""
    from scipy.optimize import brentq

    unit = param_unit(param)
    falling = steps[-1].utilisation <= steps[0].utilisation
    direction: Literal["smallest", "largest"]
    if meets[-1] and not meets[0] or not (meets[0] or meets[-1]):
        direction = "smallest"  # falling response, or a window inside the range
    elif meets[0] and not meets[-1]:
        direction = "largest"
    else:
        direction = "smallest" if falling else "largest"
    k = meets.index(True) if direction == "smallest" else len(meets) - 1 - meets[::-1].index(True)
    edge = k == 0 if direction == "smallest" else k == len(steps) - 1
    note = None
    if all(meets):
        note = (f"every value in the range meets the target; the {direction} is the range "
                f"end, and the real threshold lies beyond it")
    elif meets[0] and meets[-1] or not (meets[0] or meets[-1]):
        inside = [s.value for s, m in zip(steps, meets, strict=True) if m]
        note = (f"the response is not monotonic: values from about {inside[0]:g} to "
                f"{inside[-1]:g} {unit} meet the target; the {direction} is reported")
    if edge:
        s = steps[k]
        return GoalResult(fraction=fraction, value=s.value,
                          peak_field_kV_per_mm=s.peak_field_kV_per_mm,
                          limit_kV_per_mm=s.limit_kV_per_mm, utilisation=s.utilisation,
                          direction=direction, message=None, note=note, coarse=coarse)
    other = steps[k - 1] if direction == "smallest" else steps[k + 1]
    seen: dict[float, StepResult] = {s.value: s for s in (steps[k], other)}

    def f(p: float) -> float:
        if p not in seen:
            if cancelled is not None and cancelled():
                raise Cancelled
            res = _run_task(_task(layout, part, param, p, resolution, False))
            if not res.ok:
                raise ValueError(res.error)
            seen[p] = res
        return seen[p].utilisation - fraction

    a, b = sorted((steps[k].value, other.value))
    try:
        brentq(f, a, b, xtol=xtol, rtol=4 * np.finfo(float).eps, maxiter=60)
    except Cancelled:
        return _failed(fraction, coarse, "cancelled", direction, len(seen) - 2)
    except (ValueError, RuntimeError) as exc:
        return _failed(fraction, coarse, f"the root finder stopped between {a:g} and {b:g} "
                       f"{unit}: {exc}", direction, len(seen) - 2)
    good = [s for s in seen.values() if s.utilisation <= fraction]
    # the met value nearest to the crossing: the bracket's miss lies within xtol of it
    best = (min(good, key=lambda s: s.value) if direction == "smallest"
            else max(good, key=lambda s: s.value))
    return GoalResult(fraction=fraction, value=best.value,
                      peak_field_kV_per_mm=best.peak_field_kV_per_mm,
                      limit_kV_per_mm=best.limit_kV_per_mm, utilisation=best.utilisation,
                      direction=direction, message=None, note=note, evaluations=len(seen) - 2,
                      coarse=coarse, history=tuple(sorted(seen.values(), key=lambda s: s.value)))


def _failed(fraction: float, coarse: SweepResult, message: str,
            direction: Literal["smallest", "largest"] | None = None,
            evaluations: int = 0) -> GoalResult:
    return GoalResult(fraction=fraction, value=None, peak_field_kV_per_mm=None,
                      limit_kV_per_mm=None, utilisation=None, direction=direction,
                      message=message, evaluations=evaluations, coarse=coarse)
