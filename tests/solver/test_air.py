"""Air density, Peek's law, Paschen's law, Schumann's law: checks against published values."""

from __future__ import annotations

import math

import numpy as np
import pytest

from solver.air import (
    SCHUMANN_C,
    STREAMER_K,
    alpha_eff_per_cm,
    critical_field_kV_per_mm,
    equivalent_pressure_bar,
    paschen_minimum,
    paschen_voltage_V,
    peek_cylinder_kV_per_cm,
    peek_onset_field_kV_per_mm,
    peek_relative_air_density,
    peek_sphere_kV_per_cm,
    relative_air_density,
    schumann_breakdown_kV,
)
from solver.layout import PeekLimit

# --------------------------------------------------------------------------- density

# IEC 60060-1 delta = (p/101.3 kPa)(293/(273+t)); Peek's delta refers to 76 cmHg, 25 degC.
# Values: the worked table of relative air densities in our REFERENCES sheet, section 0,
# computed from the two definitions (IEC 60060-1; encyclopaedia article "Peek's law").
DENSITY_ROWS = [
    # p kPa, t degC, delta IEC, delta Peek
    (101.3, 20.0, 1.0000, 1.0168),
    (101.3, 25.0, 0.9832, 0.9998),
    (90.0, 30.0, 0.8591, 0.8736),
    (80.0, 0.0, 0.8476, 0.8618),
    (95.0, -10.0, 1.0448, 1.0623),
]


@pytest.mark.parametrize("p, t, iec, peek", DENSITY_ROWS)
def test_relative_air_density_both_conventions(p, t, iec, peek):
    # source: IEC 60060-1 reference atmosphere; Peek 1929 convention (REFERENCES section 0)
    assert relative_air_density(p, t) == pytest.approx(iec, abs=1e-4)
    assert peek_relative_air_density(p, t) == pytest.approx(peek, abs=1e-4)


def test_equivalent_pressure_is_density_in_bar():
    # common practice, no source: 1 bar at 20 degC is itself; twice the kelvin halves it
    assert equivalent_pressure_bar(100.0, 20.0) == pytest.approx(1.0)
    assert equivalent_pressure_bar(100.0, 313.0) == pytest.approx(0.5)


@pytest.mark.parametrize("p, t", [(0.0, 20.0), (-5.0, 20.0), (100.0, -300.0), (math.nan, 20.0)])
def test_bad_air_state_is_refused_with_a_message(p, t):
    with pytest.raises(ValueError, match="air (pressure|temperature)"):
        relative_air_density(p, t)


# --------------------------------------------------------------------------- Peek formulas

# Peek's law tables, delta = 1, m = 1, kV/cm peak: wire form (30, 0.301) from the
# encyclopaedia article "Peek's law"; coaxial (31, 0.308) and sphere (27.2, 0.54) forms from
# Peek, Dielectric Phenomena in High-Voltage Engineering (1929), from memory.
# Values: REFERENCES section 3 table, computed from those formulas.
PEEK_ROWS = [
    # r cm, wire, coaxial, sphere
    (0.05, 70.38, 73.70, 92.89),
    (0.1, 58.56, 61.19, 73.65),
    (0.5, 42.77, 44.50, 47.97),
    (1.0, 39.03, 40.55, 41.89),
    (2.0, 36.39, 37.75, 37.59),
    (5.0, 34.04, 35.27, 33.77),
    (10.0, 32.86, 34.02, 31.84),
]


@pytest.mark.parametrize("r, wire, coax, sphere", PEEK_ROWS)
def test_peek_forms_at_unit_density(r, wire, coax, sphere):
    assert peek_cylinder_kV_per_cm(r, 1.0) == pytest.approx(wire, rel=1e-3)
    assert peek_cylinder_kV_per_cm(r, 1.0, arrangement="coaxial") == pytest.approx(coax, rel=1e-3)
    assert peek_sphere_kV_per_cm(r, 1.0) == pytest.approx(sphere, rel=1e-3)


def test_peek_coaxial_worked_example_at_reduced_density():
    # REFERENCES section 3 worked example (Peek 1929 coaxial form, from memory):
    # r = 1 mm, delta = 1 -> 61.19 kV/cm; U_c = E_c r ln(R/r) with R = 50 mm -> 23.94 kV;
    # at 90 kPa and 30 degC (delta_IEC = 0.8591) -> 54.62 kV/cm.
    e_c = float(peek_cylinder_kV_per_cm(0.1, 1.0, arrangement="coaxial"))
    assert e_c * 0.1 * math.log(50.0 / 1.0) == pytest.approx(23.94, rel=1e-3)
    delta = relative_air_density(90.0, 30.0)
    assert float(peek_cylinder_kV_per_cm(0.1, delta, arrangement="coaxial")) == pytest.approx(
        54.62, rel=1e-3)


def test_peek_wire_line_worked_example():
    # encyclopaedia article "Peek's law": e_v = m g_v r ln(S/r); r = 1 mm, S = 100 cm, m = 1
    # -> 40.45 kV peak to neutral (REFERENCES section 3)
    g_v = float(peek_cylinder_kV_per_cm(0.1, 1.0))
    assert g_v * 0.1 * math.log(100.0 / 0.1) == pytest.approx(40.45, rel=1e-3)


