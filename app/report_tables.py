"""The numbers of a report as rows of text, and page 2 of the PDF that prints them.

Every row builder takes a :class:`solver.solution.Solution` and returns strings, so the
tests can check the printed numbers against the solve.  Units: field kV/mm, potential
kV, coordinates mm, charge and capacitance with an SI prefix on C/m and F/m (planar,
per metre of length) or C and F (axisymmetric, the whole body of revolution).
"""

from __future__ import annotations

import math
import textwrap
from collections.abc import Sequence
from dataclasses import dataclass, field
from datetime import datetime

import numpy as np
from matplotlib.figure import Figure
from matplotlib.lines import Line2D

from solver.geometry import part_outline
from solver.layout import FixedLimit, Layout
from solver.solution import PartResult, Solution

from .caution import CAUTION
from .inception_view import HEADING, InceptionOutcome, report_lines
from .report_numbers import fmt_num, fmt_point, fmt_si, point_decimals
from .report_profile import closest_to_limit, draw_surface_profiles

A4_PORTRAIT_IN = (8.27, 11.69)
MAX_HOT_SPOT_ROWS = 18
MAX_PART_ROWS = 24
MAX_MATRIX_CONDUCTORS = 6
PROFILE_BOTTOM = 0.12
PROFILE_MIN_HEIGHT = 0.12
"""Figure fractions: the profile's lower edge (above the caution) and least height."""
CHARGE_ROUND_OFF = 1e-9
TEXT_FLOOR = 0.10
"""Figure fraction: no text row below it on a tables page (the caution block's room)."""


def charge_unit(layout: Layout) -> str:
    """C/m for planar (per metre of length), C for axisymmetric layouts."""
    return "C/m" if layout.symmetry == "planar" else "C"


def capacitance_unit(layout: Layout) -> str:
    """F/m for planar, F for axisymmetric layouts."""
    return "F/m" if layout.symmetry == "planar" else "F"


def surface_peak(p: PartResult) -> float:
    """The field the limit applies to: the surface field in the medium next to the part.

    For conductors that is ``peak_field_kV_per_mm``; for dielectrics the gas-side
    ``surface_field_kV_per_mm`` (the field inside the body is a different number).
    """
    if p.kind == "dielectric" and p.surface_field_kV_per_mm is not None:
        return p.surface_field_kV_per_mm
    return p.peak_field_kV_per_mm


def summary_rows(solution: Solution) -> list[list[str]]:
    """Page-1 table: part, peak surface field, limit at the peak, margin (%)."""
    return [[p.name, fmt_num(surface_peak(p)), fmt_num(p.limit_at_peak_kV_per_mm),
             f"{p.margin_percent:+.1f}" if math.isfinite(p.margin_percent) else "–"]
            for p in solution.parts]


def _peak_with_error(p: PartResult) -> str:
    """The surface peak with its error estimate, or a sharp-corner warning."""
    text = fmt_num(surface_peak(p))
    if p.sharp_corner:
        return text + " (sharp corner)"
    if p.kind != "dielectric" and p.error_percent is not None and \
            math.isfinite(p.error_percent):
        return f"{text} ± {p.error_percent:.2g} %"
    return text


def view_decimals(solution: Solution) -> int:
    """Decimals for coordinates: a thousandth of the view, a hundredth of the smallest part.

    So a 2 mm wire in a 200 mm duct still gets its peak located to 0.1 mm.
    """
    x0, y0, x1, y1 = solution.view_box_mm
    smallest = min((min(b[2] - b[0], b[3] - b[1]) for b in
                    (part_outline(p).polygon.bounds for p in solution.layout.parts)),
                   default=float("inf"))
    return max(point_decimals(max(x1 - x0, y1 - y0)), point_decimals(10.0 * smallest))


def surface_peak_at(p: PartResult) -> tuple[float, float] | None:
    """Where :func:`surface_peak` sits (the gas-side peak for a dielectric)."""
    if p.kind == "dielectric" and p.surface_peak_at_mm is not None:
        return p.surface_peak_at_mm
    return p.peak_at_mm


def part_rows(solution: Solution) -> list[list[str]]:
    """Page-2 parts table, one row per part: the surface field the limit applies to.

    For a dielectric that is the gas-side field on its outline; the field inside the
    body is in :func:`dielectric_rows`.
    """
    d = view_decimals(solution)
    rows = []
    for p in solution.parts[:MAX_PART_ROWS]:
        volts = "–" if p.volts is None else fmt_num(p.volts / 1e3)
        if p.kind == "floating" and p.volts is not None:
            volts += " (solved)"
        rows.append([p.name, p.kind, volts, _peak_with_error(p),
                     fmt_point(surface_peak_at(p), d), fmt_num(p.limit_at_peak_kV_per_mm),
                     f"{p.margin_percent:+.1f}" if math.isfinite(p.margin_percent) else "–"])
    return rows


