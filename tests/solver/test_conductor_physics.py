"""Laws every electrostatic solution obeys, checked on solved layouts.

Conductors are equipotentials, the field leaves them along the normal, a cavity in a
conductor is field-free, a smaller radius carries a larger field, Laplace's equation
has no interior extremum, and the field is linear in the electrode voltages.  Sources
beside each check.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np
import pytest
from analytic_layouts import circle_points

import solver
from solver.layout import parse_layout


def planar(parts: list[dict[str, Any]], box: float | None = None, res: Any = "normal",
           walls: float | None = 0.0) -> solver.Layout:
    boundary = ({"type": "open"} if box is None else
                {"type": "box", "min": [-box, -box], "max": [box, box], "volts": walls})
    return parse_layout({"stresslens_layout": 1, "symmetry": "planar", "resolution": res,
                         "boundary": boundary, "limit": {"type": "fixed", "kV_per_mm": 1e6},
                         "parts": parts})


def electrode(name: str, volts: float, shape: dict[str, Any]) -> dict[str, Any]:
    return {"name": name, "kind": "electrode", "volts": volts, "shape": shape}


def test_floating_conductor_takes_the_mid_potential() -> None:
    # A neutral conductor placed symmetrically midway between two plates floats at the
    # mean of their potentials (symmetry of Laplace's equation under y -> -y with
    # V -> U - V; common practice, no source)
    lay = planar([
        electrode("top", 0.0, {"type": "rect", "min": [-40, 20], "max": [40, 24]}),
        electrode("bottom", 8000.0, {"type": "rect", "min": [-40, -24], "max": [40, -20]}),
        {"name": "float", "kind": "floating", "charge": 0.0,
         "shape": {"type": "ellipse", "center": [0, 0], "radii": [8, 3]}},
    ], box=40, walls=None)
    sol = solver.solve(lay, estimate_error=False)
    assert sol.part("float").volts == pytest.approx(4000.0, abs=4.0)
    # the potential inside it, read back from the grid, is that value everywhere
    inside = sol.conductor == 2
    assert np.ptp(sol.phi[inside]) < 1e-9 * 8000
    assert np.allclose(sol.phi[inside], sol.part("float").volts)


def test_field_leaves_the_surface_along_the_normal() -> None:
    # On a conductor the tangential field vanishes: E is along the outward normal
    # (boundary condition on an equipotential; Griffiths, Introduction to
    # Electrodynamics, ch. 2, conductors, from memory)
    lay = planar([
        electrode("hv", 5000.0, {"type": "ellipse", "center": [0, 0], "radii": [10, 5],
                                 "angle_deg": 30}),
        electrode("gnd", 0.0, {"type": "rect", "min": [-40, -30], "max": [40, -20]}),
    ], res="fine")
    sol = solver.solve(lay, estimate_error=False)
    tr = [t for t in sol.surfaces if t.part == "hv"][0]
    h = float(np.min(np.diff(sol.x_mm)))
    tangent = np.column_stack([-tr.normal[:, 1], tr.normal[:, 0]])

    def components(k: float) -> tuple[np.ndarray, np.ndarray]:
        """Normal and tangential field sampled k spacings off the surface (kV/mm)."""
        _, e = solver.sample(sol, tr.xy_mm + k * h * tr.normal)
        return np.einsum("ij,ij->i", e, tr.normal), np.einsum("ij,ij->i", e, tangent)

    # Off the surface the field line bends (the angle grows linearly with distance), so
    # extrapolate the components sampled 2 h and 4 h out linearly back to the surface
    (en2, et2), (en4, et4) = components(2.0), components(4.0)
    en0, et0 = 2 * en2 - en4, 2 * et2 - et4
    ok = np.isfinite(en0) & np.isfinite(et0)
    angle = np.degrees(np.arctan2(np.abs(et0[ok]), np.abs(en0[ok])))
    assert ok.sum() > 100
    assert np.max(angle) < 1.0   # observed 0.51 degrees at fine


def test_cavity_in_a_conductor_is_field_free() -> None:
    # Faraday cage: the field inside a closed hollow conductor is zero whatever the
    # outside (uniqueness theorem; Griffiths, ch. 2, conductors, from memory)
    lay = planar([
        electrode("can", 3000.0, {"type": "polygon", "points": circle_points(0, 0, 12, 600),
                                  "holes": [circle_points(0, 0, 8, 600)]}),
        electrode("gnd", 0.0, {"type": "rect", "min": [-40, -30], "max": [40, -20]}),
        electrode("hv", -6000.0, {"type": "circle", "center": [25, 10], "radius": 3}),
    ])
    sol = solver.solve(lay, estimate_error=False)
    xx, yy = np.meshgrid(sol.x_mm, sol.y_mm)
    hole = (np.hypot(xx, yy) < 7.5) & (sol.conductor < 0)
    assert hole.sum() > 100
    assert np.max(np.abs(sol.phi[hole] - 3000.0)) < 1e-6 * 3000.0
    assert np.max(np.hypot(sol.Ex_kV_per_mm, sol.Ey_kV_per_mm)[hole]) < 1e-6


def test_smaller_radius_carries_the_larger_field() -> None:
    # On one electrode, the more sharply rounded corner has the higher surface field
    # (field factors of rounded edges; common practice, no source)
    lay = planar([
        electrode("bar", 10_000.0, {"type": "polygon",
                                    "points": [[-20, -5], [20, -5], [20, 5], [-20, 5]],
                                    "corner_radius": [4, 1, 1, 4]}),
    ], box=80)
    sol = solver.solve(lay, estimate_error=False)
    tr = [t for t in sol.surfaces if t.part == "bar"][0]
    right = tr.E_kV_per_mm[tr.xy_mm[:, 0] > 15].max()   # radius 1 mm corners
    left = tr.E_kV_per_mm[tr.xy_mm[:, 0] < -15].max()   # radius 4 mm corners
    assert right > 1.3 * left


def test_maximum_principle() -> None:
    # A harmonic function takes its extrema on the boundary: no potential in the medium
    # outside the range of the electrode potentials (Evans, Partial Differential
    # Equations, 2.2.3, from memory).  Holds for the discrete scheme too, its matrix
    # being an M-matrix (Shortley-Weller; common practice, no source).
    lay = planar([
        electrode("a", -5000.0, {"type": "circle", "center": [-15, 0], "radius": 3}),
        electrode("b", 2000.0, {"type": "rect", "min": [5, -8], "max": [12, 8],
                                "corner_radius": 0.5}),
        electrode("c", 10_000.0, {"type": "ellipse", "center": [0, 15], "radii": [6, 2]}),
        {"name": "f", "kind": "floating", "charge": 0.0,
         "shape": {"type": "circle", "center": [0, -15], "radius": 4}},
        {"name": "slab", "kind": "dielectric", "permittivity": 3.5,
         "shape": {"type": "rect", "min": [-10, -5], "max": [0, 5]}},
    ])
    sol = solver.solve(lay, estimate_error=False)
    tol = 1e-6 * 15_000
    assert sol.phi.min() >= -5000.0 - tol
    assert sol.phi.max() <= 10_000.0 + tol
    assert -5000.0 < sol.part("f").volts < 10_000.0


def test_superposition_in_the_voltages() -> None:
    # Laplace's equation is linear: the potential for V1 + V2 is the sum of the
    # potentials for each (superposition; any electrostatics text, from memory)
    def lay(v1: float, v2: float) -> solver.Layout:
        return planar([
            electrode("one", v1, {"type": "circle", "center": [-10, 0], "radius": 2}),
            electrode("two", v2, {"type": "rect", "min": [6, -6], "max": [10, 6],
                                  "corner_radius": 1}),
            {"name": "f", "kind": "floating", "charge": 0.0,
             "shape": {"type": "circle", "center": [0, 8], "radius": 2}},
            electrode("gnd", 0.0, {"type": "rect", "min": [-30, -20], "max": [30, -16]}),
        ], res="draft")

    a = solver.solve(lay(3000.0, 0.0), estimate_error=False)
    b = solver.solve(lay(0.0, -7000.0), estimate_error=False)
    ab = solver.solve(lay(3000.0, -7000.0), estimate_error=False)
    assert np.allclose(a.phi + b.phi, ab.phi, atol=1e-6 * 7000.0)
    assert a.part("f").volts + b.part("f").volts == pytest.approx(ab.part("f").volts,
                                                                  abs=1e-6 * 7000.0)
    probe = np.array([[0.0, 0.0], [-3.0, 4.0], [12.0, 9.0]])
    ea, eb, eab = (solver.sample(s, probe)[1] for s in (a, b, ab))
    assert np.allclose(ea + eb, eab, atol=1e-9 + 1e-6 * np.abs(eab).max())
    # and doubling every voltage doubles the field (same law)
    assert math.isclose(ab.peak_field_kV_per_mm * 2, solver.solve(
        lay(6000.0, -14000.0), estimate_error=False).peak_field_kV_per_mm, rel_tol=1e-9)
