"""Shared fixtures: canonical systems (immutable), a clean working folder, Agg plotting."""

from __future__ import annotations

import os
from pathlib import Path

import pytest

os.environ.setdefault("MPLBACKEND", "Agg")

REPO = Path(__file__).resolve().parents[1]
#: Reference data of the tests (published values, with sources: tests/data/README.md).
REFERENCE_DATA = REPO / "tests" / "data"


@pytest.fixture(autouse=True)
def _clean_cwd(tmp_path, monkeypatch):
    """Every test runs in its own empty folder, so nothing is written into the repository."""
    monkeypatch.chdir(tmp_path)


@pytest.fixture(scope="session")
def repo_root() -> Path:
    """The repository root (for the top-level structures/ folder)."""
    return REPO