def dielectric_rows(solution: Solution) -> list[list[str]]:
    """Dielectric bodies: relative permittivity and the largest field inside (kV/mm, mm)."""
    d = view_decimals(solution)
    return [[p.name, fmt_num(solution.layout.part(p.name).permittivity),
             fmt_num(p.peak_field_kV_per_mm), fmt_point(p.peak_at_mm, d)]
            for p in solution.parts if p.kind == "dielectric"]


def hot_spot_rows(solution: Solution) -> tuple[list[list[str]], int]:
    """Hot spots, strongest first, at most :data:`MAX_HOT_SPOT_ROWS`; and how many more."""
    spots = sorted(solution.hot_spots, key=lambda h: -h.field_kV_per_mm)
    d = view_decimals(solution)
    rows = [[h.part, fmt_point(h.at_mm, d), fmt_num(h.field_kV_per_mm),
             fmt_num(h.limit_kV_per_mm), "", f"{h.s_from_mm:.4g} – {h.s_to_mm:.4g}"]
            for h in spots[:MAX_HOT_SPOT_ROWS]]
    return rows, max(len(spots) - MAX_HOT_SPOT_ROWS, 0)


def charge_rows(solution: Solution) -> list[list[str]]:
    """Charge on each conductor, with its SI-prefixed unit.

    A charge below :data:`CHARGE_ROUND_OFF` of the largest is round-off of a zero (a
    floating part with no net charge, say) and is printed as 0.
    """
    unit = charge_unit(solution.layout)
    conductors = [p for p in solution.parts if p.kind != "dielectric"]
    largest = max((abs(p.charge or 0.0) for p in conductors), default=0.0)
    return [[p.name, fmt_si(0.0 if p.charge is not None and abs(p.charge) <
                            CHARGE_ROUND_OFF * largest else p.charge, unit)]
            for p in conductors]


def capacitance_rows(solution: Solution) -> tuple[list[str], list[list[str]]]:
    """Maxwell capacitance matrix (header, rows); only the diagonal for many conductors."""
    names = list(solution.conductor_names)
    c = np.asarray(solution.capacitance, float)
    unit = capacitance_unit(solution.layout)
    if c.size == 0:
        return [], []
    if len(names) > MAX_MATRIX_CONDUCTORS:
        return ["conductor", "C_ii"], [[n, fmt_si(c[i, i], unit)] for i, n in enumerate(names)]
    return ["", *names], [[n, *(fmt_si(c[i, j], unit) for j in range(len(names)))]
                          for i, n in enumerate(names)]


def describe_boundary(layout: Layout) -> str:
    """The outer boundary in words, with the box corners in mm."""
    b = layout.boundary
    if b.type == "open":
        return "open (field decays far away)"
    box = f"box {fmt_point(b.min)} to {fmt_point(b.max)} mm"
    if b.volts is None:
        return f"{box}, insulating walls (symmetry planes)"
    return f"{box}, walls at {fmt_num(b.volts / 1e3)} kV"


def describe_limit(layout: Layout) -> str:
    """The field limit in words."""
    lim = layout.limit
    if isinstance(lim, FixedLimit):
        return f"fixed, {fmt_num(lim.kV_per_mm)} kV/mm"
    return (f"Peek's law in air, {fmt_num(lim.pressure_kPa)} kPa, {fmt_num(lim.temperature_C)} "
            f"°C, surface factor {fmt_num(lim.surface_factor)}")


def describe_resolution(solution: Solution) -> str:
    """The resolution the solve used: draft, normal, fine or the finest spacing in mm
    (``Solution.resolution``; the layout's own setting for older solutions)."""
    r = solution.resolution if solution.resolution is not None else solution.layout.resolution
    return r if isinstance(r, str) else f"finest spacing {fmt_num(r)} mm"


def settings_rows(solution: Solution) -> list[list[str]]:
    """Symmetry, boundary, limit and resolution."""
    lay = solution.layout
    return [["symmetry", lay.symmetry], ["boundary", describe_boundary(lay)],
            ["field limit", describe_limit(lay)], ["resolution", describe_resolution(solution)]]


