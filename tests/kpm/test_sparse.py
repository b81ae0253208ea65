"""The sparse Γ-point H and S agree with the dense Bloch matrices of valband.tb."""

from __future__ import annotations

import numpy as np
import pytest
import scipy.sparse as sp

from valband.errors import ParameterError
from valband.kpm import build_sparse, sparse_from_model
from valband.structure import load_structure
from valband.tb import build_model

GAMMA = np.zeros((1, 3))


@pytest.mark.parametrize("which", ["harrison", "nonorthogonal"])
def test_matches_dense_bloch_matrices_at_gamma(which, request, alloy8, cu_slab):
    params = request.getfixturevalue(which)
    st = alloy8 if which == "harrison" else cu_slab
    model = build_model(st, params)
    h, s = model.hamiltonian_and_overlap(GAMMA)
    sm = build_sparse(st, params)
    # independent routes: the numba Bloch sum at k = 0 vs the COO assembly of half blocks
    assert np.max(np.abs(h[0].imag)) == 0.0
    np.testing.assert_allclose(sm.hamiltonian.toarray(), h[0].real, rtol=0, atol=1e-13)
    if s is None:
        assert sm.overlap is None
    else:
        np.testing.assert_allclose(sm.overlap.toarray(), s[0].real, rtol=0, atol=1e-14)
    via_model = sparse_from_model(model)
    np.testing.assert_allclose(via_model.hamiltonian.toarray(), sm.hamiltonian.toarray(),
                               rtol=0, atol=1e-13)
    np.testing.assert_array_equal(via_model.orbital_site, sm.orbital_site)
    np.testing.assert_array_equal(via_model.orbital_shell, sm.orbital_shell)
    assert sm.n_electrons == model.n_electrons


def test_exactly_symmetric_and_labelled(alloy8, harrison):
    sm = build_sparse(alloy8, harrison)
    h = sm.hamiltonian
    assert sp.isspmatrix_csr(h) or isinstance(h, sp.csr_matrix)
    assert (h - h.T).count_nonzero() == 0  # B + Bᵀ: symmetric to the last bit
    labels = sm.orbitals
    assert len(labels) == sm.n_orbitals == 72
    assert [o.orbital for o in labels[:9]] == ["s", "px", "py", "pz", "dxy", "dyz", "dzx",
                                               "dx2-y2", "dz2"]
    assert all(labels[i].site == sm.orbital_site[i] for i in range(72))


def test_missing_element_names_it(harrison):
    st = load_structure("random Cu0.5Zr0.5 fcc 2x2x1 seed=1")
    with pytest.raises(ParameterError, match="Zr"):
        build_sparse(st, harrison)
