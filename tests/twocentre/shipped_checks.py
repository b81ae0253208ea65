"""Checks shared by the tests of the shipped first-principles sets."""

from __future__ import annotations

import numpy as np
import pytest

from valband.params.model import BOND_INTEGRALS
from valband.twocentre import regenerate_pair


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
