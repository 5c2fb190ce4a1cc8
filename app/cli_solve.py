"""``stresslens solve LAYOUT [--resolution R] [--json]``: solve headless, print results.

Without ``--json`` a table for people; with it exactly one JSON object on stdout (the
contract in DESIGN.md section 3).  Exit 0 on success, 2 on a bad layout.
"""

from __future__ import annotations

import argparse
import json
import math
import sys
from typing import Any

from solver.solution import Solution

from .caution import CAUTION
from .cli_layout import EXIT_BAD_INPUT, EXIT_OK, add_layout_arguments, solve_layout


def add_arguments(parser: argparse.ArgumentParser) -> None:
    add_layout_arguments(parser)
    parser.add_argument("--json", action="store_true", help="print one JSON object")
    parser.add_argument("--no-inception", action="store_true",
                        help="skip the streamer-criterion inception estimate")


def run(args: argparse.Namespace) -> int:
    sol = solve_layout(args)
    if sol is None:
        return EXIT_BAD_INPUT
    inception = None if args.no_inception else _inception(sol)
    if args.json:
        print(json.dumps(solution_json(sol, inception)))
    else:
        print(solution_table(sol, inception))
    return EXIT_OK


def _inception(sol: Solution) -> Any:
    from solver.inception import estimate_inception

    try:
        return estimate_inception(sol)
    except ValueError as exc:
        print(f"stresslens: no inception estimate: {exc}", file=sys.stderr)
        return None


def _num(v: float | None) -> float | None:
    return None if v is None or not math.isfinite(v) else round(float(v), 6)


def _xy(p: tuple[float, float] | None) -> list[float | None] | None:
    return None if p is None else [_num(p[0]), _num(p[1])]


def solution_json(sol: Solution, inception: Any = None) -> dict[str, Any]:
    """The JSON object of DESIGN.md section 3."""
    parts = []
    for p in sol.parts:
        d: dict[str, Any] = {"name": p.name, "kind": p.kind}
        if p.kind != "dielectric":
            d["volts"] = _num(p.volts)
        d["peak_field_kV_per_mm"] = _num(p.peak_field_kV_per_mm)
        d["peak_at_mm"] = _xy(p.peak_at_mm)
        d["limit_kV_per_mm"] = _num(p.limit_at_peak_kV_per_mm)
        d["margin_percent"] = _num(p.margin_percent)
        d["error_percent"] = _num(p.error_percent)
        if p.kind != "dielectric":
            d["charge"] = p.charge
            d["sharp_corner"] = p.sharp_corner
        else:
            d["surface_field_kV_per_mm"] = _num(p.surface_field_kV_per_mm)
            d["surface_peak_at_mm"] = _xy(p.surface_peak_at_mm)
        parts.append(d)
    out: dict[str, Any] = {
        "symmetry": sol.layout.symmetry, "unknowns": sol.unknowns,
        "solve_seconds": round(sol.solve_seconds, 4),
        "peak_field_kV_per_mm": _num(sol.peak_field_kV_per_mm),
        "estimated_error_percent": _num(sol.estimated_error_percent),
        "converged": sol.converged, "parts": parts,
        "hot_spots": [{"part": h.part, "at_mm": _xy(h.at_mm),
                       "field_kV_per_mm": _num(h.field_kV_per_mm),
                       "limit_kV_per_mm": _num(h.limit_kV_per_mm)} for h in sol.hot_spots],
        "capacitance": {"conductors": list(sol.conductor_names),
                        "unit": "F/m" if sol.layout.symmetry == "planar" else "F",
                        "matrix": sol.capacitance.tolist()},
    }
    if inception is not None:
        from solver.inception import inception_to_json

        out["inception"] = inception_to_json(inception)
    return out


def _capacitance_lines(sol: Solution) -> list[str]:
    """The Maxwell capacitance matrix in pF/m (planar) or pF (axisymmetric)."""
    names = sol.conductor_names
    if not names or sol.capacitance.size == 0:
        return []
    unit = "pF/m" if sol.layout.symmetry == "planar" else "pF"
    width = max(10, max(len(n) for n in names) + 2)
    out = ["", f"capacitance matrix, {unit} (charge on the row's conductor per volt on the "
           f"column's, the others at 0 V):", " " * width + "".join(f"{n[:width - 1]:>{width}}"
                                                                   for n in names)]
    for name, row in zip(names, sol.capacitance, strict=True):
        out.append(f"{name[:width - 1]:<{width}}" + "".join(f"{c * 1e12:>{width}.4g}"
                                                           for c in row))
    return out


def solution_table(sol: Solution, inception: Any = None) -> str:
    """A plain-text table of the results, every number with its unit."""
    q_unit = "C/m" if sol.layout.symmetry == "planar" else "C"
    lines = [f"{sol.layout.title or 'layout'}  ({sol.layout.symmetry}, {sol.unknowns:,} "
             f"unknowns, {sol.solve_seconds:.2f} s)", ""]
    head = (f"{'part':<18}{'kind':<11}{'potential kV':>13}{'peak kV/mm':>12}{'limit kV/mm':>12}"
            f"{'margin %':>10}{'error %':>9}  {'at x, y mm':<18}{'charge ' + q_unit:>14}")
    lines += [head, "-" * len(head)]
    for p in sol.parts:
        v = "" if p.volts is None else f"{p.volts / 1000:.4g}"
        err = "" if p.error_percent is None else f"{p.error_percent:.2g}"
        at = f"{p.peak_at_mm[0]:.2f}, {p.peak_at_mm[1]:.2f}"
        q = "" if p.charge is None else f"{p.charge:.4g}"
        flag = "  sharp corner: value grows with resolution; give it a radius" \
            if p.sharp_corner else ""
        lines.append(f"{p.name[:17]:<18}{p.kind:<11}{v:>13}{p.peak_field_kV_per_mm:>12.4g}"
                     f"{p.limit_at_peak_kV_per_mm:>12.4g}{p.margin_percent:>10.1f}{err:>9}  "
                     f"{at:<18}{q:>14}{flag}")
        if p.kind == "dielectric" and p.surface_field_kV_per_mm is not None:
            lines.append(f"{'':<18}{'(gas side)':<11}{'':>13}{p.surface_field_kV_per_mm:>12.4g}")
    lines += _capacitance_lines(sol)
    lines.append("")
    if sol.hot_spots:
        lines.append(f"{len(sol.hot_spots)} hot spot(s) above the limit:")
        for h in sol.hot_spots:
            lines.append(f"  {h.part}: {h.field_kV_per_mm:.4g} kV/mm > {h.limit_kV_per_mm:.4g} "
                         f"kV/mm at ({h.at_mm[0]:.2f}, {h.at_mm[1]:.2f}) mm")
    else:
        lines.append("no hot spots: every surface field is below its limit")
    if inception is not None:
        from solver.inception import describe_inception

        lines += [""] + describe_inception(inception)
    if not sol.converged:
        lines.append("WARNING: the linear solve did not reach its tolerance")
    lines += ["", CAUTION]
    return "\n".join(lines)
