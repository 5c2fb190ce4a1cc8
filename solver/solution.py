"""The result of a solve: plain data (numpy arrays and frozen dataclasses), no Qt.

Array layout, stated once for the whole solver: grid values are indexed ``a[iy, ix]``
(C order), ``x_mm[ix]`` and ``y_mm[iy]`` are the node coordinates in millimetres.  In an
axisymmetric layout x is the radius r and y the axial coordinate z.

Units: coordinates mm, potential V, field kV/mm (= MV/m), charge C/m (planar) or C
(axisymmetric), capacitance F/m (planar) or F (axisymmetric).
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from .layout import Layout


@dataclass(frozen=True)
class SurfaceTrace:
    """The field along one ring of one part's outline, sampled densely by arc length.

    ``E_kV_per_mm`` is the field magnitude on the outside of the outline (in the medium
    next to it).  ``radius_mm`` is the local radius of curvature (inf on straight edges,
    positive where the outline is convex, negative where concave).
    """

    part: str
    ring: int
    s_mm: np.ndarray
    xy_mm: np.ndarray
    normal: np.ndarray
    E_kV_per_mm: np.ndarray
    limit_kV_per_mm: np.ndarray
    radius_mm: np.ndarray


@dataclass(frozen=True)
class HotSpot:
    """A maximal stretch of outline where the surface field exceeds the local limit."""

    part: str
    at_mm: tuple[float, float]
    field_kV_per_mm: float
    limit_kV_per_mm: float
    s_from_mm: float
    s_to_mm: float


@dataclass(frozen=True)
class PartResult:
    """Per-part summary.

    For conductors ``peak_field_kV_per_mm`` is the largest surface field and ``volts``
    the given (electrode) or solved (floating) potential.  For dielectrics it is the
    largest field inside the body, and ``surface_field_kV_per_mm`` the largest field in
    the surrounding medium along its outline.  ``sharp_corner`` says the peak sits on a
    corner of zero radius, where the true field is unbounded and the value reported is
    that of this grid only.
    """

    name: str
    kind: str
    volts: float | None
    charge: float | None
    peak_field_kV_per_mm: float
    peak_at_mm: tuple[float, float]
    limit_at_peak_kV_per_mm: float
    margin_percent: float
    error_percent: float | None = None
    sharp_corner: bool = False
    surface_field_kV_per_mm: float | None = None
    surface_peak_at_mm: tuple[float, float] | None = None


@dataclass(frozen=True)
class Solution:
    """Everything a view, report or script needs from one solve."""

    layout: Layout
    x_mm: np.ndarray
    y_mm: np.ndarray
    phi: np.ndarray
    Ex_kV_per_mm: np.ndarray
    Ey_kV_per_mm: np.ndarray
    conductor: np.ndarray
    """Index of the part whose conductor covers each node, or -1 (int array, [iy, ix])."""
    eps_r: np.ndarray
    parts: tuple[PartResult, ...]
    surfaces: tuple[SurfaceTrace, ...]
    hot_spots: tuple[HotSpot, ...]
    capacitance: np.ndarray
    """Maxwell capacitance matrix between conductors, in the order of ``conductor_names``."""
    conductor_names: tuple[str, ...]
    unknowns: int
    solve_seconds: float
    converged: bool
    residual: float
    peak_field_kV_per_mm: float
    estimated_error_percent: float | None = None
    view_box_mm: tuple[float, float, float, float] = (0.0, 0.0, 1.0, 1.0)
    """(x0, y0, x1, y1): the region of interest around the parts (the grid extends further)."""
    notes: tuple[str, ...] = field(default_factory=tuple)
    resolution: str | float | None = None
    """The resolution this solve used (the layout's own unless overridden)."""

    def part(self, name: str) -> PartResult:
        for p in self.parts:
            if p.name == name:
                return p
        raise KeyError(name)
