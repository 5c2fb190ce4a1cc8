"""A sweep as JSON (DESIGN.md section 3), as CSV and as a plain-text table.

Shared by ``stresslens sweep`` and the sweep dialog, so both write the same columns.

CSV: one header row whose names carry the units, then one row per step, nothing
else (as the other CSV exports).  Columns: the parameter (``radius_mm``, ``volts_V``,
``permittivity``), ``peak_field_kV_per_mm`` (largest surface field of any part),
``limit_kV_per_mm`` (the limit where the field comes nearest to it),
``margin_percent`` = 100 (1 - utilisation), ``utilisation`` (largest field / local
limit), ``inception_scale`` (streamer criterion: the factor on every electrode
potential at inception; empty when there is no estimate), one ``peak_<part>_kV_per_mm``
per part, and ``message`` (why a step has no numbers).
"""

from __future__ import annotations

import csv
import math
from pathlib import Path
from typing import Any, TextIO

from solver.sweep import GoalResult, SweepResult

from .atomic_file import write_atomically
from .caution import CAUTION


class SweepExportError(ValueError):
    """A sweep file that cannot be written; the message names the path and the reason."""


def _num(v: float | None, digits: int = 6) -> float | None:
    return None if v is None or not math.isfinite(v) else round(float(v), digits)


def param_column(res: SweepResult) -> str:
    """``radius_mm``, ``volts_V`` or ``permittivity`` (no unit: relative)."""
    name = res.param.replace(":", "_")
    return f"{name}_{res.unit}" if res.unit else name


def sweep_json(res: SweepResult, goal: GoalResult | None = None) -> dict[str, Any]:
    """The JSON object of DESIGN.md section 3, with a few more keys after the contract's."""
    out: dict[str, Any] = {
        "part": res.part, "param": res.param,
        "values": [_num(v, 9) for v in res.values],
        "peak_field_kV_per_mm": [_num(v) for v in res.peak_field_kV_per_mm],
        "margin_percent": [_num(v, 3) for v in res.margin_percent],
        "unit": res.unit,
        "limit_kV_per_mm": [_num(v) for v in res.limit_kV_per_mm],
        "inception_scale": [_num(v, 4) for v in res.inception_scale],
        "parts": {n: [_num(v) for v in res.part_peak(n)] for n in res.part_names},
        "messages": [s.error for s in res.steps],
        "executor": res.executor, "seconds": round(res.seconds, 3),
        "cancelled": res.cancelled,
    }
    if goal is not None:
        g: dict[str, Any] = {"fraction": goal.fraction, "value": _num(goal.value, 9),
                             "peak_field_kV_per_mm": _num(goal.peak_field_kV_per_mm)}
        if goal.value is None:
            g["message"] = goal.message
        else:
            g["limit_kV_per_mm"] = _num(goal.limit_kV_per_mm)
            g["direction"] = goal.direction
            if goal.note:
                g["note"] = goal.note
        out["goal"] = g
    return out


def csv_header(res: SweepResult) -> list[str]:
    return ([param_column(res), "peak_field_kV_per_mm", "limit_kV_per_mm", "margin_percent",
             "utilisation", "inception_scale"]
            + [f"peak_{n}_kV_per_mm" for n in res.part_names] + ["message"])


def csv_rows(res: SweepResult) -> list[list[str]]:
    def cell(v: float | None) -> str:
        return "" if v is None or not math.isfinite(v) else f"{v:.9g}"

    rows = []
    for k, s in enumerate(res.steps):
        peaks = dict(s.part_peaks)
        rows.append([cell(s.value), cell(s.peak_field_kV_per_mm), cell(s.limit_kV_per_mm),
                     cell(s.margin_percent), cell(s.utilisation), cell(res.inception_scale[k])]
                    + [cell(peaks.get(n)) for n in res.part_names] + [s.error or ""])
    return rows


def write_sweep_csv(res: SweepResult, path: str | Path) -> None:
    """Write the CSV described in the module docstring (whole or not at all)."""
    def write(f: TextIO) -> None:
        w = csv.writer(f)
        w.writerow(csv_header(res))
        w.writerows(csv_rows(res))

    write_atomically(Path(path), write, text=True, error=SweepExportError)


def goal_lines(goal: GoalResult, param: str, unit: str) -> list[str]:
    """The goal-seek answer in words, with units."""
    u = f" {unit}" if unit else ""
    if goal.value is None:
        return [f"goal {goal.fraction:g} x limit: {goal.message}"]
    lines = [f"goal {goal.fraction:g} x limit: the {goal.direction} {param} meeting it is "
             f"{goal.value:.4g}{u}, with a peak field of {goal.peak_field_kV_per_mm:.4g} kV/mm "
             f"({goal.utilisation:.3f} x the limit of {goal.limit_kV_per_mm:.4g} kV/mm)"]
    if goal.note:
        lines.append(f"  note: {goal.note}")
    return lines


def sweep_table(res: SweepResult, goal: GoalResult | None = None, title: str = "") -> str:
    """A plain-text table of the sweep, every column with its unit, the caution last."""
    pcol = param_column(res)
    names = res.part_names
    head = (f"{pcol:>16}{'peak kV/mm':>12}{'limit kV/mm':>13}{'margin %':>10}"
            f"{'inception x':>13}" + "".join(f"{n[:13] + ' kV/mm':>20}" for n in names))
    lines = [f"{title or 'layout'}: sweep of {res.part} {res.param} ({len(res.steps)} steps, "
             f"{res.executor}, {res.seconds:.1f} s)", "", head, "-" * len(head)]
    for k, s in enumerate(res.steps):
        if not s.ok:
            lines.append(f"{s.value:>16.6g}  {s.error}")
            continue
        inc = res.inception_scale[k]
        peaks = dict(s.part_peaks)
        lines.append(f"{s.value:>16.6g}{s.peak_field_kV_per_mm:>12.4g}{s.limit_kV_per_mm:>13.4g}"
                     f"{s.margin_percent:>10.1f}{'' if math.isnan(inc) else f'{inc:.3g}':>13}"
                     + "".join(f"{peaks.get(n, math.nan):>20.4g}" for n in names))
    if res.cancelled:
        lines.append("(cancelled: the remaining steps were not run)")
    if goal is not None:
        lines += [""] + goal_lines(goal, res.param, res.unit)
    lines += ["", CAUTION]
    return "\n".join(lines)
