"""Screenshot mode and the no-display message of ``stresslens [LAYOUT]``."""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import pytest
from PySide6.QtGui import QImage

ROOT = Path(__file__).resolve().parents[2]
SAMPLE = ROOT / "sample_layouts" / "bench_supply_terminal.layout.json"


def _env_without_display() -> dict[str, str]:
    env = {k: v for k, v in os.environ.items()
           if k not in ("DISPLAY", "WAYLAND_DISPLAY", "QT_QPA_PLATFORM")}
    env["PYTHONPATH"] = str(ROOT)
    return env


def _cli(*args: str) -> subprocess.CompletedProcess:
    return subprocess.run([sys.executable, "-m", "app.cli", *args], cwd=ROOT,
                          env=_env_without_display(), capture_output=True, text=True,
                          timeout=180)


def test_screenshot_of_the_sample_is_written_and_not_blank(tmp_path: Path) -> None:
    out = tmp_path / "editor.png"
    r = _cli(str(SAMPLE), "--screenshot", str(out), "--size", "1000x700")
    assert r.returncode == 0, r.stderr
    assert str(out) in r.stdout
    img = QImage(str(out))
    assert (img.width(), img.height()) == (1000, 700)
    # common practice, no source: a drawn window has many distinct colours; a blank one few
    colours = {img.pixel(x, y) for x in range(0, 1000, 7) for y in range(0, 700, 7)}
    assert len(colours) > 40
    # the canvas shows the sample's 10 kV terminal in the electrode amber of our palette
    from app import palette
    amber = palette.ELECTRODE_HIGH.rgb()
    assert any(c == amber for c in colours)


def test_no_display_explains_instead_of_aborting() -> None:
    # common practice, no source: a program without a display says so instead of crashing
    r = _cli(str(SAMPLE))
    assert r.returncode == 3
    assert "no display" in r.stderr and "--screenshot" in r.stderr
    assert "Aborted" not in r.stderr


@pytest.mark.parametrize("args, words", [
    (["--size", "huge"], "--size must look like"),
    (["--size", "50x50"], "width must lie"),
])
def test_bad_size_is_refused(tmp_path: Path, args: list[str], words: str) -> None:
    # common practice, no source: bad arguments are named in the message
    r = _cli(str(SAMPLE), "--screenshot", str(tmp_path / "x.png"), *args)
    assert r.returncode == 2 and words in r.stderr


def test_bad_layout_is_refused_with_its_message(tmp_path: Path) -> None:
    # common practice, no source: a bad file is named with its problem
    bad = tmp_path / "bad.layout.json"
    bad.write_text('{"stresslens_layout": 1, "parts": []')
    r = _cli(str(bad), "--screenshot", str(tmp_path / "x.png"))
    assert r.returncode == 2 and "not valid JSON" in r.stderr
    assert not (tmp_path / "x.png").exists()


def test_window_waits_for_its_ready_check(qtbot, tmp_path: Path) -> None:  # noqa: ANN001
    # common practice, no source: a screenshot waits until the window is ready
    from editor_window import open_window
    w = open_window(qtbot, tmp_path)
    assert w.is_ready()
    state = {"ready": False}
    w.set_ready_check(lambda: state["ready"])
    assert not w.is_ready()
    state["ready"] = True
    assert w.is_ready()


def test_about_box_carries_the_caution(qtbot, tmp_path: Path, monkeypatch) -> None:  # noqa: ANN001
    # the product's rule: README, About box and reports carry the caution
    from editor_window import open_window
    from PySide6.QtWidgets import QMessageBox

    from app.caution import CAUTION_TITLE
    seen: list[str] = []
    monkeypatch.setattr(QMessageBox, "about", staticmethod(lambda p, t, text: seen.append(text)))
    w = open_window(qtbot, tmp_path)
    w.actions_["about"].trigger()
    text = seen[0]
    assert CAUTION_TITLE in text
    for word in ("design guidance", "surface condition", "humidity", "pressure",
                 "contamination", "3D effects", "local codes", "licensed practice"):
        assert word in text, word


def test_every_action_has_one_of_our_icons(qtbot, tmp_path: Path) -> None:  # noqa: ANN001
    # common practice, no source: every command shows an icon; each SVG draws something
    from editor_window import open_window
    from PySide6.QtGui import QColor

    from app.icons import icon, icon_names
    w = open_window(qtbot, tmp_path)
    assert all(not a.icon().isNull() for a in w.actions_.values()), \
        [k for k, a in w.actions_.items() if a.icon().isNull()]
    for name in icon_names():
        img = icon(name).pixmap(32, 32).toImage()
        ink = sum(img.pixelColor(x, y).alpha() > 0 for x in range(32) for y in range(32))
        assert 20 < ink < 32 * 32, name
        assert img.pixelColor(0, 0) == QColor(0, 0, 0, 0) or name == "stresslens", name


def test_keys_help_lists_the_shortcuts_of_the_actions(qtbot, tmp_path: Path,
                                                      monkeypatch) -> None:  # noqa: ANN001
    # common practice, no source: the key list is read from the actions, so it stays true
    from editor_window import open_window
    from PySide6.QtWidgets import QMessageBox
    seen: list[str] = []
    monkeypatch.setattr(QMessageBox, "information",
                        staticmethod(lambda p, t, text: seen.append(text)))
    w = open_window(qtbot, tmp_path)
    w.actions_["keys"].trigger()
    for key, what in (("Ctrl+Z", "Undo"), ("Ctrl+D", "Duplicate"), ("C", "Circle"),
                      ("Shift+R", "Corner radius")):
        assert f"<b>{key}</b></td><td>{what}" in seen[0], key
    assert "Space + drag" in seen[0]


def test_missing_qt_libraries_are_explained(monkeypatch) -> None:  # noqa: ANN001
    # common practice, no source: a missing system library is named with what to install
    import builtins

    from app import cli_gui
    real_import = builtins.__import__

    def no_qt(name, *a, **k):  # noqa: ANN001, ANN002, ANN003, ANN202
        if name.startswith("PySide6.QtWidgets"):
            raise ImportError("libglib-2.0.so.0: cannot open shared object file")
        return real_import(name, *a, **k)
    monkeypatch.setattr(builtins, "__import__", no_qt)
    msg = cli_gui.qt_problem()
    assert msg is not None and "libglib-2.0.so.0" in msg and "libglib2.0-0" in msg
