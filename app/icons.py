"""Stresslens's own icons (SVG files in the top-level ``icons/`` folder, drawn for it)."""

from __future__ import annotations

from functools import cache
from pathlib import Path

from PySide6.QtGui import QIcon

ICON_DIR = Path(__file__).resolve().parent.parent / "icons"
APP_ICON = "stresslens"


@cache
def icon(name: str) -> QIcon:
    """The icon ``icons/<name>.svg`` (an empty icon, never an error, when it is missing)."""
    path = ICON_DIR / f"{name}.svg"
    return QIcon(str(path)) if path.is_file() else QIcon()


def icon_names() -> list[str]:
    """Names of every icon shipped with the program."""
    return sorted(p.stem for p in ICON_DIR.glob("*.svg"))
