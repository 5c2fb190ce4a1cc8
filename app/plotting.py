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
from dataclasses import dataclass

import numpy as np
from matplotlib.axes import Axes
from matplotlib.cm import ScalarMappable
from matplotlib.colors import ListedColormap
from matplotlib.patches import PathPatch
from matplotlib.path import Path as MplPath
from scipy.interpolate import RegularGridInterpolator
from shapely.ops import polylabel

from solver.geometry import part_outline
from solver.layout import Part
from solver.solution import Solution

from . import palette
from .report_numbers import fmt_num

MAX_LEVELS = 200
"""Most equipotential levels drawn; a finer step is coarsened (and said so)."""

MAX_LABELLED_HOT_SPOTS = 6
"""Hot spots beyond this many (the weakest) are marked but not labelled."""

SLIM_FRACTION = 0.035
"""Parts with an inscribed radius below this share of the view get their caption beside them."""

MAP_PIXELS = 700
"""Pixels along the longer side of the resampled colour map."""


@dataclass(frozen=True)
class ReportOverlays:
    """What to draw over the cross-section (the same switches as the canvas).

    ``equipotential_step_V`` is the spacing of equipotential levels in volts; ``None``
    picks a round step giving about ten levels across the potential range.  When both
    colour maps are on, the field-strength map is drawn (it is the more specific view)
    and the potential is still readable from the labelled equipotentials.
    """

    potential_map: bool = True
    equipotentials: bool = True
    field_lines: bool = True
    field_strength_map: bool = False
    hot_spots: bool = True
    equipotential_step_V: float | None = None
    n_field_lines: int = 40


@dataclass(frozen=True)
class PartStyle:
    """How one kind of part is drawn in print: hatch and outline line style.

    Colours come from :mod:`app.palette` (the canvas's own); hatch and line style make
    the kinds tell apart in a black-and-white print too.
    """

    hatch: str
    linestyle: str | tuple[float, tuple[float, ...]]


PART_STYLES: dict[str, PartStyle] = {
    "electrode": PartStyle("////", "-"),
    "floating": PartStyle("xxx", (0, (5.0, 2.0))),
    "dielectric": PartStyle("...", (0, (1.2, 1.6))),
}

EQUIPOTENTIAL_COLOUR = "#2d3a4a"
FIELD_LINE_COLOUR = "#96462a"
HOT_SPOT_COLOUR = palette.HOT_SPOT.name()
PEAK_COLOUR = "#111111"
MAP_OPACITY = 0.45
"""Share of the colour map in a map pixel, the rest is the canvas colour (as on screen)."""


def part_colours(part: Part, solution: Solution) -> tuple[str, str, float]:
    r"""(edge, face, face alpha) of a part, from the canvas palette.

    An electrode's face runs from ground grey to amber with :math:`|V|/\max|V|`.
    """
    vmax = max((abs(p.volts or 0.0) for p in solution.parts if p.kind != "dielectric"),
               default=0.0)
    volts = solution.part(part.name).volts
    edge, face = palette.part_colours(part.kind, volts, vmax)
    return edge.name(), face.name(), face.alphaF()


def _blended(name: str, opacity: float, n: int = 256) -> ListedColormap:
    """A matplotlib colour map laid at ``opacity`` over the canvas colour.

    The blend keeps the lightness monotone (so the map stays perceptually ordered and
    prints as an ordered grey ramp) and leaves dark lines legible everywhere on it.
    """
    from matplotlib import colormaps

    rgba = colormaps[name](np.linspace(0.0, 1.0, n))
    bg = np.array(palette.CANVAS.getRgbF()[:3])
    rgba[:, :3] = opacity * rgba[:, :3] + (1.0 - opacity) * bg
    return ListedColormap(rgba, name=f"stresslens_{name}_print")


POTENTIAL_CMAP = _blended("cividis", MAP_OPACITY)
FIELD_CMAP = _blended("magma_r", 0.8)


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
    return levels[(levels > lo) & (levels < hi)], coarsened


def _view_slice(coords: np.ndarray, lo: float, hi: float) -> slice:
    """Index range of grid nodes covering [lo, hi] with one node to spare on each side."""
    i0 = max(int(np.searchsorted(coords, lo, side="right")) - 2, 0)
    i1 = min(int(np.searchsorted(coords, hi, side="left")) + 2, len(coords))
    return slice(i0, i1)


