"""Shared fixtures of the alloy tests (session-scoped, immutable)."""

from __future__ import annotations

import pytest

from valband.params import load_parameter_set
from valband.structure import build_structure


@pytest.fixture(scope="session")
def harrison():
    return load_parameter_set("harrison-universal")


@pytest.fixture(scope="session")
def fcc():
    """fcc parent at the Cu lattice constant (3.61 Å; the model alloys use Cu's bonds)."""
    return build_structure("Cu fcc 3.61")
