"""Air as an insulator: density, Peek's corona-onset law, Paschen, Schumann, alpha_eff.

Every formula here is a published empirical law of gas discharge physics; the source
sits in each docstring.  Units follow the published forms (kV, cm, bar, Torr) in the
low-level functions; :func:`peek_onset_field_kV_per_mm` is the bridge to the solver's
millimetre / kV-per-mm world.  Fields are peak values (a.c. rms times sqrt 2).

Two reference atmospheres appear in the literature and they differ by 1.7 %:

* IEC 60060-1 (high-voltage test techniques): 101.3 kPa, 20 degC.  Used by
  :func:`relative_air_density` and by the streamer criterion (Schumann's fit is for
  air at 20 degC).
* Peek (1929): 76 cmHg (101.325 kPa), 25 degC.  Used by :func:`peek_relative_air_density`
  and therefore by the Peek limits, because Peek's constants were fitted with his own
  density.

All of it is an estimate for design guidance: real onset and breakdown also depend on
humidity, surface condition, contamination, polarity, voltage shape and 3D effects.
"""

from __future__ import annotations

import math

import numpy as np
from numpy.typing import ArrayLike

from .layout import PeekLimit

IEC_REF_PRESSURE_KPA = 101.3
"""IEC 60060-1 standard reference atmosphere: pressure, kPa."""
IEC_REF_TEMPERATURE_K = 293.0
"""IEC 60060-1 standard reference atmosphere: 20 degC, kelvin (the standard uses 273 + t)."""
PEEK_REF_PRESSURE_KPA = 101.325
"""Peek's reference pressure, 76 cmHg, kPa."""
PEEK_REF_TEMPERATURE_K = 298.0
"""Peek's reference temperature, 25 degC, kelvin (273 + t as in Peek)."""

PEEK_WIRE = (30.0, 0.301)
"""Peek's law for wires (parallel-wire lines): g0 kV/cm peak, c cm^0.5."""
PEEK_COAXIAL = (31.0, 0.308)
"""Peek's law for a wire inside a coaxial cylinder: g0 kV/cm peak, c cm^0.5."""
PEEK_SPHERE = (27.2, 0.54)
"""Peek's law for spheres: g0 kV/cm peak, c cm^0.5."""

SHARP_EDGE_RADIUS_MM = 0.1
"""Radius at which Peek's law is evaluated for sharp corners and anything sharper, mm."""

PASCHEN_AIR = (15.0, 365.0, 0.01)
"""Air: A 1/(cm Torr), B V/(cm Torr), secondary-emission coefficient gamma."""

SCHUMANN_E0_KV_PER_CM_BAR = 24.36
"""Schumann's critical reduced field of air, (E/p)_0 in kV/(cm bar), air at 20 degC."""
SCHUMANN_K_OVER_C = 45.16
"""Schumann's ratio K/C of the streamer integral to the fit coefficient, kV^2/(cm bar)."""
STREAMER_K = 18.0
"""Default critical value K of the streamer integral (avalanche of about e^18 = 6.6e7)."""
SCHUMANN_C = STREAMER_K / SCHUMANN_K_OVER_C
"""Schumann's coefficient C in cm bar / kV^2, calibrated together with K = 18."""

_MIN_KELVIN = 1.0


# --------------------------------------------------------------------------- density


def _check_state(pressure_kPa: float, temperature_C: float) -> None:
    if not (math.isfinite(pressure_kPa) and pressure_kPa > 0.0):
        raise ValueError(f"air pressure must be a positive number of kPa, got {pressure_kPa}")
    if not (math.isfinite(temperature_C) and temperature_C + 273.0 >= _MIN_KELVIN):
        raise ValueError(f"air temperature must be above absolute zero, got {temperature_C} degC")


