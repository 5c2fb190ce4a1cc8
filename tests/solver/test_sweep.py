"""Sweeps and goal seek against the analytic coaxial field and against each other.

Coax: E(r) = U / (r ln(R/r)) at the inner conductor of radius r in a tube of bore R;
the standard textbook result, REFERENCES.md section 1.1 (also Jim Lux, "Estimating the
magnitude of the Electric Field", https://icestuff.com/~energy21/efield1.htm).
"""

from __future__ import annotations

import math
from dataclasses import replace

import numpy as np
import pytest
from analytic_layouts import coax
from scipy.optimize import brentq

from solver.layout import FixedLimit, PeekLimit, parse_layout
from solver.params import ParamError
from solver.sweep import goal_seek, sweep

U, BORE = 10_000.0, 20.0  # V, mm
LIMIT = 2.0  # kV/mm


def coax_e(r: float, volts: float = U) -> float:
    """Field at the inner conductor, kV/mm (REFERENCES.md 1.1: E = U / (r ln(R/r)))."""
    return volts / 1000.0 / (r * math.log(BORE / r))


def _coax(resolution: object = "normal"):
    return replace(coax(5.0, BORE, U, resolution), limit=FixedLimit(LIMIT))


def test_coax_sweep_follows_the_analytic_curve() -> None:
    radii = [2.0, 3.5, 5.0, 6.5]
    res = sweep(_coax(), "inner", "radius", radii, inception=False)
    exact = np.array([coax_e(r) for r in radii])
    assert res.values.tolist() == radii
    assert all(s.ok for s in res.steps)
    # REFERENCES.md 1.1 suggests <= 2 % on E_max; the normal grid does better
    np.testing.assert_allclose(res.part_peak("inner"), exact, rtol=0.01)
    np.testing.assert_allclose(res.peak_field_kV_per_mm, exact, rtol=0.01)
    # margin = 100 (1 - E/E_lim) with the fixed limit (definition, common practice, no source)
    np.testing.assert_allclose(res.margin_percent, 100 * (1 - exact / LIMIT), atol=1.0)
    assert (res.limit_kV_per_mm == LIMIT).all()


def test_goal_seek_finds_the_analytic_radius() -> None:
    fraction = 0.8
    # the radius where U / (r ln(R/r)) = 0.8 x limit (REFERENCES.md 1.1), on the falling
    # side of the curve (r < R/e, where the field has its minimum)
    exact = brentq(lambda r: coax_e(r) - fraction * LIMIT, 1.0, BORE / math.e)
    goal = goal_seek(_coax(), "inner", "radius", 2.0, 6.0, fraction, coarse_steps=5, xtol=5e-3)
    assert goal.message is None and goal.direction == "smallest"
    assert goal.value == pytest.approx(exact, rel=0.01)
    assert goal.utilisation <= fraction
    assert goal.peak_field_kV_per_mm == pytest.approx(fraction * LIMIT, rel=0.01)


def test_goal_seek_against_peeks_law_finds_the_analytic_radius() -> None:
    # a limit that changes with the radius: Peek's onset field of a smooth wire in air at
    # delta = 1 (25 degC, 101.325 kPa: Peek's reference), g = 30 (1 + 0.301 / sqrt(r_cm))
    # kV/cm (REFERENCES.md section 3, Wikipedia "Peek's law"); the coax field as above
    volts, fraction = 20_000.0, 0.8

    def peek_kV_per_mm(r_mm: float) -> float:
        return 3.0 * (1.0 + 0.301 / math.sqrt(r_mm / 10.0))

    exact = brentq(lambda r: coax_e(r, volts) - fraction * peek_kV_per_mm(r), 1.5, 5.0)
    layout = replace(coax(5.0, BORE, volts, "normal"),
                     limit=PeekLimit(pressure_kPa=101.325, temperature_C=25.0))
    goal = goal_seek(layout, "inner", "radius", 1.5, 5.0, fraction, coarse_steps=5, xtol=5e-3)
    assert goal.direction == "smallest"
    assert goal.limit_kV_per_mm == pytest.approx(peek_kV_per_mm(goal.value), rel=0.005)
    assert goal.value == pytest.approx(exact, rel=0.02)


