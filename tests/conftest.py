"""Test-wide set-up: run Qt offscreen and matplotlib headless.

Both variables must be set before anything imports Qt or creates a QApplication: with
no display and no platform chosen, Qt aborts the whole pytest process.
"""

from __future__ import annotations

import atexit
import os
import shutil
import tempfile

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
os.environ.setdefault("MPLBACKEND", "Agg")
# The log file and recovery files of a test run go to a private folder, never to the
# user's own (app.logging_setup, app.autosave).
_private = tempfile.mkdtemp(prefix="stresslens-tests-")
atexit.register(shutil.rmtree, _private, ignore_errors=True)
os.environ.setdefault("STRESSLENS_LOG_DIR", os.path.join(_private, "logs"))
os.environ.setdefault("STRESSLENS_DATA_DIR", os.path.join(_private, "data"))