def _field_magnitude(solution: Solution) -> np.ndarray:
    """|E| on the grid, kV/mm, zero inside conductors."""
    e = np.hypot(solution.Ex_kV_per_mm, solution.Ey_kV_per_mm)
    return np.where(solution.conductor >= 0, 0.0, np.nan_to_num(e))


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
                        fontsize: float = 7.0) -> bool:
    """Equipotential lines labelled in kV; returns True if the step was coarsened."""
    if not overlays.equipotentials:
        return False
    levels, coarsened = equipotential_levels(solution, overlays.equipotential_step_V)
    if len(levels) == 0:
        return coarsened
    x0, y0, x1, y1 = solution.view_box_mm
    sx, sy = _view_slice(solution.x_mm, x0, x1), _view_slice(solution.y_mm, y0, y1)
    cs = ax.contour(solution.x_mm[sx], solution.y_mm[sy], solution.phi[sy, sx] / 1e3,
                    levels=levels / 1e3, colors=EQUIPOTENTIAL_COLOUR, linewidths=0.7,
                    zorder=2)
    ax.clabel(cs, inline=True, fontsize=fontsize, fmt=_kV_label, inline_spacing=2)
    return coarsened


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
        ax.plot(line[:, 0], line[:, 1], color=FIELD_LINE_COLOUR, lw=0.8, zorder=3)
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


def part_caption(part: Part, solution: Solution) -> str:
    """Name and the number that defines the part: kV, solved kV, or permittivity."""
    if part.kind == "dielectric":
        return f"{part.name}\nεr = {part.permittivity:g}"
    volts = solution.part(part.name).volts
    if volts is None:
        return part.name
    prefix = "floating, " if part.kind == "floating" else ""
    return f"{part.name}\n{prefix}{volts / 1e3:.4g} kV"


def draw_parts(ax: Axes, solution: Solution, label: bool = True, fontsize: float = 7.5) -> None:
    """Outlines filled and hatched by kind, and each part's caption at its pole.

    The caption sits at the pole of inaccessibility of the part (the interior point
    farthest from the outline), so it lands inside thin walls and annular parts too.
    """
    for part in solution.layout.parts:
        outline = part_outline(part)
        style = PART_STYLES[part.kind]
        edge, fill, alpha = part_colours(part, solution)
        verts, codes = [], []
        for ring in outline.rings:
            closed = np.vstack([ring, ring[:1]])
            verts.append(closed)
            codes += [MplPath.MOVETO] + [MplPath.LINETO] * (len(ring) - 1) + [MplPath.CLOSEPOLY]
        path = MplPath(np.vstack(verts), codes)
        face = PathPatch(path, facecolor=fill, edgecolor=edge, lw=0.0, alpha=alpha,
                         hatch=style.hatch, zorder=4 if part.is_conductor else 1)
        if hasattr(face, "set_hatch_linewidth"):  # matplotlib >= 3.10
            face.set_hatch_linewidth(0.4)
        ax.add_patch(face)
        ax.add_patch(PathPatch(path, facecolor="none", edgecolor=edge, lw=1.3,
                               linestyle=style.linestyle, zorder=5))
        if label:
            _label_part(ax, part, outline.polygon, solution, fontsize, edge)


def _label_part(ax: Axes, part: Part, polygon: object, solution: Solution,
                fontsize: float, edge: str) -> None:
    """Caption at the part's pole; beside it, with a leader, when the part is too slim.

    A part whose inscribed radius is under :data:`SLIM_FRACTION` of the view is captioned
    off to the side, towards the middle of the view, so the box does not hide it.
    """
    x0, y0, x1, y1 = solution.view_box_mm
    span = max(x1 - x0, y1 - y0)
    pole = polylabel(polygon, tolerance=span * 1e-3)
    if not (x0 <= pole.x <= x1 and y0 <= pole.y <= y1):
        return
    box = {"boxstyle": "round,pad=0.25", "fc": "white", "ec": edge, "lw": 0.6, "alpha": 0.9}
    inscribed = polygon.exterior.distance(pole)  # type: ignore[attr-defined]
    for hole in polygon.interiors:  # type: ignore[attr-defined]
        inscribed = min(inscribed, hole.distance(pole))
    text = part_caption(part, solution)
    if inscribed >= SLIM_FRACTION * span:
        ax.text(pole.x, pole.y, text, ha="center", va="center", fontsize=fontsize, zorder=8,
                clip_on=True, linespacing=1.1, bbox=box)
        return
    d = np.array([(x0 + x1) / 2 - pole.x, (y0 + y1) / 2 - pole.y])
    d = d / np.hypot(*d) if np.any(d) else np.array([0.0, 1.0])
    ax.annotate(text, xy=(pole.x, pole.y), xytext=tuple(36 * d), textcoords="offset points",
                ha="center", va="center", fontsize=fontsize, zorder=8, linespacing=1.1,
                bbox=box, arrowprops={"arrowstyle": "-", "color": edge, "lw": 0.8})


