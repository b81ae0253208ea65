"""Symmetries the two-centre integrals must obey.

* Reversal: the integral αβ of A → B is the βα integral of B → A (Slater & Koster 1954,
  Sec. III; valband.params.model.REVERSED_PARTNER).
* Hermiticity: the two routes to H through either atom's eigen-equation agree exactly for
  Schrödinger orbitals (T is Hermitian); scalar-relativistic orbitals differ by the kinetic
  operators of the two atoms (small, documented in valband.twocentre.integrals).
* R → 0: the overlap of a normalised orbital with itself is 1, with an orbital of another l
  it is 0 (orthogonality of spherical harmonics).
"""

from __future__ import annotations

import numpy as np
import pytest

from valband.params.model import BOND_INTEGRALS, REVERSED_PARTNER
from valband.twocentre import bond_integrals, confined_atom

DIST = [2.2, 2.6, 3.4]  # Å


def test_reversed_partners(cu, al, coarse):
    ab = bond_integrals(al.site(), cu.site(), DIST, quadrature=coarse)
    ba = bond_integrals(cu.site(), al.site(), DIST, quadrature=coarse)
    for k, name in enumerate(BOND_INTEGRALS):
        j = BOND_INTEGRALS.index(REVERSED_PARTNER[name])
        assert ab.present[k] == ba.present[j]
        np.testing.assert_allclose(ab.overlap[:, k], ba.overlap[:, j], atol=1e-8)
        np.testing.assert_allclose(ab.hopping[:, k], ba.hopping[:, j], atol=1e-6)
    assert ab.names() == ("sss", "sps", "pss", "sds", "pps", "ppp", "pds", "pdp")
    # an unlike pair: pss differs from sps (s of Al with p of Cu vs p of Al with s of Cu)
    assert abs(ab.hopping[1, 1] - ab.hopping[1, 2]) > 0.05


def test_like_pair_partners_equal(cu, coarse):
    b = bond_integrals(cu.site(), cu.site(), DIST, quadrature=coarse)
    for fwd, rev in (("sps", "pss"), ("sds", "dss"), ("pds", "dps"), ("pdp", "dpp")):
        i, j = BOND_INTEGRALS.index(fwd), BOND_INTEGRALS.index(rev)
        np.testing.assert_allclose(b.overlap[:, i], b.overlap[:, j], atol=1e-10)
        np.testing.assert_allclose(b.hopping[:, i], b.hopping[:, j], atol=1e-8)


def test_hermiticity_of_the_two_routes(cu, coarse):
    atom = confined_atom("Cu", relativity="none")
    b = bond_integrals(atom.site(), atom.site(), DIST, quadrature=coarse)
    assert np.max(np.abs(b.hopping)) > 0.5
    assert np.max(np.abs(b.asymmetry)) < 2e-5  # eV: quadrature level for Schrödinger orbitals
    # scalar-relativistic orbitals: the routes differ by the relativistic kinetic terms only
    sr = bond_integrals(cu.site(), cu.site(), DIST, quadrature=coarse)
    assert np.max(np.abs(sr.asymmetry)) < 1e-3


def test_overlap_at_vanishing_distance(cu):
    b = bond_integrals(cu.site(), cu.site(), [1e-3])  # Å
    same = ["sss", "pps", "ppp", "dds", "ddp", "ddd"]
    for name in BOND_INTEGRALS:
        s = b.overlap[0, BOND_INTEGRALS.index(name)]
        if name in same:
            assert s == pytest.approx(1.0, abs=1e-3), name
        else:
            assert abs(s) < 1e-3, name
