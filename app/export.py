"""CSV exports: the surface field along every outline, and a regular sample grid.

Both files are plain comma-separated text, UTF-8, one header row whose names carry the
units, then one row per sample; nothing else in the file, so any CSV reader takes it.
Coordinate columns are ``x_mm, y_mm`` in planar layouts and ``r_mm, z_mm`` in
axisymmetric ones.

Surface file, one row per sample of each :class:`solver.solution.SurfaceTrace`:
``part, kind, ring, arc_length_mm, x_mm, y_mm, E_kV_per_mm, limit_kV_per_mm,
radius_mm``.  ``ring`` 0 is a part's outer outline, 1, 2... its holes; the arc length
runs from the ring's first point with the part's material on the left; ``E`` is the
field magnitude in the medium next to the outline; ``radius_mm`` is the local radius of
curvature (``inf`` on straight stretches, negative where the outline is concave).

Grid file, one row per node of a regular grid of step ``h`` mm over the view box:
``x_mm, y_mm, region, V, Ex_kV_per_mm, Ey_kV_per_mm, E_kV_per_mm``.  ``region`` names
the part the point lies in, or ``medium`` for the background gas.  Inside a conductor
(or on its outline) the potential is the conductor's own and the field is exactly zero,
as electrostatics demands; everywhere else the values are :func:`solver.sample` of the
solution.  So no cell is empty and every number is a physical value.

Files are written whole or not at all (:mod:`app.atomic_file`).
"""

from __future__ import annotations

import csv
import math
from pathlib import Path
from typing import IO

import numpy as np
import shapely

from solver.geometry import part_outline
from solver.solution import Solution

from .atomic_file import write_atomically

MAX_GRID_POINTS = 4_000_000
"""Most rows a grid export may have (about 250 MB of text)."""

DEFAULT_GRID_POINTS_ALONG = 200
"""Samples along the longer side of the view box when no step is given."""


class ExportError(ValueError):
    """An export that cannot be written; the message names the problem."""


def coordinate_names(solution: Solution) -> tuple[str, str]:
    """('x_mm', 'y_mm') for planar, ('r_mm', 'z_mm') for axisymmetric layouts."""
    return ("r_mm", "z_mm") if solution.layout.symmetry == "axisymmetric" else ("x_mm", "y_mm")


def surface_header(solution: Solution) -> list[str]:
    """Column names of the surface-field file."""
    xn, yn = coordinate_names(solution)
    return ["part", "kind", "ring", "arc_length_mm", xn, yn, "E_kV_per_mm", "limit_kV_per_mm",
            "radius_mm"]


def grid_header(solution: Solution) -> list[str]:
    """Column names of the grid file."""
    xn, yn = coordinate_names(solution)
    return [xn, yn, "region", "V", "Ex_kV_per_mm", "Ey_kV_per_mm", "E_kV_per_mm"]


def _g(v: float) -> str:
    """A float with 7 significant figures ('inf', '-inf' and 'nan' as Python writes them)."""
    return f"{v:.7g}"


def write_surface_csv_to(solution: Solution, out: IO[str]) -> int:
    """Write the surface-field table to an open text stream; return the number of rows."""
    w = csv.writer(out, lineterminator="\n")
    w.writerow(surface_header(solution))
    kinds = {p.name: p.kind for p in solution.layout.parts}
    n = 0
    for tr in solution.surfaces:
        kind = kinds.get(tr.part, "")
        for i in range(len(tr.s_mm)):
            w.writerow([tr.part, kind, tr.ring, _g(tr.s_mm[i]), _g(tr.xy_mm[i, 0]),
                        _g(tr.xy_mm[i, 1]), _g(tr.E_kV_per_mm[i]), _g(tr.limit_kV_per_mm[i]),
                        _g(tr.radius_mm[i])])
            n += 1
    return n


