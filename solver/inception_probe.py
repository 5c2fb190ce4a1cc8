"""A :class:`~solver.inception_path.FieldProbe` over a solved layout.

The field comes from the grid solution, sampled on the gas side of every outline; the
bodies from the exact part outlines (shapely), the domain from the grid's extent.
Units: mm, kV/mm.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import TYPE_CHECKING

import numpy as np

from .inception_path import GAS, OUTSIDE, FieldProbe

if TYPE_CHECKING:
    from .solution import Solution

_AXIS_NUDGE_MM = 1e-9


def probe_from_solution(solution: Solution) -> FieldProbe:
    """A :class:`FieldProbe` over a solved layout: the gas-side field
    (:func:`gas_field_sampler`), the exact part outlines (shapely) for the bodies, the
    grid's extent for the domain."""
    import shapely

    from .geometry import layout_outlines

    polygons = [o.polygon for o in layout_outlines(solution.layout)]
    x0, x1 = float(solution.x_mm[0]), float(solution.x_mm[-1])
    y0, y1 = float(solution.y_mm[0]), float(solution.y_mm[-1])

    axisymmetric = solution.layout.symmetry == "axisymmetric"

    def region(points: np.ndarray) -> np.ndarray:
        x, y = points[:, 0], points[:, 1]
        out = np.where((x < x0) | (x > x1) | (y < y0) | (y > y1), OUTSIDE, GAS)
        if axisymmetric:  # a part's edge on the axis may sit a rounding error off r = 0
            x = np.maximum(x, _AXIS_NUDGE_MM)
        for k, poly in enumerate(polygons):
            out = np.where((out == GAS) & shapely.intersects_xy(poly, x, y), k, out)
        return out

    names = tuple(p.name for p in solution.layout.parts)
    return FieldProbe(gas_field_sampler(solution), region, names, axisymmetric)


def gas_field_sampler(solution: Solution) -> Callable[[np.ndarray], np.ndarray]:
    r"""``f(points (N, 2) mm) -> E (N, 2) kV/mm``: bilinear in the medium nodes only.

    The grid field is zero at nodes inside conductors, so plain bilinear interpolation
    in a cell cut by an outline drags the field towards zero right where the avalanche
    grows fastest.  Here the weights of conductor nodes are dropped and the rest
    renormalised, :math:`E(p) = \sum_{i \in gas} w_i E_i / \sum_{i \in gas} w_i`, a
    first-order extrapolation of the smooth gas-side field up to the surface.
    """
    x, y = solution.x_mm, solution.y_mm
    gas = (solution.conductor < 0).astype(float)
    ex, ey = solution.Ex_kV_per_mm, solution.Ey_kV_per_mm

    def field(points: np.ndarray) -> np.ndarray:
        ix = np.clip(np.searchsorted(x, points[:, 0]) - 1, 0, len(x) - 2)
        iy = np.clip(np.searchsorted(y, points[:, 1]) - 1, 0, len(y) - 2)
        tx = np.clip((points[:, 0] - x[ix]) / (x[ix + 1] - x[ix]), 0.0, 1.0)
        ty = np.clip((points[:, 1] - y[iy]) / (y[iy + 1] - y[iy]), 0.0, 1.0)
        corners = [(iy, ix, (1 - tx) * (1 - ty)), (iy, ix + 1, tx * (1 - ty)),
                   (iy + 1, ix, (1 - tx) * ty), (iy + 1, ix + 1, tx * ty)]
        w_gas = sum(w * gas[j, i] for j, i, w in corners)
        use_all = w_gas <= 1e-12
        out = np.zeros((len(points), 2))
        for j, i, w in corners:
            wk = np.where(use_all, w, w * gas[j, i])
            out[:, 0] += wk * ex[j, i]
            out[:, 1] += wk * ey[j, i]
        return out / np.where(use_all, 1.0, w_gas)[:, None]

    return field
