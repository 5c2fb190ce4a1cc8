"""Test-wide set-up: Qt offscreen, matplotlib headless, and a private home for settings.

- ``QT_QPA_PLATFORM=offscreen`` and ``MPLBACKEND=Agg`` must be set before anything
  imports Qt or creates a QApplication: with no display and no platform chosen, Qt
  aborts the whole pytest process.
- The XDG configuration, data and state folders point into a fresh temporary folder
  for the session, so tests never read or change the user's own settings, recent
  files, autosaves or logs (QSettings and platformdirs both follow XDG on Linux), and
  two test runs on one machine do not share them.  The cache folder is left alone.
"""

from __future__ import annotations

import atexit
import os
import shutil
import tempfile

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
os.environ.setdefault("MPLBACKEND", "Agg")

_HOME = tempfile.mkdtemp(prefix="stresslens-tests-")
atexit.register(shutil.rmtree, _HOME, ignore_errors=True)
for _name in ("XDG_CONFIG_HOME", "XDG_DATA_HOME", "XDG_STATE_HOME"):
    os.environ[_name] = os.path.join(_HOME, _name.split("_")[1].lower())
