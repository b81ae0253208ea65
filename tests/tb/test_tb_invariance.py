"""Symmetries every tight-binding Hamiltonian must have.

Sources: a rigid rotation of the whole crystal leaves the spectrum unchanged (isotropy of space;
the two-centre integrals depend only on bond lengths, Slater & Koster, Phys. Rev. 94, 1498
(1954)); H(k) and S(k) are Hermitian (common practice); with real orbitals and real hopping
integrals, time reversal gives H(−k) = H(k)* (common practice, e.g. Ashcroft & Mermin ch. 10).
"""

from functools import lru_cache

import numpy as np
import pytest
import scipy.linalg
from hypothesis import given, settings
from hypothesis import strategies as st_

from valband.structure import Structure
from valband.tb import build_model

from .models import fcc_cu, mixed_params, two_element_cell
from .toy_params import spd_params


def _random_rotation(rng):
    q, r = np.linalg.qr(rng.normal(size=(3, 3)))
    q = q * np.sign(np.diag(r))
    if np.linalg.det(q) < 0:
        q[:, 0] = -q[:, 0]
    return q


def _rotated(structure, R):
    return Structure(
        cell=structure.cell @ R.T, positions=structure.positions @ R.T, symbols=structure.symbols
    )


def _bands(model, kfrac):
    H, S = model.hamiltonian_and_overlap(kfrac)
    if S is None:
        return np.linalg.eigvalsh(H)
    return np.array([scipy.linalg.eigh(h, s, eigvals_only=True) for h, s in zip(H, S)])


@pytest.mark.parametrize("case", ["fcc", "two-element", "two-element-nonorthogonal"])
def test_eigenvalues_unchanged_by_rigid_rotation(case, rng):
    if case == "fcc":
        # like pair: reciprocity leaves 10 independent integrals (pss = sps, ...), all distinct
        structure, params = fcc_cu(), spd_params(rng, ("Cu",), cutoff=4.0)  # 1st + 2nd shells
    else:
        # unlike pair Cu–Zn: all 14 integrals distinct and non-zero
        structure = two_element_cell()
        params = spd_params(rng, ("Cu", "Zn"), cutoff=4.3, overlap=case.endswith("nonorthogonal"))
    R = _random_rotation(rng)
    model = build_model(structure, params)
    turned = build_model(_rotated(structure, R), params)
    kfrac = rng.uniform(-1, 1, (25, 3))
    # fractional k is the same k rotated: k_cart' = k_frac @ reciprocal_cell' = R k_cart
    np.testing.assert_allclose(
        kfrac @ turned.structure.reciprocal_cell,
        (kfrac @ structure.reciprocal_cell) @ R.T,
        atol=1e-12,
    )
    # the matrices change (the orbitals stay fixed in space) but the spectrum does not
    assert not np.allclose(model.hamiltonian(kfrac), turned.hamiltonian(kfrac), atol=1e-3)
    np.testing.assert_allclose(_bands(turned, kfrac), _bands(model, kfrac), atol=1e-10)


@lru_cache(maxsize=1)
def _nonorthogonal_model():
    rng = np.random.default_rng(7)
    return build_model(two_element_cell(), mixed_params(rng, ("Cu", "Zn"), cutoff=5.0))


@settings(max_examples=60, deadline=None)
@given(st_.lists(st_.floats(-3, 3, allow_nan=False), min_size=3, max_size=3))
def test_hermitian_by_construction(k):
    model = _nonorthogonal_model()
    H, S = model.hamiltonian_and_overlap(np.array([k]))
    # exact, not approximate: H = D + B + B^† is assembled so
    np.testing.assert_array_equal(H, np.conj(np.swapaxes(H, 1, 2)))
    np.testing.assert_array_equal(S, np.conj(np.swapaxes(S, 1, 2)))


def test_time_reversal(rng):
    model = _nonorthogonal_model()
    k = rng.uniform(-1, 1, (30, 3))
    Hp, Sp = model.hamiltonian_and_overlap(k)
    Hm, Sm = model.hamiltonian_and_overlap(-k)
    np.testing.assert_allclose(Hm, np.conj(Hp), atol=1e-13)
    np.testing.assert_allclose(Sm, np.conj(Sp), atol=1e-13)
    assert np.abs(Hp.imag).max() > 1e-3  # a non-trivial check: H(k) is complex


def test_overlap_positive_definite_and_gamma_real(rng):
    # S(k) of a physical (small) overlap is positive definite; at Γ every phase is 1
    # (common practice)
    model = _nonorthogonal_model()
    S = model.overlap(rng.uniform(-1, 1, (10, 3)))
    assert np.linalg.eigvalsh(S).min() > 0
    H0 = model.hamiltonian(np.zeros((1, 3)))
    np.testing.assert_allclose(H0.imag, 0, atol=1e-14)