def statistics_rows(solution: Solution) -> list[list[str]]:
    """Unknowns, time, convergence, residual and the estimated error of the peak."""
    err = solution.estimated_error_percent
    return [["unknowns", f"{solution.unknowns:,}"],
            ["solve time", f"{solution.solve_seconds:.3g} s"],
            ["converged", "yes" if solution.converged else "NO: results unreliable"],
            ["relative residual", f"{solution.residual:.2g}"],
            ["peak surface field", f"{fmt_num(solution.peak_field_kV_per_mm)} kV/mm"],
            ["estimated error of the peak", "–" if err is None else f"{err:.2g} %"]]


@dataclass
class _Cursor:
    """Writes text rows down a figure, top to bottom, in figure coordinates; a row that
    would reach the caution block goes on a continuation page (``pages``)."""

    fig: Figure
    y: float = 0.95
    left: float = 0.07
    right: float = 0.93
    pages: list[Figure] = field(default_factory=list)

    def _dy(self, points: float) -> float:
        return points / (self.fig.get_figheight() * 72.0)

    def need(self, points: float) -> None:
        """Start a continuation page unless ``points`` more fit above the caution block."""
        if self.y - self._dy(points) < TEXT_FLOOR:
            self.new_page()

    def new_page(self) -> None:
        """Close this page (its caution) and go on at the top of a continuation page."""
        _caution_block(self.fig, self.left, self.right)
        self.fig = Figure(figsize=A4_PORTRAIT_IN)
        self.pages.append(self.fig)
        self.y = 0.95
        self.fig.text(self.left, self.y, "Results in numbers (continued)", fontsize=14,
                      weight="bold", va="top")
        self.y -= self._dy(24)

    def heading(self, text: str) -> None:
        self.need(10 + 17 + 12)  # a heading is never left alone at the foot of a page
        self.y -= self._dy(10)
        self.fig.text(self.left, self.y, text, fontsize=11, weight="bold", va="top")
        self.y -= self._dy(17)

    def line(self, text: str, size: float = 8.5, colour: str = "#1b1b1b") -> None:
        self.need(size * 1.5)
        self.fig.text(self.left, self.y, text, fontsize=size, va="top", color=colour)
        self.y -= self._dy(size * 1.5)

    def table(self, header: Sequence[str], rows: Sequence[Sequence[str]],
              widths: Sequence[float], numeric: Sequence[bool], span: float = 1.0) -> None:
        """Columns at relative ``widths`` over ``span`` of the text width; numbers right."""
        total = sum(widths)
        edges = np.concatenate([[0.0], np.cumsum(widths)]) / total
        right = self.left + span * (self.right - self.left)
        xs = self.left + edges * (right - self.left)
        for k, row in enumerate([list(header), *map(list, rows)]):
            self.need(12)
            for j, cell in enumerate(row):
                x, ha = (xs[j + 1] - 0.008, "right") if numeric[j] else (xs[j], "left")
                self.fig.text(x, self.y, cell, fontsize=8, va="top", ha=ha,
                              weight="bold" if k == 0 else "normal")
            self.y -= self._dy(12)
            if k == 0:
                self.fig.add_artist(_rule(self.fig, self.y + self._dy(2), self.left, right))


def _rule(fig: Figure, y: float, x0: float, x1: float) -> Line2D:
    return Line2D([x0, x1], [y, y], transform=fig.transFigure, color="#555555", lw=0.6)


def render_tables_page(solution: Solution, source_name: str, when: datetime,
                       inception: InceptionOutcome | None = None) -> Figure:
    """Page 2 (the first of :func:`render_tables_pages`)."""
    return render_tables_pages(solution, source_name, when, inception)[0]