def relative_air_density(pressure_kPa: float, temperature_C: float) -> float:
    r"""Relative air density delta in the IEC 60060-1 convention.

    .. math:: \delta = \frac{p}{101.3\ \mathrm{kPa}} \cdot \frac{273 + 20}{273 + t}

    IEC 60060-1 (high-voltage test techniques), standard reference atmosphere
    101.3 kPa, 20 degC (11 g/m^3 humidity, not modelled here).

    Parameters
    ----------
    pressure_kPa : absolute air pressure, kPa.
    temperature_C : air temperature, degC.
    """
    _check_state(pressure_kPa, temperature_C)
    return (pressure_kPa / IEC_REF_PRESSURE_KPA) * (IEC_REF_TEMPERATURE_K / (273.0 + temperature_C))


def peek_relative_air_density(pressure_kPa: float, temperature_C: float) -> float:
    r"""Relative air density delta in Peek's convention (76 cmHg, 25 degC).

    .. math:: \delta_{Peek} = \frac{b}{76\ \mathrm{cmHg}} \cdot \frac{273 + 25}{273 + t}

    F. W. Peek, *Dielectric Phenomena in High-Voltage Engineering* (1929); the same
    definition is in the encyclopaedia article "Peek's law".  It is 1.7 % larger than
    :func:`relative_air_density` at the same pressure and temperature.
    """
    _check_state(pressure_kPa, temperature_C)
    kelvin = 273.0 + temperature_C
    return (pressure_kPa / PEEK_REF_PRESSURE_KPA) * (PEEK_REF_TEMPERATURE_K / kelvin)


def equivalent_pressure_bar(pressure_kPa: float, temperature_C: float) -> float:
    r"""Pressure in bar of air at 20 degC with the same density (gas number density).

    .. math:: p_{20} = \frac{p}{100\ \mathrm{kPa/bar}} \cdot \frac{293}{273 + t}

    Discharge laws depend on the gas density, not the pressure alone; fits such as
    Schumann's are stated for air at 20 degC, so they take this pressure.
    """
    _check_state(pressure_kPa, temperature_C)
    return pressure_kPa / 100.0 * IEC_REF_TEMPERATURE_K / (273.0 + temperature_C)


# --------------------------------------------------------------------------- Peek's law


def _check_peek_args(delta: float, m: float) -> None:
    if not (math.isfinite(delta) and delta > 0.0):
        raise ValueError(f"relative air density must be positive, got {delta}")
    if not (math.isfinite(m) and 0.0 < m <= 1.0):
        raise ValueError(f"surface factor m must be in (0, 1], got {m}")


def _peek(r_cm: ArrayLike, delta: float, m: float, g0: float, c: float) -> np.ndarray:
    r"""Generic Peek form :math:`g = g_0\, m\, \delta\, (1 + c / \sqrt{\delta r})`, kV/cm."""
    _check_peek_args(delta, m)
    r = np.asarray(r_cm, dtype=float)
    if np.any(~(r > 0.0)):
        raise ValueError("Peek's law needs a positive radius (cm) at every point")
    with np.errstate(divide="ignore"):
        return g0 * m * delta * (1.0 + c / np.sqrt(delta * r))


def peek_cylinder_kV_per_cm(r_cm: ArrayLike, delta: float, m: float = 1.0,
                            arrangement: str = "wire") -> np.ndarray:
    r"""Corona-onset surface field of a cylinder (wire) of radius r, kV/cm peak.

    .. math:: g_v = g_0\, m\, \delta \left(1 + \frac{c}{\sqrt{\delta\, r}}\right)

    ``arrangement="wire"``: :math:`g_0 = 30` kV/cm, :math:`c = 0.301\ \mathrm{cm}^{1/2}`
    (Peek's law for wires of a line; encyclopaedia article "Peek's law").
    ``arrangement="coaxial"``: :math:`g_0 = 31` kV/cm, :math:`c = 0.308` (Peek 1929,
    wire inside a coaxial cylinder).  r in cm, delta in Peek's convention
    (:func:`peek_relative_air_density`), m the surface factor (1 polished, 0.93-0.98
    rough or weathered, 0.83-0.87 stranded).  r = inf gives :math:`g_0 m \delta`.
    """
    if arrangement == "wire":
        g0, c = PEEK_WIRE
    elif arrangement == "coaxial":
        g0, c = PEEK_COAXIAL
    else:
        raise ValueError(f"unknown cylinder arrangement {arrangement!r}; use 'wire' or 'coaxial'")
    return _peek(r_cm, delta, m, g0, c)


