"""Test-wide set-up: run Qt offscreen and matplotlib headless.

Both variables must be set before anything imports Qt or creates a QApplication: with
no display and no platform chosen, Qt aborts the whole pytest process.
"""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
os.environ.setdefault("MPLBACKEND", "Agg")
