"""The benchmark keeps running: its quick mode (no fine grids, no million-unknown case)
builds every reference case, the staircase baseline and the cost measurement.

The figures themselves are the benchmark's business (printed, never asserted here: timed
assertions flake on a shared 2-core machine); this only guards against the benchmark
rotting when the solver's types change (a PreparedLayout field once broke it unseen).
"""

from __future__ import annotations

import pytest

from solver import bench


def test_quick_benchmark_runs_and_reports_its_targets(capsys: pytest.CaptureFixture[str]) -> None:
    assert bench.main(["--quick"]) == 0
    out = capsys.readouterr().out
    assert "Staircase boundary" in out
    assert "Targets (issues 2 and 3):" in out
    # the accuracy targets at draft and normal are met (exact coax, REFERENCES 1.1)
    assert "[met] coax a=1 b=10 normal: |peak err|" in out
