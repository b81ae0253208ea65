"""numba kernels against their plain-numpy references, and the model against a brute-force sum.

Source: the references are straightforward transcriptions (rules of the project: every numba
kernel keeps a numpy reference, common practice); the brute-force route sums every directed
bond from the neighbour table with the Bloch phase exp(i k·(r_j + R − r_i)) (atomic gauge,
e.g. Slater & Koster, Phys. Rev. 94, 1498 (1954), eq. (1) with the phase on the bond vector).
"""

import numpy as np
import pytest

from valband.structure import find_neighbours
from valband.tb import build_model, sk_blocks
from valband.tb.bloch import bloch_sum_reference
from valband.tb.model import canonical_half
from valband.tb.slater_koster import sk_blocks_reference

from .models import mixed_params, random_cell

ORBITAL_INDEX = {"s": [0], "p": [1, 2, 3], "d": [4, 5, 6, 7, 8]}


def test_sk_kernel_matches_reference(rng):
    d = rng.normal(size=(500, 3))
    d /= np.linalg.norm(d, axis=1)[:, None]
    v = rng.normal(size=(500, 14))
    np.testing.assert_allclose(sk_blocks(d, v), sk_blocks_reference(d, v), rtol=0, atol=1e-14)


def test_sk_kernel_empty_input():
    assert sk_blocks(np.zeros((0, 3)), np.zeros((0, 14))).shape == (0, 9, 9)


def _brute_force(structure, params, kfrac, which="hopping"):
    """H(k) or S(k) from every directed bond, one parameter call per bond, no half trick."""
    nt = find_neighbours(structure, params.cutoff)
    idx, start = [], 0
    for s in structure.symbols:
        i = [o for sh in params.element(s).shells for o in ORBITAL_INDEX[sh]]
        idx.append(np.arange(start, start + len(i)))
        start += len(i)
    norb = start
    kc = kfrac @ structure.reciprocal_cell
    out = np.zeros((len(kfrac), norb, norb), complex)
    for site, s in enumerate(structure.symbols):
        el = params.element(s)
        diag = [
            el.onsite[sh] if which == "hopping" else 1.0
            for sh in el.shells
            for _ in ORBITAL_INDEX[sh]
        ]
        out[:, idx[site], idx[site]] += np.array(diag)
    for b in range(nt.n_bonds):
        i, j = nt.first[b], nt.second[b]
        a, c = structure.symbols[i], structure.symbols[j]
        v = getattr(params, which)(a, c, nt.distances[b : b + 1])
        blk = sk_blocks_reference(nt.vectors[b : b + 1] / nt.distances[b], v)[0]
        oa = [o for sh in params.element(a).shells for o in ORBITAL_INDEX[sh]]
        oc = [o for sh in params.element(c).shells for o in ORBITAL_INDEX[sh]]
        ph = np.exp(1j * kc @ nt.vectors[b])
        out[:, idx[i][:, None], idx[j][None, :]] += ph[:, None, None] * blk[np.ix_(oa, oc)][None]
    return out


@pytest.mark.parametrize("symbols", [("Cu", "Zn", "Al"), ("Li", "Ti", "Cu", "Cu"), ("Al",)])
def test_bloch_kernel_and_model_against_references(symbols, rng):
    st = random_cell(rng, symbols)
    params = mixed_params(rng, tuple(dict.fromkeys(symbols)))
    model = build_model(st, params)
    assert model.n_bonds > 0
    kfrac = rng.uniform(-1, 1, (17, 3))
    H, S = model.hamiltonian_and_overlap(kfrac)
    kc = kfrac @ st.reciprocal_cell
    args = (kc, model.bond_first, model.bond_second, model.bond_vectors)
    H_ref = bloch_sum_reference(*args, model.bond_hamiltonian, model.site_slices, model.onsite)
    ones = np.ones(model.n_orbitals)
    S_ref = bloch_sum_reference(*args, model.bond_overlap, model.site_slices, ones)
    np.testing.assert_allclose(H, H_ref, atol=1e-13)
    np.testing.assert_allclose(S, S_ref, atol=1e-13)
    np.testing.assert_allclose(model.hamiltonian(kfrac), H, atol=0)
    np.testing.assert_allclose(model.overlap(kfrac), S, atol=0)
    # the model (half of the bonds, grouped by pair) against every bond one by one
    np.testing.assert_allclose(H, _brute_force(st, params, kfrac, "hopping"), atol=1e-12)
    np.testing.assert_allclose(S, _brute_force(st, params, kfrac, "overlap"), atol=1e-12)


def test_canonical_half_keeps_one_of_each_pair(rng):
    st = random_cell(rng, ("Cu", "Zn"))
    nt = find_neighbours(st, 6.0)
    keep = canonical_half(nt.first, nt.second, nt.shifts)
    assert keep.sum() * 2 == nt.n_bonds
    kept = {
        (int(i), int(j), *map(int, R))
        for i, j, R in zip(nt.first[keep], nt.second[keep], nt.shifts[keep])
    }
    for i, j, R in zip(nt.first[~keep], nt.second[~keep], nt.shifts[~keep]):
        assert (int(j), int(i), *map(int, -R)) in kept


def test_one_parameter_call_per_directed_pair(rng):
    # build_model evaluates the integrals vectorised: one call per directed element pair of the
    # stored bonds, plus one short reciprocity check call per pair
    st = random_cell(rng, ("Cu", "Zn", "Cu"))
    params = mixed_params(rng, ("Cu", "Zn"), overlap=False)
    model = build_model(st, params)
    pairs = {(st.symbols[i], st.symbols[j]) for i, j in zip(model.bond_first, model.bond_second)}
    assert len(params.calls) == 2 * len(pairs)
    assert sum(c[3] for c in params.calls[::2]) == model.n_bonds


@pytest.mark.parametrize("kb", [1, 5, 128])
def test_bloch_kernel_k_blocking_does_not_matter(kb, rng):
    # the kernel accumulates kb k-points at a time; any block size gives the reference result
    from valband.tb.bloch import _bloch_kernel

    st = random_cell(rng, ("Cu", "Al"))
    model = build_model(st, mixed_params(rng, ("Cu", "Al")))
    rows, cols, bond, values = model._elements
    kc = rng.uniform(-1, 1, (13, 3)) @ st.reciprocal_cell
    diag = np.stack([model.onsite, np.ones(model.n_orbitals)])
    got = _bloch_kernel(kc, model.bond_vectors, rows, cols, bond, values, diag, kb)
    args = (kc, model.bond_first, model.bond_second, model.bond_vectors)
    for i, blocks in enumerate((model.bond_hamiltonian, model.bond_overlap)):
        want = bloch_sum_reference(*args, blocks, model.site_slices, diag[i])
        np.testing.assert_allclose(got[i], want, atol=1e-13)
