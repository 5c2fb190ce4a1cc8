"""Save what the profile dock shows: its numbers as CSV, or its plot as PNG, SVG or PDF.

CSV, in the style of :mod:`app.export` (one header row whose names carry the units,
then one row per sample, nothing else):

* along the line probe: ``distance_mm, x_mm, y_mm, V_kV, E_kV_per_mm, at_conductor``
  (``r_mm, z_mm`` in axisymmetric layouts); ``at_conductor`` is 1 inside a conductor
  or in the grid cell at its surface, where the interpolated |E| falls short of the
  surface field;
* along an outline: ``part, ring, arc_length_mm, x_mm, y_mm, E_kV_per_mm,
  limit_kV_per_mm``.

A saved plot carries the high-voltage caution under it.  Files are written whole or not
at all (:mod:`app.atomic_file`).
"""

from __future__ import annotations

import csv
from pathlib import Path
from typing import IO, Any

from .atomic_file import write_atomically
from .caution import CAUTION
from .probes import LineProfile

FIGURE_SUFFIXES = (".png", ".svg", ".pdf")
FILTERS = "CSV table (*.csv);;PNG image (*.png);;SVG drawing (*.svg);;PDF (*.pdf)"


class ProfileExportError(ValueError):
    """A profile that cannot be saved; the message names the problem."""


def line_rows(prof: LineProfile, names: tuple[str, str]) -> list[list[object]]:
    """Header and rows of a line-probe profile (mm, kV, kV/mm)."""
    rows: list[list[object]] = [["distance_mm", f"{names[0]}_mm", f"{names[1]}_mm", "V_kV",
                                 "E_kV_per_mm", "at_conductor"]]
    for k in range(len(prof.s_mm)):
        rows.append([f"{prof.s_mm[k]:.6g}", f"{prof.xy_mm[k, 0]:.6g}",
                     f"{prof.xy_mm[k, 1]:.6g}", f"{prof.phi_V[k] / 1000:.6g}",
                     f"{prof.E_kV_per_mm[k]:.6g}", int(prof.inside[k])])
    return rows


def surface_rows(part: str, traces: list, names: tuple[str, str]) -> list[list[object]]:
    """Header and rows of a part's surface-field profile (mm, kV/mm)."""
    rows: list[list[object]] = [["part", "ring", "arc_length_mm", f"{names[0]}_mm",
                                 f"{names[1]}_mm", "E_kV_per_mm", "limit_kV_per_mm"]]
    for tr in traces:
        for k in range(len(tr.s_mm)):
            rows.append([part, tr.ring, f"{tr.s_mm[k]:.6g}", f"{tr.xy_mm[k, 0]:.6g}",
                         f"{tr.xy_mm[k, 1]:.6g}", f"{tr.E_kV_per_mm[k]:.6g}",
                         f"{tr.limit_kV_per_mm[k]:.6g}"])
    return rows


def save_profile(panel, path: str | Path) -> Path:  # noqa: ANN001 - ProfilePanel
    """Write the panel's current profile to ``path`` (by its suffix); return the path."""
    target = Path(path)
    suffix = target.suffix.lower()
    if panel.rows is None:
        raise ProfileExportError("there is no profile to save: draw a line probe or select "
                                 "a part first")
    if suffix == ".csv":
        def write_csv(f: IO[Any]) -> None:
            csv.writer(f).writerows(panel.rows)
        write_atomically(target, write_csv, True, ProfileExportError)
    elif suffix in FIGURE_SUFFIXES:
        _save_figure(panel, target, suffix[1:])
    else:
        raise ProfileExportError(f"{target.name}: choose a .csv, .png, .svg or .pdf file")
    return target


def _save_figure(panel, target: Path, fmt: str) -> None:  # noqa: ANN001 - ProfilePanel
    """The plot at a report size (6.4 x 3.8 in), the caution in a strip below it; the
    panel's own figure is put back as it was."""
    fig = panel.figure
    size, sub = fig.get_size_inches().copy(), fig.subplotpars
    margins = dict(left=sub.left, right=sub.right, bottom=sub.bottom, top=sub.top)
    fig.set_size_inches(6.4, 3.8)
    fig.subplots_adjust(left=0.1, right=0.9, bottom=0.24, top=0.9)
    title = fig.suptitle(panel.title, fontsize=9, y=0.985)
    note = fig.text(0.02, 0.015, CAUTION, fontsize=6.5, color="#5b574f", wrap=True,
                    va="bottom")
    try:
        write_atomically(target, lambda f: fig.savefig(f, format=fmt, dpi=200,
                                                       facecolor="white"),
                         False, ProfileExportError)
    finally:
        note.remove()
        title.remove()
        fig.set_size_inches(*size)
        fig.subplots_adjust(**margins)
        panel.plot.draw_idle()