def peek_sphere_kV_per_cm(r_cm: ArrayLike, delta: float, m: float = 1.0) -> np.ndarray:
    r"""Corona-onset surface field of a sphere of radius r, kV/cm peak.

    .. math:: g_v = 27.2\, m\, \delta \left(1 + \frac{0.54}{\sqrt{\delta\, r}}\right)

    Peek, *Dielectric Phenomena in High-Voltage Engineering* (1929), spheres.
    r in cm, delta in Peek's convention, m the surface factor.
    """
    g0, c = PEEK_SPHERE
    return _peek(r_cm, delta, m, g0, c)


def _outline_curvature_per_mm(radius_mm: np.ndarray) -> np.ndarray:
    """Convex curvature 1/r (1/mm) of the outline: 0 straight or concave, capped when sharp."""
    if np.any(np.isnan(radius_mm)):
        raise ValueError("radius of curvature is NaN somewhere on the outline")
    with np.errstate(divide="ignore"):
        kappa = np.where(radius_mm > 0.0, 1.0 / radius_mm,
                         np.where(radius_mm == 0.0, np.inf, 0.0))
    return np.minimum(kappa, 1.0 / SHARP_EDGE_RADIUS_MM)


def _azimuthal_curvature_per_mm(kappa_m: np.ndarray, r_mm: np.ndarray,
                                normal_r: np.ndarray) -> np.ndarray:
    r"""Curvature of the circle swept about the axis: :math:`\kappa_\varphi = n_r / r`.

    On the axis (r = 0) a smooth surface of revolution is umbilic, so
    :math:`\kappa_\varphi = \kappa_m` there.
    """
    on_axis = r_mm <= 1e-6
    with np.errstate(divide="ignore", invalid="ignore"):
        kappa_phi = np.where(on_axis, kappa_m, normal_r / np.where(on_axis, 1.0, r_mm))
    return np.minimum(kappa_phi, 1.0 / SHARP_EDGE_RADIUS_MM)


