"""Where inception paths begin: stressed points on conductor surfaces.

Each conductor's highest surface field, its highest field clear of solid insulation
(a triple junction's field line runs into the solid at once), every hot spot, or the
surface sample nearest to a point the user picks.  Units: mm, kV/mm.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

from .streamer import InceptionError

if TYPE_CHECKING:
    from .solution import Solution

Start = tuple[str, np.ndarray, np.ndarray, float]
"""Where a path begins: (part name, point mm, outward unit normal, surface field kV/mm)."""


def start_points(solution: Solution) -> list[Start]:
    """(part, point mm, outward normal, surface field kV/mm) where paths begin: each
    conductor's peak, its peak away from solid insulation, and each hot spot on it."""
    conductors = {p.name for p in solution.layout.parts if p.is_conductor}
    traces = [t for t in solution.surfaces if t.part in conductors and len(t.E_kV_per_mm)]
    clear = _clear_of_solids(solution, traces)
    picks: set[tuple[int, int]] = set()
    for name in conductors:
        for masks in (None, clear):
            best = _peak_index(traces, name, masks)
            if best is not None:
                picks.add(best)
    for spot in solution.hot_spots:
        dist = [(float(np.min(np.hypot(*(t.xy_mm - spot.at_mm).T))), k)
                for k, t in enumerate(traces) if t.part == spot.part]
        if dist:
            k = min(dist)[1]
            picks.add((k, int(np.argmin(np.hypot(*(traces[k].xy_mm - spot.at_mm).T)))))
    return [(traces[k].part, traces[k].xy_mm[i], traces[k].normal[i],
             float(traces[k].E_kV_per_mm[i])) for k, i in sorted(picks)]


def _peak_index(traces: list, name: str,
                masks: list[np.ndarray] | None) -> tuple[int, int] | None:
    """(trace, sample) of the highest field on a part, among masked samples if given."""
    best, where = -1.0, None
    for k, t in enumerate(traces):
        if t.part != name:
            continue
        E = t.E_kV_per_mm if masks is None else np.where(masks[k], t.E_kV_per_mm, -1.0)
        i = int(np.argmax(E))
        if E[i] > best:
            best, where = float(E[i]), (k, i)
    return where if best >= 0.0 else None


def _clear_of_solids(solution: Solution, traces: list) -> list[np.ndarray]:
    """Per trace, the samples farther than three local sample spacings from any dielectric."""
    import shapely

    from .geometry import part_outline

    solids = [part_outline(p).polygon for p in solution.layout.parts if p.kind == "dielectric"]
    if not solids:
        return [np.ones(len(t.E_kV_per_mm), bool) for t in traces]
    union = shapely.union_all(solids)
    masks = []
    for t in traces:
        spacing = np.gradient(t.s_mm) if len(t.s_mm) > 1 else np.zeros(len(t.s_mm))
        d = shapely.distance(union, shapely.points(t.xy_mm))
        masks.append(d > 3.0 * spacing)
    return masks


def surface_start(solution: Solution, xy_mm: tuple[float, float]) -> Start:
    """The conductor surface sample nearest to a point (e.g. a hot spot the user clicked).

    Raises
    ------
    InceptionError : the layout has no conductor surface.
    """
    conductors = {p.name for p in solution.layout.parts if p.is_conductor}
    best: tuple[float, Start] | None = None
    for t in solution.surfaces:
        if t.part in conductors and len(t.s_mm):
            d = np.hypot(*(t.xy_mm - np.asarray(xy_mm, float)).T)
            i = int(np.argmin(d))
            if best is None or d[i] < best[0]:
                best = (float(d[i]), (t.part, t.xy_mm[i], t.normal[i], float(t.E_kV_per_mm[i])))
    if best is None:
        raise InceptionError("the layout has no conductor surface to start from")
    return best[1]
