"""Discharge inception from the streamer criterion, along field lines from the hot spots.

The criterion (Raether, Meek; used for air gaps by Schumann and Pedersen): a discharge
starts when an electron avalanche growing along a field line reaches a critical size,

.. math:: \\int_0^{x_c} \\alpha_{eff}\\big(E(x)\\big)\\, dx = K,

integrated from the electrode surface over the stretch where ionisation beats
attachment (:math:`E > E_{crit}`).  The field is linear in the electrode potentials,
so with all potentials multiplied by a scale S the field is :math:`S E_1(x)`; the
integral grows monotonically with S, and the inception scale is its root.  We use
Schumann's quadratic fit for :math:`\\alpha_{eff}` with his K/C ratio
(:mod:`solver.air`); that pair reproduces Schumann's uniform-field law exactly, the
standard sphere-gap table within about 3 % and Peek's coaxial law within 4 %.

What the estimate ignores is in :data:`INCEPTION_CAUTION`; show it wherever the
number is shown.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from typing import TYPE_CHECKING

import numpy as np

from .air import SCHUMANN_C, STREAMER_K, equivalent_pressure_bar
from .inception_path import FieldProbe, GasPath, trace_gas_path
from .inception_probe import gas_field_sampler, probe_from_solution
from .inception_starts import Start, start_points, surface_start
from .layout import PeekLimit
from .streamer import (
    InceptionError,
    inception_scale,
    ionisation_length_mm,
    streamer_integral,
)

if TYPE_CHECKING:
    from .solution import Solution

INCEPTION_CAUTION = (
    "The inception voltage is an estimate for design guidance, from the streamer criterion "
    "in clean dry air with Schumann's ionisation fit. It ignores humidity, surface condition "
    "and contamination, polarity, impulse versus steady voltage, space charge, and 3D effects "
    "outside this cross-section. Clearances and test voltages follow the applicable standards "
    "and local codes; this estimate is no substitute for testing and licensed practice."
)
"""Caution to show with every inception figure (GUI, reports, command line)."""



# --------------------------------------------------------------------------- result


@dataclass(frozen=True)
class Inception:
    """A streamer-criterion inception estimate for one layout.

    ``scale`` S multiplies every electrode potential (and the charge of floating
    parts); ``volts`` are the electrode potentials at inception, V.  ``path_mm`` (M, 2)
    is the field line the estimate integrates along, from the surface of
    ``start_part``; ``E_unit_kV_per_mm`` the field along it at the layout's own
    voltages.  ``utilisation`` is the field utilisation factor of the gap,
    :math:`\\eta = (U/d) / E_{max}` with U the potential difference between the path's
    ends and d its length; None when the path does not end on another conductor.
    """

    scale: float
    volts: dict[str, float]
    path_mm: np.ndarray
    s_mm: np.ndarray
    E_unit_kV_per_mm: np.ndarray
    start_part: str
    ends_at: str
    K: float
    p_bar: float
    peak_field_kV_per_mm: float
    """Peak of the field along the path at inception, kV/mm."""
    ionisation_length_mm: float
    """Length of path with field above the critical field at inception, mm."""
    utilisation: float | None
    notes: tuple[str, ...] = field(default_factory=tuple)
    criterion: str = "streamer"


def path_inception(path: GasPath, p_bar: float, K: float = STREAMER_K,
                   C: float = SCHUMANN_C) -> tuple[float, float, float]:
    """Inception scale, peak field at inception (kV/mm) and ionisation length (mm) on a path."""
    ds = np.diff(path.s_mm)
    S = inception_scale(path.E_kV_per_mm, ds, p_bar, K, C)
    E = S * path.E_kV_per_mm
    return S, float(np.max(E)), ionisation_length_mm(E, path.s_mm, p_bar)


def utilisation_factor(path: GasPath, start_volts: float,
                       end_volts: float | None) -> float | None:
    r"""Field utilisation of the gap along a path, :math:`\eta = |U| / (d\, E_{max})`."""
    if end_volts is None or path.s_mm[-1] <= 0.0:
        return None
    peak = float(np.max(path.E_kV_per_mm))
    return abs(start_volts - end_volts) / 1000.0 / (float(path.s_mm[-1]) * peak)


def describe_inception(inc: Inception) -> list[str]:
    """Plain-text lines (with units) for a results panel or a report table.

    Example: ``"Inception (streamer estimate): 58.1 kV on HV sphere (1.00 x applied)"``.
    The notes follow, and :data:`INCEPTION_CAUTION` is the last line.
    """
    top = max(inc.volts.items(), key=lambda kv: abs(kv[1]), default=("", 0.0))
    lines = [f"Inception (streamer estimate): {top[1] / 1000:.3g} kV on {top[0]} "
             f"({inc.scale:.3g} x applied)" if top[0] else
             f"Inception (streamer estimate): {inc.scale:.3g} x applied"]
    lines.append(f"Path: {inc.s_mm[-1]:.3g} mm from {inc.start_part} to {inc.ends_at}; "
                 f"ionisation zone {inc.ionisation_length_mm:.3g} mm")
    lines.append(f"Peak field at inception: {inc.peak_field_kV_per_mm:.3g} kV/mm; air "
                 f"{inc.p_bar:.3g} bar at 20 degC equivalent, K = {inc.K:g}")
    if inc.utilisation is not None:
        lines.append(f"Field utilisation of the gap (mean / peak field): {inc.utilisation:.2f}")
    return lines + list(inc.notes) + [INCEPTION_CAUTION]


def inception_to_json(inc: Inception, max_points: int = 400) -> dict:
    """The command line's ``"inception"`` object (DESIGN section 3), JSON-ready.

    Keys ``criterion``, ``scale``, ``volts`` {part: V} and ``path_mm`` [[x, y], ...]
    (at most ``max_points``, evenly thinned, ends kept) as the contract says, plus
    ``start_part``, ``ends_at``, ``peak_field_kV_per_mm``, ``ionisation_length_mm``,
    ``utilisation``, ``K``, ``pressure_bar`` and ``caution``.
    """
    pts = inc.path_mm
    if len(pts) > max_points:
        keep = np.unique(np.linspace(0, len(pts) - 1, max_points).round().astype(int))
        pts = pts[keep]
    return {
        "criterion": inc.criterion,
        "scale": float(inc.scale),
        "volts": {k: float(v) for k, v in inc.volts.items()},
        "path_mm": [[round(float(x), 6), round(float(y), 6)] for x, y in pts],
        "start_part": inc.start_part,
        "ends_at": inc.ends_at,
        "peak_field_kV_per_mm": float(inc.peak_field_kV_per_mm),
        "ionisation_length_mm": float(inc.ionisation_length_mm),
        "utilisation": None if inc.utilisation is None else float(inc.utilisation),
        "K": float(inc.K),
        "pressure_bar": float(inc.p_bar),
        "notes": list(inc.notes),
        "caution": INCEPTION_CAUTION,
    }


# --------------------------------------------------------------------------- on a solution


def _air_state(solution: Solution, pressure_kPa: float | None,
               temperature_C: float | None) -> tuple[float, float]:
    limit = solution.layout.limit
    if isinstance(limit, PeekLimit):
        p, t = limit.pressure_kPa, limit.temperature_C
    else:
        p, t = 101.325, 20.0
    return (p if pressure_kPa is None else pressure_kPa,
            t if temperature_C is None else temperature_C)


def _local_spacing_mm(solution: Solution, xy: np.ndarray) -> float:
    ix = int(np.clip(np.searchsorted(solution.x_mm, xy[0]), 1, len(solution.x_mm) - 1))
    iy = int(np.clip(np.searchsorted(solution.y_mm, xy[1]), 1, len(solution.y_mm) - 1))
    return float(min(solution.x_mm[ix] - solution.x_mm[ix - 1],
                     solution.y_mm[iy] - solution.y_mm[iy - 1]))


def _conductor_volts(solution: Solution, name: str) -> float | None:
    part = solution.layout.part(name)
    if part.kind == "electrode":
        return part.volts
    if part.kind == "floating":
        return solution.part(name).volts
    return None


def _end_volts(solution: Solution, path: GasPath, probe: FieldProbe) -> tuple[str, float | None]:
    """Where a path ends, in words, and the potential there (V) when it is a conductor."""
    if path.ends_at == "body":
        name = probe.names[path.end_body]
        volts = _conductor_volts(solution, name)
        return (f"conductor {name}" if volts is not None else f"solid insulation {name}"), volts
    boundary = solution.layout.boundary
    if path.ends_at == "outside":
        if boundary.type == "box" and boundary.volts is not None:
            return "box wall", boundary.volts
        return "far boundary", None
    return ("open space (field faded)" if path.ends_at == "faded" else "length cap"), None


def _notes(solution: Solution, start_part: str, ends_at: str) -> tuple[str, ...]:
    notes = []
    for part in solution.layout.parts:
        if part.kind == "floating" and part.charge:
            notes.append(f"floating part {part.name} carries a fixed charge; the scale assumes "
                         "its charge grows with the voltages")
    if solution.part(start_part).sharp_corner:
        notes.append(f"the path starts at a sharp corner of {start_part}; the field there "
                     "depends on the grid, so round the corner for a firm figure")
    if ends_at.startswith(("open space", "far boundary", "length")):
        notes.append("the field line does not reach another conductor: this is corona "
                     "onset, not breakdown of a gap")
    return tuple(notes)


def _with_surface_end(solution: Solution, path: GasPath, part: str) -> GasPath:
    """The path with its last field value taken from the part's surface trace (the
    second-order surface field) when a trace sample lies within a grid cell of the end."""
    end = path.xy_mm[-1]
    cell = _local_spacing_mm(solution, end)
    best, E_end = np.inf, None
    for t in solution.surfaces:
        if t.part == part and len(t.s_mm):
            d = np.hypot(*(t.xy_mm - end).T)
            i = int(np.argmin(d))
            if d[i] < best:
                best, E_end = float(d[i]), float(t.E_kV_per_mm[i])
    if E_end is None or best > cell:
        return path
    E = path.E_kV_per_mm.copy()
    E[-1] = E_end
    return replace(path, E_kV_per_mm=E)


def _reversed(path: GasPath) -> GasPath:
    """The same path run from its other end."""
    s = path.s_mm[-1] - path.s_mm[::-1]
    return GasPath(path.xy_mm[::-1].copy(), s, path.E_kV_per_mm[::-1].copy(), path.ends_at,
                   path.end_body)


def estimate_inception_at(solution: Solution, start: Start | tuple[float, float],
                          pressure_kPa: float | None = None, temperature_C: float | None = None,
                          K: float = STREAMER_K, probe: FieldProbe | None = None) -> Inception:
    """The streamer estimate along the field line from one surface point.

    ``start`` is a :data:`Start`, or a point (x, y) mm, which is moved to the nearest
    conductor surface sample (:func:`surface_start`).  Air defaults to the layout's
    Peek-limit state, else 101.325 kPa and 20 degC.
    """
    probe = probe_from_solution(solution) if probe is None else probe
    if len(start) == 2:
        start = surface_start(solution, (float(start[0]), float(start[1])))
    part, xy, normal, E_surface = start  # type: ignore[misc]
    p_bar = equivalent_pressure_bar(*_air_state(solution, pressure_kPa, temperature_C))
    h0 = 0.25 * _local_spacing_mm(solution, np.asarray(xy))
    extent = float(np.hypot(np.ptp(solution.x_mm), np.ptp(solution.y_mm)))
    path = trace_gas_path(probe, xy, normal, h0, extent, start_field_kV_per_mm=E_surface)
    ends_at, end_volts = _end_volts(solution, path, probe)
    start_volts = _conductor_volts(solution, part)
    if path.ends_at == "body":
        path = _with_surface_end(solution, path, probe.names[path.end_body])
    if end_volts is not None and path.E_kV_per_mm[-1] > path.E_kV_per_mm[0]:
        # same field line, same integral: report it from its stressed end
        path, ends_at, part = _reversed(path), f"conductor {part}", probe.names[path.end_body]
        start_volts, end_volts = end_volts, start_volts
    S, peak, length = path_inception(path, p_bar, K)
    volts = {p.name: S * float(p.volts) for p in solution.layout.parts
             if p.kind == "electrode" and p.volts is not None}
    return Inception(
        scale=S, volts=volts, path_mm=path.xy_mm, s_mm=path.s_mm,
        E_unit_kV_per_mm=path.E_kV_per_mm, start_part=part, ends_at=ends_at, K=K, p_bar=p_bar,
        peak_field_kV_per_mm=peak, ionisation_length_mm=length,
        utilisation=utilisation_factor(path, start_volts or 0.0, end_volts),
        notes=_notes(solution, part, ends_at))


def estimate_inception(solution: Solution, pressure_kPa: float | None = None,
                       temperature_C: float | None = None, K: float = STREAMER_K,
                       probe: FieldProbe | None = None) -> Inception:
    """The layout's inception estimate: the smallest scale over every conductor's peak-field
    point and every hot spot on a conductor.  ``probe`` defaults to
    :func:`probe_from_solution`.

    A start point with no gas next to it (parts touching) is passed over.

    Raises
    ------
    InceptionError : no conductor surface carries any field, or no start point has a path
        into the gas (the message lists why).
    """
    starts = [s for s in start_points(solution) if s[3] > 0.0]
    if not starts:
        raise InceptionError("no conductor surface carries any field: every electrode is at "
                             "the same potential")
    probe = probe_from_solution(solution) if probe is None else probe
    results, problems = [], []
    for start in starts:
        try:
            results.append(estimate_inception_at(solution, start, pressure_kPa, temperature_C,
                                                 K, probe))
        except ValueError as exc:  # InceptionError included
            problems.append(f"{start[0]}: {exc}")
    if not results:
        raise InceptionError("no inception path could be traced: " + "; ".join(problems))
    return _least_in_gas(results)


def _least_in_gas(results: list[Inception]) -> Inception:
    """The lowest estimate among paths that stay in the gas; paths that run into solid
    insulation (triple junctions, surfaces) are only noted, since a discharge along a
    solid surface is a different mechanism that this criterion does not cover."""
    in_gas = [r for r in results if not r.ends_at.startswith("solid insulation")]
    best = min(in_gas or results, key=lambda inc: inc.scale)
    if not in_gas:
        note = ("every traced field line runs into solid insulation: the figure covers only "
                "the gas before the solid surface; discharge along the surface (creepage, "
                "triple junction) is not estimated here and may start lower")
        return replace(best, notes=best.notes + (note,))
    solid = sorted({f"{r.start_part} into {r.ends_at.removeprefix('solid insulation ')} "
                    f"after {r.s_mm[-1]:.3g} mm" for r in results
                    if r.ends_at.startswith("solid insulation") and r.scale < best.scale})
    if not solid:
        return best
    note = ("field lines run from " + "; ".join(solid) + ": discharge along a solid surface "
            "(creepage, triple junction) is not estimated here and may start lower")
    return replace(best, notes=best.notes + (note,))


__all__ = [
    "INCEPTION_CAUTION", "FieldProbe", "GasPath", "Inception", "InceptionError",
    "Start", "describe_inception", "estimate_inception", "estimate_inception_at",
    "gas_field_sampler", "surface_start",
    "inception_scale", "inception_to_json", "ionisation_length_mm", "path_inception",
    "probe_from_solution", "streamer_integral", "trace_gas_path", "utilisation_factor",
]
