"""Shared fixtures of the two-centre tests: confined Cu and Al atoms, a coarse quadrature."""

from __future__ import annotations

import pytest

from valband.twocentre import QuadratureSettings, confined_atom


@pytest.fixture(scope="session")
def coarse():
    """A coarse two-centre grid (integrals converged to ~1e-5 eV), to keep the tests fast."""
    return QuadratureSettings(radial_step=0.12, n_angular=24)


@pytest.fixture(scope="session")
def cu():
    """Confined Cu atom with the module defaults (scalar-relativistic, per-shell radii)."""
    return confined_atom("Cu")


@pytest.fixture(scope="session")
def al():
    """Confined Al atom with the module defaults."""
    return confined_atom("Al")
