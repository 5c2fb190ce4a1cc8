"""The report: valid PNG/SVG/PDF files, the printed numbers equal the solve, and the
drawing agrees with the closed-form coaxial field (REFERENCES.md §1.1).
"""

from __future__ import annotations

import math
import re
import xml.etree.ElementTree as ET
from datetime import datetime, timezone
from pathlib import Path

import numpy as np
import pytest
from matplotlib.contour import ContourSet
from matplotlib.text import Annotation
from pypdf import PdfReader
from report_cases import (
    COAX_A_MM,
    COAX_B_MM,
    COAX_V,
    SAMPLE,
    axisymmetric_layout,
    coax_field,
    solved_coax,
    solved_sample,
)

import solver
from app import cli
from app.caution import CAUTION
from app.plotting import ReportOverlays, equipotential_levels, nice_step
from app.report import FIGURE_DPI, ReportError, render_figure, write_report
from app.report_numbers import fmt_num
from app.report_tables import (
    charge_rows,
    dielectric_rows,
    part_rows,
    summary_rows,
    view_decimals,
)
from solver.layout import layout_to_json, parse_layout

WHEN = datetime(2026, 3, 14, 9, 30, tzinfo=timezone.utc)
MM_PER_INCH = 25.4
PT_PER_MM = 72 / 25.4


def squash(text: str) -> str:
    """Whitespace collapsed, so wrapped lines compare with the one-line original."""
    return re.sub(r"\s+", " ", text).strip()


def test_png_is_an_a4_landscape_page_at_the_stated_dpi(tmp_path: Path) -> None:
    from matplotlib.image import imread

    out = write_report(solved_sample(), tmp_path / "r.png", source_name=SAMPLE.name, when=WHEN)
    img = imread(out)
    h, w = img.shape[:2]
    # A4 is 297 x 210 mm (ISO 216, table of A sizes)
    assert w / FIGURE_DPI * MM_PER_INCH == pytest.approx(297, abs=1.0)
    assert h / FIGURE_DPI * MM_PER_INCH == pytest.approx(210, abs=1.0)
    rgb = img[..., :3]
    assert rgb.std() > 0.1, "the page is not blank"
    assert np.ptp(rgb, axis=2).max() > 0.3, "the page has colour (maps, markers)"


def test_svg_parses_and_keeps_names_units_and_caution_as_text(tmp_path: Path) -> None:
    out = write_report(solved_sample(), tmp_path / "r.svg", source_name=SAMPLE.name, when=WHEN)
    root = ET.parse(out).getroot()
    assert root.tag.endswith("svg")
    text = squash(" ".join("".join(el.itertext()) for el in root.iter()
                           if el.tag.endswith("text")))
    for expected in ("Terminal", "Guard", "Spacer", "Enclosure", "x (mm)", "y (mm)",
                     "potential (kV)", "kV/mm", SAMPLE.name, "2026-03-14 09:30 UTC"):
        assert expected in text, expected
    assert "High voltage can kill." in text and "licensed practice." in text


