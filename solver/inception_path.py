"""The gas path of a discharge: a field line traced from a conductor surface into the gas.

An avalanche starting at a stressed surface point runs along the field line through
it.  :func:`trace_gas_path` follows that line from the surface, with adaptive
second-order (midpoint) steps, until it meets another body (a conductor or solid
insulation), leaves the domain, the field fades to a negligible fraction of its
starting value, or a length cap is reached.  It knows nothing about grids: the field
and the map of bodies come in as callables (:class:`FieldProbe`), so the same code
runs on a solved layout and on an analytic field.

Units: mm and kV/mm.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

GAS = -1
"""Region code of points in the gas."""
OUTSIDE = -2
"""Region code of points outside the computed domain."""

_TURN_TOL = 0.01
"""Largest change of the unit direction over one step (about 0.6 degrees)."""
_FIELD_RATIO_TOL = 0.12
"""Largest relative change of |E| over one step."""
_FADE = 1e-3
"""The path ends where |E| falls below this fraction of its starting value."""


@dataclass(frozen=True)
class FieldProbe:
    """What a tracer needs from a field.

    ``field(points (N, 2) mm) -> E (N, 2) kV/mm``; ``region(points) -> int (N,)``: ``GAS``,
    ``OUTSIDE``, or the index of the body (into ``names``) that covers the point.
    ``axisymmetric`` keeps the path at r = x >= 0.
    """

    field: Callable[[np.ndarray], np.ndarray]
    region: Callable[[np.ndarray], np.ndarray]
    names: tuple[str, ...]
    axisymmetric: bool = False


@dataclass(frozen=True)
class GasPath:
    """A traced path: points (M, 2) mm, arc length s (M,) mm, |E| (M,) kV/mm.

    ``ends_at`` is ``"body"`` (``end_body`` is its index), ``"outside"``, ``"faded"``
    or ``"length"``.
    """

    xy_mm: np.ndarray
    s_mm: np.ndarray
    E_kV_per_mm: np.ndarray
    ends_at: str
    end_body: int = GAS


class _Tracer:
    """Mutable state of one trace; see :func:`trace_gas_path`."""

    def __init__(self, probe: FieldProbe, sign: float) -> None:
        self.probe = probe
        self.sign = sign

    def vector(self, p: np.ndarray) -> np.ndarray:
        return self.sign * self.probe.field(p[None, :])[0]

    def region(self, p: np.ndarray) -> int:
        return int(self.probe.region(p[None, :])[0])

    def clamp(self, p: np.ndarray) -> np.ndarray:
        if self.probe.axisymmetric and p[0] < 0.0:
            return np.array([0.0, p[1]])
        return p

    def step(self, p: np.ndarray, e: np.ndarray, h: float) -> tuple[np.ndarray, np.ndarray, bool]:
        """One midpoint step of length h; returns (new point, its field, accurate?)."""
        k1 = e / np.linalg.norm(e)
        pm = self.clamp(p + 0.5 * h * k1)
        em = self.vector(pm)
        nm = np.linalg.norm(em)
        if not nm > 0.0:
            return pm, em, True
        k2 = em / nm
        pn = self.clamp(p + h * k2)
        en = self.vector(pn)
        ratio = np.linalg.norm(en) / np.linalg.norm(e)
        good = np.linalg.norm(k2 - k1) <= _TURN_TOL and abs(ratio - 1.0) <= _FIELD_RATIO_TOL
        return pn, en, bool(good)

    def edge(self, p_gas: np.ndarray, p_body: np.ndarray) -> np.ndarray:
        """The point where the segment leaves the gas, by bisection (to 1e-6 of its length)."""
        a, b = p_gas, p_body
        for _ in range(20):
            mid = 0.5 * (a + b)
            if self.region(mid) == GAS:
                a = mid
            else:
                b = mid
        return a


def trace_gas_path(probe: FieldProbe, start_mm: np.ndarray, normal: np.ndarray,
                   first_step_mm: float, max_length_mm: float,
                   start_field_kV_per_mm: float | None = None,
                   max_steps: int = 20000) -> GasPath:
    """Follow the field line from a surface point into the gas.

    Parameters
    ----------
    probe : the field and the bodies.
    start_mm : the surface point (x, y) mm.
    normal : unit outward normal of the surface there (points into the gas).
    first_step_mm : length of the first step, along the normal; later steps adapt
        (halved while the direction turns by more than ~0.6 degrees or |E| changes by
        more than 12 % in a step, grown by 1.5 when both are well inside).
    max_length_mm : length cap (also the largest step is 1/50 of it).
    start_field_kV_per_mm : the surface field at the start point when known more
        accurately than the probe gives it right at the surface; else sampled.

    Raises
    ------
    ValueError : no gas next to the start point, or no field there.
    """
    p0 = np.asarray(start_mm, dtype=float)
    n = np.asarray(normal, dtype=float) / np.linalg.norm(normal)
    h = float(first_step_mm)
    tracer = _Tracer(probe, 1.0)
    p1 = _first_gas_point(tracer, p0, n, h)
    e1 = tracer.vector(p1)
    if not np.linalg.norm(e1) > 0.0:
        raise ValueError(f"no field next to the surface at ({p0[0]:.3g}, {p0[1]:.3g}) mm")
    tracer.sign = 1.0 if float(np.dot(e1, n)) >= 0.0 else -1.0
    e1 = tracer.sign * e1
    if start_field_kV_per_mm is None:
        start_field_kV_per_mm = float(np.linalg.norm(probe.field(p0[None, :])[0]))
    E0 = start_field_kV_per_mm
    pts, mags = [p0, p1], [E0, float(np.linalg.norm(e1))]
    ends, body = _walk(tracer, pts, mags, e1, h, max_length_mm, max_steps)
    xy = np.array(pts)
    s = np.concatenate([[0.0], np.cumsum(np.linalg.norm(np.diff(xy, axis=0), axis=1))])
    return GasPath(xy, s, np.array(mags), ends, body)


def _first_gas_point(tracer: _Tracer, p0: np.ndarray, n: np.ndarray, h: float) -> np.ndarray:
    for _ in range(8):
        p1 = tracer.clamp(p0 + h * n)
        if tracer.region(p1) == GAS:
            return p1
        h *= 0.5
    raise ValueError(f"no gas next to the surface at ({p0[0]:.3g}, {p0[1]:.3g}) mm")


def _walk(tracer: _Tracer, pts: list, mags: list, e: np.ndarray, h: float,
          max_length: float, max_steps: int) -> tuple[str, int]:
    """Advance from ``pts[-1]`` (field ``e``) until a stop; appends to pts and mags."""
    p, s = pts[-1], float(np.linalg.norm(pts[-1] - pts[0]))
    h_max, h_min, h_edge = max_length / 50.0, h * 1e-3, h
    for _ in range(max_steps):
        pn, en, good = tracer.step(p, e, h)
        if not good and h > h_min:
            h *= 0.5
            continue
        where = tracer.region(pn)
        if where != GAS and h > h_edge:
            h *= 0.5  # approach the body in short steps: the edge is found on a short chord
            continue
        if where != GAS:
            edge = tracer.edge(p, pn)
            pts.append(edge)
            mags.append(float(np.linalg.norm(tracer.vector(edge))))
            return ("outside", GAS) if where == OUTSIDE else ("body", where)
        s += float(np.linalg.norm(pn - p))
        p, e = pn, en
        pts.append(p)
        mags.append(float(np.linalg.norm(e)))
        if mags[-1] < _FADE * mags[0]:
            return "faded", GAS
        if s >= max_length:
            return "length", GAS
        h = min(1.5 * h, h_max) if good else h
    return "length", GAS
