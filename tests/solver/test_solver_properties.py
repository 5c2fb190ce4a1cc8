"""Property-based checks of the solver on random valid layouts (hypothesis).

Each example is a layout of 2-4 well-separated parts (circles, rectangles with rounded
corners, star-shaped polygons with rounded corners), electrodes at random potentials,
now and then an uncharged floating part or a dielectric body, in planar or axisymmetric
symmetry, with an open, grounded-box or insulating-box boundary.  Solved at ``draft``:

- the solve finishes, reports convergence and gives finite numbers everywhere;
- every conductor node carries exactly its conductor's potential, and the potential
  sampled on the outline differs from it by no more than the field times one cell;
- the maximum principle: every grid potential lies within the range of the fixed
  potentials (electrodes and a grounded far edge); uncharged floating parts too;
- superposition: doubling every electrode potential doubles the potential everywhere.

The default run keeps to about 20 s; ``-m slow`` draws ``SLOW_FACTOR`` times as many.
"""

from __future__ import annotations

import math
from dataclasses import replace

import numpy as np
import pytest
import shapely
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

import solver
from solver.geometry import shape_polygon
from solver.layout import (
    Boundary,
    Circle,
    Layout,
    Part,
    Polygon,
    Rect,
    layout_to_json,
    parse_layout,
)

CELL_MM = 20.0
"""Each part lives in its own cell of this size (parts at most 12 mm across)."""
DEFAULT_EXAMPLES = 12
SUPERPOSITION_EXAMPLES = 5
SLOW_FACTOR = 10

volts = st.floats(-50_000.0, 50_000.0, allow_nan=False).map(lambda v: round(v, 3))


@st.composite
def shapes(draw: st.DrawFn, cx: float, cy: float):  # noqa: ANN201 - a solver shape
    """A circle, a rounded rectangle or a rounded star-shaped polygon near (cx, cy) mm."""
    kind = draw(st.sampled_from(["circle", "rect", "polygon"]))
    x = cx + draw(st.floats(-2.0, 2.0))
    y = cy + draw(st.floats(-2.0, 2.0))
    if kind == "circle":
        return Circle((x, y), draw(st.floats(0.8, 5.0)))
    if kind == "rect":
        w, h = draw(st.floats(1.5, 10.0)), draw(st.floats(1.5, 10.0))
        cr = draw(st.sampled_from([0.0, 0.1, 0.3, 0.5])) * min(w, h) * 0.99
        return Rect((x - w / 2, y - h / 2), (x + w / 2, y + h / 2), cr)
    n = draw(st.integers(3, 8))
    angles = sorted(draw(st.lists(st.floats(0.0, 2 * math.pi), min_size=n, max_size=n,
                                  unique=True)))
    gaps = np.diff(angles + [angles[0] + 2 * math.pi])
    if gaps.min() < 0.3 or gaps.max() > 0.9 * math.pi:  # keep (x, y) inside: a simple outline
        angles = [2 * math.pi * k / n for k in range(n)]
    radii = [draw(st.floats(2.0, 5.0)) for _ in range(n)]
    pts = tuple((x + r * math.cos(a), y + r * math.sin(a))
                for r, a in zip(radii, angles, strict=True))
    fraction = draw(st.sampled_from([0.0, 0.3, 0.9]))
    return Polygon(pts, corner_radius=tuple(fraction * r for r in largest_radii(pts)))


def largest_radii(pts: tuple[tuple[float, float], ...]) -> list[float]:
    """Per vertex, the corner radius whose tangent arc takes 45% of the shorter
    neighbouring edge: an arc turning by tau cuts r tan(tau / 2) off each edge
    (plane geometry, common practice, no source)."""
    p = np.asarray(pts)
    d_in, d_out = p - np.roll(p, 1, axis=0), np.roll(p, -1, axis=0) - p
    edge_in, edge_out = np.hypot(*d_in.T), np.hypot(*d_out.T)
    cos_tau = (d_in * d_out).sum(1) / (edge_in * edge_out)
    tau = np.arccos(np.clip(cos_tau, -1.0, 1.0))
    return list(0.45 * np.minimum(edge_in, edge_out) / np.tan(np.maximum(tau, 1e-3) / 2))


