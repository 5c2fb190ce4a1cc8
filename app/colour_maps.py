"""Colour lookup for the field maps: plain numpy (no Qt), so the worker thread can use it.

Potential: matplotlib's *cividis* (perceptually uniform, readable with colour-vision
deficiency) at a constant 45 % opacity.  Field strength: reversed *magma*, whose
opacity grows with the value, so weak regions leave the canvas visible.
"""

from __future__ import annotations

import numpy as np

MAP_ALPHA = 115
_LUTS: dict[str, np.ndarray] = {}


def colour_table(n: int = 256, name: str = "cividis") -> np.ndarray:
    """(n, 4) uint8 RGBA lookup table of a matplotlib colour map, alpha ``MAP_ALPHA``."""
    from matplotlib import colormaps

    rgba = colormaps[name](np.linspace(0.0, 1.0, n))
    out = (rgba * 255).round().astype(np.uint8)
    out[:, 3] = MAP_ALPHA
    return out


def map_rgba(values: np.ndarray, lo: float, hi: float, cmap: str = "cividis",
             fade_low: bool = False) -> np.ndarray:
    """(ny, nx, 4) uint8 RGBA of ``values`` mapped from ``lo`` to ``hi`` (clipped).

    NaN (inside conductors) is transparent.  With ``fade_low`` the opacity is
    :math:`30 + 200\\,t` for the normalised value :math:`t \\in [0, 1]`.
    """
    if cmap not in _LUTS:
        _LUTS[cmap] = colour_table(name=cmap)
    lut = _LUTS[cmap]
    span = hi - lo if hi > lo else 1.0
    t = np.clip(np.nan_to_num((values - lo) / span, nan=0.0), 0.0, 1.0)
    rgba = lut[(t * (len(lut) - 1)).round().astype(int)]
    if fade_low:
        rgba[..., 3] = (30 + 200 * t).astype(np.uint8)
    rgba[np.isnan(values)] = 0
    return np.ascontiguousarray(rgba)
