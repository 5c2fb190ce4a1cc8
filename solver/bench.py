"""Accuracy and speed benchmark of the field solver against exact solutions.

Run from a checkout: ``python -m solver.bench`` (``--quick`` skips the fine grids and
the million-unknown comparison).  It prints

1. for each analytic case and resolution: unknowns, wall seconds, the error of the
   reported peak surface field, the largest error of any surface-field sample against
   the exact field at that point, and the capacitance error (all in percent);
2. the same layouts with a *staircase* boundary (every cut link given its full length,
   so the conductor's potential sits on the nearest grid node) and the ratio of its
   largest sample error to that of the Shortley-Weller scheme;
3. solve cost in matrix-vector products: wall time of a whole solve (grid, assembly,
   factorisation or multigrid set-up, unit solves, post-processing) divided by the time
   of one :math:`A x` measured in the same run; for a fresh layout and for a layout
   with one radius changed by 1 %;
4. a grid of about a million unknowns: multigrid ``prepare`` + one solve against
   ``scipy.sparse.linalg.spsolve`` on the same matrix (in a child process with a time
   cap), and the peak memory per unknown of the whole solve (growth of max RSS).

Ratios are against baselines measured in the same run, so they mean the same on any
machine.  The exact formulas and layouts come from ``tests/solver/analytic_layouts.py``.
Units: mm, V, kV/mm; errors in percent.
"""

from __future__ import annotations

import argparse
import math
import multiprocessing as mp
import resource
import sys
import time
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path

import numpy as np
import scipy.sparse.linalg as spla

from .api import PreparedLayout, prepare_layout, solve_prepared
from .discretize import System, _assemble, _coefficients, _segment_inverse_eps, discretize
from .geometry import layout_outlines
from .grid import build_grid
from .layout import Layout, Resolution
from .linsolve import prepare
from .solution import Solution


def _oracles():
    """The layout builders and exact formulas shared with the tests (a checkout only)."""
    here = str(Path(__file__).resolve().parent.parent / "tests" / "solver")
    if here not in sys.path:
        sys.path.insert(0, here)
    import analytic_layouts

    return analytic_layouts

U = 1000.0  # V
PEAK_TARGETS: dict[tuple[str, Resolution], float] = {
    ("coax", "draft"): 1.0, ("coax", "normal"): 0.2, ("coax", "fine"): 0.05,
    ("spheres", "normal"): 0.2, ("spheres", "fine"): 0.1,
    ("sphere", "normal"): 0.2, ("sphere", "fine"): 0.1}
"""Peak-field error targets, percent, by the first word of the case name and resolution."""
PEAK_FLOOR = 1e-3
"""Smallest Shortley-Weller peak error (percent) used as a ratio's denominator."""


@dataclass(frozen=True)
class Case:
    """An analytic case: a layout builder, the part to read, and its exact answers."""

    name: str
    build: Callable[[Resolution], Layout]
    part: str
    field: Callable[[np.ndarray], np.ndarray]
    """Exact surface field (kV/mm) at surface points (N, 2) mm."""
    peak: float
    """Exact peak surface field, kV/mm."""
    cap: Callable[[Solution], float]
    """The capacitance the solver reports for the exact value ``cap_exact``."""
    cap_exact: float


def _line_pair_field(lam: float, b: float, ctr: tuple[float, float], axis: int
                     ) -> Callable[[np.ndarray], np.ndarray]:
    r"""|E| (kV/mm) of +lam at ``ctr`` - b along ``axis`` and -lam at ``ctr`` + b (lam in
    C/m, b in mm): the exact field of two cylinders, or of a cylinder and its image.

    :math:`\vec E = \frac{\lambda}{2\pi\varepsilon_0}\bigl(\vec d_1/d_1^2 -
    \vec d_2/d_2^2\bigr)`.
    """
    al = _oracles()
    def f(p: np.ndarray) -> np.ndarray:
        c1, c2 = np.array(ctr, float), np.array(ctr, float)
        c1[axis] -= b
        c2[axis] += b
        d1, d2 = (p - c1) * 1e-3, (p - c2) * 1e-3
        e = lam / (2 * math.pi * al.EPS0) * (d1 / (d1**2).sum(1)[:, None]
                                            - d2 / (d2**2).sum(1)[:, None])
        return np.hypot(*e.T) / 1e6
    return f


