"""CSV exports: valid files, headers with units, and numbers that match the physics.

The coaxial checks compare the exported values with the closed-form coaxial field
(REFERENCES.md §1.1; standard textbook result); the sample-layout checks compare the
file with the solve it came from.
"""

from __future__ import annotations

import csv
import math
from pathlib import Path

import numpy as np
import pytest
from report_cases import (
    COAX_A_MM,
    COAX_B_MM,
    COAX_V,
    SAMPLE,
    coax_field,
    coax_phi,
    solved_coax,
    solved_sample,
)

from app import cli
from app.export import ExportError, write_grid_csv, write_surface_csv


def read_rows(path: Path) -> tuple[list[str], list[dict[str, str]]]:
    with path.open(newline="", encoding="utf-8") as f:
        reader = csv.DictReader(f)
        rows = list(reader)
        return list(reader.fieldnames or []), rows


def test_surface_csv_holds_every_sample_and_its_peak_is_the_solvers(tmp_path: Path) -> None:
    sol = solved_sample()
    out = tmp_path / "surface.csv"
    n = write_surface_csv(sol, out)
    header, rows = read_rows(out)
    assert header == ["part", "kind", "ring", "arc_length_mm", "x_mm", "y_mm", "E_kV_per_mm",
                      "limit_kV_per_mm", "radius_mm"]
    assert n == len(rows) == sum(len(t.s_mm) for t in sol.surfaces)
    for p in sol.parts:
        mine = [r for r in rows if r["part"] == p.name]
        e = np.array([float(r["E_kV_per_mm"]) for r in mine])
        traces = [t for t in sol.surfaces if t.part == p.name]
        # every sample of the solve is in the file, to the 7 digits written
        assert e.max() == pytest.approx(max(t.E_kV_per_mm.max() for t in traces), rel=1e-6)
        k = int(np.argmax(e))
        ring = [r for r in mine if r["ring"] == mine[k]["ring"]]
        xy = np.array([[float(r["x_mm"]), float(r["y_mm"])] for r in ring])
        k = int(np.argmax([float(r["E_kV_per_mm"]) for r in ring]))
        peak, at = ((p.surface_field_kV_per_mm, p.surface_peak_at_mm)
                    if p.kind == "dielectric" else (p.peak_field_kV_per_mm, p.peak_at_mm))
        # the solver refines its peak between samples (a parabola through the largest
        # sample and its neighbours), so the reported peak is at least the file's largest
        # sample, and sits at that sample's place on the outline
        assert peak >= e.max() * (1 - 1e-6), p.name
        spacing = float(np.max(np.hypot(*np.diff(xy, axis=0).T)))
        assert math.dist(at, xy[k]) <= spacing + 1e-9, p.name
    overall = max(float(r["E_kV_per_mm"]) for r in rows)
    assert overall <= sol.peak_field_kV_per_mm * (1 + 1e-6)


def test_surface_csv_of_a_coax_matches_the_closed_form(tmp_path: Path) -> None:
    out = tmp_path / "coax_surface.csv"
    write_surface_csv(solved_coax(), out)
    _, rows = read_rows(out)
    core = [r for r in rows if r["part"] == "Core"]
    e = np.array([float(r["E_kV_per_mm"]) for r in core])
    # E(a) = V0 / (a ln(b/a)) = 0.6213 kV/mm (REFERENCES.md §1.1, standard textbook result)
    assert np.all(np.abs(e / coax_field(np.array(COAX_A_MM)) - 1) < 0.01)
    s = np.array([float(r["arc_length_mm"]) for r in core])
    assert np.all(np.diff(s) > 0)
    # the arc length runs once round the circle, 2 pi a (geometry, no source needed)
    assert s[-1] == pytest.approx(2 * math.pi * COAX_A_MM, rel=0.01)
    radius = np.array([float(r["radius_mm"]) for r in core])
    assert np.allclose(radius, COAX_A_MM, rtol=0.02)


