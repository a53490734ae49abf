"""The code passes the linter the project configures (pyflakes and import order, pyproject [tool.ruff])."""

from __future__ import annotations

import shutil
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]


def test_the_tree_passes_ruff_with_the_projects_settings() -> None:
    try:
        import ruff  # noqa: F401  (installed by the test extra)
    except ImportError:
        if shutil.which("ruff") is None:
            pytest.skip("ruff is not installed (pip install -e '.[test]')")
    run = subprocess.run([sys.executable, "-m", "ruff", "check", "--no-cache", str(ROOT)],
                         capture_output=True, text=True, cwd=ROOT)
    assert run.returncode == 0, run.stdout + run.stderr