def peak_location(solution: Solution) -> tuple[str, tuple[float, float], float] | None:
    """(part, (x, y) mm, |E| kV/mm) of the largest surface field, as the solver reports it.

    Conductors count with their peak surface field, dielectrics with the gas-side field
    on their outline (the field inside a dielectric body is not a surface field).
    """
    best: tuple[str, tuple[float, float], float] | None = None
    for p in solution.parts:
        if p.kind == "dielectric":
            if p.surface_field_kV_per_mm is None or p.surface_peak_at_mm is None:
                continue
            value, at = p.surface_field_kV_per_mm, p.surface_peak_at_mm
        else:
            value, at = p.peak_field_kV_per_mm, p.peak_at_mm
        if math.isfinite(value) and (best is None or value > best[2]):
            best = (p.name, (float(at[0]), float(at[1])), float(value))
    return best


def draw_hot_spots(ax: Axes, solution: Solution, overlays: ReportOverlays,
                   fontsize: float = 7.0) -> None:
    """Hot-spot triangles labelled 'E > limit', and a star at the peak surface field.

    Only the :data:`MAX_LABELLED_HOT_SPOTS` strongest are labelled; all are marked.
    """
    if not overlays.hot_spots:
        return
    spots = sorted(solution.hot_spots, key=lambda h: -h.field_kV_per_mm)
    for k, h in enumerate(spots):
        ax.plot(*h.at_mm, marker="^", ms=9, mfc=HOT_SPOT_COLOUR, mec="white", mew=1.0,
                zorder=9, ls="none")
        if k < MAX_LABELLED_HOT_SPOTS:
            _callout(ax, h.at_mm, f"{fmt_num(h.field_kV_per_mm)} kV/mm\n> limit "
                     f"{fmt_num(h.limit_kV_per_mm)}", HOT_SPOT_COLOUR, k, fontsize)
    peak = peak_location(solution)
    if peak is not None:
        ax.plot(*peak[1], marker="*", ms=13, mfc="white", mec=PEAK_COLOUR, mew=1.0, zorder=10,
                ls="none")
        if not spots:
            _callout(ax, peak[1], f"peak {fmt_num(peak[2])} kV/mm", PEAK_COLOUR, 0, fontsize)


def _callout(ax: Axes, at: tuple[float, float], text: str, colour: str, k: int,
             fontsize: float) -> None:
    """A boxed label offset from a point, with a leader line; offsets fan out by index."""
    angle = math.radians(40 + 70 * k)
    dx, dy = 34 * math.cos(angle), 28 * math.sin(angle)
    ax.annotate(text, xy=at, xytext=(dx, dy), textcoords="offset points", fontsize=fontsize,
                ha="center", va="center", zorder=11, color="#1b1b1b",
                bbox={"boxstyle": "round,pad=0.3", "fc": "white", "ec": colour, "lw": 1.0},
                arrowprops={"arrowstyle": "-", "color": colour, "lw": 0.9})


def draw_solution(ax: Axes, solution: Solution, overlays: ReportOverlays) -> tuple[
        ScalarMappable | None, list[str]]:
    """Draw everything ``overlays`` asks for; return the colour-map artist and notes.

    The notes are sentences for the caption (e.g. a coarsened equipotential step).
    """
    notes: list[str] = []
    mappable = draw_colour_map(ax, solution, overlays)
    if draw_equipotentials(ax, solution, overlays):
        notes.append(f"equipotential step too fine for a print; drawn at "
                     f"{nice_step(float(np.ptp(solution.phi))) / 1e3:g} kV")
    draw_field_lines(ax, solution, overlays)
    draw_parts(ax, solution)
    draw_hot_spots(ax, solution, overlays)
    x0, y0, x1, y1 = solution.view_box_mm
    ax.set_xlim(x0, x1)
    ax.set_ylim(y0, y1)
    ax.set_aspect("equal", adjustable="box")
    xl, yl = axis_names(solution)
    ax.set_xlabel(xl)
    ax.set_ylabel(yl)
    return mappable, notes
