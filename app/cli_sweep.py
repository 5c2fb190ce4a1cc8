"""``stresslens sweep LAYOUT --part NAME --param PARAM --from A --to B --steps N``.

Solves the layout for N evenly spaced values of one parameter (``solver.params``) and
prints a table, or with ``--json`` exactly one JSON object on stdout (DESIGN.md section
3).  ``--goal F`` then seeks the smallest (or largest, as the response dictates) value
in [A, B] keeping the peak field at or below F x the limit.  ``--csv OUT.csv`` writes
the steps as CSV.  ``--executor`` says where steps run: ``serial``, ``processes``
(``processes:N``) or ``dask:ADDRESS``.  Progress goes to stderr.

Exit status: 0 success (also when the goal cannot be met: the answer says so), 1 the
steps could not be run (worker processes or the cluster failed) or the CSV could not be
written, 2 a bad layout or bad arguments.
"""

from __future__ import annotations

import argparse
import json
import math
import sys
from dataclasses import replace

from solver.executors import ExecutorError, make_executor
from solver.layout import LayoutError, load_layout
from solver.params import check_param_name, param_value
from solver.sweep import goal_seek, sweep

from .cli_layout import EXIT_BAD_INPUT, EXIT_OK, EXIT_WRITE_FAILED, add_layout_arguments
from .sweep_export import SweepExportError, sweep_json, sweep_table, write_sweep_csv

MAX_STEPS = 10_000


def add_arguments(parser: argparse.ArgumentParser) -> None:
    add_layout_arguments(parser)
    parser.add_argument("--part", required=True, metavar="NAME", help="the part to change")
    parser.add_argument("--param", required=True, metavar="PARAM",
                        help="radius, corner_radius, width, height, x, y (move the part), "
                        "volts, permittivity, or vertex:K:x / vertex:K:y (K from 1)")
    parser.add_argument("--from", dest="start", type=float, required=True, metavar="A",
                        help="first value (mm, V, or relative permittivity)")
    parser.add_argument("--to", dest="stop", type=float, required=True, metavar="B",
                        help="last value")
    parser.add_argument("--steps", type=int, required=True, metavar="N",
                        help="number of values from A to B, ends included")
    parser.add_argument("--goal", type=float, default=None, metavar="FRACTION",
                        help="also find the value keeping the peak field at or below "
                        "FRACTION x the limit (e.g. 0.8)")
    parser.add_argument("--json", action="store_true", help="print one JSON object")
    parser.add_argument("--executor", default="serial", metavar="WHERE",
                        help="serial (default), processes, processes:N or dask:ADDRESS")
    parser.add_argument("--csv", type=str, default=None, metavar="OUT.csv",
                        help="write the steps as CSV")
    parser.add_argument("--no-inception", action="store_true",
                        help="skip the streamer-inception estimate at each step")


def _fail(message: str) -> int:
    print(f"stresslens sweep: {message}", file=sys.stderr)
    return EXIT_BAD_INPUT


def _check_numbers(args: argparse.Namespace) -> str | None:
    if not (math.isfinite(args.start) and math.isfinite(args.stop)):
        return "--from and --to must be finite numbers"
    if not 2 <= args.steps <= MAX_STEPS:
        return f"--steps must lie between 2 and {MAX_STEPS}, not {args.steps}"
    if args.start == args.stop:
        return "--from and --to must differ"
    if args.goal is not None and not 0 < args.goal <= 10:
        return f"--goal is a fraction of the limit between 0 and 10 (e.g. 0.8), not {args.goal:g}"
    return None


def _progress(label: str):  # noqa: ANN202
    tty = sys.stderr.isatty()

    def report(done: int, total: int) -> None:
        end = "\r" if tty and done < total else "\n"
        if tty or done == total or done % max(1, total // 10) == 0:
            print(f"stresslens sweep: {label} {done}/{total}", end=end, file=sys.stderr,
                  flush=True)

    return report


def run(args: argparse.Namespace) -> int:
    problem = _check_numbers(args)
    if problem:
        return _fail(problem)
    try:
        layout = load_layout(args.layout)
        if args.resolution is not None:
            layout = replace(layout, resolution=args.resolution)
        check_param_name(args.param)
        param_value(layout, args.part, args.param)
        executor = make_executor(args.executor)
    except (LayoutError, ExecutorError) as exc:
        return _fail(str(exc))
    values = [args.start + (args.stop - args.start) * k / (args.steps - 1)
              for k in range(args.steps)]
    try:
        res = sweep(layout, args.part, args.param, values, executor,
                    inception=not args.no_inception, progress=_progress("step"))
        goal = None
        if args.goal is not None:
            print(f"stresslens sweep: seeking {args.goal:g} x the limit between the bracketing "
                  f"steps", file=sys.stderr)
            goal = goal_seek(layout, args.part, args.param, args.start, args.stop, args.goal,
                             coarse=res)
    except RuntimeError as exc:  # a broken process pool, a lost cluster
        print(f"stresslens sweep: the steps could not be run on {executor.name}: {exc}",
              file=sys.stderr)
        return EXIT_WRITE_FAILED
    finally:
        executor.close()
    if args.csv:
        try:
            write_sweep_csv(res, args.csv)
        except SweepExportError as exc:
            print(f"stresslens sweep: {exc}", file=sys.stderr)
            return EXIT_WRITE_FAILED
    if args.json:
        print(json.dumps(sweep_json(res, goal)))
    else:
        print(sweep_table(res, goal, layout.title))
    return EXIT_OK