def test_grid_csv_of_a_coax_matches_the_closed_form(tmp_path: Path) -> None:
    out = tmp_path / "coax_grid.csv"
    n = write_grid_csv(solved_coax(), out, step_mm=2.5)
    header, rows = read_rows(out)
    assert header == ["x_mm", "y_mm", "region", "V", "Ex_kV_per_mm", "Ey_kV_per_mm",
                      "E_kV_per_mm"]
    assert n == len(rows)
    xy = np.array([[float(r["x_mm"]), float(r["y_mm"])] for r in rows])
    v = np.array([float(r["V"]) for r in rows])
    e = np.array([[float(r[k]) for k in ("Ex_kV_per_mm", "Ey_kV_per_mm", "E_kV_per_mm")]
                  for r in rows])
    region = np.array([r["region"] for r in rows])
    r = np.hypot(xy[:, 0], xy[:, 1])
    gap = (r > COAX_A_MM + 2) & (r < COAX_B_MM - 2)
    assert gap.sum() > 500 and set(region[gap]) == {"medium"}
    # phi(r) = V0 ln(b/r)/ln(b/a), E(r) = V0/(r ln(b/a)) (REFERENCES.md §1.1)
    assert np.max(np.abs(v[gap] - coax_phi(r[gap]))) < 0.005 * COAX_V
    assert np.max(np.abs(e[gap, 2] / coax_field(r[gap]) - 1)) < 0.03
    # E points outward, along r, away from the positive core
    radial = (e[gap, 0] * xy[gap, 0] + e[gap, 1] * xy[gap, 1]) / r[gap]
    assert np.allclose(radial, e[gap, 2], rtol=0.03)
    assert np.allclose(e[:, 2], np.hypot(e[:, 0], e[:, 1]), rtol=1e-6, atol=1e-9)
    # inside a conductor the potential is its own and the field is zero (electrostatics)
    core = r < COAX_A_MM - 0.5
    assert set(region[core]) == {"Core"} and np.all(v[core] == COAX_V)
    assert np.all(e[core] == 0.0)
    sheath = (r > COAX_B_MM + 0.5) & (np.max(np.abs(xy), axis=1) < 60)
    assert set(region[sheath]) == {"Sheath"} and np.all(v[sheath] == 0.0)


def test_grid_csv_labels_dielectrics_and_writes_axisymmetric_names(tmp_path: Path) -> None:
    sol = solved_sample()
    out = tmp_path / "grid.csv"
    write_grid_csv(sol, out, step_mm=2.0)
    _, rows = read_rows(out)
    inside = [r for r in rows if r["region"] == "Spacer"]
    assert inside, "grid points inside the dielectric spacer are labelled with its name"
    assert all(math.isfinite(float(r["V"])) for r in rows)
    assert {r["region"] for r in rows} <= {"medium", "Terminal", "Guard", "Spacer", "Enclosure"}


def test_grid_step_default_and_bad_steps(tmp_path: Path) -> None:
    sol = solved_sample()
    out = tmp_path / "grid.csv"
    for bad in (0.0, -1.0, float("nan"), float("inf")):
        with pytest.raises(ExportError, match="positive number of mm"):
            write_grid_csv(sol, out, step_mm=bad)
    with pytest.raises(ExportError, match="at most 4,000,000"):
        write_grid_csv(sol, out, step_mm=1e-3)
    assert not out.exists()
    n = write_grid_csv(sol, out)
    x0, y0, x1, y1 = sol.view_box_mm
    assert n == pytest.approx(200 * 200 * min(x1 - x0, y1 - y0) / max(x1 - x0, y1 - y0),
                              rel=0.05)


def test_failed_export_keeps_the_older_file(tmp_path: Path,
                                            monkeypatch: pytest.MonkeyPatch) -> None:
    out = tmp_path / "surface.csv"
    out.write_text("older work\n")
    import app.export as export

    def broken(*_args: object) -> int:
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(export, "write_surface_csv_to", broken)
    with pytest.raises(ExportError, match="No space left"):
        write_surface_csv(solved_sample(), out)
    assert out.read_text() == "older work\n"
    assert [p.name for p in tmp_path.iterdir()] == ["surface.csv"]
    with pytest.raises(ExportError, match="no such folder"):
        write_surface_csv(solved_sample(), tmp_path / "missing" / "s.csv")


def test_cli_export_writes_both_files(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    surf, grid = tmp_path / "s.csv", tmp_path / "g.csv"
    code = cli.main(["export", str(SAMPLE), "--resolution", "draft", "--surface", str(surf),
                     "--grid", str(grid), "--step", "4"])
    assert code == 0, capsys.readouterr().err
    assert read_rows(surf)[1] and read_rows(grid)[1]
    assert "surface samples" in capsys.readouterr().out


@pytest.mark.parametrize("argv, message", [
    (["--surface", "{tmp}/s.csv", "--resolution", "coarse"], "not a resolution"),
    ([], "nothing to export"),
    (["--surface", "{tmp}/s.csv", "--step", "2"], "--step applies to --grid"),
    (["--grid", "{tmp}/g.csv", "--step", "0.0001", "--resolution", "draft"], "at least"),
])
def test_cli_export_refuses_bad_arguments(tmp_path: Path, capsys: pytest.CaptureFixture[str],
                                          argv: list[str], message: str) -> None:
    args = [a.replace("{tmp}", str(tmp_path)) for a in argv]
    try:
        code = cli.main(["export", str(SAMPLE), *args])
    except SystemExit as exc:  # argparse refuses bad types itself, with status 2
        code = int(exc.code or 0)
    assert code == 2
    assert message in capsys.readouterr().err


def test_cli_export_refuses_a_broken_layout(tmp_path: Path,
                                            capsys: pytest.CaptureFixture[str]) -> None:
    bad = tmp_path / "broken.layout.json"
    bad.write_text('{"stresslens_layout": 1, "parts": [')
    assert cli.main(["export", str(bad), "--surface", str(tmp_path / "s.csv")]) == 2
    err = capsys.readouterr().err
    assert "not valid JSON" in err
    assert not (tmp_path / "s.csv").exists()