def test_pdf_has_figure_and_tables_pages_with_the_solved_numbers(tmp_path: Path) -> None:
    sol = solved_sample()
    out = write_report(sol, tmp_path / "r.pdf", source_name=SAMPLE.name, when=WHEN)
    reader = PdfReader(out)
    assert len(reader.pages) >= 2  # figure, tables (continued when they overflow)
    w1, h1 = float(reader.pages[0].mediabox.width), float(reader.pages[0].mediabox.height)
    w2, h2 = float(reader.pages[1].mediabox.width), float(reader.pages[1].mediabox.height)
    # A4 297 x 210 mm (ISO 216): page 1 landscape, page 2 portrait
    assert (w1, h1) == pytest.approx((297 * PT_PER_MM, 210 * PT_PER_MM), abs=1.0)
    assert (w2, h2) == pytest.approx((210 * PT_PER_MM, 297 * PT_PER_MM), abs=1.0)
    page1 = squash(reader.pages[0].extract_text())
    page2 = squash(" ".join(pg.extract_text() for pg in reader.pages[1:]))
    assert squash(CAUTION) in page2
    assert "High voltage can kill." in page1
    assert CAUTION in str(reader.metadata.get("/Subject"))
    for p in sol.parts:
        assert p.name in page2 and p.kind in page2
        printed = fmt_num(p.peak_field_kV_per_mm)  # the inside field for a dielectric
        assert printed in page2
        assert float(printed) == pytest.approx(p.peak_field_kV_per_mm, rel=5e-4)
        assert f"{p.margin_percent:+.1f}" in page2
    assert f"{sol.unknowns:,}" in page2
    largest = max(abs(p.charge or 0.0) for p in sol.parts)
    prefix = {"f": 1e-15, "p": 1e-12, "n": 1e-9, "µ": 1e-6, "m": 1e-3, "": 1.0}
    for name, text in charge_rows(sol):
        assert f"{name} {text}" in page2
        value, unit = text.split(" ")
        printed = float(value) * prefix[unit.removesuffix("C/m").removesuffix("C")]
        charge = sol.part(name).charge
        assert printed == pytest.approx(charge, rel=5e-4, abs=1e-9 * largest), name
    assert f"{len(sol.hot_spots)} hot spot" in page1 or "below the limit" in page1


def _numbers(cell: str) -> list[float]:
    return [float(m) for m in re.findall(r"[-+]?\d+(?:\.\d+)?(?:e[-+]?\d+)?", cell)]


def test_table_rows_carry_the_solution_values() -> None:
    sol = solved_sample()
    for row, p in zip(summary_rows(sol), sol.parts, strict=True):
        field = (p.surface_field_kV_per_mm if p.kind == "dielectric"
                 else p.peak_field_kV_per_mm)
        assert row[0] == p.name
        assert _numbers(row[1])[0] == pytest.approx(field, rel=5e-4)
        assert _numbers(row[2])[0] == pytest.approx(p.limit_at_peak_kV_per_mm, rel=5e-4)
        assert _numbers(row[3])[0] == pytest.approx(p.margin_percent, abs=0.05)
    half_digit = 0.5 * 10.0 ** -view_decimals(sol)
    for row, p in zip(part_rows(sol), sol.parts, strict=True):
        surface = p.kind == "dielectric"
        field = p.surface_field_kV_per_mm if surface else p.peak_field_kV_per_mm
        at = p.surface_peak_at_mm if surface else p.peak_at_mm
        assert _numbers(row[3])[0] == pytest.approx(field, rel=5e-4)
        if p.volts is not None:
            assert _numbers(row[2])[0] * 1e3 == pytest.approx(p.volts, rel=5e-4, abs=1e-9)
        x, y = _numbers(row[4])[:2]
        assert (x, y) == pytest.approx(at, abs=half_digit * 1.001)
    inside = {row[0]: row for row in dielectric_rows(sol)}
    assert set(inside) == {p.name for p in sol.parts if p.kind == "dielectric"} != set()
    for name, row in inside.items():
        p = sol.part(name)
        assert float(row[1]) == sol.layout.part(name).permittivity
        assert float(row[2]) == pytest.approx(p.peak_field_kV_per_mm, rel=5e-4)


def _contours(fig: object) -> ContourSet:
    ax = fig.axes[0]  # type: ignore[attr-defined]
    return next(c for c in ax.get_children() if isinstance(c, ContourSet))


def test_drawn_equipotentials_of_a_coax_sit_at_the_analytic_radii() -> None:
    sol = solved_coax()
    fig = render_figure(sol, ReportOverlays(equipotential_step_V=2500.0), "coax", WHEN)
    cs = _contours(fig)
    assert np.allclose(np.asarray(cs.levels), [2.5, 5.0, 7.5])
    for level, segs in zip(cs.levels, cs.allsegs, strict=True):
        pts = np.vstack([s for s in segs if len(s)])
        r = np.hypot(pts[:, 0], pts[:, 1])
        # phi(r) = V0 ln(b/r)/ln(b/a)  =>  r = b (a/b)^(phi/V0)  (REFERENCES.md §1.1)
        expected = COAX_B_MM * (COAX_A_MM / COAX_B_MM) ** (level * 1e3 / COAX_V)
        assert np.max(np.abs(r / expected - 1)) < 0.01, level
    labels = [t.get_text() for t in cs.labelTexts]
    assert labels and all(t.endswith(" kV") for t in labels)


