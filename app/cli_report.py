"""``stresslens report LAYOUT -o OUT.pdf|png|svg``: solve headless and write the report.

PDF: the figure and the tables page; PNG and SVG: the figure.  The overlays default to
the canvas defaults (potential map, equipotentials, field lines, hot spots); the flags
switch them.  Exit 0 on success, 1 if the file cannot be written, 2 on a bad layout or
bad arguments.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from .cli_layout import (
    EXIT_BAD_INPUT,
    EXIT_OK,
    EXIT_WRITE_FAILED,
    add_layout_arguments,
    solve_layout,
)
from .plotting import ReportOverlays
from .report import REPORT_FORMATS, ReportError, write_report


def _positive_kV(text: str) -> float:
    try:
        v = float(text)
    except ValueError:
        v = float("nan")
    if not 0 < v < float("inf"):
        raise argparse.ArgumentTypeError(f"'{text}' is not a positive step in kV")
    return v


def add_arguments(parser: argparse.ArgumentParser) -> None:
    """LAYOUT, -o OUT, --resolution and the overlay switches."""
    add_layout_arguments(parser)
    parser.add_argument("-o", "--output", type=Path, required=True, metavar="OUT",
                        help="report file: .pdf (figure and tables), .png or .svg (figure)")
    parser.add_argument("--step-kv", type=_positive_kV, default=None, metavar="KV",
                        help="equipotential step in kV (default: a round step, ~10 lines)")
    parser.add_argument("--field-map", action="store_true",
                        help="colour by field strength |E| (kV/mm) instead of potential")
    parser.add_argument("--no-field-lines", action="store_true", help="leave out field lines")
    parser.add_argument("--no-equipotentials", action="store_true",
                        help="leave out equipotential lines")


def overlays_from(args: argparse.Namespace) -> ReportOverlays:
    """The overlay switches the flags ask for."""
    return ReportOverlays(
        potential_map=not args.field_map, field_strength_map=args.field_map,
        equipotentials=not args.no_equipotentials, field_lines=not args.no_field_lines,
        hot_spots=True,
        equipotential_step_V=None if args.step_kv is None else args.step_kv * 1e3)


def run(args: argparse.Namespace) -> int:
    """Solve the layout and write the report; print where it went and the peak."""
    out: Path = args.output
    if out.suffix.lower() not in REPORT_FORMATS:
        print(f"stresslens: {out.name}: unknown report format '{out.suffix or '(none)'}'; "
              f"use one of {', '.join(REPORT_FORMATS)}", file=sys.stderr)
        return EXIT_BAD_INPUT
    solution = solve_layout(args)
    if solution is None:
        return EXIT_BAD_INPUT
    try:
        write_report(solution, out, overlays_from(args), source_name=args.layout.name)
    except ReportError as exc:
        print(f"stresslens: {exc}", file=sys.stderr)
        return EXIT_WRITE_FAILED
    print(f"wrote {out} (peak surface field {solution.peak_field_kV_per_mm:.4g} kV/mm, "
          f"{len(solution.hot_spots)} hot spots)")
    return EXIT_OK
