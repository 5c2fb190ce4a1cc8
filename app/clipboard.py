"""Parts on the clipboard: plain layout-format JSON text, so it pastes into any layout.

The text is ``{"stresslens_parts": 1, "parts": [...]}`` with each part exactly as in a
layout file (format v1), so it can also be pasted into a text editor and back.  Reading
runs the layout parser (every field checked, geometry left to the target layout).
"""

from __future__ import annotations

import json
from collections.abc import Iterable

from solver.layout import FORMAT_KEY, FORMAT_VERSION, LayoutError, Part, parse_layout, part_to_json

CLIP_KEY = "stresslens_parts"


def parts_to_text(parts: Iterable[Part]) -> str:
    """Clipboard text for ``parts``."""
    return json.dumps({CLIP_KEY: 1, "parts": [part_to_json(p) for p in parts]}, indent=1)


def parts_from_text(text: str) -> list[Part]:
    """Parts from clipboard text; :class:`LayoutError` says why when it holds none."""
    try:
        obj = json.loads(text)
    except (json.JSONDecodeError, RecursionError):
        raise LayoutError("the clipboard holds no Stresslens parts (not JSON)") from None
    if isinstance(obj, dict) and obj.get(FORMAT_KEY) is not None:
        raw = obj.get("parts")  # a whole layout pastes as its parts
    elif isinstance(obj, dict) and obj.get(CLIP_KEY) == 1:
        raw = obj.get("parts")
    else:
        raise LayoutError("the clipboard holds no Stresslens parts")
    if not isinstance(raw, list) or not raw:
        raise LayoutError("the clipboard holds no Stresslens parts (empty list)")
    _rename_duplicates(raw)
    layout = parse_layout({FORMAT_KEY: FORMAT_VERSION, "parts": raw}, check_geometry=False)
    return list(layout.parts)


def _rename_duplicates(raw: list) -> None:
    """Pasted lists may repeat a name; the target document renames them anyway."""
    seen: dict[str, int] = {}
    for p in raw:
        if isinstance(p, dict) and isinstance(p.get("name"), str):
            n = seen.get(p["name"], 0)
            seen[p["name"]] = n + 1
            if n:
                p["name"] = f"{p['name']} ({n + 1})"
