"""Random substitutional alloys, supercells, ordered intermetallics, Vegard lattice constants."""

from __future__ import annotations

import numpy as np
import pytest
import spglib
import spglib.error
from ase.data import atomic_numbers, reference_states

from valband.errors import StructureError
from valband.structure import build_structure, find_neighbours
from valband.structure.alloys import (
    b2,
    compact_supercell_matrix,
    derive_seeds,
    l10,
    l12,
    random_alloy,
    random_configurations,
    reference_lattice_constant,
    site_counts,
    vegard_lattice_constant,
)

spglib.error.OLD_ERROR_HANDLING = False  # spglib ≥ 2.5: exceptions, no deprecation warning

A_CU = 3.61


@pytest.fixture(scope="module")
def fcc():
    return build_structure(f"Cu fcc {A_CU}")


# ------------------------------------------------------------------------------ site counts
@pytest.mark.parametrize(
    ("composition", "supercell", "expected"),
    [
        # n·x is whole: the counts are exactly n·x (arithmetic: 8·0.75 = 6, 8·0.25 = 2).
        ({"Cu": 0.75, "Pd": 0.25}, 2, {"Cu": 6, "Pd": 2}),
        # 27·(1/3) = 9 each (arithmetic).
        ({"Cu": 1 / 3, "Pd": 1 / 3, "Pt": 1 / 3}, 3, {"Cu": 9, "Pd": 9, "Pt": 9}),
        # 8·0.7 = 5.6, 8·0.3 = 2.4: nearest whole counts 6 and 2 (rounding, within one site).
        ({"Cu": 0.7, "Pd": 0.3}, 2, {"Cu": 6, "Pd": 2}),
        # 2·3·4 = 24 sites, 24·0.5 = 12 (arithmetic).
        ({"Au": 0.5, "Cu": 0.5}, (2, 3, 4), {"Au": 12, "Cu": 12}),
    ],
)
def test_random_alloy_has_the_site_counts_of_the_composition(fcc, composition, supercell, expected):
    st = random_alloy(fcc, composition, supercell, seed=11)
    counts = {e: st.symbols.count(e) for e in expected}
    assert counts == expected
    assert st.n_sites == sum(expected.values())
    # decoration only: the positions are those of the plain supercell
    reps = (supercell,) * 3 if isinstance(supercell, int) else supercell
    np.testing.assert_allclose(st.positions, fcc.repeat(reps).positions)


def test_site_counts_stay_within_one_site_of_n_x():
    # Largest-remainder rounding: |count − n·x| < 1 and the counts add up to n (arithmetic).
    rng = np.random.default_rng(5)
    for _ in range(200):
        x = rng.dirichlet(np.ones(3))
        comp = {"Cu": x[0], "Pd": x[1], "Pt": x[2]}
        n = int(rng.integers(20, 200))
        try:
            counts = site_counts(comp, n)
        except StructureError:
            assert min(x) * n < 1  # only a vanishing element may fail
            continue
        assert sum(counts.values()) == n
        assert all(abs(counts[e] - n * comp[e]) < 1 for e in comp)


def test_same_seed_same_structure_different_seed_differs(fcc):
    comp = {"Cu": 0.5, "Pd": 0.5}
    s1 = random_alloy(fcc, comp, 3, seed=42)
    s2 = random_alloy(fcc, comp, 3, seed=42)
    s3 = random_alloy(fcc, comp, 3, seed=43)
    assert s1.symbols == s2.symbols
    # 27 sites, 14/13 split: C(27, 13) ≈ 2e7 decorations, two seeds coinciding is negligible
    assert s1.symbols != s3.symbols
    assert "seed=42" in s1.source and "Cu0.5Pd0.5" in s1.source


def test_impossible_composition_is_rejected_with_reason(fcc):
    # 8 sites, x_Pd = 0.05: n·x = 0.4, so Pd would get no site (not realisable within one site).
    with pytest.raises(StructureError, match=r"Pd would get no site.*multiple of 20 sites"):
        random_alloy(fcc, {"Cu": 0.95, "Pd": 0.05}, 2, seed=1)
    # exact=True refuses rounding: 8·0.7 = 5.6 is not whole; 10 sites would be exact.
    with pytest.raises(StructureError, match=r"not exact on 8 sites.*multiple of 10"):
        random_alloy(fcc, {"Cu": 0.7, "Pd": 0.3}, 2, seed=1, exact=True)


@pytest.mark.parametrize(
    ("composition", "match"),
    [
        ({"Cu": 0.7, "Pd": 0.2}, "sum to 0.9"),
        ({"Cu": 1.2, "Pd": -0.2}, "≥ 0"),
        ({"Cu": 0.5, "Qq": 0.5}, "unknown element 'Qq'"),
        ({"Cu": float("nan"), "Pd": 0.5}, "finite"),
        ({}, "mapping"),
    ],
)
def test_bad_compositions_are_rejected(fcc, composition, match):
    with pytest.raises(StructureError, match=match):
        random_alloy(fcc, composition, 2, seed=1)


