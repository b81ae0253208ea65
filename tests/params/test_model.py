"""ParameterSet lookups and the directed-pair rule of the Slater–Koster integrals."""

from __future__ import annotations

import numpy as np
import pytest

from valband.errors import InputError, ParameterError
from valband.params import BOND_INTEGRALS, REVERSED_PARTNER, load_parameter_set

COL = {n: i for i, n in enumerate(BOND_INTEGRALS)}


@pytest.fixture(scope="module")
def harrison():
    return load_parameter_set("harrison-universal")


def test_bond_integral_names():
    # the ten Slater–Koster integrals (Slater & Koster 1954, Table I) plus the four reversed
    assert len(BOND_INTEGRALS) == 14 and len(set(BOND_INTEGRALS)) == 14
    assert BOND_INTEGRALS == ("sss", "sps", "pss", "sds", "dss", "pps", "ppp", "pds", "pdp",
                              "dps", "dpp", "dds", "ddp", "ddd")  # fmt: skip


def test_directed_pair_rule_for_every_pair(harrison):
    # Hermiticity with the Slater–Koster sign convention: <p_A|H|s_B> along A→B equals
    # <s_B|H|p_A> along B→A, hence V_pss(A, B) = V_sps(B, A) (Slater & Koster 1954)
    r = np.linspace(2.0, 5.0, 61)
    els = list(harrison.elements)
    for a in els:
        for b in els:
            hab = harrison.hopping(a, b, r)
            hba = harrison.hopping(b, a, r)
            assert hab[:, COL["pss"]] == pytest.approx(hba[:, COL["sps"]], abs=0)
            for name, partner in REVERSED_PARTNER.items():
                np.testing.assert_array_equal(hab[:, COL[name]], hba[:, COL[partner]])


def test_like_pairs_have_equal_reversed_integrals(harrison):
    r = np.array([2.4, 2.8, 3.6])
    h = harrison.hopping("Cu", "Cu", r)
    for rev, fwd in (("pss", "sps"), ("dss", "sds"), ("dps", "pds"), ("dpp", "pdp")):
        np.testing.assert_array_equal(h[:, COL[rev]], h[:, COL[fwd]])


def test_integrals_of_absent_shells_are_zero(harrison):
    r = np.array([2.6, 3.0])
    h = harrison.hopping("Al", "Cu", r)  # Al has no d: dss, dps, dpp, dds, ddp, ddd vanish
    for name in ("dss", "dps", "dpp", "dds", "ddp", "ddd"):
        assert np.all(h[:, COL[name]] == 0)
    for name in ("sss", "sps", "pss", "sds", "pds", "pdp"):
        assert np.all(h[:, COL[name]] != 0)
    h = harrison.hopping("Cu", "Al", r)
    for name in ("sds", "pds", "pdp", "dds", "ddp", "ddd"):
        assert np.all(h[:, COL[name]] == 0)


def test_exactly_zero_at_and_beyond_the_cutoff(harrison):
    for (a, b) in harrison.pairs:
        rc = harrison.cutoff(a, b)
        assert harrison.cutoff(b, a) == rc
        h = harrison.hopping(a, b, np.array([rc, np.nextafter(rc, np.inf), rc + 1.0, 50.0]))
        assert np.all(h == 0.0)
        inside = harrison.hopping(a, b, np.array([np.nextafter(rc, 0.0) - 1e-3]))
        assert np.any(inside != 0.0)


def test_shape_and_vectorisation(harrison):
    r = np.linspace(2.2, 4.6, 17)
    h = harrison.hopping("Ag", "Pd", r)
    assert h.shape == (17, 14)
    one_by_one = np.vstack([harrison.hopping("Ag", "Pd", [x]) for x in r])
    np.testing.assert_array_equal(h, one_by_one)
    assert harrison.hopping("Ag", "Pd", np.array([])).shape == (0, 14)


def test_overlap_is_none_for_orthogonal_sets(harrison):
    assert harrison.orthogonal
    assert harrison.overlap("Cu", "Cu", np.array([2.5])) is None


def test_overlap_of_the_nonorthogonal_example():
    ps = load_parameter_set("example-nonorthogonal")
    s = ps.overlap("Cu", "Cu", np.array([2.5527, 4.08]))
    assert s.shape == (2, 14)
    assert s[0, COL["sss"]] == pytest.approx(0.020)  # exponential law at r0
    assert np.all(s[1] == 0)  # at the outer cutoff


def test_lookup_errors_name_the_set_and_what_it_has(harrison):
    with pytest.raises(ParameterError, match=r"'harrison-universal' has no element 'Zn'.*Ag"):
        harrison.element("Zn")
    with pytest.raises(ParameterError, match="harrison-universal"):
        harrison.cutoff("Cu", "Zn")
    ps = load_parameter_set("example-nonorthogonal")
    with pytest.raises(ParameterError, match="no element 'Ag'"):
        ps.hopping("Cu", "Ag", np.array([2.5]))


@pytest.mark.parametrize("r", [[0.0], [-1.0], [np.inf], [[2.0, 3.0]]])
def test_bad_distances_are_refused(harrison, r):
    with pytest.raises(InputError, match="distances r"):
        harrison.hopping("Cu", "Cu", r)


def test_element_params(harrison):
    cu = harrison.element("Cu")
    assert cu.shells == ("s", "p", "d") and cu.n_orbitals == 9
    assert set(cu.onsite) == {"s", "p", "d"}
    assert set(cu.provenance) == {"valence_electrons", "onsite.s", "onsite.p", "onsite.d"}
    assert harrison.element("Al").n_orbitals == 4
