"""The code passes its linter (ruff, configured in pyproject.toml: pyflakes, pycodestyle, import order, bugbear)."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]


def test_ruff_finds_nothing():
    pytest.importorskip("ruff", reason="ruff is not installed (pip install '.[test]' installs it)")
    out = subprocess.run([sys.executable, "-m", "ruff", "check", "--no-cache", str(ROOT)], capture_output=True,
                         text=True, cwd=ROOT)
    assert out.returncode == 0, out.stdout + out.stderr
