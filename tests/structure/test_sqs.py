"""Special quasirandom structures and shell pair correlations."""

from __future__ import annotations

import numpy as np
import pytest

from valband.errors import SettingsError, StructureError
from valband.structure import build_structure
from valband.structure.alloys import compact_supercell_matrix, l10, l12, random_configurations
from valband.structure.sqs import (
    anneal_numba,
    anneal_reference,
    neighbour_shells,
    pair_correlations,
    sqs,
)

A = 3.61


@pytest.fixture(scope="module")
def fcc():
    return build_structure(f"Cu fcc {A}")


@pytest.fixture(scope="module")
def p32(fcc):
    return compact_supercell_matrix(fcc, 32)


def test_fcc_shells(fcc):
    # fcc coordination shells (textbook): 12 at a/√2, 6 at a, 24 at a·√(3/2).
    big = fcc.repeat((3, 3, 3))
    table = neighbour_shells(big, 3)
    np.testing.assert_allclose(table.distances, [A / np.sqrt(2), A, A * np.sqrt(1.5)], rtol=1e-12)
    np.testing.assert_array_equal(table.n_pairs, np.array([12, 6, 24]) * big.n_sites)


def test_l10_first_shell_correlation_is_minus_one_third():
    # L1_0 CuAu (c/a = 1): alternate (001) planes of Cu and Au. Of the 12 nearest neighbours
    # of any atom, the 4 in its own (001) plane are like and the 8 in the planes above and
    # below are unlike, so Π₁ = ⟨σσ'⟩ = (4·(+1) + 8·(−1))/12 = −1/3; at x = 1/2,
    # α₁ = 1 − P(unlike)/x = 1 − (8/12)/(1/2) = −1/3 (Warren–Cowley, Cowley 1950).
    # The 6 second neighbours (±a along x, y, z) lie on the same sublattice: Π₂ = +1.
    c = pair_correlations(l10("Cu", "Au", 3.9), 2)
    np.testing.assert_allclose(c.spin, [-1 / 3, 1.0], atol=1e-12)
    np.testing.assert_allclose(c.warren_cowley[0, 0, 1], -1 / 3, atol=1e-12)
    np.testing.assert_allclose(c.warren_cowley[0, 1, 0], -1 / 3, atol=1e-12)
    assert c.spin_random == pytest.approx(0.0)


def test_l12_first_shell_warren_cowley_is_minus_one_third():
    # Perfectly ordered Cu3Au (L1_2): each Au has 12 Cu neighbours, so P(Cu|Au) = 1 and
    # α₁ = 1 − 1/x_Cu = 1 − 4/3 = −1/3, the classic value of fully ordered Cu3Au (Cowley 1950).
    c = pair_correlations(l12("Cu", "Au", 3.75), 1, species=["Cu", "Au"])
    np.testing.assert_allclose(c.warren_cowley[0, 0, 1], -1 / 3, atol=1e-12)
    # spin form: Π₁ − (2x − 1)² = 4x(1 − x)·α₁ (identity of the definitions, module docstring)
    x = 0.75
    assert c.spin[0] - (2 * x - 1) ** 2 == pytest.approx(4 * x * (1 - x) * (-1 / 3), abs=1e-12)


def test_random_alloys_average_to_the_hypergeometric_correlation(fcc, p32):
    # Exact combinatorics: N sites with fixed counts (N_A − N_B = M), two distinct sites drawn
    # without replacement give E[σ_i σ_j] = (M² − N)/(N(N − 1)). (The 32-site cell has no
    # self-image pairs within 3 shells: its shortest vector 2a exceeds a·√(3/2).)
    n, m = 32, 24 - 8
    expected = (m**2 - n) / (n * (n - 1))
    confs = random_configurations(fcc, {"Cu": 0.75, "Pd": 0.25}, p32, n_configs=80, seed=4)
    spins = np.array([pair_correlations(c.structure, 3, species=["Cu", "Pd"]).spin for c in confs])
    se = spins.std(axis=0, ddof=1) / np.sqrt(len(spins))
    assert np.all(np.abs(spins.mean(axis=0) - expected) < 5 * se)


def test_sqs_50_50_fcc_matches_the_random_alloy(fcc, p32):
    # Zunger, Wei, Ferreira & Bernard, PRL 65, 353 (1990): an SQS reproduces the random
    # alloy's pair correlations, (2x − 1)² = 0 at x = 1/2, over the first shells.
    res = sqs(fcc, {"Cu": 0.5, "Pd": 0.5}, p32, seed=1)
    corr = res.correlations
    assert res.structure.n_sites == 32
    assert res.structure.symbols.count("Cu") == 16
    assert corr.spin_random == 0.0
    assert abs(corr.spin[0] - corr.spin_random) <= 0.1
    assert np.all(np.abs(corr.spin - corr.spin_random) <= 0.1)
    # the reported objective is the one of the returned structure
    again = pair_correlations(res.structure, 3, species=["Cu", "Pd"])
    assert res.objective == pytest.approx(np.sum((again.spin - 0.0) ** 2), abs=1e-12)
    assert res.seed == 1 and "seed=1" in res.structure.source


