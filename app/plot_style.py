"""How reports draw things: part styles for print, line colours, colour maps.

Colours of parts come from :mod:`app.palette` (the canvas's own), so a report looks
like the screen; hatch and outline line style are added so that the kinds of part tell
apart in a black-and-white print too.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from matplotlib.colors import ListedColormap
from matplotlib.typing import LineStyleType

from solver.layout import Part
from solver.solution import Solution

from . import palette


@dataclass(frozen=True)
class PartStyle:
    """How one kind of part is drawn in print: hatch and outline line style.

    Colours come from :mod:`app.palette` (the canvas's own); hatch and line style make
    the kinds tell apart in a black-and-white print too.
    """

    hatch: str
    linestyle: LineStyleType


PART_STYLES: dict[str, PartStyle] = {
    "electrode": PartStyle("////", "-"),
    "floating": PartStyle("xxx", (0, (5.0, 2.0))),
    "dielectric": PartStyle("...", (0, (1.2, 1.6))),
}

EQUIPOTENTIAL_COLOUR = "#2d3a4a"
FIELD_LINE_COLOUR = "#96462a"
FIELD_LINE_STYLE = (0, (6.0, 2.5))
"""Dashed, so field lines and equipotentials differ in a grey print as well as in hue."""
HOT_SPOT_COLOUR = palette.HOT_SPOT.name()
PEAK_COLOUR = "#111111"
MAP_OPACITY = 0.45
"""Share of the colour map in a map pixel, the rest is the canvas colour (as on screen)."""


def part_colours(part: Part, solution: Solution) -> tuple[str, str, float]:
    r"""(edge, face, face alpha) of a part, from the canvas palette.

    An electrode's face runs from ground grey to amber with :math:`|V|/\max|V|`.
    """
    vmax = max((abs(p.volts or 0.0) for p in solution.parts if p.kind != "dielectric"),
               default=0.0)
    volts = solution.part(part.name).volts
    edge, face = palette.part_colours(part.kind, volts, vmax)
    return edge.name(), face.name(), face.alphaF()


def _blended(name: str, opacity: float, n: int = 256) -> ListedColormap:
    """A matplotlib colour map laid at ``opacity`` over the canvas colour.

    The blend keeps the lightness monotone (so the map stays perceptually ordered and
    prints as an ordered grey ramp) and leaves dark lines legible everywhere on it.
    """
    from matplotlib import colormaps

    rgba = colormaps[name](np.linspace(0.0, 1.0, n))
    c = palette.CANVAS
    bg = np.array([c.redF(), c.greenF(), c.blueF()])
    rgba[:, :3] = opacity * rgba[:, :3] + (1.0 - opacity) * bg
    return ListedColormap(rgba, name=f"stresslens_{name}_print")


POTENTIAL_CMAP = _blended("cividis", MAP_OPACITY)
FIELD_CMAP = _blended("magma_r", 0.8)
