r"""The streamer criterion along a path: the ionisation integral and the inception scale.

.. math:: \int_0^{x_c} \alpha_{eff}\big(S\,E_1(x)\big)\, dx = K

with :math:`E_1` the field along the path at the layout's own voltages and S the factor
on all potentials.  Pure arrays in, numbers out; :mod:`solver.inception` applies it to
solved layouts.  Units: mm and kV/mm at the interface, cm and bar inside Schumann's fit.
"""

from __future__ import annotations

import math

import numpy as np
from numpy.typing import ArrayLike
from scipy.optimize import brentq

from .air import SCHUMANN_C, SCHUMANN_E0_KV_PER_CM_BAR, STREAMER_K, critical_field_kV_per_mm

_MAX_DOUBLINGS = 200


class InceptionError(ValueError):
    """No inception estimate is possible; the message says why."""


def _segment_lengths(n: int, ds_mm: float | ArrayLike) -> np.ndarray:
    ds = np.asarray(ds_mm, dtype=float)
    if ds.ndim == 0:
        ds = np.full(max(n - 1, 0), float(ds))
    if ds.shape != (max(n - 1, 0),):
        raise ValueError(f"need {n - 1} segment lengths for {n} field samples, got {ds.shape}")
    if np.any(~(ds >= 0.0)):
        raise ValueError("segment lengths along a path must be non-negative (mm)")
    return ds


def streamer_integral(E_along_path_kV_per_mm: ArrayLike, ds_mm: float | ArrayLike,
                      p_bar: float, C: float = SCHUMANN_C) -> float:
    r"""Ionisation integral :math:`\int \alpha_{eff}\, ds` along a path (dimensionless).

    .. math::
        \int \alpha_{eff}\, ds = \int C p \left[\max\left(\frac{E}{p} - \left(\frac{E}{p}
        \right)_0, 0\right)\right]^2 ds

    The field is taken linear between samples and each segment integrated exactly
    (no error from where the integrand switches on between samples).

    Parameters
    ----------
    E_along_path_kV_per_mm : field magnitude at the M path samples, kV/mm peak.
    ds_mm : segment lengths between samples (M-1 values, or one spacing), mm.
    p_bar : pressure of air at 20 degC with the same density, bar.
    C : coefficient of Schumann's fit, cm bar/kV^2 (see :func:`solver.air.alpha_eff_per_cm`).
    """
    E = np.asarray(E_along_path_kV_per_mm, dtype=float)
    ds = _segment_lengths(E.size, ds_mm)
    if E.size < 2:
        return 0.0
    x = E * 10.0 / p_bar - SCHUMANN_E0_KV_PER_CM_BAR  # excess reduced field, kV/(cm bar)
    return float(C * p_bar * np.sum(ds / 10.0 * _mean_square_positive(x[:-1], x[1:])))


def _mean_square_positive(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    r"""Mean of :math:`\max(x, 0)^2` over a segment where x runs linearly from a to b."""
    both = (a * a + a * b + b * b) / 3.0
    hi = np.maximum(a, b)
    lo = np.minimum(a, b)
    with np.errstate(divide="ignore", invalid="ignore"):
        crossing = hi**3 / (3.0 * (hi - lo))  # positive fraction hi/(hi-lo) times hi^2/3
    return np.where(lo >= 0.0, both, np.where(hi > 0.0, crossing, 0.0))


def inception_scale(E_unit_kV_per_mm: ArrayLike, ds_mm: float | ArrayLike, p_bar: float,
                    K: float = STREAMER_K, C: float = SCHUMANN_C) -> float:
    r"""The factor S on all potentials at which the streamer integral along a path reaches K.

    With the field :math:`S\,E_1(s)` the integral :math:`I(S)` is zero up to
    :math:`S_0 = E_{crit} / \max E_1` and increases monotonically beyond; the root of
    :math:`I(S) = K` is bracketed by doubling from :math:`S_0` and found with Brent's
    method to a relative tolerance of 1e-10.

    Parameters
    ----------
    E_unit_kV_per_mm : field magnitude along the path at scale 1, kV/mm.
    ds_mm : segment lengths between samples, mm.
    p_bar : pressure of air at 20 degC with the same density, bar.
    K, C : the critical integral and the fit coefficient, calibrated together.

    Raises
    ------
    InceptionError : the field is zero everywhere on the path, or the path has no length.
    """
    E = np.asarray(E_unit_kV_per_mm, dtype=float)
    ds = _segment_lengths(E.size, ds_mm)
    if not (K > 0 and C > 0):
        raise ValueError("K and C must be positive")
    peak = float(np.max(E)) if E.size else 0.0
    if not (math.isfinite(peak) and peak > 0.0) or float(np.sum(ds)) <= 0.0:
        raise InceptionError("no field along the path: every electrode may be at the same "
                             "potential, or the path has no length")

    def excess(S: float) -> float:
        return streamer_integral(S * E, ds, p_bar, C) - K

    lo = critical_field_kV_per_mm(p_bar) / peak
    hi = 2.0 * lo
    for _ in range(_MAX_DOUBLINGS):
        if excess(hi) >= 0.0:
            break
        lo, hi = hi, 2.0 * hi
    else:
        raise InceptionError("the streamer integral never reaches K along this path")
    return float(brentq(excess, lo, hi, xtol=1e-14, rtol=1e-10))


def ionisation_length_mm(E_kV_per_mm: np.ndarray, s_mm: np.ndarray, p_bar: float) -> float:
    """Length of path where the field exceeds the critical field (linear between samples), mm."""
    x = E_kV_per_mm - critical_field_kV_per_mm(p_bar)
    a, b, ds = x[:-1], x[1:], np.diff(s_mm)
    hi, lo = np.maximum(a, b), np.minimum(a, b)
    with np.errstate(divide="ignore", invalid="ignore"):
        frac = np.where(lo >= 0, 1.0, np.where(hi > 0, hi / (hi - lo), 0.0))
    return float(np.sum(frac * ds))
