"""``stresslens [LAYOUT] [--screenshot OUT.png] [--size WxH]``: the editor window.

With ``--screenshot`` the window opens (offscreen when there is no display), waits
until it is ready (:meth:`app.main_window.MainWindow.is_ready`: the first results
shown, when a solver is attached), saves a PNG of itself and exits 0.  Without a
display and without ``--screenshot`` it explains what to do instead of letting Qt
abort.  Exit status: 0 done, 2 bad arguments or a bad layout, 3 no display, 1 other.
"""

from __future__ import annotations

import argparse
import os
import sys
import time
from pathlib import Path
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from PySide6.QtWidgets import QApplication

    from .main_window import MainWindow

NO_DISPLAY_MESSAGE = (
    "stresslens: no display found (neither DISPLAY nor WAYLAND_DISPLAY is set), so the "
    "window cannot open.\n"
    "  - For a picture of the editor: stresslens LAYOUT --screenshot OUT.png\n"
    "  - For results without a window: stresslens solve LAYOUT, or stresslens report "
    "LAYOUT -o OUT.pdf\n"
    "  - 'make run' does both on a machine without a display.")


def add_arguments(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("layout", nargs="?", help="layout file (*.layout.json) to open")
    parser.add_argument("--screenshot", metavar="OUT.png",
                        help="save a picture of the window to this PNG file and exit")
    parser.add_argument("--size", default="1400x900", metavar="WxH",
                        help="window size in pixels for --screenshot (default 1400x900)")
    parser.add_argument("--timeout", type=float, default=120.0, metavar="S",
                        help="longest wait, in seconds, for the first results before a "
                             "screenshot is taken anyway (default 120)")


def parse_size(text: str) -> tuple[int, int]:
    """'1400x900' -> (1400, 900); ValueError with a message otherwise."""
    try:
        w, h = (int(v) for v in text.lower().split("x"))
    except ValueError:
        raise ValueError(f"--size must look like 1400x900, not '{text}'") from None
    if not (200 <= w <= 8000 and 150 <= h <= 8000):
        raise ValueError(f"--size {text}: width must lie in 200..8000 and height in "
                         f"150..8000 pixels")
    return w, h


def has_display() -> bool:
    """False on Linux with no X11/Wayland display and no Qt platform chosen."""
    if os.environ.get("QT_QPA_PLATFORM") or not sys.platform.startswith("linux"):
        return True
    return bool(os.environ.get("DISPLAY") or os.environ.get("WAYLAND_DISPLAY"))


def run(args: argparse.Namespace) -> int:
    try:
        size = parse_size(args.size)
    except ValueError as exc:
        print(f"stresslens: {exc}", file=sys.stderr)
        return 2
    if not has_display():
        if not args.screenshot:
            print(NO_DISPLAY_MESSAGE, file=sys.stderr)
            return 3
        os.environ["QT_QPA_PLATFORM"] = "offscreen"
    problem = qt_problem()
    if problem:
        print(problem, file=sys.stderr)
        return 1
    if args.screenshot:
        return _screenshot(args.layout, Path(args.screenshot), size, args.timeout)
    return _interactive(args.layout)


def qt_problem() -> str | None:
    """Why the Qt libraries cannot load (None when they can), in words that say what to do."""
    try:
        import PySide6.QtWidgets  # noqa: F401
    except ImportError as exc:
        return (f"stresslens: the Qt libraries cannot be loaded ({exc}).\n"
                "  On Debian or Ubuntu install: libglib2.0-0 libegl1 libgl1 libx11-6 "
                "libdbus-1-3 libfontconfig1 libfreetype6 libxkbcommon0\n"
                "  ('make setup' run as root installs them).")
    return None


def make_app() -> QApplication:
    """The QApplication (created once), named so settings land in one place."""
    from PySide6.QtWidgets import QApplication

    from .icons import APP_ICON, icon

    existing = QApplication.instance()
    app = existing if isinstance(existing, QApplication) else QApplication(sys.argv[:1])
    app.setOrganizationName("Stresslens")
    app.setApplicationName("Stresslens")
    app.setWindowIcon(icon(APP_ICON))
    return app


def build_window(layout_path: str | None) -> MainWindow:
    """The editor window with ``layout_path`` loaded (an empty layout when None).

    A bad file is reported in a dialog by the window itself; the window stays open.
    """
    from .autosave import attach_autosave
    from .export_actions import attach_export_actions
    from .live_view import attach_live_view
    from .main_window import MainWindow

    window = MainWindow()
    attach_live_view(window)
    attach_export_actions(window)
    attach_autosave(window)
    if layout_path:
        window.files.load(layout_path)
    return window


def scripted_window(layout_path: str | None, size: tuple[int, int] = (1400, 900)):  # noqa: ANN201
    """(QApplication, shown window) for a script that edits without a user (a
    benchmark): no recovery file for its edits, no question about them on closing."""
    app = make_app()
    window = build_window(layout_path)
    window.autosave.finish()
    window.files.confirm_discard = lambda: True
    window.resize(*size)
    window.show()
    return app, window


def _interactive(layout_path: str | None) -> int:
    from .logging_setup import install_excepthook

    app = make_app()
    install_excepthook()
    window = build_window(layout_path)
    window.restore_window_state()
    window.show()
    window.autosave.offer_recovery()  # work left by a session that did not close normally
    return int(app.exec())


def _screenshot(layout_path: str | None, out: Path, size: tuple[int, int],
                timeout_s: float) -> int:
    from solver.layout import LayoutError, load_layout

    if layout_path:
        try:
            load_layout(layout_path)
        except LayoutError as exc:
            print(f"stresslens: {exc}", file=sys.stderr)
            return 2
    app = make_app()
    window = build_window(layout_path)
    window.resize(*size)
    window.show()
    app.processEvents()
    window.canvas.zoom_to_fit()
    deadline = time.monotonic() + timeout_s
    while not window.is_ready() and time.monotonic() < deadline:
        app.processEvents()
        time.sleep(0.01)
    ready = window.is_ready()
    app.processEvents()
    if not window.grab().save(str(out), "PNG"):
        print(f"stresslens: cannot write the screenshot to {out}", file=sys.stderr)
        return 1
    note = "" if ready else f" (results not ready after {timeout_s:g} s; editor shown as is)"
    print(f"stresslens: window screenshot saved to {out}{note}")
    window.hide()
    window.deleteLater()
    return 0
