"""Benchmark of the live view: ``python -m app.bench_live [LAYOUT] [--edits N]``.

Runs the real window offscreen with the live view attached and prints:

* the time from an edit to the updated overlay during a scripted drag (draft solves),
  its median, and the updates per second that gives;
* the same edit solved directly with :func:`solver.solve` at ``draft`` (the baseline,
  measured in this run) and the ratio of the two: the live view's overhead;
* the longest stall of the GUI thread (gap between 5 ms timer ticks, wall clock, and
  the GUI thread's own CPU time within such a gap, which the machine's load does not
  inflate) while the full
  solve on release runs in the background and its result is shown: overlays, results
  table and the surface-field profile of the first part, selected (target: under 50 ms).

Figures, not pass/fail: the machine is noisy.
"""

from __future__ import annotations

import argparse
import os
import statistics
import time
from dataclasses import replace


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(prog="python -m app.bench_live")
    ap.add_argument("layout", nargs="?",
                    default="sample_layouts/bench_supply_terminal.layout.json")
    ap.add_argument("--edits", type=int, default=8)
    args = ap.parse_args(argv)
    os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
    from PySide6.QtCore import QTimer

    import solver

    from .cli_gui import scripted_window
    from .shape_edit import translated

    app, w = scripted_window(args.layout)
    live, doc = w.live, w.doc
    gaps: list[float] = []
    cpu_gaps: list[float] = []
    last_cpu = [time.thread_time()]
    last = [time.perf_counter()]

    def tick() -> None:
        now = time.perf_counter()
        gaps.append(now - last[0])
        last[0] = now
        cpu = time.thread_time()  # CPU time of this (the GUI) thread
        cpu_gaps.append(cpu - last_cpu[0])
        last_cpu[0] = cpu

    timer = QTimer()
    timer.timeout.connect(tick)
    timer.start(5)

    def pump_until(cond) -> None:  # noqa: ANN001
        while not cond():
            app.processEvents()
            time.sleep(0.002)

    pump_until(w.is_ready)
    pid = doc.ids()[0]
    w.selection.set([pid])  # the profile dock plots its surface field after every result
    doc.set_interacting(True)
    live_s, direct_s = [], []
    for _ in range(args.edits):
        p = doc.part(pid)
        doc.replace_part(pid, replace(p, shape=translated(p.shape, 0.5, 0.0)))
        t0, rev = time.perf_counter(), doc.revision
        pump_until(lambda r=rev: live.shown_revision == r and not live.runner.busy())
        live_s.append(time.perf_counter() - t0)
        t0 = time.perf_counter()
        solver.solve(doc.to_layout(), "draft", estimate_error=False, capacitance=False)
        direct_s.append(time.perf_counter() - t0)
    gaps.clear()
    cpu_gaps.clear()
    last[0], last_cpu[0] = time.perf_counter(), time.thread_time()
    doc.set_interacting(False)
    t0 = time.perf_counter()
    pump_until(lambda: not live.runner.busy())
    full_s = time.perf_counter() - t0
    settle = time.perf_counter() + 0.5  # the deferred redraws (profile plot) count too
    pump_until(lambda: time.perf_counter() > settle)
    med, base = statistics.median(live_s), statistics.median(direct_s)
    print(f"layout: {args.layout} ({len(doc)} parts)")
    print(f"edit -> overlay shown (draft): median {med * 1000:.0f} ms, "
          f"{1 / med:.1f} updates/s over {args.edits} edits")
    print(f"baseline solver.solve(draft) alone: median {base * 1000:.0f} ms; "
          f"live/baseline ratio {med / base:.2f}")
    print(f"full solve on release: {full_s:.2f} s; longest GUI-thread stall "
          f"{max(gaps, default=0) * 1000:.0f} ms (target < 50 ms)")
    print(f"  of which the GUI thread's own work (CPU time between ticks): longest "
          f"{max(cpu_gaps, default=0) * 1000:.0f} ms; the rest of a stall is the machine's "
          f"load (load average {os.getloadavg()[0]:.1f} on {os.cpu_count()} cores)")
    live.runner.wait()
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