def peek_onset_field_kV_per_mm(radius_mm: ArrayLike, symmetry: str, limit: PeekLimit,
                               r_mm: ArrayLike | None = None,
                               normal_r: ArrayLike | None = None) -> np.ndarray:
    r"""Peek corona-onset field at each outline point, kV/mm peak (the hot-spot limit).

    Parameters
    ----------
    radius_mm : local radius of curvature of the outline in the drawing plane, mm:
        positive convex, negative concave, ``inf`` straight, 0 a sharp corner.
    symmetry : ``"planar"`` or ``"axisymmetric"``.
    limit : the layout's Peek limit (pressure kPa, temperature degC, surface factor m).
    r_mm, normal_r : axisymmetric only, the distance of each point from the axis (mm)
        and the radial component of the outward unit normal.  Without them every
        point is treated as lying on the axis (a sphere of the outline's radius).

    Returns
    -------
    The onset field :math:`g_v / 10` in kV/mm, same shape as ``radius_mm``.

    Notes
    -----
    Air density is Peek's (:func:`peek_relative_air_density`), matching his constants.

    *Planar* layouts are long objects: every convex outline point is a cylinder of the
    local radius, so the cylinder form applies.  We use the wire form (30, 0.301)
    rather than the coaxial one (31, 0.308): it was fitted on conductors in open
    geometry (lines over ground), the common planar case, and it is 3-5 % lower, the
    conservative side for a limit.

    *Axisymmetric* layouts are surfaces of revolution with two principal curvatures:
    the outline's own :math:`\kappa_m = 1/r` and the swept circle's
    :math:`\kappa_\varphi = n_r / r_{axis}`.  The field falls off a conductor surface as
    :math:`\partial_n E / E = -(\kappa_m + \kappa_\varphi)` (Laplace's equation at an
    equipotential), and that decay is what Peek's radius term measures.  We therefore
    use the sphere form at the sphere radius with the same decay,
    :math:`r_{eq} = 2 / (\kappa_m + \kappa_\varphi)`.  This is exact for spheres; for
    a cylinder-like stretch (a rod's side, a ring's outer rim) it gives the sphere form
    at twice the cylinder radius, which lies within +5 % / -7 % of Peek's wire form for
    radii of 0.5 mm to 50 mm (below it from 2.5 mm up: the conservative side); for a
    torus it lies between.  The sphere form at the smaller principal radius instead
    would overrate the side of a thin rod by 12 % (5 mm) to 32 % (0.5 mm).

    Straight (``inf``) and concave (negative) outline radii contribute zero curvature:
    a concave surface spreads the field rather than concentrating it.  Where the
    total curvature is zero or negative the limit is the uniform-field value
    :math:`g_0 m \delta` (3.0 kV/mm planar, 2.72 kV/mm axisymmetric at delta = 1),
    an extrapolation of Peek's law beyond the radii it was fitted on.

    A sharp corner (radius 0) has no defined radius and an unbounded field; we evaluate
    Peek's law at ``SHARP_EDGE_RADIUS_MM`` (0.1 mm, a typical deburred edge; common
    practice, no source), and every radius below it likewise.  The corner is judged as
    the sharpest edge a finished part plausibly has, so a computed field above that
    limit says: round this corner.
    """
    radius = np.asarray(radius_mm, dtype=float)
    delta = peek_relative_air_density(limit.pressure_kPa, limit.temperature_C)
    m = limit.surface_factor
    kappa = _outline_curvature_per_mm(radius)
    if symmetry == "planar":
        g0, c = PEEK_WIRE
        r_eq_cm = _inverse_cm(kappa, 1.0)
    elif symmetry == "axisymmetric":
        g0, c = PEEK_SPHERE
        if r_mm is None or normal_r is None:
            kappa_sum = 2.0 * kappa
        else:
            r_ax = np.broadcast_to(np.asarray(r_mm, dtype=float), radius.shape)
            n_r = np.broadcast_to(np.asarray(normal_r, dtype=float), radius.shape)
            kappa_sum = kappa + _azimuthal_curvature_per_mm(kappa, r_ax, n_r)
        r_eq_cm = _inverse_cm(kappa_sum, 2.0)
    else:
        raise ValueError(f"unknown symmetry {symmetry!r}; use 'planar' or 'axisymmetric'")
    return _peek(r_eq_cm, delta, m, g0, c) / 10.0


def _inverse_cm(kappa_per_mm: np.ndarray, factor: float) -> np.ndarray:
    """Radius ``factor / kappa`` in cm; infinite where the curvature is zero or negative."""
    with np.errstate(divide="ignore"):
        return np.where(kappa_per_mm > 0.0, factor / kappa_per_mm, np.inf) / 10.0


# --------------------------------------------------------------------------- uniform gaps


def paschen_voltage_V(pd_torr_cm: ArrayLike, A: float = PASCHEN_AIR[0],
                      B: float = PASCHEN_AIR[1], gamma: float = PASCHEN_AIR[2]) -> np.ndarray:
    r"""Townsend breakdown voltage of a uniform gap (Paschen's law), volts.

    .. math:: V_b = \frac{B\, pd}{\ln(A\, pd) - \ln\ln(1 + 1/\gamma)}

    Defaults for air: A = 15 /(cm Torr), B = 365 V/(cm Torr), gamma = 0.01 (Raizer,
    *Gas Discharge Physics*, table of A and B, fitted for E/p of about 100-800
    V/(cm Torr)).  At atmospheric pressure (E/p near 40 V/(cm Torr)) these constants
    overstate breakdown by 9-13 % for 1-10 mm gaps; use :func:`schumann_breakdown_kV`
    there.  Left of the curve's asymptote (ln(A pd) <= ln ln(1 + 1/gamma)) no Townsend
    breakdown occurs and the result is ``inf``.
    """
    if not (A > 0 and B > 0 and 0 < gamma < 1):
        raise ValueError("Paschen constants need A > 0, B > 0 and 0 < gamma < 1")
    pd = np.asarray(pd_torr_cm, dtype=float)
    if np.any(~(pd > 0.0)):
        raise ValueError("pd must be positive (Torr cm)")
    denominator = np.log(A * pd) - math.log(math.log1p(1.0 / gamma))
    with np.errstate(divide="ignore"):
        return np.where(denominator > 0.0, B * pd / np.where(denominator > 0, denominator, 1.0),
                        np.inf)


