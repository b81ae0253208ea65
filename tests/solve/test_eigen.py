"""The k-chunked solver: compiled small-matrix eigh, real gauge, Mulliken projections."""

from __future__ import annotations

import numpy as np
import pytest

from valband.params import load_parameter_set
from valband.solve import diagonalise
from valband.solve.eigen import real_gauge
from valband.solve.small_eigh import eigh_small
from valband.structure import build_structure
from valband.tb import build_model


@pytest.mark.parametrize("n", [1, 2, 5, 9, 18])
def test_small_eigh_matches_lapack(n):
    # Reference: numpy.linalg.eigh (LAPACK) on the same random symmetric matrices.
    rng = np.random.default_rng(n)
    a = rng.normal(size=(50, n, n))
    a = a + np.swapaxes(a, 1, 2)
    w, v = eigh_small(a)
    np.testing.assert_allclose(w, np.linalg.eigvalsh(a), atol=1e-12)
    np.testing.assert_allclose(a @ v, v * w[:, None, :], atol=1e-12)
    np.testing.assert_allclose(np.swapaxes(v, 1, 2) @ v, np.broadcast_to(np.eye(n), a.shape), atol=1e-12)


def test_small_eigh_degenerate_and_diagonal():
    # Exact degeneracies (as at high-symmetry k-points) and already-diagonal input.
    rng = np.random.default_rng(7)
    q, _ = np.linalg.qr(rng.normal(size=(9, 9)))
    lam = np.array([-3.0, -3.0, -3.0, -1.0, -1.0, 0.5, 2.0, 2.0, 2.0])
    a = np.stack([q @ np.diag(lam) @ q.T, np.diag(lam[::-1]), np.zeros((9, 9))])
    w, v = eigh_small(a)
    np.testing.assert_allclose(w[0], lam, atol=1e-12)
    np.testing.assert_allclose(w[1], lam, atol=1e-15)
    np.testing.assert_allclose(a @ v, v * w[:, None, :], atol=1e-12)


@pytest.fixture(scope="module")
def harrison():
    return load_parameter_set("harrison-universal")


@pytest.mark.parametrize(("spec", "real"), [("Cu fcc", True), ("Fe bcc 2.87", True),
                                             ("CuPd bcc 2.99", True), ("Al hcp 2.86 c=4.67", False),
                                             ("Al diamond 5.6", False)])
def test_real_gauge_detection_and_equal_spectra(harrison, spec, real):
    # Sites that are inversion centres make D†H(k)D real (D = i^l): fcc, bcc, B2 yes; hcp and
    # diamond sites are not inversion centres (textbook crystallography), so no.
    model = build_model(build_structure(spec), harrison)
    assert (real_gauge(model) is not None) == real
    k = np.random.default_rng(3).uniform(-0.5, 0.5, size=(40, 3))
    eig, _ = diagonalise(model, k)
    np.testing.assert_allclose(eig, np.linalg.eigvalsh(model.hamiltonian(k)), atol=1e-11)


def test_projections_are_gauge_and_chunk_independent(harrison):
    model = build_model(build_structure("Cu fcc"), harrison)
    k = np.random.default_rng(5).uniform(-0.5, 0.5, size=(30, 3))
    chans = np.eye(model.n_orbitals)
    e1, w1 = diagonalise(model, k, chans)
    e2, w2 = diagonalise(model, k, chans, chunk_bytes=1)  # one k-point per chunk
    np.testing.assert_allclose(e1, e2, atol=1e-12)
    np.testing.assert_allclose(w1, w2, atol=1e-12)
    # same per-orbital weights as the complex LAPACK route, summed over degenerate sets
    e_ref, c_ref = np.linalg.eigh(model.hamiltonian(k))
    w_ref = np.swapaxes(np.abs(c_ref) ** 2, 1, 2)
    np.testing.assert_allclose(e1, e_ref, atol=1e-11)
    np.testing.assert_allclose(w1.sum(axis=1), w_ref.sum(axis=1), atol=1e-10)
    np.testing.assert_allclose(w1.sum(axis=2), 1.0, atol=1e-12)


def test_mulliken_weights_sum_to_one():
    # Mulliken, J. Chem. Phys. 23, 1833 (1955): Σ_i Re(c*_i (Sc)_i) = cᴴSc = 1 per state.
    model = build_model(build_structure("Cu fcc 3.61"), load_parameter_set("example-nonorthogonal"))
    k = np.random.default_rng(9).uniform(-0.5, 0.5, size=(20, 3))
    eig, w = diagonalise(model, k, np.eye(model.n_orbitals))
    np.testing.assert_allclose(w.sum(axis=2), 1.0, atol=1e-10)
    import scipy.linalg

    h, s = model.hamiltonian_and_overlap(k[:3])
    for i in range(3):  # generalised problem against SciPy's LAPACK driver
        np.testing.assert_allclose(eig[i], scipy.linalg.eigh(h[i], s[i], eigvals_only=True), atol=1e-10)