def _sphere_plane_field(a: float, h: float) -> Callable[[np.ndarray], np.ndarray]:
    """|E| (kV/mm) on a sphere over a plane from the Kelvin image charges."""
    al = _oracles()
    am, hm = a * 1e-3, h * 1e-3
    q, z, charges = 4 * math.pi * al.EPS0 * am * U, hm, []
    for _ in range(200):
        charges += [(q, z), (-q, -z)]
        d = hm + z
        q, z = q * am / d, hm - am * am / d

    def f(p: np.ndarray) -> np.ndarray:
        e = np.zeros((len(p), 2))
        for qi, zi in charges:
            dr = p * 1e-3 - np.array([0.0, zi])
            # the rz-plane field of a point charge on the axis
            e += al.K * qi * dr / (np.hypot(*dr.T) ** 3)[:, None]
        return np.hypot(*e.T) / 1e6
    return f


def _cap_of(part: str) -> Callable[[Solution], float]:
    """Self capacitance C_ii of a part from the Maxwell matrix (F/m or F)."""
    def cap(s: Solution) -> float:
        i = s.conductor_names.index(part)
        return float(s.capacitance[i, i])
    return cap


def cases() -> list[Case]:
    """The six analytic cases of the table (REFERENCES 1.1-1.6, 1.8)."""
    al = _oracles()
    out = []
    a, b = 1.0, 10.0
    out.append(Case("coax a=1 b=10", lambda r: al.coax(a, b, U, r), "inner",
                    lambda p: np.full(len(p), U / (a * math.log(b / a)) / 1000),
                    U / (a * math.log(b / a)) / 1000, _cap_of("inner"),
                    2 * math.pi * al.EPS0 / math.log(b / a)))
    r, dd = 5.0, 100.0
    ach = math.acosh(dd / (2 * r))
    lam = math.pi * al.EPS0 / ach * U
    out.append(Case("two wires r=5 D=100", lambda res: al.two_wires(r, dd, U, res), "plus",
                    _line_pair_field(lam, math.sqrt(dd**2 / 4 - r * r), (0.0, 0.0), 0),
                    U * math.sqrt(dd**2 - 4 * r * r) / (2 * r * (dd - 2 * r) * ach) / 1000,
                    lambda s: 0.5 * float(s.capacitance[0, 0] - s.capacitance[0, 1]),
                    math.pi * al.EPS0 / ach))
    h = 50.0
    ach = math.acosh(h / r)
    box = ach / (ach + al.box_image_shift(r, h, 40 * h))
    out.append(Case("wire over plane r=5 h=50", lambda res: al.wire_over_plane(r, h, U, 40 * h,
                                                                               res), "wire",
                    lambda p: _line_pair_field(2 * math.pi * al.EPS0 / ach * U * box,
                                               math.sqrt(h * h - r * r), (0.0, 0.0), 1)(p),
                    U * math.sqrt((h + r) / (h - r)) / (r * ach) / 1000 * box, _cap_of("wire"),
                    2 * math.pi * al.EPS0 / ach * box))
    rs, eps = 3.0, 4.0
    series = math.log(rs / a) / eps + math.log(b / rs)
    out.append(Case("coax, sleeve r=3 eps=4", lambda res: al.coax(a, b, U, res, (rs, eps)),
                    "inner", lambda p: np.full(len(p), U / (a * eps * series) / 1000),
                    U / (a * eps * series) / 1000, _cap_of("inner"),
                    2 * math.pi * al.EPS0 / series))
    a2, b2 = 50.0, 100.0
    out.append(Case("spheres a=50 b=100 (axi)", lambda res: al.sphere_in_sphere(a2, b2, U, res),
                    "inner", lambda p: np.full(len(p), U * b2 / (a2 * (b2 - a2)) / 1000),
                    U * b2 / (a2 * (b2 - a2)) / 1000, _cap_of("inner"),
                    4 * math.pi * al.EPS0 * a2 * b2 / (b2 - a2) * 1e-3))
    a3, h3 = 10.0, 20.0
    cap3, e3 = al.sphere_plane_series(a3, h3, U)
    out.append(Case("sphere a=10 h=20 / plane (axi)",
                    lambda res: al.sphere_over_plane(a3, h3, U, 40 * h3, res), "sphere",
                    _sphere_plane_field(a3, h3), e3 / 1e6, _cap_of("sphere"), cap3))
    return out