def test_goal_seek_in_a_window_reports_its_lower_end() -> None:
    # U / (r ln(R/r)) has its minimum at r = R/e (REFERENCES.md 1.1): over 2..15 mm the
    # field falls below 0.8 x limit only in a window; its lower end is the answer
    fraction = 0.8
    exact = brentq(lambda r: coax_e(r) - fraction * LIMIT, 1.0, BORE / math.e)
    upper = brentq(lambda r: coax_e(r) - fraction * LIMIT, BORE / math.e, BORE - 1e-6)
    goal = goal_seek(_coax("draft"), "inner", "radius", 2.0, 15.0, fraction, coarse_steps=8)
    assert goal.direction == "smallest" and upper < 15.0
    # draft grid: the field ~1 % high moves r by ~2.5 % (d ln E / d ln r = -0.4 here)
    assert goal.value == pytest.approx(exact, rel=0.03)
    assert "not monotonic" in goal.note


def test_goal_seek_on_the_voltage_reports_the_largest() -> None:
    # E grows in proportion to U (REFERENCES.md 1.1), so the answer is the largest U with
    # U / (r ln(R/r)) <= f x limit, U = f x limit x r ln(R/r)
    fraction, r = 0.5, 5.0
    exact_kV = fraction * LIMIT * r * math.log(BORE / r)
    goal = goal_seek(_coax("draft"), "inner", "volts", 1000.0, 20000.0, fraction, xtol=1.0,
                     coarse_steps=5)
    assert goal.direction == "largest"
    assert goal.value / 1000.0 == pytest.approx(exact_kV, rel=0.02)


def test_goal_seek_refuses_when_no_value_meets_the_target() -> None:
    # the lowest field any inner radius can give is e U / R at r = R/e (REFERENCES.md 1.1),
    # 1.36 kV/mm here: 0.5 x 2 kV/mm cannot be met
    assert math.e * U / 1000 / BORE > 0.5 * LIMIT
    goal = goal_seek(_coax("draft"), "inner", "radius", 2.0, 12.0, 0.5, coarse_steps=5)
    assert goal.value is None
    assert "no value of radius in [2, 12] mm keeps the peak field at or below 0.5 x" \
        in goal.message


def test_invalid_steps_carry_a_message_and_the_sweep_goes_on() -> None:
    res = sweep(_coax("draft"), "inner", "radius", [4.0, 25.0, 6.0], inception=False)
    assert [s.ok for s in res.steps] == [True, False, True]
    assert "radius = 25 mm" in res.steps[1].error and "overlap" in res.steps[1].error
    assert math.isnan(res.peak_field_kV_per_mm[1])


def test_a_parameter_the_part_lacks_stops_the_sweep_before_any_solve() -> None:
    with pytest.raises(ParamError, match="only a dielectric"):
        sweep(_coax("draft"), "inner", "permittivity", [1.0, 2.0])


def test_rounded_corner_peak_falls_as_the_radius_grows() -> None:
    # a bar at 20 kV over a grounded plate; the corner field falls as the corner radius
    # grows (common practice, no source)
    layout = parse_layout({
        "stresslens_layout": 1, "resolution": "draft",
        "parts": [
            {"name": "bar", "kind": "electrode", "volts": 20000,
             "shape": {"type": "rect", "min": [-15, 10], "max": [15, 30], "corner_radius": 1}},
            {"name": "plate", "kind": "electrode", "volts": 0,
             "shape": {"type": "rect", "min": [-60, -5], "max": [60, 0]}}]})
    res = sweep(layout, "bar", "corner_radius", [0.5, 1.5, 3.0, 6.0], inception=False)
    peaks = res.part_peak("bar")
    assert np.all(np.diff(peaks) < 0), peaks


def test_cancel_stops_the_sweep_and_marks_the_steps_not_run() -> None:
    seen: list[int] = []
    res = sweep(_coax("draft"), "inner", "radius", [3.0, 4.0, 5.0], inception=False,
                progress=lambda done, total: seen.append(done), cancelled=lambda: len(seen) > 1)
    assert res.cancelled
    assert res.steps[0].ok and not res.steps[2].ok and "cancelled" in res.steps[2].error


def test_inception_scale_grows_with_the_radius() -> None:
    # larger radius, lower peak field at the same voltage: a higher inception voltage
    # (common practice, no source); the step carries the scale or the reason it has none
    res = sweep(_coax("draft"), "inner", "radius", [2.0, 5.0])
    assert res.inception_scale[1] > res.inception_scale[0] > 0