def paschen_minimum(A: float = PASCHEN_AIR[0], B: float = PASCHEN_AIR[1],
                    gamma: float = PASCHEN_AIR[2]) -> tuple[float, float]:
    r"""The Paschen minimum (pd in Torr cm, V_b in volts).

    .. math:: (pd)_{min} = \frac{e \ln(1 + 1/\gamma)}{A}, \quad V_{min} = B\,(pd)_{min}
    """
    pd_min = math.e * math.log1p(1.0 / gamma) / A
    return pd_min, B * pd_min


def schumann_breakdown_kV(p_bar: ArrayLike, d_cm: ArrayLike) -> np.ndarray:
    r"""Breakdown voltage of a uniform air gap from Schumann's streamer law, kV peak.

    .. math:: V_b = (E/p)_0\, pd + \sqrt{(K/C)\, pd} = 24.36\, pd + 6.72 \sqrt{pd}

    p in bar of air at 20 degC (:func:`equivalent_pressure_bar`), d in cm.  Schumann's
    fit as given in Kuffel, Zaengl & Kuffel, *High Voltage Engineering Fundamentals*
    (2000), gas breakdown chapter; it is the uniform-field case of
    :func:`alpha_eff_per_cm` with the streamer criterion.
    """
    pd = np.asarray(p_bar, dtype=float) * np.asarray(d_cm, dtype=float)
    if np.any(~(pd > 0.0)):
        raise ValueError("pressure (bar) and gap (cm) must be positive")
    return SCHUMANN_E0_KV_PER_CM_BAR * pd + np.sqrt(SCHUMANN_K_OVER_C * pd)


def alpha_eff_per_cm(E_kV_per_cm: ArrayLike, p_bar: float, C: float = SCHUMANN_C) -> np.ndarray:
    r"""Effective ionisation coefficient of air alpha - eta, 1/cm (Schumann's fit).

    .. math::
        \frac{\alpha_{eff}}{p} = C \left[\frac{E}{p} - \left(\frac{E}{p}\right)_0\right]^2
        \ \text{for}\ E/p > (E/p)_0, \qquad 0\ \text{otherwise}

    with :math:`(E/p)_0 = 24.36` kV/(cm bar) (Schumann 1923, as quoted in Kuffel,
    Zaengl & Kuffel 2000).  Schumann published the ratio :math:`K/C = 45.16`
    kV^2/(cm bar), so C and the critical K of the streamer integral belong together:
    the default C = 18 / 45.16 cm bar/kV^2 pairs with ``STREAMER_K`` = 18.  Below the
    critical field attachment wins; the fit is not meant for that range and we count
    no growth there (the integral is taken only where ionisation dominates).

    Parameters
    ----------
    E_kV_per_cm : field magnitude, kV/cm peak.
    p_bar : pressure of air at 20 degC with the same density, bar.
    C : fit coefficient, cm bar / kV^2.
    """
    if not (math.isfinite(p_bar) and p_bar > 0.0):
        raise ValueError(f"pressure must be positive (bar), got {p_bar}")
    excess = np.asarray(E_kV_per_cm, dtype=float) / p_bar - SCHUMANN_E0_KV_PER_CM_BAR
    return p_bar * C * np.square(np.maximum(excess, 0.0))


def critical_field_kV_per_mm(p_bar: float) -> float:
    """Field at which ionisation and attachment balance, kV/mm (Schumann: 2.436 p)."""
    return SCHUMANN_E0_KV_PER_CM_BAR * p_bar / 10.0
