"""Planar solves against exact analytic fields (coax, two-wire line, wire over plane,
layered plates).

Formulas are recomputed here from closed forms; the source of each is beside its check.
Tolerances are what the Shortley-Weller scheme achieves on smooth outlines, with an
honest margin (about twice the error observed), not the looser design-guidance ones.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from analytic_layouts import box_image_shift, coax, plates_layered, two_wires, wire_over_plane

import solver
from solver.solution import Solution

EPS0 = 8.8541878128e-12  # F/m, CODATA 2018


def trace_values(sol: Solution, part: str) -> np.ndarray:
    """All surface-field samples (kV/mm) on a part's outline."""
    return np.concatenate([t.E_kV_per_mm for t in sol.surfaces if t.part == part])


def rel(a: float, b: float) -> float:
    return abs(a / b - 1.0)


# ----------------------------------------------------------------------------- coax
# Coaxial cylinders: E(r) = U / (r ln(b/a)), C' = 2 pi eps0 / ln(b/a).
# Source: Gauss's law for a line charge, any electrostatics text (e.g. Griffiths,
# Introduction to Electrodynamics, ch. 2, from memory); Kuffel, Zaengl & Kuffel, High
# Voltage Engineering Fundamentals, 2nd ed., ch. 4, coaxial cylinders (from memory);
# REFERENCES 1.1, confirmed on Jim Lux, "Estimating the magnitude of the Electric Field".

A_IN, B_OUT, U = 1.0, 10.0, 10_000.0


def coax_exact() -> tuple[float, float]:
    """(E_max kV/mm, C' F/m) of the coax a = 1 mm, b = 10 mm at U."""
    return U / (A_IN * math.log(B_OUT / A_IN)) / 1000.0, 2 * math.pi * EPS0 / math.log(B_OUT / A_IN)


@pytest.fixture(scope="module", params=["draft", "normal"])
def coax_solution(request: pytest.FixtureRequest) -> tuple[str, Solution]:
    return request.param, solver.solve(coax(A_IN, B_OUT, U, request.param), estimate_error=False)


SURFACE_TOL = {"draft": 0.025, "normal": 0.005}  # observed: 0.84 %, 0.23 %
CAP_TOL = {"draft": 0.005, "normal": 0.001}      # observed: 0.26 %, 0.06 %


def test_coax_surface_field_samples(coax_solution: tuple[str, Solution]) -> None:
    res, sol = coax_solution
    e_max, _ = coax_exact()
    e = trace_values(sol, "inner")
    # Source: coaxial-cylinder field U/(a ln(b/a)), REFERENCES 1.1 (standard textbook result)
    assert np.max(np.abs(e / e_max - 1.0)) < SURFACE_TOL[res]
    # the exact field is the same all round the inner conductor: no false hot spot
    # (common practice, no source: a uniform surface field must read uniform)
    assert (e.max() - e.min()) / e.mean() < SURFACE_TOL[res]


def test_coax_capacitance(coax_solution: tuple[str, Solution]) -> None:
    res, sol = coax_solution
    _, cap = coax_exact()
    i = sol.conductor_names.index("inner")
    # Source: C' = 2 pi eps0 / ln(b/a), REFERENCES 1.1 (standard textbook result)
    assert rel(sol.capacitance[i, i], cap) < CAP_TOL[res]
    # the charge on the inner conductor is C' U (Gauss's law)
    assert rel(sol.part("inner").charge, cap * U) < CAP_TOL[res]


def test_coax_reported_peak(coax_solution: tuple[str, Solution]) -> None:
    res, sol = coax_solution
    e_max, _ = coax_exact()
    # Source: REFERENCES 1.1 (E_max = U/(a ln(b/a))); the reported peak must be as good
    # as the samples it is taken from
    assert rel(sol.part("inner").peak_field_kV_per_mm, e_max) < SURFACE_TOL[res]


# ----------------------------------------------------------------------- two wires
# Two parallel cylinders radius r, centre spacing D, at +-U/2 (exact by line charges at
# +-sqrt(D^2/4 - r^2)): C' = pi eps0 / arccosh(D/2r),
# E_max = U sqrt(D^2 - 4 r^2) / (2 r (D - 2 r) arccosh(D/2r)).
# Source: method of images for two cylinders, e.g. Smythe, Static and Dynamic
# Electricity, ch. 4 (from memory); REFERENCES 1.6 (derived there from the line charges).

