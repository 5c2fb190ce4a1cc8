"""The memory guard: an absurd resolution is refused before anything large is allocated,
with a message that names a finest spacing that fits, and that spacing does fit.

The expectation is the program's own contract (issue: a memory estimate before any
allocation, a message naming a resolution that fits); common practice, no source.
"""

from __future__ import annotations

import re
import time
import tracemalloc

import pytest

import solver
from solver.geometry import layout_outlines
from solver.grid import build_grid
from solver.layout import Circle, Layout, LayoutError, Part, Rect

CAP = 40_000
"""A small node cap stands in for a small machine (the real cap is half the memory)."""


def terminal() -> Layout:
    return Layout(parts=(
        Part("Terminal", "electrode", Rect((-10.0, 0.0), (10.0, 40.0), 2.0), volts=20_000.0),
        Part("Ball", "electrode", Circle((0.0, 80.0), 6.0), volts=0.0)))


def test_an_absurd_resolution_is_refused_early_and_names_one_that_fits() -> None:
    layout = terminal()
    outlines = layout_outlines(layout)
    tracemalloc.start()
    t0 = time.perf_counter()
    try:
        with pytest.raises(LayoutError) as info:
            build_grid(layout, outlines, 1e-4, unknown_cap=CAP)
        peak = tracemalloc.get_traced_memory()[1]
    finally:
        tracemalloc.stop()
    seconds = time.perf_counter() - t0
    msg = str(info.value)
    assert "1e-04" in msg or "0.0001" in msg
    assert f"{CAP:,}" in msg
    fit = float(re.search(r"finest spacing of ([\d.e+-]+) mm fits", msg).group(1))
    # the refusal costs little: no grid-sized array was made (a 1e-4 mm grid over
    # 100 mm would need ~1e12 nodes)
    assert peak < 50e6, f"{peak / 1e6:.0f} MB allocated before refusing"
    assert seconds < 30
    grid = build_grid(layout, outlines, fit, unknown_cap=CAP)
    assert len(grid.x) * len(grid.y) <= CAP


@pytest.mark.slow  # about 12 s: with this machine's real cap the search for a fitting
# spacing builds grids of millions of nodes
def test_solve_refuses_with_the_same_message() -> None:
    with pytest.raises(LayoutError, match="finest spacing of .* mm fits"):
        solver.solve(terminal(), 1e-5, estimate_error=False)
