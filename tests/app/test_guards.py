"""Guards against silent wrong answers and lost work that span several modules.

- A solve that misses its tolerance is reported (``Solution.converged`` False, the
  residual, a warning in the command line's text) and the live view keeps the last
  converged result on show, marked as such; with none, it marks the one it shows.
- Saving a layout whose folder refuses the write (permission denied) leaves the old
  file whole and says why (the failure paths of ``app.atomic_file``).

The expectations are the program's own contract (never a silent wrong answer, never
lost work); common practice, no source.
"""

from __future__ import annotations

from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest
from live_helpers import live_window

import solver
from app.atomic_file import write_atomically
from app.cli_solve import solution_table
from solver import linsolve
from solver.layout import Circle, Layout, Part, Rect


def rod_and_plate(height_mm: float = 20.0) -> Layout:
    return Layout(parts=(
        Part("Rod", "electrode", Circle((0.0, height_mm), 4.0), volts=8000.0),
        Part("Plate", "electrode", Rect((-60.0, -10.0), (60.0, 0.0)), volts=0.0)),
        resolution="draft")


def test_a_solve_that_misses_its_tolerance_says_so(monkeypatch) -> None:  # noqa: ANN001
    real = linsolve.Prepared.solve

    def stalled(self, b, x0=None, rtol=linsolve.RTOL):  # noqa: ANN001, ANN202
        x, info = real(self, b, x0, rtol)
        return x + 1e-3 * np.abs(x).max(), replace(info, residual=2e-3, converged=False)

    monkeypatch.setattr(linsolve.Prepared, "solve", stalled)
    sol = solver.solve(rod_and_plate(), "draft", estimate_error=False)
    assert not sol.converged and sol.residual >= 2e-3
    assert "did not reach its tolerance" in solution_table(sol)


def test_an_unconverged_result_does_not_replace_the_last_good_one(qtbot, tmp_path) -> None:  # noqa: ANN001
    w, live = live_window(qtbot, tmp_path, rod_and_plate())
    good = live.overlays.result
    assert good is not None and good.solution.converged
    messages: list[str] = []
    w.show_message = messages.append
    bad = replace(good, revision=good.revision + 1,
                  solution=replace(good.solution, converged=False, residual=4e-3))
    live._on_result(bad)
    assert live.overlays.result is good and live.runner.latest is good
    assert "not converged" in live.status.text()
    assert f"revision {good.revision}" in live.status.text()
    assert "4.0e-03" in live.status.toolTip()
    assert messages and "did not converge" in messages[-1] and "earlier drawing" in messages[-1]


def test_with_no_good_result_the_unconverged_one_is_shown_marked(qtbot, tmp_path) -> None:  # noqa: ANN001
    w, live = live_window(qtbot, tmp_path, rod_and_plate())
    good = live.overlays.result
    live.usable = None  # as if the very first solve had failed to converge
    bad = replace(good, revision=good.revision + 1,
                  solution=replace(good.solution, converged=False, residual=4e-3))
    live._on_result(bad)
    assert live.overlays.result is bad
    assert "NOT CONVERGED" in live.status.text()
    # the next converged result is shown again and becomes the one kept
    live._on_result(replace(good, revision=good.revision + 2))
    assert live.overlays.result.revision == good.revision + 2
    assert live.usable is live.overlays.result


class WriteRefused(OSError):
    pass


def test_permission_denied_leaves_the_old_file(tmp_path, monkeypatch) -> None:  # noqa: ANN001
    target = tmp_path / "terminal.layout.json"
    target.write_text("the old layout")

    def refuse(*a, **k):  # noqa: ANN002, ANN003, ANN202
        raise PermissionError(13, "Permission denied")

    # root ignores folder permissions, so the refusal is simulated where the OS gives it
    monkeypatch.setattr("tempfile.mkstemp", refuse)
    with pytest.raises(WriteRefused, match="cannot write here .Permission denied"):
        write_atomically(target, lambda f: f.write("new"), text=True, error=WriteRefused)
    assert target.read_text() == "the old layout"


def test_a_failure_while_writing_leaves_the_old_file_and_no_debris(tmp_path) -> None:  # noqa: ANN001
    target = tmp_path / "terminal.layout.json"
    target.write_text("the old layout")

    def half_then_fail(f) -> None:  # noqa: ANN001
        f.write("{\"half\": ")
        raise ValueError("a value that cannot be written")

    with pytest.raises(ValueError, match="cannot be written"):
        write_atomically(target, half_then_fail, text=True, error=WriteRefused)
    assert target.read_text() == "the old layout"
    assert sorted(p.name for p in Path(tmp_path).iterdir()) == ["terminal.layout.json"]


def test_a_vanished_folder_is_named(tmp_path) -> None:  # noqa: ANN001
    gone = tmp_path / "usb_stick" / "layouts"
    with pytest.raises(WriteRefused, match="usb_stick/layouts: no such folder"):
        write_atomically(gone / "a.layout.json", lambda f: f.write("x"), text=True,
                         error=WriteRefused)