@pytest.mark.parametrize("res,tol", [("draft", 0.01), ("normal", 0.005)])
def test_two_wire_line(res: str, tol: float) -> None:
    r, d, u = 5.0, 100.0, 1000.0
    sol = solver.solve(two_wires(r, d, u, res), estimate_error=False)
    e_max = u * math.sqrt(d * d - 4 * r * r) / (2 * r * (d - 2 * r) * math.acosh(d / (2 * r)))
    cap = math.pi * EPS0 / math.acosh(d / (2 * r))
    for name in ("plus", "minus"):
        assert rel(trace_values(sol, name).max(), e_max / 1000.0) < tol
    # line capacitance from the Maxwell matrix: Q+ = (C11 - C12) U / 2 at +-U/2
    c = sol.capacitance
    assert rel(0.5 * (c[0, 0] - c[0, 1]), cap) < tol
    assert rel(sol.part("plus").charge, cap * u) < tol


# ------------------------------------------------------------------ wire over plane
# Cylinder radius r, axis height h over a grounded plane: C' = 2 pi eps0 / arccosh(h/r),
# E_max = U sqrt((h+r)/(h-r)) / (r arccosh(h/r)).  Source: image line charge at
# b = sqrt(h^2 - r^2), e.g. Kuffel, Zaengl & Kuffel, 2nd ed., ch. 4 (from memory);
# REFERENCES 1.5.  The plane is the bottom wall of a grounded box 40 h wide and tall;
# the other walls' images (a doubly periodic lattice, summed below) shift the wire
# potential by -0.0021 lambda/(2 pi eps0), i.e. raise C' by 0.07 % for r = 5, h = 50.

@pytest.mark.parametrize("res,tol", [("draft", 0.01), ("normal", 0.005)])
def test_wire_over_plane(res: str, tol: float) -> None:
    r, h, u = 5.0, 50.0, 1000.0
    sol = solver.solve(wire_over_plane(r, h, u, 40 * h, res), estimate_error=False)
    ach = math.acosh(h / r)
    box = ach / (ach + box_image_shift(r, h, 40 * h))  # C_box / C_half-plane
    e_max = u * math.sqrt((h + r) / (h - r)) / (r * ach) / 1000.0 * box
    cap = 2 * math.pi * EPS0 / ach * box
    assert rel(trace_values(sol, "wire").max(), e_max) < tol
    assert rel(sol.capacitance[0, 0], cap) < tol


def test_box_image_shift_is_small() -> None:
    # the correction applied above is a small one (common practice, no source: a box
    # 40 h across changes a wire's capacitance by well under 1 %)
    assert 0.0 < -box_image_shift(5.0, 50.0, 2000.0) / math.acosh(10.0) < 1e-3


# ------------------------------------------------------------------- layered plates
# Series dielectric layers between plates: D is continuous, E_i = U / (eps_i sum d_j/eps_j).
# Source: REFERENCES 1.8 (1 mm air + 1 mm PTFE at 10 kV: 6.77 and 3.23 kV/mm);
# any electrostatics text on the parallel-plate capacitor with two dielectrics.

@pytest.mark.parametrize("d,eps", [([1.0, 1.0], [1.0, 2.1]), ([0.5, 2.0, 1.0], [1.0, 4.5, 2.1])])
def test_layered_plates(d: list[float], eps: list[float]) -> None:
    u = 10_000.0
    sol = solver.solve(plates_layered(d, eps, u, 20.0, "normal"), estimate_error=False)
    series = sum(dj / ej for dj, ej in zip(d, eps, strict=True))
    y, v_below = 0.0, u
    for dk, ek in zip(d, eps, strict=True):
        mid = np.array([[0.0, y + 0.5 * dk], [4.0, y + 0.5 * dk], [-6.0, y + 0.5 * dk]])
        phi, e = solver.sample(sol, mid)
        expect = u / (ek * series) / 1000.0
        assert np.allclose(e[:, 1], expect, rtol=1e-3)  # field points from HV (y<0) up
        assert np.allclose(e[:, 0], 0.0, atol=1e-3 * expect)
        # the potential falls linearly across each layer: mid-layer value
        assert np.allclose(phi, v_below - 500.0 * expect * dk, rtol=1e-3)
        v_below -= 1000.0 * expect * dk
        y += dk
