"""Draw a :class:`solver.solution.Solution` onto a matplotlib Axes (no pyplot).

Shared by the report figure and any matplotlib view in the GUI.  What is drawn is
chosen by :class:`ReportOverlays`; the same switches the canvas shows, so an export shows
exactly what the engineer saw.

Layers, bottom to top: colour map (potential in kV, or field strength in kV/mm),
equipotentials labelled in kV, field lines with arrows pointing along E (from high to
low potential), part outlines (colour and hatch by kind, line style by kind so that a
black-and-white print still tells them apart), part names, hot-spot markers with value
and limit, and the marker of the peak surface field.

Units: coordinates mm, potential kV on labels (V in the Solution), field kV/mm.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

import numpy as np
from matplotlib.axes import Axes
from matplotlib.cm import ScalarMappable
from scipy.interpolate import RegularGridInterpolator
from scipy.ndimage import distance_transform_edt

from solver.inception import Inception
from solver.solution import Solution

from .plot_inception import draw_inception_path
from .plot_markers import draw_hot_spots
from .plot_parts import draw_parts
from .plot_style import (
    EQUIPOTENTIAL_COLOUR,
    FIELD_CMAP,
    FIELD_LINE_COLOUR,
    FIELD_LINE_STYLE,
    POTENTIAL_CMAP,
)

MAX_LEVELS = 200
"""Most equipotential levels drawn; a finer step is coarsened (and said so)."""

MAP_PIXELS = 700
"""Pixels along the longer side of the resampled colour map."""


@dataclass(frozen=True)
class ReportOverlays:
    """What to draw over the cross-section (the same switches as the canvas).

    ``equipotential_step_V`` is the spacing of equipotential levels in volts; ``None``
    picks a round step giving about ten levels across the potential range.
    ``equipotential_levels_V``, when given, are the levels themselves (V), so an export
    from the editor draws exactly the lines the canvas shows.  When both
    colour maps are on, the field-strength map is drawn (it is the more specific view)
    and the potential is still readable from the labelled equipotentials.
    """

    potential_map: bool = True
    equipotentials: bool = True
    field_lines: bool = True
    field_strength_map: bool = False
    hot_spots: bool = True
    inception_path: bool = True
    equipotential_step_V: float | None = None
    equipotential_levels_V: tuple[float, ...] | None = None
    n_field_lines: int = 40


def axis_names(solution: Solution) -> tuple[str, str]:
    """Axis labels with units: x/y for planar layouts, r/z for axisymmetric ones."""
    if solution.layout.symmetry == "axisymmetric":
        return "r (mm)", "z (mm)"
    return "x (mm)", "y (mm)"


def nice_step(span: float, target: int = 10) -> float:
    """A round step (1, 2, 2.5 or 5 times a power of ten) giving about ``target`` steps."""
    if not span > 0 or not math.isfinite(span):
        return 1.0
    raw = span / target
    mag = 10.0 ** math.floor(math.log10(raw))
    for m in (1.0, 2.0, 2.5, 5.0, 10.0):
        if m * mag >= raw * 0.999:
            return m * mag
    return 10.0 * mag


def equipotential_levels(solution: Solution, step_V: float | None) -> tuple[np.ndarray, bool]:
    """Levels (V) strictly between the lowest and highest potential, and a coarsened flag.

    Levels are the multiples of the step, :math:`V_k = k\\,\\Delta V`, inside
    :math:`(V_{min}, V_{max})`; a step giving more than :data:`MAX_LEVELS` levels is
    replaced by the automatic one and the flag is True.
    """
    lo, hi = float(np.nanmin(solution.phi)), float(np.nanmax(solution.phi))
    span = hi - lo
    auto = nice_step(span)
    step = auto if step_V is None or not step_V > 0 else float(step_V)
    coarsened = span / step > MAX_LEVELS
    if coarsened:
        step = auto
    k0, k1 = math.floor(lo / step) + 1, math.ceil(hi / step) - 1
    levels = np.arange(k0, k1 + 1) * step
    tol = 1e-6 * span  # round-off below a grounded wall must not make a 0 V level
    return levels[(levels > lo + tol) & (levels < hi - tol)], coarsened


def _view_slice(coords: np.ndarray, lo: float, hi: float) -> slice:
    """Index range of grid nodes covering [lo, hi] with one node to spare on each side."""
    i0 = max(int(np.searchsorted(coords, lo, side="right")) - 2, 0)
    i1 = min(int(np.searchsorted(coords, hi, side="left")) + 2, len(coords))
    return slice(i0, i1)


def _field_magnitude(solution: Solution) -> np.ndarray:
    """|E| on the grid (kV/mm), conductor nodes given their nearest medium node's value.

    Inside a conductor the field is zero, but the colour map is resampled bilinearly and
    would fade towards zero in the last cell before every surface, just where the field
    is strongest.  The conductor's own patch covers its inside, so the map only needs
    values that continue the medium's field up to the outline.
    """
    e = np.nan_to_num(np.hypot(solution.Ex_kV_per_mm, solution.Ey_kV_per_mm))
    inside = solution.conductor >= 0
    if not inside.any() or inside.all():
        return e
    _, (iy, ix) = distance_transform_edt(inside, return_indices=True)
    return e[iy, ix]


def draw_colour_map(ax: Axes, solution: Solution,
                    overlays: ReportOverlays) -> ScalarMappable | None:
    """Resample the potential (kV) or |E| (kV/mm) onto an image over the view box.

    The grid is non-uniform; the image is a bilinear resampling of the node values onto
    :data:`MAP_PIXELS` pixels along the longer side of the view, rasterised in vector
    output so PDF and SVG stay small.
    """
    if not (overlays.potential_map or overlays.field_strength_map):
        return None
    x0, y0, x1, y1 = solution.view_box_mm
    if overlays.field_strength_map:
        values, cmap = _field_magnitude(solution), FIELD_CMAP
        vmax = max(solution.peak_field_kV_per_mm, 1e-12)
        vmin = 0.0
    else:
        values, cmap = solution.phi / 1e3, POTENTIAL_CMAP
        vmin, vmax = float(np.nanmin(values)), float(np.nanmax(values))
        if vmax <= vmin:
            vmax = vmin + 1e-3
    interp = RegularGridInterpolator((solution.y_mm, solution.x_mm), values,
                                     bounds_error=False, fill_value=np.nan)
    scale = MAP_PIXELS / max(x1 - x0, y1 - y0)
    nx, ny = max(int((x1 - x0) * scale), 2), max(int((y1 - y0) * scale), 2)
    xs, ys = np.linspace(x0, x1, nx), np.linspace(y0, y1, ny)
    yy, xx = np.meshgrid(ys, xs, indexing="ij")
    img = interp(np.column_stack([yy.ravel(), xx.ravel()])).reshape(ny, nx)
    im = ax.imshow(img, origin="lower", extent=(x0, x1, y0, y1), cmap=cmap, vmin=vmin,
                   vmax=vmax, interpolation="bilinear", zorder=0, rasterized=True)
    return im


def draw_equipotentials(ax: Axes, solution: Solution, overlays: ReportOverlays,
                        fontsize: float = 7.0) -> str | None:
    """Equipotential lines labelled in kV; returns a note if fewer were drawn than asked."""
    if not overlays.equipotentials:
        return None
    note = None
    if overlays.equipotential_levels_V is not None:
        levels = np.unique(np.asarray(overlays.equipotential_levels_V, float))
        if len(levels) > MAX_LEVELS:
            note = f"only the first {MAX_LEVELS} of {len(levels)} equipotentials drawn"
            levels = levels[:MAX_LEVELS]
    else:
        levels, coarsened = equipotential_levels(solution, overlays.equipotential_step_V)
        if coarsened:
            note = (f"equipotential step too fine for a print; drawn at "
                    f"{nice_step(float(np.ptp(solution.phi))) / 1e3:g} kV")
    if len(levels) == 0:
        return note
    x0, y0, x1, y1 = solution.view_box_mm
    sx, sy = _view_slice(solution.x_mm, x0, x1), _view_slice(solution.y_mm, y0, y1)
    cs = ax.contour(solution.x_mm[sx], solution.y_mm[sy], solution.phi[sy, sx] / 1e3,
                    levels=levels / 1e3, colors=EQUIPOTENTIAL_COLOUR, linewidths=0.7,
                    negative_linestyles="solid", zorder=2)
    ax.clabel(cs, inline=True, fontsize=fontsize, fmt=_kV_label, inline_spacing=2)
    return note


def _kV_label(v: float) -> str:
    return f"{v:.4g} kV"


def draw_field_lines(ax: Axes, solution: Solution, overlays: ReportOverlays) -> int:
    """Field lines from :func:`solver.field_lines`, each with one arrow along E.

    The arrow sits at the line's middle and points along
    :math:`\\mathbf E = -\\nabla\\varphi` interpolated there.  Returns the number drawn.
    """
    if not overlays.field_lines:
        return 0
    import solver

    lines = solver.field_lines(solution, n_lines=overlays.n_field_lines)
    ex = RegularGridInterpolator((solution.y_mm, solution.x_mm), solution.Ex_kV_per_mm,
                                 bounds_error=False, fill_value=0.0)
    ey = RegularGridInterpolator((solution.y_mm, solution.x_mm), solution.Ey_kV_per_mm,
                                 bounds_error=False, fill_value=0.0)
    drawn = 0
    for line in lines:
        if len(line) < 2:
            continue
        ax.plot(line[:, 0], line[:, 1], color=FIELD_LINE_COLOUR, lw=0.8, ls=FIELD_LINE_STYLE,
                zorder=3)
        _field_arrow(ax, line, ex, ey)
        drawn += 1
    return drawn


def _field_arrow(ax: Axes, line: np.ndarray, ex: RegularGridInterpolator,
                 ey: RegularGridInterpolator) -> None:
    m = len(line) // 2
    a, b = line[max(m - 1, 0)], line[min(m + 1, len(line) - 1)]
    mid = 0.5 * (a + b)
    e = np.array([ex([mid[::-1]])[0], ey([mid[::-1]])[0]])
    d = b - a
    if not np.any(d) or float(np.dot(d, e)) == 0.0:
        return
    if float(np.dot(d, e)) < 0:
        a, b = b, a
    ax.annotate("", xy=tuple(b), xytext=tuple(a), zorder=3,
                arrowprops={"arrowstyle": "-|>", "color": FIELD_LINE_COLOUR, "lw": 0.6,
                            "mutation_scale": 7, "shrinkA": 0, "shrinkB": 0})


def fitted_view(solution: Solution, aspect: float | None) -> tuple[float, float, float, float]:
    """The solver's view box widened to ``aspect`` (width / height), within the grid.

    The shorter side grows about the centre so the drawing fills the axes; the grid
    reaches beyond the view box, so the added margin shows computed field, never blank.
    In an axisymmetric layout the view starts at most 3 % of its width left of the axis;
    no view reaches past the grid (a boxed layout ends at its walls).
    """
    x0, y0, x1, y1 = (float(v) for v in solution.view_box_mm)
    if aspect is not None and aspect > 0:
        w, h = x1 - x0, y1 - y0
        if w / h < aspect:
            x0, x1 = _grow(x0, x1, h * aspect, solution.x_mm)
        else:
            y0, y1 = _grow(y0, y1, w / aspect, solution.y_mm)
    if solution.layout.symmetry == "axisymmetric":
        x0 = max(x0, -0.03 * (x1 - x0))
    x0, x1 = max(x0, float(solution.x_mm[0])), min(x1, float(solution.x_mm[-1]))
    y0, y1 = max(y0, float(solution.y_mm[0])), min(y1, float(solution.y_mm[-1]))
    return x0, y0, x1, y1


def _grow(lo: float, hi: float, size: float, coords: np.ndarray) -> tuple[float, float]:
    """[lo, hi] widened to ``size`` about its middle, shifted or cut to lie in the grid."""
    mid = 0.5 * (lo + hi)
    lo, hi = mid - size / 2, mid + size / 2
    g0, g1 = float(coords[0]), float(coords[-1])
    if lo < g0:
        lo, hi = g0, min(g1, hi + (g0 - lo))
    if hi > g1:
        lo, hi = max(g0, lo - (hi - g1)), g1
    return lo, hi


def draw_axis_of_symmetry(ax: Axes, solution: Solution) -> None:
    """A dash-dot line on r = 0 and a light veil over r < 0 (axisymmetric layouts only)."""
    if solution.layout.symmetry != "axisymmetric":
        return
    x0, y0, x1, y1 = solution.view_box_mm
    if x0 < 0:
        ax.axvspan(x0, 0.0, color="#e9e6df", zorder=6, lw=0)
    ax.axvline(0.0, color="#55606e", lw=0.9, ls=(0, (8, 2, 1.5, 2)), zorder=7)


def draw_solution(ax: Axes, solution: Solution, overlays: ReportOverlays,
                  aspect: float | None = None, inception: Inception | None = None
                  ) -> tuple[ScalarMappable | None, list[str]]:
    """Draw everything ``overlays`` asks for; return the colour-map artist and notes.

    ``aspect`` (width / height of the axes box) widens the view to fill it, see
    :func:`fitted_view`.  The notes are sentences for the caption (e.g. a coarsened
    equipotential step).  ``inception``, when given, has its path drawn
    (:func:`app.plot_inception.draw_inception_path`) if ``overlays.inception_path``.
    """
    solution = replace(solution, view_box_mm=fitted_view(solution, aspect))
    mappable = draw_colour_map(ax, solution, overlays)
    note = draw_equipotentials(ax, solution, overlays)
    notes = [] if note is None else [note]
    draw_field_lines(ax, solution, overlays)
    draw_parts(ax, solution)
    draw_axis_of_symmetry(ax, solution)
    if overlays.hot_spots:
        draw_hot_spots(ax, solution)
    if overlays.inception_path and inception is not None:
        draw_inception_path(ax, inception)
    x0, y0, x1, y1 = solution.view_box_mm
    ax.set_xlim(x0, x1)
    ax.set_ylim(y0, y1)
    ax.set_aspect("equal", adjustable="box")
    xl, yl = axis_names(solution)
    ax.set_xlabel(xl)
    ax.set_ylabel(yl)
    return mappable, notes
