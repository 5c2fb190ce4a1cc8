"""The layering of the code base, checked by import-linter.

The contracts live in ``pyproject.toml`` (``[tool.importlinter]``): ``solver`` never
imports Qt, matplotlib or ``app``; the document model has no Qt.  A second test runs the
same contracts on a tiny throw-away tree that breaks one, so a silently disabled linter
cannot pass unnoticed.
"""

from __future__ import annotations

import os
import shutil
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
LINT_IMPORTS = Path(sys.executable).with_name("lint-imports")


def _lint(cwd: Path) -> subprocess.CompletedProcess[str]:
    """Run lint-imports in ``cwd`` with ``cwd`` first on the import path."""
    env = dict(os.environ, PYTHONPATH=str(cwd))
    return subprocess.run([str(LINT_IMPORTS), "--no-cache", "--no-logo"], cwd=cwd, env=env,
                          capture_output=True, text=True, timeout=120)


def test_import_contracts_hold() -> None:
    # common practice, no source: layered architecture enforced by a linter
    assert LINT_IMPORTS.exists(), f"{LINT_IMPORTS} is missing; run 'make setup'"
    result = _lint(ROOT)
    assert result.returncode == 0, f"import contracts broken:\n{result.stdout}{result.stderr}"


def test_linter_reports_a_broken_contract(tmp_path: Path) -> None:
    # common practice, no source: a checker is only trusted once it has been seen to fail
    shutil.copy(ROOT / "pyproject.toml", tmp_path / "pyproject.toml")
    (tmp_path / "solver").mkdir()
    (tmp_path / "solver" / "__init__.py").write_text("import PySide6.QtCore\n")
    (tmp_path / "app").mkdir()
    (tmp_path / "app" / "__init__.py").write_text("")
    (tmp_path / "app" / "document.py").write_text("import solver\n")
    result = _lint(tmp_path)
    assert result.returncode != 0
    assert "solver is a pure numerical core" in result.stdout
    assert "BROKEN" in result.stdout
