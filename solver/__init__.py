"""Stresslens numerical core: layouts in, potentials and surface fields out.

Pure numpy/scipy/shapely/pyamg/contourpy; never imports Qt, matplotlib or ``app``.
"""

from .layout import Layout, LayoutError, load_layout, loads_layout, parse_layout

__all__ = ["Layout", "LayoutError", "load_layout", "loads_layout", "parse_layout"]
