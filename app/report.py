"""The report: one figure (page 1) and the tables (page 2), written headless.

:func:`render_figure` draws the cross-section with the overlays the caller asks for
(:class:`app.plotting.ReportOverlays`, the same switches as the canvas), a colour bar
with units, the title, the layout file name and the date, a small table of per-part
peak surface field, limit and margin, a legend that also reads in black and white,
and the high-voltage caution.  :func:`write_report` picks the format from the file
extension: ``.pdf`` gets both pages, ``.png`` and ``.svg`` the figure only.

matplotlib ``Figure`` objects only (no pyplot, no global backend); files are written
whole or not at all (:mod:`app.atomic_file`), so a failed export never leaves a
half-written file or destroys an older one.
"""

from __future__ import annotations

import textwrap
from datetime import datetime, timezone
from pathlib import Path
from typing import IO

from matplotlib.figure import Figure
from matplotlib.lines import Line2D
from matplotlib.patches import Patch

from solver.solution import Solution

from . import palette
from .atomic_file import write_atomically
from .caution import CAUTION
from .inception_view import InceptionOutcome, assess
from .plot_inception import INCEPTION_COLOUR, INCEPTION_STYLE
from .plot_labels import place_axes_labels
from .plot_markers import peak_location
from .plot_style import (
    EQUIPOTENTIAL_COLOUR,
    FIELD_LINE_COLOUR,
    FIELD_LINE_STYLE,
    HOT_SPOT_COLOUR,
    PART_STYLES,
    PEAK_COLOUR,
)
from .plotting import ReportOverlays, draw_solution
from .report_numbers import fitted_title, fmt_num, fmt_point
from .report_tables import (
    describe_boundary,
    describe_limit,
    describe_resolution,
    render_tables_pages,
    summary_rows,
    view_decimals,
)

__all__ = ["FIGURE_DPI", "FIGURE_SIZE_IN", "REPORT_FORMATS", "ReportError", "ReportOverlays",
           "render_figure", "write_report"]

FIGURE_SIZE_IN = (11.69, 8.27)
"""A4 landscape, inches."""

FIGURE_DPI = 150
"""Pixels per inch of a PNG report: 1754 x 1240 pixels."""

REPORT_FORMATS = (".pdf", ".png", ".svg")

MAP_AXES = (0.06, 0.13, 0.56, 0.76)
"""Left, bottom, width, height of the drawing, in figure fractions."""

TITLE_CHARS_AT_15PT = 84
"""Characters of a bold 15 pt title that fit across the page (measured, DejaVu Sans)."""

MAX_SUMMARY_ROWS = 8
"""Parts listed on the figure; the PDF's second page lists them all."""


class ReportError(ValueError):
    """A report that cannot be written; the message says why (format, folder...)."""


def render_figure(solution: Solution, overlays: ReportOverlays | None = None,
                  source_name: str = "", when: datetime | None = None,
                  inception: InceptionOutcome | None = None) -> Figure:
    """Page 1: the cross-section with its overlays, colour bar, summary and caution.

    ``inception`` is the discharge-inception outcome (made here when not given); its
    path is drawn when there is one and ``overlays.inception_path`` is on.
    """
    overlays = overlays or ReportOverlays()
    when = when or datetime.now(timezone.utc)
    inception = assess(solution) if inception is None else inception
    fig = Figure(figsize=FIGURE_SIZE_IN)
    ax = fig.add_axes(MAP_AXES)
    mappable, notes = draw_solution(ax, solution, overlays, aspect=_axes_aspect(fig),
                                    inception=inception.inception)
    if mappable is not None:
        label = ("field strength |E| (kV/mm)" if overlays.field_strength_map
                 else "potential (kV)")
        cbar = fig.colorbar(mappable, ax=ax, fraction=0.045, pad=0.02, shrink=0.85)
        cbar.set_label(label)
    place_axes_labels(ax)
    _header(fig, solution, source_name, when)
    table_bottom = _summary(fig, solution)
    _legend(fig, solution, overlays, table_bottom - 0.04,
            overlays.inception_path and inception.inception is not None)
    _settings(fig, solution)
    _footer(fig, notes + list(solution.notes))
    return fig


def _axes_aspect(fig: Figure) -> float:
    """Width / height of the drawing's box in inches, less room for the colour bar."""
    w_in = MAP_AXES[2] * fig.get_figwidth() * 0.9
    return w_in / (MAP_AXES[3] * fig.get_figheight())


