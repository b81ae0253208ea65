"""Checks shared by the tests of the shipped first-principles sets."""

from __future__ import annotations

import numpy as np
import pytest

from valband.params.model import BOND_INTEGRALS
from valband.twocentre import regenerate_pair
from valband.twocentre.generate import settings_from_provenance

#: The 17 elements of the shipped first-principles sets.
ELEMENTS = {"Fe", "Co", "Ni", "Cu", "Ru", "Rh", "Pd", "Ag", "Os", "Ir", "Pt", "Au",
            "Al", "Zn", "Ga", "In", "Sn"}


def assert_shipped_contents(ps):
    """17 elements, all 153 pairs, non-orthogonal, spd / sp shells, solid configurations.

    Returns the generation settings the set records.
    """
    assert set(ps.elements) == ELEMENTS
    assert len(ps.pairs) == len(ELEMENTS) * (len(ELEMENTS) + 1) // 2 == 153
    assert not ps.orthogonal
    for el in ("Fe", "Cu", "Pd", "Pt", "Zn"):
        assert ps.element(el).shells == ("s", "p", "d")
    for el in ("Al", "Ga", "In", "Sn"):
        assert ps.element(el).shells == ("s", "p")
    s = settings_from_provenance(ps.provenance)
    assert s.relativity == "scalar" and s.configuration == "solid"
    return s


def assert_pair_regenerates(ps, first: str, second: str) -> None:
    """The shipped pair equals the generator's output with the settings the set records."""
    t = regenerate_pair(ps.provenance, first, second)
    pair = ps.pair(first, second)
    assert (pair.first, pair.second) == (first, second)
    for kind, laws, table in (("H", pair.hopping, t.hopping), ("S", pair.overlap, t.overlap)):
        for name, law in laws.items():
            n = len(law.r)
            np.testing.assert_allclose(law.r, t.distances[:n], atol=1e-12)
            np.testing.assert_allclose(law.v, table[:n, BOND_INTEGRALS.index(name)], atol=2e-7,
                                       err_msg=f"{kind} {name}")
    for el in (first, second):
        for sh, v in t.onsite[el].items():
            assert ps.element(el).onsite[sh] == pytest.approx(v, abs=1e-8)
