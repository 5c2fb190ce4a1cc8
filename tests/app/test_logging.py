"""The log file and the GUI's last-resort error dialog (app.logging_setup).

What is expected is the program's own contract (issue: errors are visible in plain
words, the log file holds the details); common practice, no source.
"""

from __future__ import annotations

import logging
import sys
import threading
import warnings
from pathlib import Path

import pytest
from PySide6.QtCore import QTimer, qWarning

from app import logging_setup as ls


@pytest.fixture
def log_folder(tmp_path, monkeypatch):  # noqa: ANN001, ANN201
    """A private log folder; the file handler and hooks are removed afterwards."""
    folder = tmp_path / "logs"
    monkeypatch.setenv(ls.LOG_DIR_ENV, str(folder))
    ls.remove_logging()
    logging.captureWarnings(False)  # an earlier test's capture would hide this one's
    old_hook, old_thread_hook = sys.excepthook, threading.excepthook
    yield folder
    ls.remove_logging()
    logging.captureWarnings(False)
    sys.excepthook, threading.excepthook = old_hook, old_thread_hook


def read_log(folder: Path) -> str:
    for h in logging.getLogger().handlers:
        h.flush()
    return (folder / ls.LOG_NAME).read_text(encoding="utf-8")


def test_records_of_every_layer_reach_the_log_file(log_folder) -> None:  # noqa: ANN001
    path = ls.install_logging()
    assert path == log_folder / ls.LOG_NAME and path.is_file()
    logging.getLogger("solver.linsolve").warning("multigrid stalled at %g", 1e-3)
    logging.getLogger("app.solve_runner").info("draft solve done")
    with warnings.catch_warnings():
        warnings.simplefilter("always")
        warnings.warn("a deprecated call", UserWarning, stacklevel=1)
    text = read_log(log_folder)
    assert "WARNING solver.linsolve" in text and "multigrid stalled at 0.001" in text
    assert "INFO    app.solve_runner" in text
    assert "a deprecated call" in text


def test_installing_twice_adds_one_handler(log_folder) -> None:  # noqa: ANN001
    a, b = ls.install_logging(), ls.install_logging()
    assert a == b
    named = [h for h in logging.getLogger().handlers if h.get_name() == "stresslens-file"]
    assert len(named) == 1


def test_an_unwritable_log_folder_is_reported_and_harmless(tmp_path, monkeypatch,
                                                           capsys) -> None:  # noqa: ANN001
    blocker = tmp_path / "a_file"
    blocker.write_text("not a folder")
    monkeypatch.setenv(ls.LOG_DIR_ENV, str(blocker / "logs"))
    ls.remove_logging()
    assert ls.install_logging() is None
    err = capsys.readouterr().err
    assert "no log file" in err and str(blocker) in err
    logging.getLogger("app").error("still fine without a file")


def test_the_log_rolls_over_and_keeps_a_few_old_files(log_folder, monkeypatch) -> None:  # noqa: ANN001
    monkeypatch.setattr(ls, "MAX_BYTES", 2000)
    ls.install_logging()
    for k in range(200):
        logging.getLogger("app").info("line %d %s", k, "x" * 50)
    names = sorted(p.name for p in log_folder.iterdir())
    assert names == ["stresslens.log", "stresslens.log.1", "stresslens.log.2",
                     "stresslens.log.3"]
    assert all(p.stat().st_size <= 2200 for p in log_folder.iterdir())


def _raise_deep() -> None:
    raise ZeroDivisionError("division by zero in a made-up place")


def test_the_excepthook_logs_the_traceback_and_shows_plain_words(log_folder) -> None:  # noqa: ANN001
    ls.install_logging()
    shown: list[tuple[str, str]] = []
    hook = ls.install_excepthook(lambda title, text: shown.append((title, text)))
    assert sys.excepthook is hook
    try:
        _raise_deep()
    except ZeroDivisionError:
        hook(*sys.exc_info())
    text = read_log(log_folder)
    assert "unexpected error in the GUI" in text
    assert "Traceback" in text and "_raise_deep" in text
    assert len(shown) == 1
    title, body = shown[0]
    assert "division by zero in a made-up place" in body
    assert "Your drawing is still open" in body and str(log_folder / ls.LOG_NAME) in body
    assert "Traceback" not in body  # plain words in the dialog, the details in the log


def test_errors_while_the_dialog_is_open_are_logged_not_stacked(log_folder) -> None:  # noqa: ANN001
    ls.install_logging()
    shown: list[str] = []

    def show(title: str, text: str) -> None:
        shown.append(text)
        try:
            raise RuntimeError("second failure during the dialog")
        except RuntimeError:
            sys.excepthook(*sys.exc_info())

    ls.install_excepthook(show)
    try:
        raise ValueError("first failure")
    except ValueError:
        sys.excepthook(*sys.exc_info())
    assert len(shown) == 1
    text = read_log(log_folder)
    assert "first failure" in text and "second failure during the dialog" in text


@pytest.mark.qt_no_exception_capture
def test_an_exception_in_a_qt_slot_becomes_a_dialog(qtbot, log_folder) -> None:  # noqa: ANN001
    ls.install_logging()
    shown: list[str] = []
    ls.install_excepthook(lambda title, text: shown.append(text))

    def slot() -> None:
        raise KeyError("part 17")

    QTimer.singleShot(0, slot)
    qtbot.waitUntil(lambda: bool(shown), timeout=3000)
    assert "part 17" in shown[0]
    assert "KeyError: 'part 17'" in read_log(log_folder)


def test_thread_exceptions_and_qt_warnings_reach_the_log(qtbot, log_folder) -> None:  # noqa: ANN001
    ls.install_logging()
    ls.install_excepthook(lambda title, text: None)
    qWarning("a warning from Qt itself")

    def work() -> None:
        raise OSError("disk vanished in a worker")

    t = threading.Thread(target=work, name="worker-test")
    t.start()
    t.join()
    text = read_log(log_folder)
    assert "a warning from Qt itself" in text
    assert "worker-test" in text and "disk vanished in a worker" in text


def test_the_command_line_writes_to_the_log(log_folder, tmp_path, capsys) -> None:  # noqa: ANN001
    from app.cli import main

    assert main(["solve", str(tmp_path / "missing.layout.json")]) == 2
    assert "missing.layout.json" in capsys.readouterr().err
    text = read_log(log_folder)
    assert "Stresslens started" in text and "stresslens solve: exit status 2" in text


def test_a_failed_background_solve_is_said_and_its_traceback_logged(qtbot, log_folder) -> None:  # noqa: ANN001
    from app.solve_runner import _Job, _Relay

    ls.install_logging()
    relay = _Relay()
    said: list[tuple[int, str]] = []
    relay.failed.connect(lambda rev, msg: said.append((rev, msg)))

    def broken_solve():  # noqa: ANN202
        return {}["a key that is not there"]

    _Job(relay, 7, broken_solve).run()
    assert said == [(7, "KeyError: 'a key that is not there'")]
    text = read_log(log_folder)
    assert "solve of revision 7 failed" in text and "broken_solve" in text


def test_without_overrides_the_platform_folders_are_used(monkeypatch) -> None:  # noqa: ANN001
    import platformdirs

    from app.user_dirs import ENV, user_folder

    for key in ENV.values():
        monkeypatch.delenv(key, raising=False)
    assert user_folder("log") == Path(platformdirs.user_log_dir("stresslens", appauthor=False))
    assert user_folder("data") == Path(platformdirs.user_data_dir("stresslens",
                                                                  appauthor=False))
    assert ls.log_path().name == "stresslens.log"
