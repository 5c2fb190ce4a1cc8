"""Autosave and recovery (app.autosave): unsaved work survives a killed process.

The expectations are the program's own contract (an engineer's sketch is never lost:
written a few seconds after a change, offered back after a crash, removed after a
normal close); common practice, no source.
"""

from __future__ import annotations

import json
import os
import signal
import subprocess
import sys
import textwrap
import time
from dataclasses import replace
from pathlib import Path

import pytest
from editor_layouts import every_shape_layout
from editor_window import open_window
from PySide6.QtWidgets import QMessageBox

from app import autosave as au
from app.commands import MovePartsCommand
from solver.layout import Circle, dumps_layout, layout_to_json

SB = QMessageBox.StandardButton
ROOT = Path(__file__).resolve().parents[2]


@pytest.fixture
def data(tmp_path, monkeypatch):  # noqa: ANN001, ANN201
    """A private data folder (``$STRESSLENS_DATA_DIR``); returns its recovery folder."""
    monkeypatch.setenv(au.DATA_DIR_ENV, str(tmp_path / "data"))
    return tmp_path / "data" / "recovery"


@pytest.fixture
def questions(monkeypatch):  # noqa: ANN001, ANN201
    """Record every ``QMessageBox.question``; answer from ``answers`` (in order)."""
    seen: list[str] = []
    answers: list = []

    def ask(parent, title, text, *args, **kwargs):  # noqa: ANN001, ANN202
        seen.append(text)
        return answers.pop(0)

    monkeypatch.setattr(QMessageBox, "question", staticmethod(ask))
    return seen, answers


def watched(qtbot, tmp_path, delay_ms: int = 50, path: str | None = None):  # noqa: ANN001, ANN201
    w = open_window(qtbot, tmp_path, every_shape_layout(), path=path)
    return w, au.attach_autosave(w, delay_ms)


def move_first(w, dx: float = 1.0) -> None:  # noqa: ANN001
    w.stack.push(MovePartsCommand(w.doc, [w.doc.ids()[0]], dx, 0.0))


def stored_layout(path: Path) -> dict:
    return json.loads(path.read_text(encoding="utf-8"))["layout"]


# ---------------------------------------------------------------------- writing


def test_a_burst_of_edits_is_written_once_after_the_quiet_time(qtbot, tmp_path, data) -> None:  # noqa: ANN001
    w, a = watched(qtbot, tmp_path, delay_ms=150)
    for _ in range(5):
        move_first(w, 0.5)
    assert not a.path.exists()  # not before the quiet time
    qtbot.waitUntil(a.path.exists, timeout=3000)
    qtbot.wait(300)
    assert a.writes == 1
    assert a.path.parent == data
    assert stored_layout(a.path) == w.doc.to_json()
    head = json.loads(a.path.read_text())
    assert head["pid"] == os.getpid() and head["original_path"] is None


def test_changes_that_never_pause_are_written_within_the_longest_wait(qtbot, tmp_path,  # noqa: ANN001
                                                                       data) -> None:
    w, a = watched(qtbot, tmp_path, delay_ms=400)
    a.max_wait_s = 0.3
    t0 = time.monotonic()
    while not a.path.exists() and time.monotonic() - t0 < 3.0:
        move_first(w, 0.1)  # a change every 20 ms: the quiet time never comes
        qtbot.wait(20)
    assert a.path.exists()
    assert time.monotonic() - t0 < 1.5


def test_a_clean_document_leaves_no_recovery_file(qtbot, tmp_path, data) -> None:  # noqa: ANN001
    w, a = watched(qtbot, tmp_path)
    move_first(w)
    qtbot.waitUntil(a.path.exists, timeout=3000)
    w.stack.undo()  # back to the state on disk
    assert not w.doc.dirty and not a.path.exists()
    move_first(w)
    qtbot.waitUntil(a.path.exists, timeout=3000)
    w.doc.mark_saved(tmp_path / "saved.layout.json")
    assert not a.path.exists()


def test_a_normal_close_removes_the_file(qtbot, tmp_path, data, questions) -> None:  # noqa: ANN001
    w, a = watched(qtbot, tmp_path)
    move_first(w)
    qtbot.waitUntil(a.path.exists, timeout=3000)
    questions[1].append(SB.Discard)  # "Save the changes?" -> Discard
    assert w.close()
    assert not a.path.exists()


def test_a_close_cancelled_keeps_the_file(qtbot, tmp_path, data, questions) -> None:  # noqa: ANN001
    w, a = watched(qtbot, tmp_path)
    move_first(w)
    qtbot.waitUntil(a.path.exists, timeout=3000)
    questions[1].append(SB.Cancel)
    assert not w.close()
    assert a.path.exists()


