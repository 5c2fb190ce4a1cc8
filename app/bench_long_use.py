"""Long-use benchmark: ``python -m app.bench_long_use [LAYOUT] [--minutes 10]``.

Runs the real editor window offscreen with the live field view and scripts what an
engineer does for a long session: press on a part, drag it to and fro for a few
seconds with the mouse (real mouse events on the canvas, one every 40 ms, so the live
view solves drafts all the time), release (a full solve with its error estimate runs),
pause, and again, for the given number of minutes.  It prints:

* memory: the resident set size (RSS, MB) after a warm-up cycle and at the end, the
  growth between them, and the RSS at each minute (target: growth < 50 MB over
  10 minutes);
* responsiveness: the longest gap between ticks of a 10 ms heartbeat timer on the GUI
  thread while dragging (target: < 100 ms), the GUI thread's CPU time within it, its
  99th percentile, how many long gaps were the GUI thread's own work, and the longest
  gap with the window idle measured in the same run (the baseline);
* the machine's load and CPU pressure (Linux pressure-stall information) over the run,
  to read the stall figures against;
* how many drafts and full solves were shown or dropped as stale, and the undo steps.

Figures, not pass/fail: the machine is noisy.  ``tests/app/test_long_use.py`` runs a
one-minute smoke run.
"""

from __future__ import annotations

import argparse
import gc
import math
import os
import time

STEP_MS = 40
"""Interval of the scripted mouse moves (a hand moves the mouse at about 25 Hz)."""
HEARTBEAT_MS = 10
DRAG_S, PAUSE_S = 4.0, 1.5
AMPLITUDE_MM = 12.0
"""Largest excursion of the dragged part from where the drag began (mm)."""
DRIFT_MM = 10.0
"""Where a drag ends, from where it began (mm), alternately to the right and left (a
multiple of the snapping grid, so no drag snaps back to where it began)."""


def rss_mb() -> float:
    """Resident set size of this process in MB (Linux /proc; else the peak from
    ``resource``)."""
    try:
        pages = int(open("/proc/self/statm").read().split()[1])
        return pages * os.sysconf("SC_PAGE_SIZE") / 1e6
    except (OSError, ValueError, IndexError):
        import resource

        return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1e3


class Heartbeat:
    """Gaps between ticks of a fast timer on the GUI thread: a long gap is a stall."""

    def __init__(self) -> None:
        from PySide6.QtCore import QTimer

        self.gaps: list[float] = []
        self.cpu: list[float] = []
        """GUI-thread CPU time within each gap: a long gap with little CPU is the thread
        waiting (for a core on a busy machine, or for a lock), not working."""
        self.last = time.perf_counter()
        self.last_cpu = time.thread_time()
        self.timer = QTimer()
        self.timer.setTimerType(self.timer.timerType().PreciseTimer)
        self.timer.timeout.connect(self._tick)
        self.timer.start(HEARTBEAT_MS)

    def _tick(self) -> None:
        now, cpu = time.perf_counter(), time.thread_time()
        self.gaps.append(now - self.last)
        self.cpu.append(cpu - self.last_cpu)
        self.last, self.last_cpu = now, cpu

    def reset(self) -> None:
        self.gaps.clear()
        self.cpu.clear()
        self.last, self.last_cpu = time.perf_counter(), time.thread_time()

    def summary(self, over_s: float = 0.1) -> str:
        """The longest gap and its CPU share, the 99th percentile, and how many gaps
        exceeded ``over_s`` with the GUI thread working for most of it."""
        if not self.gaps:
            return "no heartbeats"
        k = max(range(len(self.gaps)), key=self.gaps.__getitem__)
        ordered = sorted(self.gaps)
        p99 = ordered[int(0.99 * (len(ordered) - 1))]
        long = [(g, c) for g, c in zip(self.gaps, self.cpu, strict=True) if g > over_s]
        busy = sum(1 for g, c in long if c > 0.5 * g)
        return (f"longest stall {1000 * self.gaps[k]:.0f} ms (target < {1000 * over_s:.0f} ms; "
                f"GUI-thread CPU in it {1000 * self.cpu[k]:.0f} ms), 99th percentile "
                f"{1000 * p99:.0f} ms, over {len(self.gaps)} heartbeats of {HEARTBEAT_MS} ms; "
                f"{len(long)} gaps over {1000 * over_s:.0f} ms, {busy} of them with the GUI "
                f"thread busy for most of the gap (the rest: waiting for a core or a lock)")


