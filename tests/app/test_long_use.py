"""One-minute smoke run of the long-use benchmark (app.bench_long_use), slow-marked.

The targets (memory growth < 50 MB over 10 minutes, no GUI-thread stall over 100 ms)
are figures the benchmark prints, not asserted here: stalls depend on the machine's
load.  This run checks that a minute of scripted dragging with live solving finishes,
that every drag became one undo step, that results were shown, and it guards against
a gross leak (more than 100 MB in one minute).  Common practice, no source.
"""

from __future__ import annotations

import os
import re
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]


@pytest.mark.slow
def test_a_minute_of_dragging_with_live_solving(tmp_path) -> None:  # noqa: ANN001
    env = dict(os.environ, QT_QPA_PLATFORM="offscreen", STRESSLENS_DATA_DIR=str(tmp_path),
               STRESSLENS_LOG_DIR=str(tmp_path / "logs"))
    out = subprocess.run([sys.executable, "-m", "app.bench_long_use", "--minutes", "1"],
                         cwd=ROOT, env=env, capture_output=True, text=True, timeout=600)
    assert out.returncode == 0, out.stderr[-2000:]
    text = out.stdout
    print(text)  # the figures, for the record (pytest -s)
    drags = int(re.search(r"dragged 'Guard' (\d+) times", text).group(1))
    undo = int(re.search(r"undo steps (\d+)", text).group(1))
    assert drags >= 5 and undo == drags + 1  # the warm-up drag is one more step
    assert int(re.search(r"results shown: (\d+)", text).group(1)) > 0
    growth = float(re.search(r"growth ([+-][\d.]+) MB", text).group(1))
    assert growth < 100.0
    assert re.search(r"longest stall \d+ ms .*GUI-thread CPU in it \d+ ms", text)
    assert not list(Path(tmp_path).glob("recovery/*.json"))  # scripted edits: no recovery
