"""New, open, save, save as, recent files, unsaved-changes prompt, bad files."""

from __future__ import annotations

import json
from dataclasses import replace

import pytest
from editor_layouts import every_shape_layout
from editor_window import open_window
from PySide6.QtWidgets import QFileDialog, QMessageBox

from solver.layout import Circle, layout_to_json, load_layout

SB = QMessageBox.StandardButton


@pytest.fixture
def dialogs(monkeypatch):  # noqa: ANN001, ANN201
    """Record every message box; answer questions from ``answers`` (a list, in order)."""
    seen: list[tuple[str, str, str]] = []
    answers: list = []

    def record(kind: str, default=None):  # noqa: ANN001, ANN202
        def f(parent, title, text, *args, **kwargs):  # noqa: ANN001, ANN202
            seen.append((kind, title, text))
            return answers.pop(0) if kind == "question" else default
        return staticmethod(f)

    monkeypatch.setattr(QMessageBox, "question", record("question"))
    monkeypatch.setattr(QMessageBox, "warning", record("warning", SB.Ok))
    monkeypatch.setattr(QMessageBox, "critical", record("critical", SB.Ok))
    return seen, answers


def _ask_file(monkeypatch, which: str, path) -> None:  # noqa: ANN001
    monkeypatch.setattr(QFileDialog, which, staticmethod(lambda *a, **k: (str(path), "")))


def test_save_then_open_round_trips_to_identical_json(qtbot, tmp_path, monkeypatch,
                                                      dialogs) -> None:  # noqa: ANN001
    # common practice, no source: what is saved must come back unchanged
    w = open_window(qtbot, tmp_path, every_shape_layout())
    w.doc.replace_part(w.doc.id_of("Ball"), replace(w.doc.part(w.doc.id_of("Ball")),
                                                    shape=Circle((31.25, -0.5), 6.125)))
    before = w.doc.to_json()
    target = tmp_path / "bench"
    _ask_file(monkeypatch, "getSaveFileName", target)
    assert w.files.save_as()
    saved = tmp_path / "bench.layout.json"
    assert saved.is_file() and not w.doc.dirty and w.doc.path == saved
    assert layout_to_json(load_layout(saved)) == before
    w.files.new()
    assert len(w.doc) == 0
    _ask_file(monkeypatch, "getOpenFileName", saved)
    assert w.files.open()
    assert w.doc.to_json() == before and not w.doc.dirty
    assert w.files.recent()[0] == str(saved.resolve())
    assert not [d for d in dialogs[0] if d[0] != "question"]


def test_corrupt_file_shows_the_message_and_keeps_the_document(qtbot, tmp_path,
                                                                dialogs) -> None:  # noqa: ANN001
    # common practice, no source: a failed open changes nothing
    w = open_window(qtbot, tmp_path, every_shape_layout())
    w.doc.update_settings(title="Work in progress")
    before, path_before = w.doc.to_json(), w.doc.path
    bad = tmp_path / "broken.layout.json"
    bad.write_text('{"stresslens_layout": 1, "parts": [ {"name": "A", "kind": "electr')
    seen, answers = dialogs
    answers.append(SB.Discard)
    assert not w.files.open(str(bad))
    kinds = [s[0] for s in seen]
    assert kinds == ["question", "warning"]
    assert "broken.layout.json" in seen[1][2] and "not valid JSON" in seen[1][2]
    assert w.doc.to_json() == before and w.doc.path == path_before and w.doc.dirty


def test_wrong_field_is_named(qtbot, tmp_path, dialogs) -> None:  # noqa: ANN001
    # common practice, no source: the message names the part and the field
    w = open_window(qtbot, tmp_path, every_shape_layout())
    bad = tmp_path / "typo.layout.json"
    obj = layout_to_json(every_shape_layout())
    obj["parts"][1]["shape"]["radius"] = "six"
    bad.write_text(json.dumps(obj))
    assert not w.files.open(str(bad))
    assert "Ball" in dialogs[0][-1][2] and "radius" in dialogs[0][-1][2]
    assert w.doc.to_json() == layout_to_json(every_shape_layout())


