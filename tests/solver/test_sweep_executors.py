"""Sweep executors: worker processes and a Dask cluster give the serial numbers exactly.

The reference is the same sweep run serially in this process (the solve is
deterministic, so a step's numbers must not depend on where it ran).
"""

from __future__ import annotations

import sys

import numpy as np
import pytest
from test_sweep import _coax

from solver.executors import ExecutorError, ProcessExecutor, SerialExecutor, make_executor
from solver.sweep import sweep


def test_worker_processes_give_the_serial_numbers() -> None:
    layout, radii = _coax("draft"), [2.0, 3.0, 4.0, 5.0, 6.0]
    serial = sweep(layout, "inner", "radius", radii, inception=False)
    pool = ProcessExecutor(2)
    pool.start()  # workers started ahead, as the sweep dialog does
    try:
        parallel = sweep(layout, "inner", "radius", radii, executor=pool, inception=False)
    finally:
        pool.close()
    assert parallel.executor == "processes:2"
    np.testing.assert_array_equal(parallel.peak_field_kV_per_mm, serial.peak_field_kV_per_mm)


@pytest.mark.parametrize(("spec", "words"), [
    ("threads", "not an executor"), ("processes:0", "at least 1"),
    ("processes:two", "whole number"),
])
def test_bad_executor_names_are_refused(spec: str, words: str) -> None:
    with pytest.raises(ExecutorError, match=words):
        make_executor(spec)


def test_dask_missing_gives_the_install_hint(monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setitem(sys.modules, "distributed", None)  # as if not installed
    with pytest.raises(ExecutorError, match=r"stresslens\[dask\]"):
        make_executor("dask:tcp://127.0.0.1:1")


def test_dask_cluster_gives_the_serial_numbers() -> None:
    distributed = pytest.importorskip(
        "distributed", reason="dask[distributed] is not installed (the optional extra 'dask')")
    layout, radii = _coax("draft"), [2.0, 3.5, 5.0, 6.5]
    serial = sweep(layout, "inner", "radius", radii, executor=SerialExecutor(), inception=False)
    with distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                                  dashboard_address=None) as cluster:
        ex = make_executor(f"dask:{cluster.scheduler_address}")
        try:
            res = sweep(layout, "inner", "radius", radii, executor=ex, inception=False)
        finally:
            ex.close()
    assert res.executor.startswith("dask:tcp://")
    np.testing.assert_array_equal(res.peak_field_kV_per_mm, serial.peak_field_kV_per_mm)
