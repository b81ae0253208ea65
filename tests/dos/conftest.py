"""Shared fixtures of the DOS tests."""

import numpy as np
import pytest


@pytest.fixture
def rng():
    """A seeded generator, so failures reproduce."""
    return np.random.default_rng(20240917)
