"""Small systems shared by the KPM tests (session-scoped, immutable)."""

from __future__ import annotations

import pytest

from valband.params import load_parameter_set
from valband.structure import load_structure


@pytest.fixture(scope="session")
def harrison():
    return load_parameter_set("harrison-universal")


@pytest.fixture(scope="session")
def nonorthogonal():
    return load_parameter_set("example-nonorthogonal")


@pytest.fixture(scope="session")
def alloy8():
    """8-site random Cu0.75Pd0.25 fcc cell (72 s, p, d orbitals); spec of our own choosing."""
    return load_structure("random Cu0.75Pd0.25 fcc 2x2x2 seed=7")


@pytest.fixture(scope="session")
def cu_slab():
    """12-site Cu(111) slab, three layers of 2×2 (108 orbitals)."""
    return load_structure("slab Cu fcc111 layers=3 size=2x2 vacuum=8")