# ------------------------------------------------------------------------ staircase

def staircase(system: System, layout: Layout) -> System:
    """The same grid with every conductor cut moved to the far node of its link.

    Benchmark baseline only: the link keeps its full length, so the conductor's
    potential is imposed one whole spacing away, as a staircase boundary does.
    """
    grid = system.grid
    full = np.zeros_like(system.nb_dist)
    hx, hy = np.diff(grid.x), np.diff(grid.y)
    full[0, :, :-1], full[1, :, 1:] = hx[None, :], hx[None, :]
    full[2, :-1, :], full[3, 1:, :] = hy[:, None], hy[:, None]
    cut = (system.nb_part >= 0) & (system.cut_cross >= 0)
    nb_dist = np.where(cut, full, system.nb_dist)
    outlines = layout_outlines(layout)
    inv = _segment_inverse_eps(layout, outlines, grid, nb_dist, system.eps_node)
    coef = _coefficients(grid, nb_dist, system.nb_part, inv)
    free = system.node_index >= 0
    return _assemble(layout, grid, system.conductor, system.eps_node, free, nb_dist,
                     system.nb_part, coef, system.cut_cross, system.crossings)


def prepare_with(layout: Layout, res: Resolution,
                 transform: Callable[[System, Layout], System] | None = None
                 ) -> PreparedLayout:
    """``prepare_layout`` with an optional change to the assembled system."""
    t0 = time.perf_counter()
    outlines = layout_outlines(layout)
    grid = build_grid(layout, outlines, res)
    system = discretize(layout, outlines, grid)
    if transform is not None:
        system = transform(system, layout)
    prep = prepare(system.A)
    from .api import part_charges

    unit, charges = {}, {}
    n = len(layout.parts)
    for k, p in enumerate(layout.parts):
        if p.is_conductor:
            unit[k], _ = prep.solve(np.asarray(system.G[:, k].todense()).ravel())
            volts = np.zeros(n + 1)
            volts[k] = 1.0
            charges[k] = part_charges(layout, outlines, system, unit[k], volts)
    return PreparedLayout(layout, outlines, grid, system, prep, unit, charges,
                          time.perf_counter() - t0, True, 0.0, {k: (k,) for k in unit}, res)


# ------------------------------------------------------------------------ measures

@dataclass(frozen=True)
class Row:
    case: str
    res: str
    unknowns: int
    seconds: float
    peak_err: float
    top_err: float
    sample_err: float
    cap_err: float


def measure(case: Case, res: Resolution, transform=None) -> Row:
    """Solve one case and compare with its exact answers (errors in percent)."""
    t0 = time.perf_counter()
    sol = solve_prepared(prepare_with(case.build(res), res, transform))
    sec = time.perf_counter() - t0
    tr = [t for t in sol.surfaces if t.part == case.part]
    xy = np.vstack([t.xy_mm for t in tr])
    e = np.concatenate([t.E_kV_per_mm for t in tr])
    exact = case.field(xy)
    return Row(case.name, str(res), sol.unknowns, sec,
               100 * (sol.part(case.part).peak_field_kV_per_mm / case.peak - 1),
               100 * (float(e.max()) / case.peak - 1),
               100 * float(np.max(np.abs(e / exact - 1))),
               100 * (case.cap(sol) / case.cap_exact - 1))


