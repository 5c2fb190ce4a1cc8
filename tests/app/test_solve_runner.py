"""The solve runner's solver process: results come back from it, and a broken one falls
back to solving in the worker thread (the user still gets the result)."""

from __future__ import annotations

import os
from concurrent.futures.process import BrokenProcessPool

import pytest

from app import solver_process
from app.solve_runner import EquipotentialStep, equipotential_levels
from app.solver_process import in_solver_process


def _pid() -> int:
    return os.getpid()


def test_work_runs_in_another_process() -> None:
    # common practice, no source: a spawned worker process has its own process id
    assert in_solver_process(_pid) != os.getpid()


class _Broken:
    def submit(self, *args, **kwargs):  # noqa: ANN002, ANN003, ANN201
        raise BrokenProcessPool("gone")


def test_a_broken_solver_process_falls_back_to_this_thread(monkeypatch) -> None:  # noqa: ANN001
    monkeypatch.setattr(solver_process, "solver_process", lambda: _Broken())
    monkeypatch.setattr(solver_process, "_FAILURES", [0])
    monkeypatch.setattr(solver_process, "_IN_THREAD", False)
    assert in_solver_process(_pid) == os.getpid()
    assert not solver_process._IN_THREAD  # one failure: the next solve tries a process again
    assert in_solver_process(_pid) == os.getpid()
    assert solver_process._IN_THREAD  # two in a row: stay in the thread


def test_step_must_have_a_known_unit() -> None:
    with pytest.raises(ValueError, match="unit"):
        EquipotentialStep(1.0, "V")


def test_levels_of_a_bare_number_are_percent(monkeypatch) -> None:  # noqa: ANN001
    class Part:
        def __init__(self, volts: float) -> None:
            self.volts = volts

    class Sol:
        parts = (Part(-5000.0), Part(5000.0))

    # common practice, no source: 25 % steps of a 10 kV span from -5 kV are -2.5, 0, 2.5 kV
    levels, coarse = equipotential_levels(Sol(), 25.0)
    assert levels == pytest.approx([-2500.0, 0.0, 2500.0]) and not coarse
    # kV steps are multiples of the step, whatever the ends
    levels, _ = equipotential_levels(Sol(), EquipotentialStep(3.0, "kV"))
    assert levels == pytest.approx([-3000.0, 0.0, 3000.0])


def _fails() -> None:
    raise RuntimeError("the solve's own error")


def test_an_error_of_the_solve_itself_is_not_taken_for_a_broken_process() -> None:
    # common practice, no source: the solve's exception reaches the caller unchanged
    before = solver_process._FAILURES[0]
    with pytest.raises(RuntimeError, match="own error"):
        in_solver_process(_fails)
    assert solver_process._FAILURES[0] == before and not solver_process._IN_THREAD
