"""The log file, and plain-words dialogs instead of crashes in the GUI.

:func:`install_logging` sends the records of every logger (``solver.*``, ``app.*``,
Python warnings and Qt's own messages) to a rotating log file in the platform's log
folder, ``platformdirs.user_log_dir("stresslens")``, or ``$STRESSLENS_LOG_DIR`` when set
(tests).  The GUI and the command line call it once at start; calling it again does
nothing.  If the folder cannot be written, the program runs on without a log file and
says so once on stderr.

:func:`install_excepthook` (GUI only) catches an exception that reaches the event loop:
its traceback goes to the log, and the user sees a dialog in plain words that says
the drawing is still open and where the details are, instead of a crash.
"""

from __future__ import annotations

import logging
import logging.handlers
import os
import sys
import threading
import traceback
from collections.abc import Callable
from pathlib import Path
from types import TracebackType

from .user_dirs import ENV, user_folder

LOG_DIR_ENV = ENV["log"]
LOG_NAME = "stresslens.log"
MAX_BYTES = 1_000_000
"""Size in bytes at which the log rolls over to ``stresslens.log.1``."""
BACKUPS = 3
FORMAT = "%(asctime)s %(levelname)-7s %(name)s [%(threadName)s]: %(message)s"

log = logging.getLogger("app")
_HANDLER_NAME = "stresslens-file"


def log_dir() -> Path:
    """The folder of the log file: ``$STRESSLENS_LOG_DIR`` or the platform's log folder."""
    return user_folder("log")


def log_path() -> Path:
    """Where the current log file is (or would be) written."""
    return log_dir() / LOG_NAME


def install_logging(level: int = logging.INFO) -> Path | None:
    """Attach the rotating log file to the root logger; return its path.

    Returns None (after one line on stderr) when the folder cannot be created or
    written; nothing else changes then.  Idempotent.
    """
    root = logging.getLogger()
    for h in root.handlers:
        if h.get_name() == _HANDLER_NAME:
            return Path(h.baseFilename)  # type: ignore[attr-defined]
    path = log_path()
    try:
        path.parent.mkdir(parents=True, exist_ok=True)
        handler = logging.handlers.RotatingFileHandler(
            path, maxBytes=MAX_BYTES, backupCount=BACKUPS, encoding="utf-8", delay=False)
    except OSError as exc:
        print(f"stresslens: no log file ({path.parent}: {exc.strerror or exc})",
              file=sys.stderr)
        return None
    handler.set_name(_HANDLER_NAME)
    handler.setFormatter(logging.Formatter(FORMAT))
    handler.setLevel(level)
    root.addHandler(handler)
    if root.level == logging.NOTSET or root.level > level:
        root.setLevel(level)
    logging.captureWarnings(True)
    _route_qt_messages()
    _chain_thread_hook()
    log.info("Stresslens started (pid %d, %s)", os.getpid(), " ".join(sys.argv))
    return path


def remove_logging() -> None:
    """Detach and close the log file (tests; the program keeps its log to the end)."""
    root = logging.getLogger()
    for h in list(root.handlers):
        if h.get_name() == _HANDLER_NAME:
            root.removeHandler(h)
            h.close()
    _qt_routed[0] = False


def _chain_thread_hook() -> None:
    """Log an exception that ends a thread, then hand it to the hook that was there."""
    previous = threading.excepthook

    def hook(args: threading.ExceptHookArgs) -> None:
        log.error("uncaught exception in thread %s", getattr(args.thread, "name", "?"),
                  exc_info=(args.exc_type, args.exc_value, args.exc_traceback))  # type: ignore
        previous(args)

    threading.excepthook = hook


_qt_routed = [False]


def _route_qt_messages() -> None:
    """Qt's warnings go to the log too (when Qt is loaded at all), then on to the
    handler installed before (pytest-qt's, in tests)."""
    if "PySide6.QtCore" not in sys.modules or _qt_routed[0] or _current_log_file() is None:
        return
    _qt_routed[0] = True
    from PySide6.QtCore import QtMsgType, qInstallMessageHandler

    levels = {QtMsgType.QtDebugMsg: logging.DEBUG, QtMsgType.QtInfoMsg: logging.INFO,
              QtMsgType.QtWarningMsg: logging.WARNING, QtMsgType.QtCriticalMsg: logging.ERROR,
              QtMsgType.QtFatalMsg: logging.CRITICAL}
    qt_log = logging.getLogger("qt")

    previous = None

    def handler(kind, context, message: str) -> None:  # noqa: ANN001
        qt_log.log(levels.get(kind, logging.WARNING), "%s", message)
        if previous is not None:
            previous(kind, context, message)

    previous = qInstallMessageHandler(handler)


# ---------------------------------------------------------------------- GUI exceptions

ShowError = Callable[[str, str], None]


def plain_words(exc: BaseException, where: Path | None) -> str:
    """The dialog text for an unexpected error: what happened, that nothing is lost,
    what to do, and where the details are."""
    what = str(exc).strip().splitlines()[0] if str(exc).strip() else type(exc).__name__
    details = (f"The details are in the log file:\n{where}" if where is not None
               else "No log file could be written; the details went to the terminal.")
    return ("Stresslens met an unexpected problem and stopped what it was doing:\n\n"
            f"    {what[:300]}\n\n"
            "Your drawing is still open. Save it (under a new name if in doubt) and, if "
            "the problem comes back, restart Stresslens.\n\n" + details)


def install_excepthook(show: ShowError | None = None) -> Callable[..., None]:
    """Make an exception that reaches the Qt event loop a logged error and a dialog.

    ``show(title, text)`` shows the dialog (default: a static ``QMessageBox.critical``
    call, which tests replace).  While one dialog is open, further errors are only
    logged, so a failing repaint cannot stack dialogs without end.  Returns the hook.
    """
    busy = [False]

    def hook(exc_type: type[BaseException], exc: BaseException,
             tb: TracebackType | None) -> None:
        if issubclass(exc_type, KeyboardInterrupt):
            sys.__excepthook__(exc_type, exc, tb)
            return
        where = _current_log_file()
        log.error("unexpected error in the GUI", exc_info=(exc_type, exc, tb))
        if where is None:
            traceback.print_exception(exc_type, exc, tb)
        if busy[0]:
            return
        busy[0] = True
        try:
            (show or _critical)("Unexpected problem", plain_words(exc, where))
        except Exception:  # noqa: BLE001 - the dialog itself failed: the log has it all
            log.exception("could not show the error dialog")
        finally:
            busy[0] = False

    sys.excepthook = hook
    _route_qt_messages()
    return hook


def _current_log_file() -> Path | None:
    for h in logging.getLogger().handlers:
        if h.get_name() == _HANDLER_NAME:
            return Path(h.baseFilename)  # type: ignore[attr-defined]
    return None


def _critical(title: str, text: str) -> None:
    from PySide6.QtWidgets import QApplication, QMessageBox

    QMessageBox.critical(QApplication.activeWindow(), title, text)
