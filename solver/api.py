"""Solve a layout: grid, system, unit solutions, superposition, post-processing.

Every conductor is first a Dirichlet boundary.  For each conductor j that matters, the
unit solution :math:`u_j` (conductor j at 1 V, all others and the outer edge at 0 V)
is computed with one factorisation or multigrid hierarchy; the charges they carry give
the Maxwell capacitance matrix :math:`C_{ij} = Q_i(u_j)`.  The potential is then the
superposition :math:`\\phi = \\sum_j V_j u_j`, where the potentials of floating
conductors solve :math:`C_{ff} V_f = Q_f - C_{fe} V_e` (their given charges).  So a
change of voltages or charges alone needs no new solve at all.

Charges come from Gauss's law on the outline, :math:`Q = \\varepsilon_0\\oint
\\varepsilon_r E_n\\,dl` (planar, C/m) or :math:`\\varepsilon_0\\oint\\varepsilon_r
E_n\\,2\\pi r\\,dl` (axisymmetric, C), with the second-order surface field.
"""

from __future__ import annotations

import time
from dataclasses import dataclass

import numpy as np

from .discretize import EPS0, System, discretize
from .geometry import PartOutline, layout_outlines, same_conductor
from .grid import Grid, build_grid
from .layout import FixedLimit, Layout, Resolution
from .linsolve import Prepared, prepare, single_threaded_blas
from .post import grid_field, grid_potential
from .results import summarise
from .solution import Solution
from .surface import conductor_samples, ring_charge_integral

COARSEN_FOR_ERROR = 1.6
TOUCH_MM = 1e-6


@dataclass(frozen=True)
class PreparedLayout:
    """A layout discretised and factorised, with its unit solutions (reusable)."""

    layout: Layout
    outlines: tuple[PartOutline, ...]
    grid: Grid
    system: System
    prepared: Prepared
    unit: dict[int, np.ndarray]
    charges: dict[int, np.ndarray]
    setup_seconds: float
    converged: bool
    residual: float
    groups: dict[int, tuple[int, ...]]
    """Conductors that touch (electrodes at one potential) share one unit solution: the
    key is the group's first part, the value all its parts."""
    resolution: Resolution = "normal"


@single_threaded_blas
def prepare_layout(layout: Layout, resolution: Resolution | None = None,
                   coarsen: float = 1.0, all_conductors: bool = True) -> PreparedLayout:
    """Grid, assemble and factorise; compute the unit solutions that are needed.

    With ``all_conductors`` every conductor gets its unit solution (capacitance matrix);
    otherwise only energised electrodes, floating conductors and a live outer edge.
    """
    t0 = time.perf_counter()
    outlines = layout_outlines(layout)
    grid = build_grid(layout, outlines, resolution, coarsen=coarsen)
    system = discretize(layout, outlines, grid)
    prep = prepare(system.A)
    n_parts = len(layout.parts)
    groups = conductor_groups(layout, outlines)
    wanted = [g for g, members in groups.items() if all_conductors or any(
        layout.parts[k].kind == "floating" or (layout.parts[k].volts or 0.0) != 0.0
        for k in members)]
    if grid.outer == "dirichlet" and grid.outer_volts != 0.0:
        wanted.append(n_parts)
        groups = {**groups, n_parts: (n_parts,)}
    unit, charges = {}, {}
    need_charges = all_conductors or any(p.kind == "floating" for p in layout.parts)
    worst, ok = 0.0, True
    for g in wanted:
        members = list(groups[g])
        b = np.asarray(system.G[:, members].sum(axis=1)).ravel()
        u, info = prep.solve(b)
        worst, ok = max(worst, info.residual), ok and info.converged
        unit[g] = u
        volts = np.zeros(n_parts + 1)
        volts[members] = 1.0
        if need_charges:
            charges[g] = part_charges(layout, outlines, system, u, volts)
    return PreparedLayout(layout, outlines, grid, system, prep, unit, charges,
                          time.perf_counter() - t0, ok, worst, groups,
                          layout.resolution if resolution is None else resolution)


def conductor_groups(layout: Layout, outlines: tuple[PartOutline, ...]
                     ) -> dict[int, tuple[int, ...]]:
    """Conductor parts grouped by contact: electrodes that touch or overlap (the format
    allows it only at one potential) are one conductor.  Setting them to different
    potentials in separate unit solutions would put a singular field at the contact and
    make the capacitance matrix meaningless."""
    parent = list(range(len(layout.parts)))

    def root(k: int) -> int:
        while parent[k] != k:
            parent[k] = parent[parent[k]]
            k = parent[k]
        return k

    cond = [k for k, p in enumerate(layout.parts) if p.is_conductor]
    for a_i, a in enumerate(cond):
        for b in cond[a_i + 1:]:
            if same_conductor(layout.parts[a], layout.parts[b]) and \
                    outlines[a].polygon.distance(outlines[b].polygon) <= TOUCH_MM:
                parent[root(b)] = root(a)
    groups: dict[int, list[int]] = {}
    for k in cond:
        groups.setdefault(root(k), []).append(k)
    return {min(m): tuple(sorted(m)) for m in groups.values()}


