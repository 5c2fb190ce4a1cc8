"""Where Stresslens keeps per-user files: recovery files (data) and the log file (log).

Each folder is the platform's own (``platformdirs``: ``~/.local/share/stresslens`` and
``~/.local/state/stresslens/log`` on Linux) unless an environment variable names
another, as the tests do: ``STRESSLENS_DATA_DIR``, ``STRESSLENS_LOG_DIR``.
"""

from __future__ import annotations

import os
from pathlib import Path
from typing import Literal

ENV = {"data": "STRESSLENS_DATA_DIR", "log": "STRESSLENS_LOG_DIR"}


def user_folder(kind: Literal["data", "log"]) -> Path:
    """The folder for ``kind``: the environment's override, or the platform's."""
    override = os.environ.get(ENV[kind])
    if override:
        return Path(override)
    import platformdirs

    find = platformdirs.user_data_dir if kind == "data" else platformdirs.user_log_dir
    return Path(find("stresslens", appauthor=False))