def _header(fig: Figure, solution: Solution, source_name: str, when: datetime) -> None:
    title = solution.layout.title or source_name or "Stresslens layout"
    title, size = fitted_title(title, TITLE_CHARS_AT_15PT)
    fig.text(0.06, 0.955, title, fontsize=size, weight="bold", va="top")
    sub = " · ".join(s for s in (source_name, f"{solution.layout.symmetry} cross-section",
                                 f"solved {when:%Y-%m-%d %H:%M} UTC") if s)
    fig.text(0.06, 0.918, sub, fontsize=9, color="#555555", va="top")


def _summary(fig: Figure, solution: Solution) -> float:
    """The peak in large type, then the per-part table (kV/mm, %); returns its bottom."""
    x, y = 0.70, 0.86
    peak = peak_location(solution)
    fig.text(x, y, "Peak surface field", fontsize=10, color="#555555", va="top")
    value = f"{fmt_num(solution.peak_field_kV_per_mm)} kV/mm"
    err = solution.estimated_error_percent
    if err is not None:
        value += f"  ± {err:.2g} %"
    fig.text(x, y - 0.028, value, fontsize=17, weight="bold", va="top")
    if peak is not None:
        fig.text(x, y - 0.075, f"on {peak[0]} at {fmt_point(peak[1], view_decimals(solution))} mm",
                 fontsize=9, va="top")
    n_hot = len(solution.hot_spots)
    verdict = (f"{n_hot} hot spot{'s' * (n_hot != 1)} above the limit" if n_hot
               else "below the limit everywhere" if peak is not None
               else "no field: all conductors at one potential")
    fig.text(x, y - 0.102, verdict, fontsize=9, va="top", weight="bold",
             color=HOT_SPOT_COLOUR if n_hot else "#2d6a2d")
    note = ""
    if peak is not None and solution.part(peak[0]).sharp_corner:
        note = "\n".join(textwrap.wrap(
            "The peak sits on a sharp corner, where the true field is unbounded: this value "
            "depends on the grid. Round the corner to get a number that converges.", 50))
        fig.text(x, y - 0.128, note, fontsize=8.5, va="top", color=HOT_SPOT_COLOUR)
    return _summary_table(fig, solution, x, y - 0.15 - 0.022 * (note.count("\n") + bool(note)))


def _summary_table(fig: Figure, solution: Solution, x: float, y: float) -> float:
    cols = [(x, "left", "\npart"), (x + 0.15, "right", "peak\nkV/mm"),
            (x + 0.215, "right", "limit\nkV/mm"), (x + 0.275, "right", "margin\n%")]
    rows = summary_rows(solution)[:MAX_SUMMARY_ROWS]
    for k, row in enumerate([[c[2] for c in cols], *rows]):
        yy = y - 0.026 * k - 0.022 * (k > 0)
        for (cx, ha, _), cell in zip(cols, row, strict=False):
            weight = "bold" if k == 0 else "normal"
            colour = HOT_SPOT_COLOUR if k and cell.startswith("-") and cx == cols[3][0] \
                else "#1b1b1b"
            fig.text(cx, yy, cell[:18], fontsize=8.5, ha=ha, va="top", weight=weight,
                     color=colour)
        if k == 0:
            fig.add_artist(Line2D([x, x + 0.275], [yy - 0.043] * 2, transform=fig.transFigure,
                                  color="#555555", lw=0.6))
    if len(solution.parts) > len(rows):
        fig.text(x, y - 0.026 * (len(rows) + 1) - 0.022,
                 f"… {len(solution.parts) - len(rows)} more "
                 "parts on page 2", fontsize=8, va="top")
        return y - 0.026 * (len(rows) + 2) - 0.022
    return y - 0.026 * (len(rows) + 1) - 0.022


