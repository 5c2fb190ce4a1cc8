"""The discharge-inception estimate as the GUI and the reports show it (no Qt).

:func:`assess` runs :func:`solver.inception.estimate_inception` on a solution and keeps
either the estimate or the plain reason there is none, so every view (results panel,
canvas overlay, report) shows the same outcome of one computation.  The texts carry
their units (kV, mm) and the estimate's caution
(:data:`solver.inception.INCEPTION_CAUTION`) goes wherever the number goes.
"""

from __future__ import annotations

import logging
from dataclasses import dataclass

from solver.inception import INCEPTION_CAUTION, Inception, describe_inception, estimate_inception
from solver.solution import Solution

log = logging.getLogger(__name__)

HEADING = "Discharge inception (streamer estimate)"


@dataclass(frozen=True)
class InceptionOutcome:
    """One layout's inception estimate, or the reason there is none (``reason``)."""

    inception: Inception | None
    reason: str = ""


def assess(solution: Solution) -> InceptionOutcome:
    """The streamer-criterion estimate of ``solution``, or why it cannot be made.

    A solve that did not converge gets no estimate: the field it would integrate is
    unreliable.
    """
    if not solution.converged:
        return InceptionOutcome(None, "the solve did not converge, so the field is not "
                                      "reliable enough for an estimate")
    try:
        return InceptionOutcome(estimate_inception(solution))
    except ValueError as exc:  # InceptionError included: the message says why
        return InceptionOutcome(None, str(exc))
    except Exception as exc:  # noqa: BLE001 - a failed estimate must not hide the solve
        log.exception("inception estimate failed")
        return InceptionOutcome(None, f"the estimate failed ({type(exc).__name__}: {exc})")


def top_volts(inc: Inception) -> tuple[str, float]:
    """(electrode, V) of the electrode with the largest potential magnitude at inception."""
    return max(inc.volts.items(), key=lambda kv: abs(kv[1]), default=("", 0.0))


def path_label(inc: Inception) -> str:
    """Short label of the path on a drawing, e.g. ``'inception path, 58.1 kV'``."""
    name, volts = top_volts(inc)
    if not name:
        return f"inception path, {inc.scale:.3g} x applied"
    return f"inception path, {volts / 1000:.3g} kV"


def summary_lines(inc: Inception) -> list[str]:
    """The results panel's lines (units in each): scale, electrode voltages, where the
    path starts and ends, the field utilisation factor and the notes (no caution)."""
    lines = [f"Scale: {inc.scale:.3g} x the applied voltages"]
    volts = ", ".join(f"{name} {v / 1000:.4g} kV" for name, v in inc.volts.items())
    if volts:
        lines.append(f"Electrodes at inception: {volts}")
    lines.append(f"Starts on {inc.start_part}, runs {inc.s_mm[-1]:.3g} mm to {inc.ends_at}; "
                 f"ionisation zone {inc.ionisation_length_mm:.3g} mm")
    lines.append(f"Peak field at inception: {inc.peak_field_kV_per_mm:.3g} kV/mm "
                 f"(air at {inc.p_bar:.3g} bar, 20 \u00b0C equivalent; K = {inc.K:g})")
    lines.append("Field utilisation factor (mean / peak field): " + (
        f"{inc.utilisation:.2f}" if inc.utilisation is not None
        else "\u2013 (the path does not end on another conductor)"))
    return lines + [f"Note: {n}" for n in inc.notes]


def report_lines(outcome: InceptionOutcome) -> list[str]:
    """The report's lines: :func:`describe_inception` (ending with the caution), or the
    reason there is no estimate followed by the caution."""
    if outcome.inception is not None:
        return describe_inception(outcome.inception)
    return [f"No estimate: {outcome.reason}", INCEPTION_CAUTION]


__all__ = ["HEADING", "INCEPTION_CAUTION", "InceptionOutcome", "assess", "path_label",
           "report_lines", "summary_lines", "top_volts"]