def test_peek_sphere_worked_example_and_surface_factor():
    # REFERENCES section 3: isolated sphere r = 10 cm, E_c = 31.84 kV/cm -> U_c = E_c r = 318 kV
    assert float(peek_sphere_kV_per_cm(10.0, 1.0)) * 10.0 == pytest.approx(318.4, rel=1e-3)
    # surface factor multiplies the whole law (Peek's m; encyclopaedia article "Peek's law")
    delta = 0.8736  # 90 kPa, 30 degC, Peek convention
    ratio = peek_sphere_kV_per_cm(1.0, delta, 0.9) / peek_sphere_kV_per_cm(1.0, delta, 1.0)
    assert float(ratio) == pytest.approx(0.9, rel=1e-12)
    expected = 27.2 * 0.9 * delta * (1 + 0.54 / math.sqrt(delta * 1.0))
    assert float(peek_sphere_kV_per_cm(1.0, delta, 0.9)) == pytest.approx(expected, rel=1e-12)


def test_peek_refuses_nonsense():
    with pytest.raises(ValueError, match="positive radius"):
        peek_sphere_kV_per_cm(0.0, 1.0)
    with pytest.raises(ValueError, match="surface factor"):
        peek_sphere_kV_per_cm(1.0, 1.0, 1.5)
    with pytest.raises(ValueError, match="arrangement"):
        peek_cylinder_kV_per_cm(1.0, 1.0, arrangement="triax")


# --------------------------------------------------------------------------- onset along outlines

STD = PeekLimit(pressure_kPa=101.325, temperature_C=25.0, surface_factor=1.0)  # delta_Peek = 1


def test_planar_onset_uses_the_wire_form_in_kV_per_mm():
    # REFERENCES section 3 wire column: r = 1 mm -> 58.56 kV/cm, r = 10 mm -> 39.03 kV/cm
    g = peek_onset_field_kV_per_mm(np.array([1.0, 10.0]), "planar", STD)
    assert g == pytest.approx([5.856, 3.903], rel=1e-3)


def test_axisymmetric_on_axis_uses_the_sphere_form():
    # REFERENCES section 3 sphere column: r = 5 mm -> 47.97 kV/cm, r = 100 mm -> 31.84 kV/cm
    g = peek_onset_field_kV_per_mm(np.array([5.0, 100.0]), "axisymmetric", STD)
    assert g == pytest.approx([4.797, 3.184], rel=1e-3)


def test_axisymmetric_sphere_off_axis_is_still_a_sphere():
    # a sphere of radius a centred on the axis: n_r = r/a, so both curvatures are 1/a
    # (differential geometry of surfaces of revolution; common practice, no source)
    a = 10.0
    theta = np.linspace(0.0, math.pi, 7)
    r_ax, n_r = a * np.sin(theta), np.sin(theta)
    g = peek_onset_field_kV_per_mm(np.full(7, a), "axisymmetric", STD, r_mm=r_ax, normal_r=n_r)
    assert g == pytest.approx(np.full(7, 4.189), rel=1e-3)


def test_axisymmetric_rod_side_is_close_to_the_cylinder_forms():
    # side of a rod of radius 5 mm along the axis: straight outline, swept circle 1/5 mm.
    # Our equivalent-sphere rule must stay within 5 % of Peek's wire form and 7 % of the
    # coaxial form at r = 0.5 cm (42.77 and 44.50 kV/cm; REFERENCES section 3) while the
    # sphere form at the rod radius would be 12 % high (47.97).
    g = float(peek_onset_field_kV_per_mm(np.array([np.inf]), "axisymmetric", STD,
                                         r_mm=np.array([5.0]), normal_r=np.array([1.0]))[0])
    assert g == pytest.approx(4.277, rel=0.05)
    assert g == pytest.approx(4.450, rel=0.07)
    assert g < 4.797 * 0.95


def test_straight_concave_and_flat_get_the_uniform_field_limit_with_density():
    # Peek's law with r -> inf is g0 m delta (REFERENCES section 3); delta_Peek at 90 kPa, 30 degC
    # is 0.8736 (REFERENCES section 0); m = 0.95.
    lim = PeekLimit(pressure_kPa=90.0, temperature_C=30.0, surface_factor=0.95)
    radius = np.array([np.inf, -5.0, -0.01])
    planar = peek_onset_field_kV_per_mm(radius, "planar", lim)
    assert planar == pytest.approx(np.full(3, 3.0 * 0.95 * 0.8736), rel=2e-4)
    flat_disc = peek_onset_field_kV_per_mm(np.array([np.inf]), "axisymmetric", lim,
                                           r_mm=np.array([20.0]), normal_r=np.array([0.0]))
    assert flat_disc == pytest.approx([2.72 * 0.95 * 0.8736], rel=2e-4)


