"""The Qt binding keeps Python's reference counts straight.

PySide6 6.12.0 dropped one reference to None on every call of a method returning void;
on Python 3.11 (None not immortal) the editor then aborted with "deallocating None"
after a few hundred thousand calls, i.e. minutes of drawing.  pyproject.toml excludes
that release; this check catches a binding with the same fault.
"""

from __future__ import annotations

import sys

from PySide6.QtCore import QObject, QPointF


def test_void_calls_do_not_consume_references_to_none() -> None:
    # common practice, no source: a C extension must not change refcounts it does not own
    p, o = QPointF(1.0, 2.0), QObject()
    before = sys.getrefcount(None)
    for _ in range(2000):
        p.setX(3.0)
        o.setObjectName("probe")
    assert abs(sys.getrefcount(None) - before) < 50
