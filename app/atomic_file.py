"""Write a file so that it appears whole or not at all.

The content goes to a temporary file in the target's folder, which is then renamed over
the target (``os.replace`` is atomic on one file system).  A failure half-way leaves
any older file untouched and no temporary file behind.  The new file gets the usual
permissions (0666 less the umask), not the private ones of a temporary file.
"""

from __future__ import annotations

import os
import tempfile
from collections.abc import Callable
from pathlib import Path
from typing import IO, Any, TypeVar

T = TypeVar("T")


def write_atomically(target: Path, write: Callable[[IO[Any]], T], text: bool,
                     error: type[Exception]) -> T:
    """Call ``write`` on a fresh temporary file, then rename it to ``target``.

    ``text`` opens the file as UTF-8 text with universal newlines off; otherwise binary.
    Problems with the folder or the disk are raised as ``error`` with a message naming
    the path and the reason; whatever ``write`` raises passes through unchanged.
    """
    if not target.parent.is_dir():
        raise error(f"{target.parent}: no such folder")
    try:
        fd, tmp = tempfile.mkstemp(prefix=f".{target.name}.", dir=target.parent)
    except OSError as exc:
        raise error(f"{target.parent}: cannot write here ({exc.strerror})") from None
    try:
        mode = "w" if text else "wb"
        with open(fd, mode, encoding="utf-8" if text else None,
                  newline="" if text else None) as f:
            result = write(f)
        os.chmod(tmp, 0o666 & ~_umask())
        os.replace(tmp, target)
        return result
    except OSError as exc:
        raise error(f"{target}: cannot write ({exc.strerror or exc})") from None
    finally:
        if os.path.exists(tmp):
            os.unlink(tmp)


def _umask() -> int:
    """The process umask (read by setting and restoring it)."""
    mask = os.umask(0)
    os.umask(mask)
    return mask
