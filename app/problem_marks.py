"""Where a layout problem is: the parts a LayoutError message names and the point it gives.

Messages from :mod:`solver.layout` and :mod:`solver.geometry` name parts in single
quotes (``part 'Guard': ...``, ``parts 'A' and 'B': ...``) and give a location as
``near (x, y) mm``; the canvas marks both so the user sees what to fix.
"""

from __future__ import annotations

import re

from solver.layout import Point

_NAME = re.compile(r"'([^']+)'")
_NEAR = re.compile(r"near \((-?[\d.]+(?:e[-+]?\d+)?), (-?[\d.]+(?:e[-+]?\d+)?)\) mm")


def problem_parts(message: str, names: set[str]) -> list[str]:
    """Names of existing parts quoted in ``message``, in order of mention."""
    found = [n for n in _NAME.findall(message) if n in names]
    return list(dict.fromkeys(found))


def problem_point(message: str) -> Point | None:
    """The ``near (x, y) mm`` location of ``message``, if it gives one."""
    m = _NEAR.search(message)
    return (float(m.group(1)), float(m.group(2))) if m else None