def test_a_failed_autosave_is_said_once_and_work_goes_on(qtbot, tmp_path, monkeypatch) -> None:  # noqa: ANN001
    blocker = tmp_path / "blocker"
    blocker.write_text("a file where the data folder should be")
    monkeypatch.setenv(au.DATA_DIR_ENV, str(blocker))
    w, a = watched(qtbot, tmp_path)
    messages: list[str] = []
    w.show_message = messages.append
    move_first(w)
    assert not a.write_now()
    move_first(w)
    assert not a.write_now()
    assert len(messages) == 1 and messages[0].startswith("Autosave failed:")
    assert str(blocker) in messages[0]
    assert w.doc.dirty  # the drawing itself is untouched


# ---------------------------------------------------------------------- finding orphans


def _orphan(folder: Path, pid: int, start: str | None = None, title: str = "Left over",
            saved_at: str = "2026-01-02T03:04:05+00:00") -> Path:
    folder.mkdir(parents=True, exist_ok=True)
    layout = replace(every_shape_layout(), title=title)
    path = folder / f"recovery-{pid}-1.json"
    path.write_text(json.dumps({au.FORMAT_KEY: 1, "pid": pid, "process_start": start,
                                "saved_at": saved_at, "original_path": None,
                                "layout": layout_to_json(layout)}))
    return path


def test_only_files_of_finished_processes_are_offered(data) -> None:  # noqa: ANN001
    sleeper = subprocess.Popen([sys.executable, "-c", "import time; time.sleep(60)"])
    try:
        live = _orphan(data, sleeper.pid, au.process_start(sleeper.pid), "still running")
        assert au.orphaned_files(data) == []
        # the same pid with another start time is a new process: the writer is gone
        json_obj = json.loads(live.read_text())
        json_obj["process_start"] = "1"
        live.write_text(json.dumps(json_obj))
        assert [r.layout.title for r in au.orphaned_files(data)] == ["still running"]
    finally:
        sleeper.kill()
        sleeper.wait()
    json_obj["process_start"] = au.process_start(os.getpid())
    live.write_text(json.dumps(json_obj))
    assert [r.layout.title for r in au.orphaned_files(data)] == ["still running"]


def test_a_damaged_recovery_file_is_skipped_and_kept(data, caplog) -> None:  # noqa: ANN001
    data.mkdir(parents=True)
    bad = data / "recovery-999999-1.json"
    bad.write_bytes(b'{"stresslens_recovery": 1, "pid": 999999, "layout": {"parts": [')
    good = _orphan(data, 999998)
    assert [r.path for r in au.orphaned_files(data)] == [good]
    assert bad.exists()
    assert any("recovery file skipped" in r.getMessage() and str(bad) in r.getMessage()
               for r in caplog.records)


def test_newest_first_and_no_means_later(qtbot, tmp_path, data, questions) -> None:  # noqa: ANN001
    old = _orphan(data, 999990, title="older", saved_at="2026-01-01T00:00:00+00:00")
    new = _orphan(data, 999991, title="newer", saved_at="2026-01-05T00:00:00+00:00")
    w, a = watched(qtbot, tmp_path)
    questions[1].append(SB.No)
    assert not a.offer_recovery()
    assert "1 older recovery file" in questions[0][0]
    assert old.exists() and new.exists()
    assert w.doc.settings.title == "Editor test bench"
    questions[1].append(SB.Discard)
    assert not a.offer_recovery()
    assert old.exists() and not new.exists()


def test_a_drawing_that_breaks_a_rule_is_restored_for_repair(qtbot, tmp_path, data,  # noqa: ANN001
                                                             questions) -> None:
    layout = every_shape_layout()
    overlapping = replace(layout, parts=(*layout.parts, replace(
        layout.parts[0], name="Overlap", volts=-100.0, shape=Circle((-30.0, 0.0), 5.0))))
    data.mkdir(parents=True)
    path = data / "recovery-999992-1.json"
    path.write_text(json.dumps({au.FORMAT_KEY: 1, "pid": 999992, "saved_at":
                                "2026-01-02T03:04:05+00:00", "original_path": None,
                                "layout": layout_to_json(overlapping)}))
    w, a = watched(qtbot, tmp_path)
    questions[1].append(SB.Yes)
    assert a.offer_recovery()
    assert [p.name for _, p in w.doc.parts()][-1] == "Overlap"
    assert w.doc.problem() is not None  # shown in the status bar, fixed in the editor