@pytest.mark.parametrize("seed", [-1, 1.5, None, True])
def test_bad_seed_is_rejected(fcc, seed):
    with pytest.raises(StructureError, match="seed must be a non-negative integer"):
        random_alloy(fcc, {"Cu": 0.5, "Pd": 0.5}, 2, seed=seed)


def test_sublattice_decoration_keeps_the_other_sublattice():
    parent = b2("Cu", "Zn", 2.95)
    st = random_alloy(parent, {"Ni": 0.5, "Cu": 0.5}, 2, seed=3, sublattice="Zn")
    zn_sites = [i for i, s in enumerate(parent.repeat((2, 2, 2)).symbols) if s == "Zn"]
    cu_sites = [i for i in range(16) if i not in zn_sites]
    assert all(st.symbols[i] == "Cu" for i in cu_sites)
    assert sorted(st.symbols[i] for i in zn_sites) == ["Cu"] * 4 + ["Ni"] * 4


def test_random_configurations_are_reproducible_one_by_one(fcc):
    comp = {"Cu": 0.75, "Pd": 0.25}
    configs = list(random_configurations(fcc, comp, 2, n_configs=5, seed=9))
    assert [c.index for c in configs] == list(range(5))
    assert len({c.seed for c in configs}) == 5
    assert [c.seed for c in configs] == derive_seeds(9, 5)
    for c in configs:
        again = random_alloy(fcc, comp, 2, seed=c.seed)
        assert again.symbols == c.structure.symbols
        assert f"seed={c.seed}" in c.structure.source and "master seed=9" in c.structure.source
    # the first seeds do not depend on how many are asked for
    assert derive_seeds(9, 3) == derive_seeds(9, 5)[:3]


def test_random_configurations_occupy_every_site_with_probability_x(fcc):
    # Definition of a random substitutional alloy: each site holds Pd with probability x.
    # 400 configurations: standard error sqrt(x(1−x)/400) ≈ 0.022; tolerance 5 standard errors.
    configs = random_configurations(fcc, {"Cu": 0.75, "Pd": 0.25}, 2, n_configs=400, seed=2)
    occ = np.mean([[s == "Pd" for s in c.structure.symbols] for c in configs], axis=0)
    np.testing.assert_allclose(occ, 0.25, atol=5 * np.sqrt(0.25 * 0.75 / 400))


# ------------------------------------------------------------------------------ supercells
def _shortest(cells: np.ndarray, reach: int = 3) -> np.ndarray:
    """Brute-force shortest nonzero lattice vector of each cell in ``cells`` (m, 3, 3)."""
    g = np.stack(np.meshgrid(*[np.arange(-reach, reach + 1)] * 3, indexing="ij"), -1)
    g = g.reshape(-1, 3)
    g = g[np.any(g != 0, axis=1)]
    return np.linalg.norm(np.einsum("vi,mij->mvj", g, cells), axis=2).min(axis=1)


def test_compact_supercell_beats_every_small_integer_matrix(fcc):
    # Independent brute force: all 3^9 integer matrices with entries −1, 0, 1 and det 4; the
    # exhaustive HNF search must do at least as well as the best of them (equal here: the
    # conventional cube, shortest vector a, is among them).
    vals = np.array([-1, 0, 1])
    mats = np.stack(np.meshgrid(*[vals] * 9, indexing="ij"), -1).reshape(-1, 3, 3)
    mats = mats[np.round(np.linalg.det(mats)).astype(int) == 4]
    brute = _shortest(mats @ fcc.cell).max()
    p = compact_supercell_matrix(fcc, 4)
    ours = _shortest((p @ fcc.cell)[None])[0]
    assert round(np.linalg.det(p)) == 4
    assert ours == pytest.approx(brute, abs=1e-9)
    assert ours == pytest.approx(A_CU, abs=1e-9)  # the conventional fcc cube (textbook)


def test_compact_supercell_of_32_sites_is_at_least_the_doubled_cube(fcc):
    # The 2×2×2 conventional cube has 32 sites and shortest vector 2a (geometry fact); the
    # diagonal 4×4×2 repeat of the primitive cell only 2·a/√2.
    p = compact_supercell_matrix(fcc, 32)
    assert round(np.linalg.det(p)) == 32
    ours = _shortest((p @ fcc.cell)[None])[0]
    assert ours >= 2 * A_CU - 1e-9
    st = random_alloy(fcc, {"Cu": 0.5, "Pd": 0.5}, p, seed=0)
    assert st.n_sites == 32
    assert st.volume == pytest.approx(32 * fcc.volume, rel=1e-12)


def test_compact_supercell_rejects_non_multiples(fcc):
    hcp = build_structure("Co hcp")
    with pytest.raises(StructureError, match="multiple of 2 sites"):
        compact_supercell_matrix(hcp, 7)