def test_field_line_arrows_point_away_from_the_positive_core() -> None:
    fig = render_figure(solved_coax(), ReportOverlays(), "coax", WHEN)
    arrows = [a for a in fig.axes[0].texts
              if isinstance(a, Annotation) and a.get_text() == "" and a.arrow_patch]
    assert len(arrows) >= 10
    for a in arrows:
        head, tail = np.array(a.xy), np.array(a.xyann)
        # E = -grad(phi) runs from the 10 kV core out to the grounded sheath
        assert np.hypot(*head) > np.hypot(*tail)


def test_hot_spots_and_peak_are_marked_on_the_coax() -> None:
    sol = solved_coax()
    # limit 0.5 kV/mm < E(a) = 0.621 kV/mm (REFERENCES.md §1.1): the whole core is hot
    assert sol.hot_spots
    fig = render_figure(sol, ReportOverlays(), "coax", WHEN)
    ax = fig.axes[0]
    hot = [ln for ln in ax.lines if ln.get_marker() == "^"]
    star = [ln for ln in ax.lines if ln.get_marker() == "*"]
    assert len(hot) == len(sol.hot_spots) and len(star) == 1
    sx, sy = star[0].get_xdata()[0], star[0].get_ydata()[0]
    assert math.hypot(sx, sy) == pytest.approx(COAX_A_MM, rel=0.01)
    callouts = [t.get_text() for t in ax.texts if "> limit" in t.get_text()]
    assert callouts and all("kV/mm" in t for t in callouts)


@pytest.mark.parametrize("overlays, label", [
    (ReportOverlays(), "potential (kV)"),
    (ReportOverlays(field_strength_map=True), "field strength |E| (kV/mm)"),
    (ReportOverlays(potential_map=False, field_strength_map=False), None),
])
def test_colour_bar_names_the_quantity_and_its_unit(overlays: ReportOverlays,
                                                    label: str | None) -> None:
    fig = render_figure(solved_sample(), overlays, "sample", WHEN)
    bars = [ax.get_ylabel() for ax in fig.axes[1:]]
    assert bars == ([] if label is None else [label])


def test_axisymmetric_axes_are_named_r_and_z() -> None:
    fig = render_figure(solver.solve(axisymmetric_layout()), ReportOverlays(), "axi", WHEN)
    ax = fig.axes[0]
    assert (ax.get_xlabel(), ax.get_ylabel()) == ("r (mm)", "z (mm)")
    assert ax.get_aspect() == 1.0


def test_equipotential_levels_are_multiples_of_the_step_inside_the_range() -> None:
    sol = solved_coax()
    levels, coarse = equipotential_levels(sol, 1000.0)
    assert not coarse and np.allclose(levels, np.arange(1000, 10000, 1000))
    levels, coarse = equipotential_levels(sol, 1.0)  # 10 000 levels: too many to print
    assert coarse and np.allclose(levels, np.arange(1000, 10000, 1000))
    # round steps 1, 2, 2.5, 5 x 10^k (common practice, no source)
    assert [nice_step(s) for s in (10_000, 7, 0.03, 180)] == pytest.approx([1000, 1, 0.005,
                                                                             20])