def test_sharp_corner_is_capped_at_the_edge_radius_not_infinite():
    # radius 0 and 0.01 mm are judged as 0.1 mm: wire form at 0.01 cm, delta = 1
    g = peek_onset_field_kV_per_mm(np.array([0.0, 0.01, 0.1]), "planar", STD)
    expected = 3.0 * (1 + 0.301 / math.sqrt(0.01))
    assert g == pytest.approx(np.full(3, expected), rel=1e-9)
    assert np.all(np.isfinite(g))


def test_smaller_radius_needs_a_higher_onset_field():
    # Peek: smaller radii need a higher surface field to incept (REFERENCES section 8)
    g = peek_onset_field_kV_per_mm(np.geomspace(0.2, 500.0, 30), "planar", STD)
    assert np.all(np.diff(g) < 0)


def test_onset_refuses_unknown_symmetry_and_nan_radius():
    with pytest.raises(ValueError, match="symmetry"):
        peek_onset_field_kV_per_mm(np.array([1.0]), "spherical", STD)
    with pytest.raises(ValueError, match="NaN"):
        peek_onset_field_kV_per_mm(np.array([np.nan]), "planar", STD)


# --------------------------------------------------------------------------- Paschen, Schumann

# Paschen's law for air with A = 15 /(cm Torr), B = 365 V/(cm Torr), gamma = 0.01
# (constants: neasmn.org "Paschen's Law" page and vcalc "Paschen's Law"; Raizer, Gas Discharge
# Physics, from memory).  Values: REFERENCES section 4 table computed from the formula.
PASCHEN_ROWS = [(0.5, 376.0), (1.0, 310.0), (2.0, 390.0), (5.0, 655.0), (10.0, 1049.0),
                (76.0, 5035.0), (760.0, 35509.0)]


@pytest.mark.parametrize("pd, volts", PASCHEN_ROWS)
def test_paschen_air_table(pd, volts):
    assert float(paschen_voltage_V(pd)) == pytest.approx(volts, rel=1.5e-3)


def test_paschen_minimum_and_left_asymptote():
    # REFERENCES section 4: pd_min = e ln(1 + 1/gamma)/A = 0.836 Torr cm, V_min = 305 V
    pd_min, v_min = paschen_minimum()
    assert pd_min == pytest.approx(0.836, abs=1e-3)
    assert v_min == pytest.approx(305.0, rel=2e-3)
    assert float(paschen_voltage_V(pd_min)) == pytest.approx(v_min, rel=1e-9)
    assert float(paschen_voltage_V(0.2)) == math.inf  # ln(3) < ln ln(101): no Townsend breakdown


# Schumann's uniform-field law V = 24.36 pd + 6.72 sqrt(pd) kV (Kuffel, Zaengl & Kuffel,
# High Voltage Engineering Fundamentals, 2000, gas breakdown chapter; from memory).
# Values at p = 1.013 bar: REFERENCES section 4 table.
SCHUMANN_ROWS = [(0.1, 4.61), (0.5, 17.12), (1.0, 31.44), (2.0, 58.92), (3.0, 85.74),
                 (5.0, 138.5), (10.0, 268.2)]


@pytest.mark.parametrize("d_cm, kV", SCHUMANN_ROWS)
def test_schumann_uniform_law(d_cm, kV):
    assert float(schumann_breakdown_kV(1.013, d_cm)) == pytest.approx(kV, rel=2e-3)


@pytest.mark.parametrize("d_cm, lo, hi", [(0.5, 16.8, 17.4), (1.0, 31.2, 32.0), (2.0, 57.5, 58.0),
                                          (3.0, 85.0, 85.0)])
def test_schumann_law_agrees_with_standard_sphere_gaps(d_cm, lo, hi):
    # IEC 60052 sphere-gap table as reproduced on Jim Lux's sphere-gap page (REFERENCES
    # section 5): near-uniform small gaps, all sphere sizes; table accuracy 3 %.
    v = float(schumann_breakdown_kV(1.013, d_cm))
    assert 0.97 * lo <= v <= 1.03 * hi


def test_alpha_eff_is_zero_below_critical_and_quadratic_above():
    # Schumann's fit alpha_eff/p = C((E/p) - 24.36)^2, Kuffel, Zaengl & Kuffel 2000 (from memory)
    p = 1.013
    assert critical_field_kV_per_mm(p) == pytest.approx(2.468, rel=1e-3)  # REFERENCES section 6
    E = np.array([10.0, 24.0 * p, 30.0 * p, 40.0 * p])
    a = alpha_eff_per_cm(E, p)
    assert a[:2] == pytest.approx([0.0, 0.0])
    assert a[2:] == pytest.approx(p * SCHUMANN_C * np.array([30.0 - 24.36, 40.0 - 24.36]) ** 2)


def test_alpha_eff_integral_over_a_uniform_gap_at_schumann_voltage_is_K():
    # the defining property of the (alpha_eff, K) pair: for a uniform gap at Schumann's
    # breakdown voltage the ionisation integral equals K (Kuffel et al. 2000, from memory)
    for p, d in [(1.0, 0.1), (1.013, 1.0), (2.0, 0.5), (0.8, 5.0)]:
        E = float(schumann_breakdown_kV(p, d)) / d
        assert float(alpha_eff_per_cm(E, p)) * d == pytest.approx(STREAMER_K, rel=1e-9)