# ------------------------------------------------------------------------------ ordered
@pytest.mark.parametrize(
    ("structure", "number", "formula"),
    [
        # Space groups (International Tables): L1_2 Cu3Au Pm-3m 221, L1_0 CuAu P4/mmm 123,
        # B2 CsCl Pm-3m 221; spglib is the reference.
        (l12("Cu", "Au"), 221, {"Cu": 3, "Au": 1}),
        (l12("Au", "Cu"), 221, {"Au": 3, "Cu": 1}),
        (l10("Cu", "Au", c_over_a=0.93), 123, {"Cu": 1, "Au": 1}),
        (l10("Fe", "Pt"), 123, {"Fe": 1, "Pt": 1}),
        (b2("Cu", "Zn"), 221, {"Cu": 1, "Zn": 1}),
    ],
)
def test_ordered_space_groups(structure, number, formula):
    ds = spglib.get_symmetry_dataset(structure.to_spglib(), symprec=1e-5)
    assert ds.number == number
    assert {e: structure.symbols.count(e) for e in formula} == formula


def test_l12_minority_has_twelve_majority_neighbours():
    # L1_2 A3B (textbook): B has 12 A nearest neighbours; A has 8 A and 4 B.
    st = l12("Cu", "Au", 3.75)
    nb = find_neighbours(st, 3.75 / np.sqrt(2) * 1.01)
    sym = np.array(st.symbols)
    au = int(np.flatnonzero(sym == "Au")[0])
    cu = int(np.flatnonzero(sym == "Cu")[0])
    assert np.all(sym[nb.second[nb.first == au]] == "Cu") and np.sum(nb.first == au) == 12
    assert np.sum(sym[nb.second[nb.first == cu]] == "Au") == 4


def test_b2_has_eight_unlike_neighbours():
    # B2 (CsCl, textbook): each atom has 8 nearest neighbours of the other kind at a√3/2.
    st = b2("Cu", "Zn", 2.95)
    nb = find_neighbours(st, 2.95 * np.sqrt(3) / 2 * 1.01)
    sym = np.array(st.symbols)
    assert np.all(nb.coordination(2) == 8)
    assert np.all(sym[nb.first] != sym[nb.second])


def test_l10_cell_and_c_over_a():
    # L1_0 in its primitive tetragonal cell: a/√2 × a/√2 × c, c = (c/a)·a (geometry).
    st = l10("Cu", "Au", 3.96, c_over_a=0.93)
    np.testing.assert_allclose(np.diag(st.cell), [3.96 / np.sqrt(2)] * 2 + [0.93 * 3.96])
    with pytest.raises(StructureError, match="c/a"):
        l10("Cu", "Au", 3.96, c_over_a=5.0)


def test_vegard_default_lattice_constants():
    # Vegard's law on ASE's reference constants (ase.data.reference_states):
    # Cu3Au L1_2: 0.75·a_Cu + 0.25·a_Au.
    a_cu = reference_states[atomic_numbers["Cu"]]["a"]
    a_au = reference_states[atomic_numbers["Au"]]["a"]
    st = l12("Cu", "Au")
    assert st.cell[0, 0] == pytest.approx(0.75 * a_cu + 0.25 * a_au, rel=1e-12)
    # Measured Cu3Au a ≈ 3.75 Å (from memory); Vegard's law is within a few per cent.
    assert st.cell[0, 0] == pytest.approx(3.75, rel=0.02)
    # B2 CuPd: measured a ≈ 2.99 Å (from memory); Vegard on bcc-equivalent volumes.
    assert b2("Cu", "Pd").cell[0, 0] == pytest.approx(2.99, rel=0.02)


def test_equal_volume_conversion_between_lattices():
    # Same atomic volume (geometry): fcc a³/4 = bcc a³/2; hcp √3/4·a²c per atom.
    a_fe = reference_states[atomic_numbers["Fe"]]["a"]  # Fe is bcc in ASE
    a_fcc, _ = reference_lattice_constant("Fe", "fcc")
    assert a_fcc**3 / 4 == pytest.approx(a_fe**3 / 2, rel=1e-12)
    a_h, c_h = reference_lattice_constant("Cu", "hcp")
    assert np.sqrt(3) / 4 * a_h**2 * c_h == pytest.approx(A_CU**3 / 4, rel=1e-12)
    assert c_h / a_h == pytest.approx(np.sqrt(8 / 3), rel=1e-12)
    a, c = vegard_lattice_constant({"Co": 0.5, "Ru": 0.5}, "hcp")
    co, ru = (reference_states[atomic_numbers[e]] for e in ("Co", "Ru"))
    assert a == pytest.approx(0.5 * (co["a"] + ru["a"]))
    assert c == pytest.approx(0.5 * (co["a"] * co["c/a"] + ru["a"] * ru["c/a"]))


def test_unusable_reference_state_asks_for_a():
    # ASE's reference state of Mn is a complex cubic cell ('cubic'), not one we convert.
    with pytest.raises(StructureError, match="give the lattice constant"):
        reference_lattice_constant("Mn", "fcc")