@st.composite
def layouts(draw: st.DrawFn) -> Layout:
    """A valid layout: 2-4 parts, one per cell, at least one electrode."""
    symmetry = draw(st.sampled_from(["planar", "axisymmetric"]))
    n = draw(st.integers(2, 4))
    x0 = CELL_MM if symmetry == "axisymmetric" else 0.0
    parts = []
    for k in range(n):
        cx, cy = x0 + CELL_MM * (k % 2), CELL_MM * (k // 2)
        kind = draw(st.sampled_from(["electrode"] * 4 + ["floating", "dielectric"]))
        shape = draw(shapes(cx, cy))
        if kind == "electrode" or k == 0:
            parts.append(Part(f"E{k}", "electrode", shape, volts=draw(volts)))
        elif kind == "floating":
            parts.append(Part(f"F{k}", "floating", shape, charge=0.0))
        else:
            parts.append(Part(f"D{k}", "dielectric", shape,
                              permittivity=draw(st.floats(1.5, 10.0))))
    lo, hi = (x0 - CELL_MM, -CELL_MM), (x0 + 3 * CELL_MM, 3 * CELL_MM)  # r >= 0 when axisym.
    boundary = draw(st.sampled_from([Boundary(), Boundary("box", lo, hi, 0.0),
                                     Boundary("box", lo, hi, None)]))
    layout = Layout(parts=tuple(parts), symmetry=symmetry, boundary=boundary,
                    resolution="draft")
    return parse_layout(layout_to_json(layout))  # the file rules hold: a valid layout


def fixed_potentials(layout: Layout) -> list[float]:
    """Potentials imposed on the problem: electrodes, and a far edge held at 0 V."""
    fixed = [p.volts for p in layout.parts if p.kind == "electrode"]
    if layout.boundary.type == "open" or layout.boundary.volts is not None:
        fixed.append(layout.boundary.volts or 0.0)
    return fixed


def check_solution(layout: Layout) -> None:
    sol = solver.solve(layout, "draft", estimate_error=False)
    assert sol.converged, f"no convergence, residual {sol.residual:g}"
    assert np.isfinite(sol.phi).all() and np.isfinite(sol.Ex_kV_per_mm).all()
    assert np.isfinite(sol.Ey_kV_per_mm).all()
    fixed = fixed_potentials(layout)
    lo, hi = min(fixed), max(fixed)
    span = max(hi - lo, max(abs(v) for v in fixed), 1.0)
    # Maximum principle for div(eps grad phi) = 0 (harmonic functions and their
    # variable-coefficient kin): extremes lie on the Dirichlet boundary.
    # Common practice, no source.
    assert sol.phi.min() >= lo - 1e-9 * span
    assert sol.phi.max() <= hi + 1e-9 * span
    for k, part in enumerate(layout.parts):
        if not part.is_conductor:
            continue
        v = sol.parts[k].volts
        # An uncharged isolated conductor takes a potential inside the range of the
        # others (maximum principle again). Common practice, no source.
        assert lo - 1e-9 * span <= v <= hi + 1e-9 * span
        if part.kind == "electrode":
            assert v == part.volts
        nodes = sol.phi[sol.conductor == k]
        assert nodes.size > 0, f"{part.name}: no grid node inside"
        # A conductor is an equipotential (electrostatics). Common practice, no source.
        np.testing.assert_array_equal(nodes, v)
        check_outline(sol, k, v)


def check_outline(sol: solver.Solution, k: int, v: float) -> None:
    """On the outline, linear interpolation between the conductor's nodes (exactly v)
    and nodes at most one cell diagonal away differs from v by at most |E| times that
    distance (mean-value bound; common practice, no source)."""
    ring = np.asarray(shapely.get_coordinates(shape_polygon(sol.layout.parts[k].shape)
                                              .exterior))
    pts = ring[:: max(1, len(ring) // 200)]
    phi, _ = solver.sample(sol, pts)
    ix = np.clip(np.searchsorted(sol.x_mm, pts[:, 0]), 1, len(sol.x_mm) - 1)
    iy = np.clip(np.searchsorted(sol.y_mm, pts[:, 1]), 1, len(sol.y_mm) - 1)
    diag_mm = np.hypot(sol.x_mm[ix] - sol.x_mm[ix - 1], sol.y_mm[iy] - sol.y_mm[iy - 1])
    emax_V_per_mm = 1000.0 * float(np.hypot(sol.Ex_kV_per_mm, sol.Ey_kV_per_mm).max())
    ok = np.isfinite(phi)
    bound = 2.0 * emax_V_per_mm * diag_mm[ok] + 1e-9 * max(abs(v), 1.0)
    assert (np.abs(phi[ok] - v) <= bound).all()


def check_superposition(layout: Layout) -> None:
    """Laplace's equation is linear: scaling every fixed potential scales the solution
    (common practice, no source)."""
    doubled = replace(layout, parts=tuple(
        replace(p, volts=2.0 * p.volts) if p.kind == "electrode" else p
        for p in layout.parts))
    a = solver.solve(layout, "draft", estimate_error=False, capacitance=False)
    b = solver.solve(doubled, "draft", estimate_error=False, capacitance=False)
    scale = max(1.0, float(np.abs(a.phi).max()))
    np.testing.assert_allclose(b.phi, 2.0 * a.phi, rtol=0, atol=1e-8 * scale)
    np.testing.assert_allclose(b.peak_field_kV_per_mm, 2.0 * a.peak_field_kV_per_mm,
                               rtol=1e-8, atol=1e-12)


SETTINGS = dict(deadline=None, suppress_health_check=[HealthCheck.too_slow],
                derandomize=True)


@settings(max_examples=DEFAULT_EXAMPLES, **SETTINGS)
@given(layouts())
def test_random_layouts_solve_and_respect_the_maximum_principle(layout: Layout) -> None:
    check_solution(layout)


@settings(max_examples=SUPERPOSITION_EXAMPLES, **SETTINGS)
@given(layouts())
def test_doubling_every_potential_doubles_the_solution(layout: Layout) -> None:
    check_superposition(layout)


@pytest.mark.slow
@settings(max_examples=DEFAULT_EXAMPLES * SLOW_FACTOR, deadline=None,
          suppress_health_check=[HealthCheck.too_slow])
@given(layouts())
def test_many_random_layouts(layout: Layout) -> None:
    check_solution(layout)


@pytest.mark.slow
@settings(max_examples=SUPERPOSITION_EXAMPLES * SLOW_FACTOR, deadline=None,
          suppress_health_check=[HealthCheck.too_slow])
@given(layouts())
def test_many_superpositions(layout: Layout) -> None:
    check_superposition(layout)
