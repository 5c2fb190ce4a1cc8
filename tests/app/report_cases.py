"""Layouts and solves shared by the report and export tests (each solved once per run).

The coaxial layout has the textbook closed form (REFERENCES.md §1.1, standard result):
:math:`\\varphi(r) = V_0 \\ln(b/r)/\\ln(b/a)` and :math:`E(r) = V_0/(r\\ln(b/a))` for
:math:`a < r < b`.
"""

from __future__ import annotations

import math
from functools import cache
from pathlib import Path

import numpy as np

import solver
from solver.layout import Layout, load_layout, parse_layout
from solver.solution import Solution

ROOT = Path(__file__).resolve().parents[2]
SAMPLE = ROOT / "sample_layouts" / "bench_supply_terminal.layout.json"

COAX_A_MM, COAX_B_MM, COAX_V = 10.0, 50.0, 10_000.0


def coax_layout() -> Layout:
    """Core r = 10 mm at 10 kV inside a grounded sheath of inner radius 50 mm (planar)."""
    t = np.linspace(0.0, 2 * math.pi, 1440, endpoint=False)
    hole = [[COAX_B_MM * math.cos(a), COAX_B_MM * math.sin(a)] for a in t]
    return parse_layout({
        "stresslens_layout": 1, "title": "Coaxial check", "symmetry": "planar",
        "limit": {"type": "fixed", "kV_per_mm": 0.5}, "resolution": "normal",
        "parts": [
            {"name": "Core", "kind": "electrode", "volts": COAX_V,
             "shape": {"type": "circle", "center": [0, 0], "radius": COAX_A_MM}},
            {"name": "Sheath", "kind": "electrode", "volts": 0,
             "shape": {"type": "polygon", "points": [[-60, -60], [60, -60], [60, 60], [-60, 60]],
                       "holes": [hole]}}]})


def coax_phi(r_mm: np.ndarray) -> np.ndarray:
    """Analytic potential (V) between the coaxial conductors."""
    return COAX_V * np.log(COAX_B_MM / r_mm) / math.log(COAX_B_MM / COAX_A_MM)


def coax_field(r_mm: np.ndarray) -> np.ndarray:
    """Analytic field magnitude (kV/mm) between the coaxial conductors."""
    return COAX_V / 1e3 / (r_mm * math.log(COAX_B_MM / COAX_A_MM))


@cache
def solved_coax() -> Solution:
    return solver.solve(coax_layout())


@cache
def solved_sample() -> Solution:
    return solver.solve(load_layout(SAMPLE), resolution="draft")


def axisymmetric_layout() -> Layout:
    """A rounded terminal on the axis above a grounded disc (for the r, z labels)."""
    return parse_layout({
        "stresslens_layout": 1, "title": "Axisymmetric terminal", "symmetry": "axisymmetric",
        "resolution": "draft",
        "parts": [
            {"name": "Cap", "kind": "electrode", "volts": 20000,
             "shape": {"type": "rect", "min": [0, 20], "max": [15, 40], "corner_radius": 4}},
            {"name": "Base", "kind": "electrode", "volts": 0,
             "shape": {"type": "rect", "min": [0, -5], "max": [60, 0]}}]})