def test_sqs_off_stoichiometric_beats_the_random_start(fcc, p32):
    # A 75/25 SQS must match (2x − 1)² = 1/4 better than the random alloy it started from
    # (Zunger et al. 1990: the SQS minimises the mismatch).
    comp = {"Cu": 0.75, "Pd": 0.25}
    res = sqs(fcc, comp, p32, seed=5)
    start = sqs(fcc, comp, p32, seed=5, n_steps=0)
    assert res.correlations.spin_random == pytest.approx(0.25)
    assert res.objective <= start.objective
    assert np.all(np.abs(res.correlations.spin - 0.25) <= 0.1)


def test_sqs_is_reproducible(fcc, p32):
    a = sqs(fcc, {"Cu": 0.5, "Pd": 0.5}, p32, seed=7, n_steps=500)
    b = sqs(fcc, {"Cu": 0.5, "Pd": 0.5}, p32, seed=7, n_steps=500)
    assert a.structure.symbols == b.structure.symbols and a.objective == b.objective


def test_numba_kernel_agrees_with_numpy_reference(fcc):
    # The numba kernel updates pair counts incrementally; the reference recounts every state.
    rng = np.random.default_rng(0)
    big = fcc.repeat((3, 2, 2))
    table = neighbour_shells(big, 3)
    for k in (2, 3):
        types = rng.integers(0, k, size=big.n_sites)
        x = np.bincount(types, minlength=k) / big.n_sites
        target = np.broadcast_to(np.outer(x, x), (3, k, k)).copy()
        w = rng.random(3) + 0.1
        n = 400
        pi, pj = rng.integers(0, big.n_sites, size=(2, n))
        u = rng.random(n)
        temps = np.geomspace(1e-2, 1e-5, n)
        fast = anneal_numba(types, table, target, w, pi, pj, u, temps)
        ref = anneal_reference(types, table, target, w, pi, pj, u, temps)
        np.testing.assert_array_equal(fast[0], ref[0])
        assert fast[1] == pytest.approx(ref[1], rel=1e-12, abs=1e-15)
        assert fast[2:] == ref[2:]


def test_sqs_kernels_give_the_same_structure(fcc, p32):
    comp = {"Cu": 0.5, "Pd": 0.5}
    a = sqs(fcc, comp, p32, seed=3, n_steps=200, kernel="numba")
    b = sqs(fcc, comp, p32, seed=3, n_steps=200, kernel="numpy")
    assert a.structure.symbols == b.structure.symbols
    assert a.n_accepted == b.n_accepted


def test_ternary_pair_probabilities_sum_to_the_fractions(fcc):
    # Sum rule (every site has the same number of s-neighbours): Σ_b p_s(a, b) = x_a.
    res = sqs(fcc, {"Cu": 1 / 3, "Pd": 1 / 3, "Pt": 1 / 3}, (3, 3, 2), seed=2, n_steps=2000)
    p = res.correlations.pair_probabilities
    np.testing.assert_allclose(p.sum(axis=2), np.broadcast_to(res.correlations.fractions, (3, 3)))
    assert res.correlations.spin is None


@pytest.mark.parametrize(
    ("kwargs", "error", "match"),
    [
        ({"composition": {"Cu": 1.0}}, StructureError, "at least two elements"),
        ({"n_shells": 0}, SettingsError, "number of shells"),
        ({"weights": [1.0, -1.0, 1.0]}, SettingsError, "weights"),
        ({"kernel": "fortran"}, SettingsError, "kernel"),
        ({"seed": -3}, StructureError, "seed"),
    ],
)
def test_bad_sqs_settings(fcc, kwargs, error, match):
    args = {"composition": {"Cu": 0.5, "Pd": 0.5}, "seed": 1} | kwargs
    comp = args.pop("composition")
    with pytest.raises(error, match=match):
        sqs(fcc, comp, 2, **args)


def test_shell_pairs_match_ase_neighbour_list():
    # ASE's neighbour list (through valband.structure.find_neighbours) is the reference for the
    # numpy pair search, here on a skewed, strained hcp supercell with images of each site.
    from valband.structure import find_neighbours
    from valband.structure.strain import apply_strain

    eps = [[0.02, 0.01, 0], [0.01, 0, 0], [0, 0, -0.01]]
    st = apply_strain(build_structure("Co hcp").repeat((2, 1, 1)), eps)
    table = neighbour_shells(st, 4)
    cutoff = table.distances[-1] + 1e-6
    nb = find_neighbours(st, cutoff)
    ours = sorted(zip(table.first.tolist(), table.second.tolist(), strict=True))
    ase_pairs = sorted(zip(nb.first.tolist(), nb.second.tolist(), strict=True))
    assert ours == ase_pairs


def test_sqs_on_one_sublattice():
    # B2 parent: the Zn sites alone form a simple cubic lattice, whose shells are a, a√2, a√3
    # (textbook); the Cu sublattice stays untouched.
    from valband.structure.alloys import b2

    a = 2.95
    res = sqs(b2("Cu", "Zn", a), {"Ni": 0.5, "Zn": 0.5}, 4, seed=2, sublattice="Zn")
    np.testing.assert_allclose(res.correlations.distances, a * np.sqrt([1, 2, 3]), rtol=1e-12)
    assert res.structure.symbols[0::2] == ("Cu",) * 64
    assert sorted(set(res.structure.symbols[1::2])) == ["Ni", "Zn"]
    assert np.all(np.abs(res.correlations.spin) <= 0.1)
