"""``stresslens export LAYOUT --surface OUT.csv [--grid OUT.csv --step MM]``.

Solves headless and writes the surface field along every outline and/or the potential
and field on a regular grid (columns and conventions in :mod:`app.export`).  Exit 0 on
success, 1 if a file cannot be written, 2 on a bad layout or bad arguments.
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
from .export import ExportError, grid_axes, write_grid_csv, write_surface_csv


def add_arguments(parser: argparse.ArgumentParser) -> None:
    """LAYOUT, --resolution, --surface, --grid and --step."""
    add_layout_arguments(parser)
    parser.add_argument("--surface", type=Path, metavar="OUT.csv",
                        help="surface field along every outline (kV/mm against arc length)")
    parser.add_argument("--grid", type=Path, metavar="OUT.csv",
                        help="potential (V) and field (kV/mm) on a regular grid over the view")
    parser.add_argument("--step", type=float, default=None, metavar="MM",
                        help="grid step in mm (default: 200 points along the longer side)")


def run(args: argparse.Namespace) -> int:
    """Solve, then write the files asked for; report rows written per file."""
    if args.surface is None and args.grid is None:
        print("stresslens export: nothing to export; give --surface OUT.csv and/or "
              "--grid OUT.csv", file=sys.stderr)
        return EXIT_BAD_INPUT
    if args.step is not None and args.grid is None:
        print("stresslens export: --step applies to --grid only", file=sys.stderr)
        return EXIT_BAD_INPUT
    solution = solve_layout(args)
    if solution is None:
        return EXIT_BAD_INPUT
    try:
        if args.grid is not None:
            grid_axes(solution, args.step)  # a bad step is bad input, not a write failure
    except ExportError as exc:
        print(f"stresslens export: {exc}", file=sys.stderr)
        return EXIT_BAD_INPUT
    try:
        if args.surface is not None:
            n = write_surface_csv(solution, args.surface)
            print(f"wrote {args.surface} ({n} surface samples)")
        if args.grid is not None:
            n = write_grid_csv(solution, args.grid, args.step)
            print(f"wrote {args.grid} ({n} grid points)")
    except ExportError as exc:
        print(f"stresslens export: {exc}", file=sys.stderr)
        return EXIT_WRITE_FAILED
    return EXIT_OK
