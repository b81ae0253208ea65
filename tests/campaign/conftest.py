"""Fixtures of the campaign tests."""

from __future__ import annotations

from pathlib import Path

import pytest

from .campaigns import SMALL, write


@pytest.fixture
def small(tmp_path) -> Path:
    return write(tmp_path, SMALL)
