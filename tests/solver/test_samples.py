"""The sample layouts: each loads, and together they cover the format.

The samples are our own invented demo scenarios (no outside source); these checks
guard that they stay valid and keep showing every feature of the format
(DESIGN.md section 2) to a new user.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from solver.layout import FixedLimit, Layout, PeekLimit, load_layout

SAMPLES = sorted((Path(__file__).resolve().parents[2] / "sample_layouts").glob("*.layout.json"))
MAIN_SAMPLE = "bench_supply_terminal.layout.json"
"""Opened by ``make run``; keep the Makefile's SAMPLE in step."""


def _all() -> list[Layout]:
    return [load_layout(p) for p in SAMPLES]


def test_there_are_at_least_eight_samples_including_the_main_one() -> None:
    assert len(SAMPLES) >= 8
    assert MAIN_SAMPLE in {p.name for p in SAMPLES}


@pytest.mark.parametrize("path", SAMPLES, ids=[p.name for p in SAMPLES])
def test_sample_loads_and_is_complete(path: Path) -> None:
    layout = load_layout(path)
    assert len(layout.title) >= 20, "each sample says what it shows"
    assert 1 <= len(layout.parts) <= 8, "small enough to solve in seconds"
    assert layout.resolution in ("draft", "normal", "fine") or float(layout.resolution) > 0
    if isinstance(layout.limit, FixedLimit):
        # air at sea level withstands about 3 kV/mm across large gaps (from memory);
        # a design limit in a sample lies between a tenth of that and oil-like values
        assert 0.3 <= layout.limit.kV_per_mm <= 30.0
    assert any(p.kind == "electrode" for p in layout.parts)


def test_samples_cover_both_symmetries() -> None:
    assert {lay.symmetry for lay in _all()} == {"planar", "axisymmetric"}


def test_samples_cover_every_part_kind() -> None:
    assert {p.kind for lay in _all() for p in lay.parts} == {"electrode", "floating", "dielectric"}


def test_samples_cover_every_shape_type() -> None:
    shapes = {p.shape.type for lay in _all() for p in lay.parts}
    assert shapes == {"circle", "ellipse", "rect", "polygon", "path"}


def test_samples_cover_every_boundary_type() -> None:
    kinds = set()
    for lay in _all():
        b = lay.boundary
        kinds.add("open" if b.type == "open" else "grounded box" if b.volts is not None
                  else "insulating box")
    assert kinds == {"open", "grounded box", "insulating box"}


def test_samples_cover_both_limit_kinds() -> None:
    limits = {type(lay.limit) for lay in _all()}
    assert limits == {FixedLimit, PeekLimit}
