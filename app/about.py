"""The About box: what the program is, its version, the high-voltage caution and the
caution of the discharge-inception estimate."""

from __future__ import annotations

from html import escape

from PySide6.QtWidgets import QMessageBox, QWidget

from solver.inception import INCEPTION_CAUTION

from .caution import CAUTION, CAUTION_TITLE

try:
    from importlib.metadata import version as _version

    VERSION = _version("stresslens")
except Exception:  # noqa: BLE001 - not installed: run from the source tree
    VERSION = "0.1.0 (source tree)"


def about_html() -> str:
    """The About text as rich text, the caution set apart so it is read."""
    rest = escape(CAUTION[len(CAUTION_TITLE):].strip())
    return (f"<h3>Stresslens {escape(VERSION)}</h3>"
            "<p>Sketch a two-dimensional cross-section of high-voltage electrodes, planar or "
            "axisymmetric, set their potentials, and see the equipotentials, the field lines "
            "and every place where the surface field exceeds the limit you choose.</p>"
            "<p>Lengths in mm, potentials in V or kV, fields in kV/mm.</p>"
            f"<p style='color:#9b1c1c'><b>{escape(CAUTION_TITLE)}</b> {rest}</p>"
            "<p><small><b>Discharge inception estimate.</b> "
            f"{escape(INCEPTION_CAUTION)}</small></p>")


def show_about(parent: QWidget | None) -> None:
    """Show the About box (a static QMessageBox call, so tests can replace it)."""
    QMessageBox.about(parent, "About Stresslens", about_html())