def matvec_seconds(A, repeat: int = 30) -> float:
    """Median wall time of one sparse product A @ x (s)."""
    x = np.random.default_rng(0).standard_normal(A.shape[1])
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        A @ x
        times.append(time.perf_counter() - t0)
    return float(np.median(times))


def _spsolve_child(A, b, q) -> None:
    t0 = time.perf_counter()
    x = spla.spsolve(A.tocsc(), b)
    q.put((time.perf_counter() - t0, float(np.linalg.norm(A @ x - b) / np.linalg.norm(b))))


def million(spacing: float, cap_seconds: float) -> tuple[list[str], float | None, float]:
    """Multigrid against spsolve on a ~1M-unknown coax grid; memory per unknown."""
    al = _oracles()
    lay = al.coax(1.0, 10.0, U, spacing)
    rss0 = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
    t0 = time.perf_counter()
    pl = prepare_layout(lay, spacing)
    sol = solve_prepared(pl)
    whole = time.perf_counter() - t0
    rss1 = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
    A = pl.system.A
    n = A.shape[0]
    b = np.asarray(pl.system.G[:, 0].todense()).ravel()
    t0 = time.perf_counter()
    prep = prepare(A, "amg")
    x, info = prep.solve(b)
    t_amg = time.perf_counter() - t0
    exact = U / math.log(10.0) / 1000.0
    lines = [f"coax at {spacing} mm: {n:,} unknowns; whole solve {whole:.1f} s; peak "
             f"{sol.peak_field_kV_per_mm:.4f} kV/mm, error "
             f"{100 * (sol.peak_field_kV_per_mm / exact - 1):+.3f} %",
             f"  multigrid prepare + 1 solve: {t_amg:.1f} s, {info.iterations} iterations, "
             f"residual {info.residual:.1e}"]
    ctx = mp.get_context("fork")
    q = ctx.Queue()
    child = ctx.Process(target=_spsolve_child, args=(A, b, q))
    child.start()
    child.join(cap_seconds)
    if child.is_alive():
        child.kill()
        child.join()
        ratio: float | None = cap_seconds / t_amg
        lines.append(f"  spsolve: not finished in {cap_seconds:.0f} s (stopped); "
                     f"ratio spsolve/multigrid > {ratio:.1f}")
    elif child.exitcode != 0:
        ratio = None
        lines.append(f"  spsolve: child failed (exit code {child.exitcode}; out of memory?)")
    else:
        t_sp, res = q.get()
        ratio = t_sp / t_amg
        lines.append(f"  spsolve (SuperLU): {t_sp:.1f} s, residual {res:.1e}; "
                     f"ratio spsolve/multigrid = {t_sp / t_amg:.2f}")
    per_unknown = (rss1 - rss0) * 1024 / n
    lines.append(f"  peak memory growth of the whole solve: {per_unknown:.0f} "
                 f"bytes per unknown (max RSS, includes the grid and post-processing)")
    return lines, ratio, per_unknown