def test_overlapping_parts_can_be_opened_for_repair(qtbot, tmp_path, dialogs) -> None:  # noqa: ANN001
    # DESIGN.md section 2: different conductors must not overlap; the editor is where that is
    #   fixed
    w = open_window(qtbot, tmp_path)
    obj = layout_to_json(every_shape_layout())
    obj["parts"][1]["shape"]["center"] = [-30.0, 0.0]  # floating ball on the 5 kV bar
    f = tmp_path / "overlap.layout.json"
    f.write_text(json.dumps(obj))
    seen, answers = dialogs
    answers.append(SB.Cancel)
    assert not w.files.open(str(f)) and len(w.doc) == 0
    answers.append(SB.Open)
    assert w.files.open(str(f))
    assert "Bar" in seen[-1][2] and "Ball" in seen[-1][2]
    assert w.doc.problem() is not None
    qtbot.waitUntil(lambda: "Ball" in w.problem_label.text(), timeout=2000)


def test_unsaved_changes_prompt(qtbot, tmp_path, monkeypatch, dialogs) -> None:  # noqa: ANN001
    # common practice, no source: Cancel keeps the work; Save writes it first
    w = open_window(qtbot, tmp_path, every_shape_layout())
    w.doc.update_settings(title="Edited")
    seen, answers = dialogs
    answers.append(SB.Cancel)
    assert not w.files.new()
    assert len(w.doc) == 5 and w.doc.settings.title == "Edited"
    target = tmp_path / "kept.layout.json"
    _ask_file(monkeypatch, "getSaveFileName", target)
    answers.append(SB.Save)
    assert w.files.new()
    assert load_layout(target).title == "Edited" and len(w.doc) == 0
    assert [s[0] for s in seen] == ["question", "question"]


def test_close_asks_and_can_be_refused(qtbot, tmp_path, dialogs) -> None:  # noqa: ANN001
    # common practice, no source: closing with unsaved work asks first
    w = open_window(qtbot, tmp_path, every_shape_layout())
    w.doc.update_settings(title="Edited")
    dialogs[1].append(SB.Cancel)
    assert not w.close() and w.isVisible()
    dialogs[1].append(SB.Discard)
    assert w.close()


def test_failed_save_keeps_old_file_and_the_drawing(qtbot, tmp_path, monkeypatch,
                                                    dialogs) -> None:  # noqa: ANN001
    # common practice, no source: a failed save loses nothing
    w = open_window(qtbot, tmp_path, every_shape_layout())
    _ask_file(monkeypatch, "getSaveFileName", tmp_path / "no_such_folder" / "x.layout.json")
    w.doc.update_settings(title="Edited")
    assert not w.files.save_as()
    assert dialogs[0][-1][0] == "critical" and "no_such_folder" in dialogs[0][-1][2]
    assert w.doc.dirty and w.doc.settings.title == "Edited"


def test_save_writes_only_whole_files(qtbot, tmp_path, monkeypatch, dialogs) -> None:  # noqa: ANN001
    # common practice, no source: an interrupted save leaves the old file whole (write, then
    #   rename)
    target = tmp_path / "atomic.layout.json"
    target.write_text("old content")
    w = open_window(qtbot, tmp_path, every_shape_layout(), path=str(target))
    w.doc.update_settings(title="New")

    def boom(*a, **k):  # noqa: ANN002, ANN003, ANN202
        raise OSError(28, "No space left on device")
    monkeypatch.setattr("os.replace", boom)
    assert not w.files.save()
    assert target.read_text() == "old content"
    assert [p.name for p in tmp_path.iterdir() if p.name.startswith(".atomic")] == []


def test_opening_a_file_drops_a_half_drawn_outline(qtbot, tmp_path, dialogs) -> None:  # noqa: ANN001
    # common practice, no source: work in progress on one layout does not leak into the next
    from editor_window import click
    w = open_window(qtbot, tmp_path, every_shape_layout())
    target = tmp_path / "other.layout.json"
    target.write_text(json.dumps(layout_to_json(every_shape_layout())))
    w.actions_["tool_polygon"].trigger()
    click(qtbot, w, (0.0, 0.0))
    click(qtbot, w, (10.0, 0.0))
    assert w.canvas.tool.preview() is not None
    assert w.files.open(str(target))
    assert w.canvas.tool.preview() is None