class Hand:
    """Drives the mouse on the canvas viewport: press, move out and back along a sine, release."""

    def __init__(self, window, part_name: str) -> None:  # noqa: ANN001
        self.w, self.name = window, part_name
        self.side = 1

    def _send(self, kind, mm: tuple[float, float], button, buttons) -> None:  # noqa: ANN001
        from PySide6.QtCore import QPointF, Qt
        from PySide6.QtGui import QMouseEvent
        from PySide6.QtWidgets import QApplication

        vp = self.w.canvas.viewport()
        p = QPointF(self.w.canvas.mapFromScene(QPointF(*mm)))
        ev = QMouseEvent(kind, p, QPointF(vp.mapToGlobal(p.toPoint())), button, buttons,
                         Qt.KeyboardModifier.NoModifier)
        QApplication.sendEvent(vp, ev)

    def centre(self) -> tuple[float, float]:
        from . import shape_edit as se

        pid = self.w.doc.id_of(self.name)
        x0, y0, x1, y1 = se.bounds(self.w.doc.part(pid).shape)
        return (x0 + x1) / 2, (y0 + y1) / 2

    def drag(self, app, seconds: float, until: float) -> int:  # noqa: ANN001
        """One drag of ``seconds`` (cut short at ``until``); returns the moves sent."""
        from PySide6.QtCore import QEvent, Qt

        left = Qt.MouseButton.LeftButton
        x0, y0 = self.centre()
        self._send(QEvent.Type.MouseButtonPress, (x0, y0), left, left)
        t0, moves, at = time.perf_counter(), 0, (x0, y0)
        try:
            while (t := time.perf_counter() - t0) < seconds and time.perf_counter() < until:
                # a sine out and back, ending DRIFT_MM aside (alternately left and right), so
                # every drag is one undo step and the part stays near its place
                u = t / seconds
                at = (x0 + AMPLITUDE_MM * math.sin(2 * math.pi * u) + self.side * DRIFT_MM * u,
                      y0)
                self._send(QEvent.Type.MouseMove, at, Qt.MouseButton.NoButton, left)
                moves += 1
                pump(app, STEP_MS / 1000)
            at = (x0 + self.side * DRIFT_MM, y0)  # the end of the stroke, exactly
            self._send(QEvent.Type.MouseMove, at, Qt.MouseButton.NoButton, left)
            pump(app, STEP_MS / 1000)
        finally:
            self._send(QEvent.Type.MouseButtonRelease, at, left, Qt.MouseButton.NoButton)
        self.side = -self.side
        return moves


def cpu_pressure_us() -> float | None:
    """Linux pressure-stall total for the CPU (µs during which some task waited for a
    core), or None where the kernel does not report it."""
    try:
        first = open("/proc/pressure/cpu").readline().split()
        return float(dict(kv.split("=") for kv in first[1:])["total"])
    except (OSError, ValueError, KeyError, IndexError):
        return None


def _load() -> float:
    """The 1-minute load average (other work on the machine skews the stall figures)."""
    try:
        return os.getloadavg()[0]
    except OSError:
        return float("nan")


def pump(app, seconds: float) -> None:  # noqa: ANN001
    """Run the event loop for ``seconds``."""
    end = time.perf_counter() + seconds
    while time.perf_counter() < end:
        app.processEvents()
        time.sleep(0.001)


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(prog="python -m app.bench_long_use")
    ap.add_argument("layout", nargs="?",
                    default="sample_layouts/bench_supply_terminal.layout.json")
    ap.add_argument("--part", default="Guard", help="name of the part to drag")
    ap.add_argument("--minutes", type=float, default=10.0)
    args = ap.parse_args(argv)
    os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
    from .cli_gui import scripted_window

    app, w = scripted_window(args.layout)
    w.canvas.zoom_to_fit()
    if w.doc.id_of(args.part) is None:
        print(f"bench_long_use: no part named '{args.part}' in {args.layout}")
        return 2
    live, hand, beat = w.live, Hand(w, args.part), Heartbeat()
    shown = [0]
    live.runner.result_ready.connect(lambda _r: shown.__setitem__(0, shown[0] + 1))

    def settle() -> None:
        while not w.is_ready():
            pump(app, 0.01)

    settle()
    beat.reset()
    pump(app, 2.0)
    idle_ms = 1000 * max(beat.gaps, default=0.0)
    hand.drag(app, DRAG_S, time.perf_counter() + DRAG_S)  # warm-up cycle
    settle()
    gc.collect()
    rss0, load0, psi0 = rss_mb(), _load(), cpu_pressure_us()
    beat.reset()
    shown[0], dropped0, moves, drags = 0, live.runner.dropped, 0, 0
    t_start = time.perf_counter()
    end = t_start + 60 * args.minutes
    per_minute: list[float] = []
    while time.perf_counter() < end:
        moves += hand.drag(app, DRAG_S, end)
        drags += 1
        pump(app, PAUSE_S)
        if time.perf_counter() - t_start >= 60 * (len(per_minute) + 1):
            per_minute.append(rss_mb())
    stalls = beat.summary()
    psi1 = cpu_pressure_us()
    pressure = ("not reported by this system" if psi0 is None or psi1 is None else
                f"{100 * (psi1 - psi0) / 1e6 / (time.perf_counter() - t_start):.0f} % of the "
                f"time some task waited for a core")
    settle()
    gc.collect()
    rss1 = rss_mb()
    minutes = (time.perf_counter() - t_start) / 60
    print(f"machine load (1-min average, {os.cpu_count()} cores): {load0:.1f} at the start, "
          f"{_load():.1f} at the end; CPU pressure over the run: {pressure}")
    print(f"layout: {args.layout}; dragged '{args.part}' {drags} times, {moves} mouse moves "
          f"in {minutes:.1f} min; undo steps {w.stack.count()}")
    print(f"results shown: {shown[0]}; dropped as stale: {live.runner.dropped - dropped0}")
    print(f"memory: RSS {rss0:.1f} MB after warm-up -> {rss1:.1f} MB at the end: growth "
          f"{rss1 - rss0:+.1f} MB (target < 50 MB over 10 min)")
    print("memory by minute (MB): " + ", ".join(f"{m:.1f}" for m in per_minute))
    print(f"GUI thread: {stalls}; idle baseline (window idle, same run): longest gap "
          f"{idle_ms:.0f} ms")
    live.runner.wait()
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