def test_report_refuses_unknown_formats_and_keeps_older_files(
        tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    with pytest.raises(ReportError, match="unknown report format '.jpg'"):
        write_report(solved_sample(), tmp_path / "r.jpg")
    out = tmp_path / "r.pdf"
    out.write_bytes(b"older report")
    import app.report as report

    def broken(*_args: object) -> None:
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(report, "_save", broken)
    with pytest.raises(ReportError, match="No space left"):
        write_report(solved_sample(), out)
    assert out.read_bytes() == b"older report"
    assert [p.name for p in tmp_path.iterdir()] == ["r.pdf"]


def test_cli_report_writes_a_two_page_pdf(tmp_path: Path,
                                          capsys: pytest.CaptureFixture[str]) -> None:
    out = tmp_path / "terminal.pdf"
    code = cli.main(["report", str(SAMPLE), "-o", str(out), "--resolution", "draft",
                     "--step-kv", "1"])
    assert code == 0, capsys.readouterr().err
    assert len(PdfReader(out).pages) >= 2  # the tables continue when they overflow
    assert "kV/mm" in capsys.readouterr().out


def test_cli_report_refuses_bad_input(tmp_path: Path,
                                      capsys: pytest.CaptureFixture[str]) -> None:
    assert cli.main(["report", str(SAMPLE), "-o", str(tmp_path / "r.docx")]) == 2
    assert "unknown report format" in capsys.readouterr().err
    bad = tmp_path / "touching.layout.json"
    bad.write_text('{"stresslens_layout": 1, "parts": [{"name": "A", "kind": "electrode", '
                   '"volts": 1000, "shape": {"type": "circle", "center": [0, 0], "radius": 5}}, '
                   '{"name": "B", "kind": "electrode", "volts": 0, "shape": {"type": "circle", '
                   '"center": [8, 0], "radius": 5}}]}')
    assert cli.main(["report", str(bad), "-o", str(tmp_path / "r.pdf")]) == 2
    assert "'A' and 'B'" in capsys.readouterr().err
    assert not (tmp_path / "r.pdf").exists()


def test_readme_carries_the_caution_word_for_word() -> None:
    # the product's safety rule: README, About box and every report say the same thing
    readme = (Path(__file__).resolve().parents[2] / "README.md").read_text(encoding="utf-8")
    assert squash(CAUTION) in squash(readme.replace("*", ""))


def test_a_peak_on_a_square_corner_is_flagged_on_the_figure() -> None:
    # near a convex right-angled conductor corner the field grows as rho^(-1/3) without
    # bound (J. D. Jackson, Classical Electrodynamics, 3rd ed., sec. 2.11 -- from memory),
    # so the printed peak depends on the grid and the figure must say so
    layout = parse_layout({
        "stresslens_layout": 1, "resolution": "draft",
        "parts": [{"name": "Bar", "kind": "electrode", "volts": 5000,
                   "shape": {"type": "rect", "min": [-10, 10], "max": [10, 20]}},
                  {"name": "Plate", "kind": "electrode", "volts": 0,
                   "shape": {"type": "rect", "min": [-40, -5], "max": [40, 0]}}]})
    sol = solver.solve(layout, estimate_error=False)
    assert sol.part("Bar").sharp_corner
    text = " ".join(t.get_text() for t in render_figure(sol, ReportOverlays(
        field_lines=False), "bar", WHEN).texts)
    assert "sharp corner" in squash(text)
    rounded = solver.solve(parse_layout({**layout_to_json(layout), "parts": [
        {**layout_to_json(layout)["parts"][0],
         "shape": {"type": "rect", "min": [-10, 10], "max": [10, 20], "corner_radius": 3}},
        layout_to_json(layout)["parts"][1]]}), estimate_error=False)
    assert not rounded.part("Bar").sharp_corner
    text = " ".join(t.get_text() for t in render_figure(rounded, ReportOverlays(
        field_lines=False), "bar", WHEN).texts)
    assert "sharp corner" not in squash(text)


def test_field_strength_map_of_a_coax_follows_the_closed_form() -> None:
    sol = solved_coax()
    fig = render_figure(sol, ReportOverlays(field_strength_map=True, field_lines=False,
                                            equipotentials=False), "coax", WHEN)
    im = fig.axes[0].images[0]
    data = np.asarray(im.get_array(), float)
    x0, x1, y0, y1 = im.get_extent()
    ny, nx = data.shape
    xs, ys = np.linspace(x0, x1, nx), np.linspace(y0, y1, ny)
    yy, xx = np.meshgrid(ys, xs, indexing="ij")
    r = np.hypot(xx, yy)
    gap = (r > COAX_A_MM + 1.0) & (r < COAX_B_MM - 1.0)
    # E(r) = V0 / (r ln(b/a)) between the conductors (REFERENCES.md §1.1)
    assert np.max(np.abs(data[gap] / coax_field(r[gap]) - 1)) < 0.03
    # next to the core the map keeps the surface value, it does not fade to the
    # zero field inside the conductor
    rim = (r > COAX_A_MM) & (r < COAX_A_MM + 0.5)
    assert np.min(data[rim]) > 0.9 * coax_field(np.array(COAX_A_MM + 0.5))


def test_captions_and_callouts_do_not_cover_each_other() -> None:
    # legibility of the figure (common practice, no source): no boxed label over another
    from matplotlib.backends.backend_agg import FigureCanvasAgg

    fig = render_figure(solved_sample(), ReportOverlays(), SAMPLE.name, WHEN)
    renderer = FigureCanvasAgg(fig).get_renderer()
    fig.draw(renderer)
    boxes = [t.get_bbox_patch().get_window_extent(renderer) for t in fig.axes[0].texts
             if t.get_text() and t.get_bbox_patch() is not None]
    assert len(boxes) >= len(solved_sample().parts)
    for i, a in enumerate(boxes):
        for b in boxes[i + 1:]:
            w = min(a.x1, b.x1) - max(a.x0, b.x0)
            h = min(a.y1, b.y1) - max(a.y0, b.y0)
            assert min(w, h) <= 1.0, (a, b)


def test_a_layout_with_no_field_still_gives_a_report(tmp_path: Path) -> None:
    # one conductor at 0 V in open space: the potential is 0 everywhere (Laplace's
    # equation with zero boundary values has only the zero solution; from memory)
    layout = parse_layout({
        "stresslens_layout": 1, "resolution": "draft",
        "parts": [{"name": "Lone", "kind": "electrode", "volts": 0,
                   "shape": {"type": "circle", "center": [0, 0], "radius": 5}}]})
    sol = solver.solve(layout, estimate_error=False)
    out = write_report(sol, tmp_path / "lone.pdf", source_name="lone", when=WHEN)
    text = squash(" ".join(p.extract_text() for p in PdfReader(out).pages))
    assert "no field: all conductors at one potential" in text


def test_surface_profile_on_the_tables_page_of_a_coax() -> None:
    from app.report_tables import render_tables_page

    sol = solved_coax()
    fig = render_tables_page(sol, "coax", WHEN)
    assert len(fig.axes) == 1, "the profile fits below the tables"
    ax = fig.axes[0]
    assert ax.get_xlabel() == "arc length along the outline (mm)"
    assert ax.get_ylabel() == "surface field |E| (kV/mm)"
    lines = {ln.get_label(): ln for ln in ax.lines}
    core = lines["Core"]
    s, e = np.asarray(core.get_xdata()), np.asarray(core.get_ydata())
    # along the core E = V0 / (a ln(b/a)) everywhere, 2 pi a of outline (REFERENCES §1.1)
    assert np.allclose(e, coax_field(np.array(COAX_A_MM)), rtol=0.01)
    assert s[-1] == pytest.approx(2 * math.pi * COAX_A_MM, rel=0.01)
    limit = lines["limit 0.5 kV/mm"]
    assert np.allclose(limit.get_ydata(), 0.5)


@pytest.mark.parametrize("sample", sorted(p.name for p in SAMPLE.parent.glob("*.layout.json")))
def test_every_sample_layout_gives_a_two_page_report(sample: str, tmp_path: Path) -> None:
    # smoke check over our own demo layouts (no outside reference: the file must exist,
    # have both pages and name every part on the tables page)
    layout = solver.load_layout(SAMPLE.parent / sample)
    sol = solver.solve(layout, resolution="draft", estimate_error=False)
    out = write_report(sol, tmp_path / "r.pdf", source_name=sample, when=WHEN)
    pages = PdfReader(out).pages
    assert len(pages) >= 2  # the tables continue on a third page when they overflow
    page2 = squash(pages[1].extract_text())
    assert all(p.name in page2 for p in layout.parts)
