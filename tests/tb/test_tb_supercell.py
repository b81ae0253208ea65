"""Zone folding: a 2×2×2 supercell at K holds the primitive bands at the eight unfolded k.

Source: Bloch's theorem (common practice): the supercell reciprocal lattice is spanned by
b_i/2, so the supercell at fractional K (supercell basis) is the primitive cell at the eight
fractional k = (K + n)/2, n ∈ {0, 1}³; the spectra agree as multisets.
"""

import itertools

import numpy as np
import pytest
import scipy.linalg

from valband.tb import build_model

from .models import fcc_cu, two_element_cell
from .toy_params import spd_params


def _bands(model, kfrac):
    H, S = model.hamiltonian_and_overlap(kfrac)
    if S is None:
        return np.linalg.eigvalsh(H)
    return np.array([scipy.linalg.eigh(h, s, eigvals_only=True) for h, s in zip(H, S)])


@pytest.mark.parametrize("case", ["fcc", "two-element-nonorthogonal"])
def test_supercell_spectrum_is_union_of_folded_k(case, rng):
    if case == "fcc":
        prim, params = fcc_cu(), spd_params(rng, ("Cu",), cutoff=4.0)
    else:
        prim, params = two_element_cell(), spd_params(rng, ("Cu", "Zn"), cutoff=4.3, overlap=True)
    small = build_model(prim, params)
    big = build_model(prim.repeat((2, 2, 2)), params)
    assert big.n_orbitals == 8 * small.n_orbitals
    assert big.n_bonds == 8 * small.n_bonds
    assert big.n_electrons == 8 * small.n_electrons
    for K in (np.zeros(3), rng.uniform(-0.5, 0.5, 3)):
        folded = np.array([(K + np.array(n)) / 2 for n in itertools.product((0, 1), repeat=3)])
        want = np.sort(_bands(small, folded).ravel())
        got = _bands(big, K[None])[0]
        np.testing.assert_allclose(got, want, atol=1e-9)