# ---------------------------------------------------------------------- a real crash

def processes_with_env(key: str, value: str) -> list[int]:
    """Ids of the processes (Linux /proc) whose environment has ``key=value``."""
    want = f"{key}={value}".encode()
    found = []
    for d in Path("/proc").iterdir() if Path("/proc").is_dir() else []:
        if d.name.isdigit() and int(d.name) != os.getpid():
            try:
                if want in (d / "environ").read_bytes().split(b"\0"):
                    found.append(int(d.name))
            except OSError:
                pass
    return found


CHILD = textwrap.dedent("""
    import sys
    from PySide6.QtCore import QTimer
    from app.cli_gui import build_window, make_app
    from app.commands import MovePartsCommand

    app = make_app()
    w = build_window(sys.argv[1])
    w.autosave.delay_ms = 300
    w.show()

    def edit():
        w.stack.push(MovePartsCommand(w.doc, [w.doc.ids()[0]], 7.5, 0.0))
        print("edited", flush=True)

    QTimer.singleShot(300, edit)
    app.exec()
""")


def test_work_survives_a_killed_process_and_is_offered_at_the_next_start(
        qtbot, tmp_path, data, questions) -> None:  # noqa: ANN001
    layout = every_shape_layout()
    source = tmp_path / "bench.layout.json"
    source.write_text(dumps_layout(layout))
    env = dict(os.environ, QT_QPA_PLATFORM="offscreen", PYTHONPATH=str(ROOT),
               **{au.DATA_DIR_ENV: str(data.parent)})
    child = subprocess.Popen([sys.executable, "-c", CHILD, str(source)], cwd=ROOT, env=env,
                             stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    try:
        deadline = time.monotonic() + 60
        while not list(data.glob("recovery-*.json")) and time.monotonic() < deadline:
            assert child.poll() is None, child.stderr.read()
            time.sleep(0.1)
        files = list(data.glob("recovery-*.json"))
        assert len(files) == 1, "no recovery file within 60 s"
        time.sleep(0.2)
        assert json.loads(files[0].read_text())["pid"] == child.pid
    finally:
        child.send_signal(signal.SIGKILL)
        child.wait(10)
    assert child.returncode == -signal.SIGKILL
    assert "edited" in child.stdout.read()
    # nothing the killed program started (its solver process) may live on after it
    deadline = time.monotonic() + 10
    while processes_with_env(au.DATA_DIR_ENV, env[au.DATA_DIR_ENV]) and \
            time.monotonic() < deadline:
        time.sleep(0.2)
    assert processes_with_env(au.DATA_DIR_ENV, env[au.DATA_DIR_ENV]) == []

    w, a = watched(qtbot, tmp_path)  # the next start, in this process
    questions[1].append(SB.Yes)
    assert a.offer_recovery()
    assert "bench.layout.json" in questions[0][0]
    moved = w.doc.part(w.doc.ids()[0]).shape
    assert moved == replace(layout.parts[0].shape, min=(-32.5, -10.0), max=(-12.5, 10.0))
    assert w.doc.dirty and w.doc.path == source
    assert source.read_text() == dumps_layout(layout)  # the file on disk is untouched
    assert not files[0].exists() and a.path.exists()  # our own copy replaced it
    assert au.orphaned_files(data, own={a.path}) == []


def test_finish_stops_watching(qtbot, tmp_path, data) -> None:  # noqa: ANN001
    w, a = watched(qtbot, tmp_path)
    a.finish()
    move_first(w)
    qtbot.wait(200)
    assert w.doc.dirty and not a.path.exists() and a.writes == 0


def test_the_program_start_offers_recovery(qtbot, tmp_path, data, questions,  # noqa: ANN001
                                           monkeypatch) -> None:
    from PySide6.QtWidgets import QApplication

    from app import cli_gui

    _orphan(data, 999993, title="left by a crash")
    shown = []
    real_build = cli_gui.build_window

    def build(path):  # noqa: ANN001, ANN202
        w = real_build(path)
        w.files.confirm_discard = lambda: True
        qtbot.addWidget(w)
        shown.append(w)
        return w

    monkeypatch.setattr(cli_gui, "build_window", build)
    monkeypatch.setattr(QApplication, "exec", lambda *a: 0)  # return at once
    monkeypatch.setattr(sys, "excepthook", sys.excepthook)  # undone after the test
    questions[1].append(SB.Yes)
    assert cli_gui._interactive(None) == 0
    assert len(questions[0]) == 1 and "an untitled layout" in questions[0][0]
    assert shown[0].doc.settings.title == "left by a crash" and shown[0].doc.dirty