def part_charges(layout: Layout, outlines: tuple[PartOutline, ...], system: System,
                 u: np.ndarray, volts: np.ndarray) -> np.ndarray:
    """Charge on every part (C/m planar, C axisymmetric; zero for dielectrics)."""
    phi = grid_potential(system, u, volts)
    return charges_from_samples(len(layout.parts), conductor_samples(system, outlines, phi,
                                                                     volts),
                                system.grid.axisymmetric)


def charges_from_samples(n_parts: int, samples: list, axisymmetric: bool) -> np.ndarray:
    """Gauss's law on each conductor ring's samples, summed per part (C/m or C)."""
    q = np.zeros(n_parts)
    scale = EPS0 * (1e-3 if axisymmetric else 1.0)
    for rs in samples:
        q[rs.part] += scale * ring_charge_integral(rs, axisymmetric)
    return q


def conductor_volts(pl: PreparedLayout) -> np.ndarray:
    """Potentials of every part (V; floating ones solved) and the outer edge, last."""
    layout = pl.layout
    n = len(layout.parts)
    volts = np.zeros(n + 1)
    for k, p in enumerate(layout.parts):
        if p.kind == "electrode":
            volts[k] = p.volts or 0.0
    volts[n] = pl.grid.outer_volts if pl.grid.outer == "dirichlet" else 0.0
    fl = [k for k, p in enumerate(layout.parts) if p.kind == "floating"]
    if fl:
        known = [k for k in pl.unit if k not in fl]
        q_known = sum((volts[k] * pl.charges[k] for k in known), np.zeros(n))
        cff = np.array([[pl.charges[j][i] for j in fl] for i in fl])
        rhs = np.array([(layout.parts[i].charge or 0.0) - q_known[i] for i in fl])
        volts[fl] = np.linalg.solve(cff, rhs)
    return volts


@single_threaded_blas
def solve_prepared(pl: PreparedLayout, estimate: dict[str, float] | None = None,
                   extra_seconds: float = 0.0) -> Solution:
    """The Solution of a prepared layout by superposition of its unit solutions."""
    t0 = time.perf_counter()
    volts = conductor_volts(pl)
    u = np.zeros(pl.system.A.shape[0])
    for k, uk in pl.unit.items():
        if volts[k] != 0.0:
            u += volts[k] * uk
    phi = grid_potential(pl.system, u, volts)
    ex, ey = grid_field(pl.system, phi, volts)
    n_parts = len(pl.layout.parts)
    cap_idx = [g for g in pl.groups if g < n_parts]
    if cap_idx and all(g in pl.charges for g in cap_idx):
        cap = np.array([[sum(pl.charges[j][i] for i in pl.groups[g]) for j in cap_idx]
                        for g in cap_idx])
    else:
        cap, cap_idx = np.zeros((0, 0)), []
    seconds = pl.setup_seconds + extra_seconds + time.perf_counter() - t0
    return summarise(pl, volts, u, phi, ex, ey, cap, cap_idx, seconds, estimate)


@single_threaded_blas
def solve(layout: Layout, resolution: Resolution | None = None, estimate_error: bool = True,
          capacitance: bool = True, coarsen: float = 1.0) -> Solution:
    """Solve a layout (see the module docstring); the main entry point of the solver.

    With ``estimate_error`` a second solve on a grid 1.6 times coarser gives each peak
    field an error estimate by Richardson's rule for a second-order method,
    :math:`e \\approx |E_h - E_{1.6h}| / (1.6^2 - 1)`.  ``coarsen`` > 1 scales every
    spacing of the resolution up (a quicker preview while a part is dragged).
    """
    t0 = time.perf_counter()
    pl = prepare_layout(layout, resolution, coarsen=coarsen, all_conductors=capacitance)
    estimate = None
    if estimate_error:
        coarse = solve_prepared(prepare_layout(layout, resolution,
                                               coarsen * COARSEN_FOR_ERROR,
                                               all_conductors=False))
        estimate = {p.name: p.peak_field_kV_per_mm for p in coarse.parts}
    sol = solve_prepared(pl, estimate, extra_seconds=time.perf_counter() - t0
                         - pl.setup_seconds)
    return sol


def limit_function(layout: Layout):
    """``f(radius_mm, xy_mm=None, normal=None) -> limit kV/mm`` for the layout's limit.

    With Peek's law in an axisymmetric layout the position and normal give the second
    principal curvature (the swept circle), see :func:`solver.air.peek_onset_field_kV_per_mm`.
    """
    lim = layout.limit
    if isinstance(lim, FixedLimit):
        return lambda r, xy=None, normal=None: np.full(np.shape(r), lim.kV_per_mm)
    from .air import peek_onset_field_kV_per_mm

    def peek(r: np.ndarray, xy: np.ndarray | None = None,
             normal: np.ndarray | None = None) -> np.ndarray:
        return peek_onset_field_kV_per_mm(
            np.asarray(r, float), layout.symmetry, lim,
            r_mm=None if xy is None else xy[:, 0],
            normal_r=None if normal is None else normal[:, 0])

    return peek
