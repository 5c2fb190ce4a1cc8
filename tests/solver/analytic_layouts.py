"""Layouts of the classic analytic geometries, built with ``parse_layout``.

Shared by the verification tests and ``solver.bench``.  Units: mm, V.  Each builder
returns a :class:`solver.Layout`; the matching exact formulas live beside the checks.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np

from solver.layout import Layout, parse_layout

EPS0 = 8.8541878128e-12  # F/m, CODATA 2018
K = 1.0 / (4.0 * math.pi * EPS0)


def circle_points(cx: float, cy: float, r: float, n: int = 2000) -> list[list[float]]:
    """``n`` points on a circle of radius ``r`` mm about (cx, cy), anticlockwise."""
    t = np.linspace(0.0, 2.0 * math.pi, n, endpoint=False)
    return np.column_stack([cx + r * np.cos(t), cy + r * np.sin(t)]).tolist()


def half_disc_points(zc: float, r: float, n: int = 1000) -> list[list[float]]:
    """A half disc r >= 0 of radius ``r`` centred on the axis at z = ``zc``: a sphere."""
    t = np.linspace(-0.5 * math.pi, 0.5 * math.pi, n)
    pts = np.column_stack([r * np.cos(t), zc + r * np.sin(t)])
    pts[0, 0] = pts[-1, 0] = 0.0
    return pts.tolist()


def _layout(parts: list[dict[str, Any]], symmetry: str = "planar",
            boundary: dict[str, Any] | None = None, resolution: Any = "normal") -> Layout:
    return parse_layout({
        "stresslens_layout": 1, "title": "analytic check", "symmetry": symmetry,
        "boundary": boundary or {"type": "open"}, "resolution": resolution,
        "limit": {"type": "fixed", "kV_per_mm": 1e6}, "parts": parts})


def coax(a: float, b: float, volts: float, resolution: Any = "normal",
         sleeve: tuple[float, float] | None = None) -> Layout:
    """Planar coax: inner circle radius ``a`` at ``volts`` in a grounded tube of bore ``b``.

    ``sleeve`` = (outer radius mm, permittivity) adds a dielectric tube on the inner
    conductor (drawn as a disc with the conductor wholly inside it).
    """
    outer = b * 1.3
    parts = [
        {"name": "inner", "kind": "electrode", "volts": volts,
         "shape": {"type": "circle", "center": [0, 0], "radius": a}},
        {"name": "outer", "kind": "electrode", "volts": 0,
         "shape": {"type": "polygon", "points": circle_points(0, 0, outer, 400),
                   "holes": [circle_points(0, 0, b)]}},
    ]
    if sleeve is not None:
        rs, eps = sleeve
        parts.append({"name": "sleeve", "kind": "dielectric", "permittivity": eps,
                      "shape": {"type": "circle", "center": [0, 0], "radius": rs}})
    return _layout(parts, resolution=resolution)


def two_wires(r: float, d: float, volts: float, resolution: Any = "normal") -> Layout:
    """Two parallel cylinders of radius ``r`` mm, centres ``d`` mm apart, at +-volts/2."""
    return _layout([
        {"name": "plus", "kind": "electrode", "volts": volts / 2,
         "shape": {"type": "circle", "center": [-d / 2, 0], "radius": r}},
        {"name": "minus", "kind": "electrode", "volts": -volts / 2,
         "shape": {"type": "circle", "center": [d / 2, 0], "radius": r}},
    ], resolution=resolution)


def wire_over_plane(r: float, h: float, volts: float, width: float,
                    resolution: Any = "normal") -> Layout:
    """Cylinder of radius ``r`` with its axis ``h`` above the bottom wall (y = 0) of a
    grounded square box of side ``width`` (mm); the wall is the plane."""
    return _layout([
        {"name": "wire", "kind": "electrode", "volts": volts,
         "shape": {"type": "circle", "center": [0, h], "radius": r}},
    ], boundary={"type": "box", "min": [-width / 2, 0], "max": [width / 2, width], "volts": 0},
        resolution=resolution)


def plates_layered(d: list[float], eps: list[float], volts: float, width: float,
                   resolution: Any = "normal") -> Layout:
    """Two plate electrodes (y < 0 at ``volts``, y > sum(d) grounded) with dielectric
    layers of thicknesses ``d`` (mm) and permittivities ``eps`` between them, in a box
    of insulating walls as wide as the plates, so the field is uniform in each layer."""
    total = sum(d)
    t = 2.0
    parts = [
        {"name": "hv", "kind": "electrode", "volts": volts,
         "shape": {"type": "rect", "min": [-width / 2, -t], "max": [width / 2, 0]}},
        {"name": "gnd", "kind": "electrode", "volts": 0,
         "shape": {"type": "rect", "min": [-width / 2, total], "max": [width / 2, total + t]}},
    ]
    y = 0.0
    for k, (dk, ek) in enumerate(zip(d, eps, strict=True)):
        if ek != 1.0:
            parts.append({"name": f"layer{k}", "kind": "dielectric", "permittivity": ek,
                          "shape": {"type": "rect", "min": [-width / 2, y],
                                    "max": [width / 2, y + dk]}})
        y += dk
    return _layout(parts, boundary={"type": "box", "min": [-width / 2, -t],
                                    "max": [width / 2, total + t], "volts": None},
                   resolution=resolution)


def sphere_in_sphere(a: float, b: float, volts: float, resolution: Any = "normal") -> Layout:
    """Axisymmetric concentric spheres: inner radius ``a`` at ``volts``, grounded shell
    of inner radius ``b`` (mm), both centred at z = 0 on the axis."""
    outer = 1.3 * b
    shell = half_disc_points(0, outer, 300) + half_disc_points(0, b)[::-1]
    # a half annulus: outer arc up, then inner arc down, closed along the axis
    return _layout([
        {"name": "inner", "kind": "electrode", "volts": volts,
         "shape": {"type": "polygon", "points": half_disc_points(0, a)}},
        {"name": "shell", "kind": "electrode", "volts": 0,
         "shape": {"type": "polygon", "points": shell}},
    ], symmetry="axisymmetric", resolution=resolution)


def sphere(a: float, volts: float, zc: float = 0.0, resolution: Any = "normal",
           boundary: dict[str, Any] | None = None) -> Layout:
    """An isolated sphere of radius ``a`` mm centred on the axis at z = ``zc``."""
    return _layout([
        {"name": "sphere", "kind": "electrode", "volts": volts,
         "shape": {"type": "polygon", "points": half_disc_points(zc, a)}},
    ], symmetry="axisymmetric", boundary=boundary, resolution=resolution)


def sphere_over_plane(a: float, h: float, volts: float, size: float,
                      resolution: Any = "normal") -> Layout:
    """Sphere of radius ``a`` with its centre ``h`` above a grounded plane z = 0: the
    bottom wall of a grounded box reaching ``size`` mm out in r and up in z."""
    return sphere(a, volts, zc=h, resolution=resolution,
                  boundary={"type": "box", "min": [0, 0], "max": [size, size], "volts": 0})


def sphere_gap(a: float, s: float, volts: float, resolution: Any = "normal") -> Layout:
    """Two spheres of radius ``a`` on the axis with gap ``s`` (mm); the lower one at
    ``volts``, the upper grounded, in open space."""
    zc = a + s / 2
    return _layout([
        {"name": "hv", "kind": "electrode", "volts": volts,
         "shape": {"type": "polygon", "points": half_disc_points(-zc, a)}},
        {"name": "earthed", "kind": "electrode", "volts": 0,
         "shape": {"type": "polygon", "points": half_disc_points(zc, a)}},
    ], symmetry="axisymmetric", resolution=resolution)


# --------------------------------------------------------------- exact oracles

def box_image_shift(r: float, h: float, w: float, n: int = 200) -> float:
    """Potential at the wire, in units of lambda/(2 pi eps0), from all images of the line
    charge at (0, b) in the grounded box [-w/2, w/2] x [0, w] except the plane image.

    Images by reflection in the walls x = +-w/2 and y = 0, w (method of images; common
    practice, no source): +lambda at (2 m w, 2 k w +- b) with sign +- , and -lambda at
    ((2 m + 1) w, ...).  Summed over a symmetric square of cells, which converges.
    """
    b = math.sqrt(h * h - r * r)
    m = np.arange(-n, n + 1)
    mm, kk = np.meshgrid(m, m)
    total = 0.0
    for xs, sx in ((2 * mm * w, 1.0), ((2 * mm + 1) * w, -1.0)):
        for ys, sy in ((2 * kk * w + b, 1.0), (2 * kk * w - b, -1.0)):
            sign = np.full(mm.shape, sx * sy)
            if sx > 0:
                sign[n, n] = 0.0  # the charge itself and its plane image
            total += float(np.sum(-sign * np.log(np.hypot(xs, ys - h))))
    return total


def sphere_plane_series(a: float, h: float, u: float, terms: int = 200
                        ) -> tuple[float, float]:
    """(C in F, E_max in V/m) of a sphere radius ``a`` mm, centre ``h`` mm above a
    grounded plane, at ``u`` V.

    Kelvin images: q0 = 4 pi eps0 a U at z0 = h; the image of the plane image -q_{n-1}
    (at -z_{n-1}) in the sphere is q_n = q_{n-1} a / (h + z_{n-1}) at
    z_n = h - a^2 / (h + z_{n-1}).  E at the point nearest the plane, z_p = h - a:
    E = sum q_n [1/(z_n - z_p)^2 + 1/(z_n + z_p)^2] / (4 pi eps0).
    Source: method of images for a sphere and a plane, e.g. Smythe, Static and Dynamic
    Electricity, ch. 5 (from memory); REFERENCES 1.4 (validated there: sphere surface
    equipotential to 7e-16).
    """
    am, hm = a * 1e-3, h * 1e-3
    q, z = 4 * math.pi * EPS0 * am * u, hm
    zp = hm - am
    cap, field = 0.0, 0.0
    for _ in range(terms):
        cap += q / u
        field += K * q * (1.0 / (z - zp) ** 2 + 1.0 / (z + zp) ** 2)
        d = hm + z
        q, z = q * am / d, hm - am * am / d
    return cap, field
