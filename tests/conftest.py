"""Shared fixtures: a workspace in tmp_path, the corpus location, the sample scenario."""

from __future__ import annotations

from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
CORPUS = ROOT.parent / "shared" / "corpus"
SAMPLE = ROOT / "sample_contacts"


@pytest.fixture
def corpus_dir() -> Path:
    """The shared test corpus, read in place; skipped when a clone has no ../shared."""
    if not CORPUS.is_dir():
        pytest.skip(f"{CORPUS} is absent (a fresh clone has no ../shared/corpus)")
    return CORPUS


@pytest.fixture(autouse=True)
def _isolated_workspace(tmp_path, monkeypatch):
    """Never let a test touch the user's default workspace."""
    monkeypatch.setenv("MYNET_WORKSPACE", str(tmp_path / "workspace.sqlite"))
    monkeypatch.setenv("NO_COLOR", "1")
    yield
