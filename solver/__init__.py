"""Stresslens numerical core: layouts in, potentials and surface fields out.

Pure numpy/scipy/shapely/pyamg/contourpy; never imports Qt, matplotlib or ``app``.

>>> import solver
>>> sol = solver.solve(solver.load_layout("sample_layouts/bench_supply_terminal.layout.json"))
>>> sol.peak_field_kV_per_mm  # doctest: +SKIP
"""

from .api import PreparedLayout, prepare_layout, solve, solve_prepared
from .layout import Layout, LayoutError, load_layout, loads_layout, parse_layout
from .lines import equipotentials, field_lines
from .post import sample
from .solution import HotSpot, PartResult, Solution, SurfaceTrace

__all__ = ["HotSpot", "Layout", "LayoutError", "PartResult", "PreparedLayout", "Solution",
           "SurfaceTrace", "equipotentials", "field_lines", "load_layout", "loads_layout",
           "parse_layout", "prepare_layout", "sample", "solve", "solve_prepared"]
