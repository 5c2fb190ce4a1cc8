"""``stresslens sweep``: the JSON contract of DESIGN.md section 3, CSV, table, bad input.

Numbers are checked against the closed-form coaxial field E = U / (r ln(R/r))
(REFERENCES.md section 1.1; standard textbook result).
"""

from __future__ import annotations

import csv
import json
import math
from pathlib import Path

import numpy as np
import pytest
from report_cases import COAX_B_MM
from scipy.optimize import brentq
from sweep_cases import LIMIT, coax_e, sweep_coax

from app import cli
from app.caution import CAUTION
from solver.layout import dumps_layout


@pytest.fixture
def coax_file(tmp_path: Path) -> Path:
    path = tmp_path / "coax.layout.json"
    path.write_text(dumps_layout(sweep_coax()))
    return path


def _run(capsys: pytest.CaptureFixture[str], *argv: str) -> tuple[int, str, str]:
    code = cli.main(["sweep", *[str(a) for a in argv]])
    out, err = capsys.readouterr()
    return code, out, err


def test_json_follows_the_contract_and_the_analytic_curve(coax_file: Path, capsys) -> None:
    code, out, err = _run(capsys, coax_file, "--part", "Core", "--param", "radius", "--from",
                          "4", "--to", "12", "--steps", "5", "--goal", "0.8", "--json",
                          "--no-inception")
    assert code == 0
    obj = json.loads(out)  # exactly one JSON object on stdout
    for key in ("part", "param", "values", "peak_field_kV_per_mm", "margin_percent", "goal"):
        assert key in obj
    assert (obj["part"], obj["param"]) == ("Core", "radius")
    assert obj["values"] == pytest.approx([4, 6, 8, 10, 12])
    exact = np.array([coax_e(r) for r in obj["values"]])
    np.testing.assert_allclose(obj["peak_field_kV_per_mm"], exact, rtol=0.01)
    np.testing.assert_allclose(obj["margin_percent"], 100 * (1 - exact / LIMIT), atol=1.0)
    # goal: U / (r ln(R/r)) = 0.8 x limit on the falling side r < R/e (REFERENCES.md 1.1)
    r_goal = brentq(lambda r: coax_e(r) - 0.8 * LIMIT, 1.0, COAX_B_MM / math.e)
    goal = obj["goal"]
    assert set(goal) >= {"fraction", "value", "peak_field_kV_per_mm"}
    assert goal["fraction"] == 0.8
    assert goal["value"] == pytest.approx(r_goal, rel=0.01)
    assert goal["peak_field_kV_per_mm"] <= 0.8 * LIMIT
    assert "step 5/5" in err  # progress on stderr


def test_goal_out_of_reach_gives_null_and_a_message(coax_file: Path, capsys) -> None:
    # the least field any core radius gives is e U / R = 0.54 kV/mm at r = R/e
    # (REFERENCES.md 1.1), above 0.5 x 1 kV/mm
    code, out, _ = _run(capsys, coax_file, "--part", "Core", "--param", "radius", "--from",
                        "10", "--to", "25", "--steps", "3", "--goal", "0.5", "--json",
                        "--resolution", "draft", "--no-inception")
    goal = json.loads(out)["goal"]
    assert code == 0 and goal["value"] is None
    assert "keeps the peak field at or below 0.5 x the limit" in goal["message"]


def test_table_and_csv_carry_units_and_the_caution(coax_file: Path, tmp_path: Path,
                                                    capsys) -> None:
    out_csv = tmp_path / "sweep.csv"
    code, out, _ = _run(capsys, coax_file, "--part", "Core", "--param", "volts", "--from",
                        "5000", "--to", "15000", "--steps", "3", "--resolution", "draft",
                        "--csv", out_csv)
    assert code == 0
    assert "volts_V" in out and "peak kV/mm" in out and "margin %" in out
    assert CAUTION in out
    with out_csv.open(newline="") as f:
        rows = list(csv.DictReader(f))
    assert [float(r["volts_V"]) for r in rows] == [5000, 10000, 15000]
    # E is proportional to U (linear electrostatics, REFERENCES.md 1.1)
    peaks = [float(r["peak_field_kV_per_mm"]) for r in rows]
    assert peaks[2] / peaks[0] == pytest.approx(3.0, rel=1e-6)
    assert float(rows[1]["inception_scale"]) > 0


def test_an_invalid_step_is_a_row_with_a_message(coax_file: Path, capsys) -> None:
    code, out, _ = _run(capsys, coax_file, "--part", "Core", "--param", "radius", "--from",
                        "20", "--to", "60", "--steps", "3", "--resolution", "draft", "--json",
                        "--no-inception")
    obj = json.loads(out)
    assert code == 0
    assert obj["peak_field_kV_per_mm"][0] > 0 and obj["peak_field_kV_per_mm"][2] is None
    assert "radius = 60 mm" in obj["messages"][2]


@pytest.mark.parametrize(("args", "words"), [
    (["--part", "Nobody", "--param", "radius"], "no part is called 'Nobody'"),
    (["--part", "Core", "--param", "thickness"], "'thickness' is not a parameter"),
    (["--part", "Core", "--param", "volts", "--steps", "1"], "--steps must lie between 2"),
    (["--part", "Core", "--param", "radius", "--goal", "-1"], "--goal is a fraction"),
    (["--part", "Core", "--param", "radius", "--executor", "gpu"], "'gpu' is not an executor"),
    (["--part", "Sheath", "--param", "permittivity"], "only a dielectric"),
])
def test_bad_arguments_exit_2_with_a_message(coax_file: Path, capsys, args: list[str],
                                             words: str) -> None:
    base = [coax_file, "--from", "1", "--to", "2"]
    if "--steps" not in args:
        base += ["--steps", "3"]
    code, out, err = _run(capsys, *base, *args)
    assert code == 2 and out == ""
    assert words in err


def test_broken_layout_file_exits_2(tmp_path: Path, capsys) -> None:
    bad = tmp_path / "bad.layout.json"
    bad.write_text("{not json")
    code, _, err = _run(capsys, bad, "--part", "a", "--param", "x", "--from", "0", "--to", "1",
                        "--steps", "2")
    assert code == 2 and "not valid JSON" in err


def test_unwritable_csv_exits_1(coax_file: Path, tmp_path: Path, capsys) -> None:
    code, _, err = _run(capsys, coax_file, "--part", "Core", "--param", "volts", "--from", "1",
                        "--to", "2", "--steps", "2", "--resolution", "draft", "--no-inception",
                        "--csv", tmp_path / "no_such_dir" / "s.csv")
    assert code == 1 and "no such folder" in err


def test_worker_processes_print_the_serial_numbers(coax_file: Path, capsys) -> None:
    # the solve is deterministic: where a step runs must not change its numbers
    args = [coax_file, "--part", "Core", "--param", "radius", "--from", "5", "--to", "11",
            "--steps", "4", "--resolution", "draft", "--json", "--no-inception"]
    serial = json.loads(_run(capsys, *args)[1])
    code, out, _ = _run(capsys, *args, "--executor", "processes:2")
    parallel = json.loads(out)
    assert code == 0 and parallel["executor"] == "processes:2"
    assert parallel["peak_field_kV_per_mm"] == serial["peak_field_kV_per_mm"]