def grid_axes(solution: Solution, step_mm: float | None) -> tuple[np.ndarray, np.ndarray]:
    """Sample coordinates :math:`x_i = x_0 + i h \\le x_1` (same for y) over the view box.

    Raises :class:`ExportError` for a step that is not a positive finite number or that
    would give more than :data:`MAX_GRID_POINTS` points.
    """
    x0, y0, x1, y1 = solution.view_box_mm
    if step_mm is None:
        step_mm = max(x1 - x0, y1 - y0) / (DEFAULT_GRID_POINTS_ALONG - 1)
    if not (isinstance(step_mm, (int, float)) and math.isfinite(step_mm) and step_mm > 0):
        raise ExportError(f"grid step must be a positive number of mm, not {step_mm!r}")
    nx = math.floor((x1 - x0) / step_mm * (1 + 1e-12)) + 1
    ny = math.floor((y1 - y0) / step_mm * (1 + 1e-12)) + 1
    if nx * ny > MAX_GRID_POINTS:
        least = math.sqrt((x1 - x0) * (y1 - y0) / MAX_GRID_POINTS)
        raise ExportError(f"grid step {step_mm:g} mm gives {nx * ny:,} points over the "
                          f"{x1 - x0:.4g} x {y1 - y0:.4g} mm view; at most "
                          f"{MAX_GRID_POINTS:,} are allowed, so use a step of at least "
                          f"{least:.3g} mm")
    return x0 + step_mm * np.arange(nx), y0 + step_mm * np.arange(ny)


def part_regions(solution: Solution) -> list[shapely.Polygon]:
    """Each part's region (shapely, prepared for fast point queries), in layout order."""
    polys = [part_outline(p).polygon for p in solution.layout.parts]
    for poly in polys:
        shapely.prepare(poly)
    return polys


def grid_samples(solution: Solution, pts: np.ndarray,
                 regions: list[shapely.Polygon] | None = None) -> tuple[
                     np.ndarray, np.ndarray, np.ndarray]:
    """(region index per point, V, E (N, 2) kV/mm) at points (N, 2) mm; region -1: medium.

    Conductors (closed sets, outline included) get their own potential and zero field;
    other points take :func:`solver.sample`.  A dielectric region only labels the point
    (the innermost dielectric wins where one lies inside another, as in the solver).
    """
    import solver

    regions = part_regions(solution) if regions is None else regions
    region = np.full(len(pts), -1, dtype=int)
    phi, e = solver.sample(solution, pts)
    phi, e = np.array(phi, float), np.array(e, float)
    in_conductor = np.zeros(len(pts), dtype=bool)
    dielectrics = []
    for k, (part, poly) in enumerate(zip(solution.layout.parts, regions, strict=True)):
        if part.is_conductor:
            inside = shapely.intersects_xy(poly, pts[:, 0], pts[:, 1])
            volts = solution.part(part.name).volts
            phi[inside] = np.nan if volts is None else volts
            e[inside] = 0.0
            region[inside] = k
            in_conductor |= inside
        else:
            dielectrics.append((poly.area, k, poly))
    for _, k, poly in sorted(dielectrics, key=lambda t: -t[0]):  # larger first, inner wins
        inside = shapely.contains_xy(poly, pts[:, 0], pts[:, 1]) & ~in_conductor
        region[inside] = k
    return region, phi, e


def write_grid_csv_to(solution: Solution, out: IO[str], step_mm: float | None) -> int:
    """Write the grid table (rows by y, then x) to an open text stream; return the rows."""
    xs, ys = grid_axes(solution, step_mm)
    names = ["medium"] + [p.name for p in solution.layout.parts]
    regions = part_regions(solution)
    w = csv.writer(out, lineterminator="\n")
    w.writerow(grid_header(solution))
    rows_per_chunk = max(1, 50_000 // len(xs))  # bounded memory for large exports
    for j0 in range(0, len(ys), rows_per_chunk):
        yy, xx = np.meshgrid(ys[j0:j0 + rows_per_chunk], xs, indexing="ij")
        pts = np.column_stack([xx.ravel(), yy.ravel()])
        region, phi, e = grid_samples(solution, pts, regions)
        mag = np.hypot(e[:, 0], e[:, 1])
        w.writerows([_g(pts[i, 0]), _g(pts[i, 1]), names[region[i] + 1], _g(phi[i]),
                     _g(e[i, 0]), _g(e[i, 1]), _g(mag[i])] for i in range(len(pts)))
    return len(xs) * len(ys)


def write_surface_csv(solution: Solution, path: str | Path) -> int:
    """Write the surface-field CSV file; return the number of data rows."""
    return write_atomically(Path(path), lambda f: write_surface_csv_to(solution, f), True,
                            ExportError)


def write_grid_csv(solution: Solution, path: str | Path, step_mm: float | None = None) -> int:
    """Write the grid CSV file (step in mm; None: 200 points along the longer side)."""
    grid_axes(solution, step_mm)  # refuse a bad step before touching the file system
    return write_atomically(Path(path), lambda f: write_grid_csv_to(solution, f, step_mm), True,
                            ExportError)