def _legend(fig: Figure, solution: Solution, overlays: ReportOverlays, top: float,
            inception_path: bool = False) -> None:
    """Symbols: one swatch per kind present, then the line and marker overlays."""
    handles: list[object] = []
    for kind in ("electrode", "floating", "dielectric"):
        if any(p.kind == kind for p in solution.layout.parts):
            edge, face = (c.name() for c in palette.part_colours(kind, 1.0, 1.0))
            s = PART_STYLES[kind]
            label = {"electrode": "electrode (fill: grey 0 V, amber +, blue −)",
                     "floating": "floating conductor", "dielectric": "dielectric"}[kind]
            handles.append(Patch(facecolor=face, edgecolor=edge, hatch=s.hatch,
                                 linestyle=s.linestyle, label=label))
    if overlays.equipotentials:
        handles.append(Line2D([], [], color=EQUIPOTENTIAL_COLOUR, lw=0.8,
                              label="equipotential (kV)"))
    if overlays.field_lines:
        handles.append(Line2D([], [], color=FIELD_LINE_COLOUR, lw=0.8, ls=FIELD_LINE_STYLE,
                              label="field line (arrow along E)"))
    if overlays.hot_spots and solution.hot_spots:
        handles.append(Line2D([], [], ls="none", marker="^", ms=8, mfc=HOT_SPOT_COLOUR,
                              mec="white", label="hot spot: field > limit"))
    if overlays.hot_spots:
        handles.append(Line2D([], [], ls="none", marker="*", ms=11, mfc="white", mec=PEAK_COLOUR,
                              label="peak surface field"))
    if inception_path:
        handles.append(Line2D([], [], color=INCEPTION_COLOUR, lw=1.8, ls=INCEPTION_STYLE,
                              marker="o", markevery=[0], ms=4, mec="white",
                              label="discharge inception path (streamer estimate)"))
    fig.legend(handles=handles, loc="upper left", bbox_to_anchor=(0.695, top), fontsize=8.5,
               frameon=False, handlelength=2.4, borderaxespad=0.0)


def _settings(fig: Figure, solution: Solution) -> None:
    """Limit, boundary, resolution and grid size, so the figure stands alone."""
    lay = solution.layout
    lines = [f"limit: {describe_limit(lay)}", f"boundary: {describe_boundary(lay)}",
             f"resolution: {describe_resolution(solution)}",
             f"{solution.unknowns:,} unknowns, solved in {solution.solve_seconds:.2g} s"]
    wrapped = [w for line in lines for w in textwrap.wrap(line, 62, subsequent_indent="  ")]
    fig.text(0.70, 0.105, "\n".join(wrapped), fontsize=7.5, va="bottom", ha="left",
             color="#444444", linespacing=1.5)


def _footer(fig: Figure, notes: list[str]) -> None:
    text = "\n".join(textwrap.wrap(CAUTION, 150))
    fig.text(0.06, 0.022, text, fontsize=8, va="bottom", ha="left",
             bbox={"boxstyle": "round,pad=0.45", "fc": "#fff6d6", "ec": "#8a6d00", "lw": 0.8})
    if notes:
        fig.text(0.06, 0.075, "Note: " + "; ".join(notes), fontsize=7.5, va="bottom",
                 color="#555555")


def write_report(solution: Solution, path: str | Path, overlays: ReportOverlays | None = None,
                 source_name: str = "", when: datetime | None = None,
                 inception: InceptionOutcome | None = None) -> Path:
    """Write the report; the format follows the extension (.pdf, .png or .svg).

    PDF: page 1 the figure (A4 landscape), page 2 the tables and the discharge-inception
    estimate with its caution (A4 portrait), continued on page 3 when they need it.  PNG: the
    figure at :data:`FIGURE_DPI`.  SVG: the figure, text kept as text.  Raises
    :class:`ReportError` for another extension or a folder that cannot be written.
    """
    target = Path(path)
    ext = target.suffix.lower()
    if ext not in REPORT_FORMATS:
        raise ReportError(f"{target.name}: unknown report format '{ext or '(none)'}'; "
                          f"use one of {', '.join(REPORT_FORMATS)}")
    when = when or datetime.now(timezone.utc)
    inception = assess(solution) if inception is None else inception
    fig = render_figure(solution, overlays, source_name or target.name, when, inception)
    write_atomically(target, lambda f: _save(f, ext, fig, solution, source_name, when,
                                             inception), False, ReportError)
    return target


def _save(f: IO[bytes], ext: str, fig: Figure, solution: Solution, source_name: str,
          when: datetime, inception: InceptionOutcome) -> None:
    meta = {"Title": solution.layout.title or source_name, "Creator": "Stresslens"}
    if ext == ".png":
        fig.savefig(f, format="png", dpi=FIGURE_DPI, metadata={"Title": meta["Title"],
                                                               "Description": CAUTION})
    elif ext == ".svg":
        import matplotlib

        with matplotlib.rc_context({"svg.fonttype": "none"}):
            fig.savefig(f, format="svg", metadata={"Title": meta["Title"],
                                                   "Description": CAUTION})
    else:
        from matplotlib.backends.backend_pdf import PdfPages

        with PdfPages(f, metadata={**meta, "Subject": CAUTION}) as pdf:
            pdf.savefig(fig)
            for page in render_tables_pages(solution, source_name, when, inception):
                pdf.savefig(page)
