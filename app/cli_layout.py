"""Shared pieces of the headless subcommands: the layout argument and the solve.

Exit statuses, as for every subcommand: 0 success, 1 a file could not be written,
2 a bad layout or bad arguments (the message on stderr names the problem).
"""

from __future__ import annotations

import argparse
import sys
from dataclasses import replace
from pathlib import Path

from solver.layout import RESOLUTION_NAMES, LayoutError, Resolution, load_layout
from solver.solution import Solution

EXIT_OK, EXIT_WRITE_FAILED, EXIT_BAD_INPUT = 0, 1, 2


def resolution_arg(text: str) -> Resolution:
    """argparse type: 'draft', 'normal', 'fine' or a positive spacing in mm."""
    if text in RESOLUTION_NAMES:
        return text  # type: ignore[return-value]
    try:
        value = float(text)
    except ValueError:
        value = float("nan")
    if not value > 0 or value == float("inf"):
        raise argparse.ArgumentTypeError(
            f"'{text}' is not a resolution: use {', '.join(RESOLUTION_NAMES)} or a positive "
            f"finest grid spacing in mm")
    return value


def add_layout_arguments(parser: argparse.ArgumentParser) -> None:
    """The LAYOUT positional and ``--resolution``."""
    parser.add_argument("layout", metavar="LAYOUT", type=Path, help="a *.layout.json file")
    parser.add_argument("--resolution", type=resolution_arg, default=None, metavar="R",
                        help="draft, normal, fine or the finest grid spacing in mm "
                        "(default: the layout's own)")


def solve_layout(args: argparse.Namespace) -> Solution | None:
    """Load and solve ``args.layout``; on a bad layout print the message, return None."""
    import solver

    try:
        layout = load_layout(args.layout)
        if args.resolution is not None:  # so the Solution's layout says what was used
            layout = replace(layout, resolution=args.resolution)
        return solver.solve(layout)
    except LayoutError as exc:
        print(f"stresslens: {exc}", file=sys.stderr)
        return None