def render_tables_pages(solution: Solution, source_name: str, when: datetime,
                        inception: InceptionOutcome | None = None) -> list[Figure]:
    """Page 2 and, when it overflows, its continuation pages: parts, hot spots, the
    discharge-inception estimate (when ``inception`` is given) with its caution, charges
    and capacitances, settings, solver statistics, the surface-field profile if there is
    room.  Every page carries the caution."""
    fig = Figure(figsize=A4_PORTRAIT_IN)
    cur = _Cursor(fig, pages=[fig])
    fig.text(cur.left, cur.y, "Results in numbers", fontsize=14, weight="bold", va="top")
    cur.y -= cur._dy(20)
    for line in textwrap.wrap(solution.layout.title or source_name, 95):
        cur.line(line, size=9.5)
    cur.line(f"{source_name} · {solution.layout.symmetry} · {when:%Y-%m-%d %H:%M} UTC",
             colour="#555555")
    cur.heading("Parts: peak surface field (kV/mm), potential (kV), coordinates (mm)")
    cur.table(["part", "kind", "potential kV", "peak field kV/mm", "at (mm)",
               "limit kV/mm", "margin %"], part_rows(solution),
              [1.3, 0.85, 1.15, 1.65, 1.75, 1.0, 0.9],
              [False, False, True, True, False, True, True])
    if len(solution.parts) > MAX_PART_ROWS:
        cur.line(f"… and {len(solution.parts) - MAX_PART_ROWS} more parts (all are in "
                 f"'stresslens solve --json').", size=8)
    inside = dielectric_rows(solution)
    if inside:
        cur.line("For a dielectric the surface field is the gas-side field on its outline "
                 "(where surface flashover starts); the field inside it:", size=8)
        cur.table(["dielectric", "εr", "field inside kV/mm", "at (mm)"], inside,
                  [1.6, 0.8, 1.7, 1.6], [False, True, True, False], span=0.72)
    _hot_spot_section(cur, solution)
    if inception is not None:
        _inception_section(cur, inception)
    _charge_section(cur, solution)
    cur.heading("Settings")
    cur.table(["setting", "value"], settings_rows(solution), [1.3, 6.0], [False, False],
              span=0.85)
    cur.heading("Solver statistics")
    cur.table(["quantity", "value"], statistics_rows(solution), [2.2, 2.3], [False, False],
              span=0.55)
    for note in solution.notes:
        cur.line(f"Note: {note}", size=8)
    _profile_section(cur, solution)
    _caution_block(cur.fig, cur.left, cur.right)
    return cur.pages


def _profile_section(cur: _Cursor, solution: Solution) -> None:
    """The surface-field profile in the room left above the caution, or at the top of a
    continuation page when too little is left."""
    bottom = PROFILE_BOTTOM
    if not closest_to_limit(solution):
        return
    if cur.y - cur._dy(46) - bottom < PROFILE_MIN_HEIGHT:
        cur.new_page()  # on a page of its own rather than left out
    cur.heading("Surface field along the outlines closest to their limit")
    draw_surface_profiles(cur.fig, solution, (cur.left + 0.05, bottom, 0.55,
                                              cur.y - cur._dy(8) - bottom))


def _hot_spot_section(cur: _Cursor, solution: Solution) -> None:
    cur.heading("Hot spots (surface field above the limit)")
    rows, more = hot_spot_rows(solution)
    if not rows:
        cur.line("None: the surface field stays below the limit on every outline.")
        return
    cur.table(["part", "at (mm)", "field kV/mm", "limit kV/mm", "", "arc length (mm)"], rows,
              [1.4, 1.4, 1.0, 1.0, 0.3, 1.3], [False, False, True, True, False, False],
              span=0.85)
    if more:
        cur.line(f"… and {more} weaker hot spots (all are in the surface-field CSV export).")


def _inception_section(cur: _Cursor, inception: InceptionOutcome) -> None:
    """The streamer estimate in words (kV, mm, kV/mm), then its caution in small type."""
    cur.heading(HEADING)
    *lines, caution = report_lines(inception)
    for line in lines:
        for k, part in enumerate(textwrap.wrap(line, 110)):
            cur.line(("    " if k else "") + part)
    for part in textwrap.wrap(caution, 125):
        cur.line(part, size=7.5, colour="#6b5200")


def _charge_section(cur: _Cursor, solution: Solution) -> None:
    per = " per metre of length" if solution.layout.symmetry == "planar" else ""
    cur.heading(f"Charges and capacitances{per}")
    charges = charge_rows(solution)
    if charges:
        cur.table(["conductor", "charge"], charges, [1.6, 1.4], [False, True], span=0.4)
    header, rows = capacitance_rows(solution)
    if rows:
        cur.y -= cur._dy(4)
        cur.line("Maxwell capacitance matrix (row: charge on it per volt on the column's "
                 "conductor):", size=8)
        n = len(header)
        cur.table(header, rows, [1.6] + [1.2] * (n - 1), [False] + [True] * (n - 1),
                  span=min(1.0, 0.2 + 0.15 * (n - 1)))


def _caution_block(fig: Figure, left: float, right: float) -> None:
    text = "\n".join(textwrap.wrap(CAUTION, 110))
    fig.text(left, 0.035, text, fontsize=8, va="bottom", ha="left", color="#1b1b1b",
             bbox={"boxstyle": "round,pad=0.5", "fc": "#fff6d6", "ec": "#8a6d00", "lw": 0.8})