def cost_in_matvecs(res: Resolution) -> tuple[list[str], list[float]]:
    """Whole-solve time / one matvec, fresh and after a 1 % change of radius."""
    al = _oracles()
    out, ratios = [], []
    for label, a in (("fresh", 1.0), ("radius +1 %", 1.01)):
        lay = al.coax(a, 10.0, U, res)
        t0 = time.perf_counter()
        pl = prepare_layout(lay, res)
        solve_prepared(pl)
        whole = time.perf_counter() - t0
        mv = matvec_seconds(pl.system.A)
        ratios.append(whole / mv)
        out.append(f"  coax {res:6s} {label:12s}: {pl.system.A.shape[0]:>9,} unknowns, "
                   f"{whole:6.2f} s = {whole / mv:>9,.0f} matvecs ({mv * 1e3:.3f} ms each), "
                   f"{pl.prepared.method}")
    return out, ratios


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(prog="python -m solver.bench", description=__doc__.split(
        "\n")[0])
    ap.add_argument("--quick", action="store_true", help="skip fine grids and the 1M grid")
    ap.add_argument("--spsolve-cap", type=float, default=240.0,
                    help="seconds to let spsolve run on the 1M grid (default 240)")
    args = ap.parse_args(argv)
    t_start = time.perf_counter()
    big = None if args.quick else million(0.0055, args.spsolve_cap)
    resolutions: list[Resolution] = ["draft", "normal"]
    if not args.quick:
        resolutions.append("fine")
    targets: list[tuple[str, str, bool]] = []
    print("Stresslens solver benchmark (errors in %, against exact solutions)")
    print("peak err: reported peak; top sample err: largest surface sample vs exact peak;")
    print("max sample err: largest |error| of any surface sample vs the exact field there")
    print(f"{'case':32s} {'res':7s} {'unknowns':>9s} {'sec':>7s} {'peak err':>9s} "
          f"{'top sample err':>15s} {'max sample err':>15s} {'C err':>8s}")
    all_cases = cases()
    sw_rows = {}
    for c in all_cases:
        for res in resolutions:
            row = measure(c, res)
            sw_rows[(c.name, res)] = row
            print(f"{row.case:32s} {row.res:7s} {row.unknowns:>9,} {row.seconds:>7.2f} "
                  f"{row.peak_err:>+9.3f} {row.top_err:>+15.3f} {row.sample_err:>15.3f} "
                  f"{row.cap_err:>+8.3f}")
            goal = PEAK_TARGETS.get((c.name.split(" ")[0], res))
            if goal is not None:
                targets.append((f"{c.name} {res}: |peak err| {abs(row.peak_err):.3f} % "
                                f"<= {goal} %", "", abs(row.peak_err) <= goal))
            if c.name.startswith("coax a=1"):
                targets.append((f"{c.name} {res}: max sample err {row.sample_err:.3f} % <= "
                                f"2 x |peak err| = {2 * abs(row.peak_err):.3f} %", "",
                                row.sample_err <= 2 * abs(row.peak_err)))
    print("\nStaircase boundary (same grids, cuts moved to the far node) at normal:")
    print(f"{'case':32s} {'peak err':>9s} {'max sample err':>15s} {'C err':>8s} "
          f"{'ratio peak':>11s} {'ratio max':>10s} {'ratio C':>8s}  (staircase / SW)")
    for c in all_cases:
        st = measure(c, "normal", staircase)
        sw = sw_rows[(c.name, "normal")]
        ratio_peak = abs(st.peak_err) / max(abs(sw.peak_err), PEAK_FLOOR)
        print(f"{c.name:32s} {st.peak_err:>+9.3f} {st.sample_err:>15.3f} {st.cap_err:>+8.3f} "
              f"{ratio_peak:>11.1f} {st.sample_err / sw.sample_err:>10.1f} "
              f"{abs(st.cap_err / sw.cap_err):>8.1f}")
        targets.append((f"{c.name}: staircase / SW peak error {ratio_peak:.0f} >= 100", "",
                        ratio_peak >= 100))
    print(f"(ratio peak: the SW error is floored at {PEAK_FLOOR} % where it happens to be "
          "smaller)")
    print("\nSolve cost in matrix-vector products (same run):")
    for res in resolutions:
        lines, (fresh, again) = cost_in_matvecs(res)
        print("\n".join(lines))
        targets.append((f"coax {res}: fresh solve {fresh:,.0f} matvecs <= 100", "", fresh <= 100))
        targets.append((f"coax {res}: re-solve after a change {again:,.0f} matvecs <= 30", "",
                        again <= 30))
    if big is not None:
        lines, ratio, per_unknown = big
        print("\nAbout a million unknowns:")
        print("\n".join(lines))
        targets.append((f"1M grid: spsolve / multigrid {ratio or float('nan'):.1f} >= 10", "",
                        ratio is not None and ratio >= 10))
        targets.append((f"1M grid: {per_unknown:.0f} bytes per unknown < 1024", "",
                        per_unknown < 1024))
    print("\nTargets (issues 2 and 3):")
    for text, _, ok in targets:
        print(f"  [{'met' if ok else 'MISSED'}] {text}")
    print(f"\nbenchmark wall time {time.perf_counter() - t_start:.0f} s")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
