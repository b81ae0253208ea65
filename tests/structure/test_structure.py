"""Structures: reading, building, validation, neighbour tables."""

from __future__ import annotations

import filecmp

import numpy as np
import pytest
from ase.build import bulk

from valband.errors import StructureError
from valband.structure import (
    MIN_DISTANCE,
    Structure,
    build_structure,
    find_neighbours,
    load_structure,
    read_structure,
)


def test_build_defaults_to_ase_reference_lattice_constant():
    # ASE's reference data (ase.data.reference_states) gives Cu fcc a = 3.61 Å.
    s = build_structure("Cu fcc")
    assert s.n_sites == 1
    assert s.volume == pytest.approx(3.61**3 / 4, rel=1e-12)


@pytest.mark.parametrize(
    ("spec", "n_first", "d_first"),
    [
        # Coordination numbers and nearest-neighbour distances of the cubic lattices (textbook):
        # sc 6 at a, bcc 8 at a√3/2, fcc 12 at a/√2, diamond 4 at a√3/4.
        ("Po sc 3.0", 6, 3.0),
        ("Fe bcc 2.87", 8, 2.87 * np.sqrt(3) / 2),
        ("Cu fcc 3.61", 12, 3.61 / np.sqrt(2)),
        ("Si diamond 5.43", 4, 5.43 * np.sqrt(3) / 4),
    ],
)
def test_first_shell_coordination(spec, n_first, d_first):
    s = build_structure(spec)
    nb = find_neighbours(s, d_first * 1.05)
    assert np.all(nb.coordination(s.n_sites) == n_first)
    np.testing.assert_allclose(nb.distances, d_first, rtol=1e-10)
    np.testing.assert_allclose(np.linalg.norm(nb.vectors, axis=1), nb.distances)


def test_hcp_twelve_neighbours_ideal_ratio():
    # Ideal hcp (c/a = √(8/3)) has 12 nearest neighbours at a (textbook).
    a = 2.5
    s = build_structure(f"Co hcp {a} c={a * np.sqrt(8 / 3)}")
    nb = find_neighbours(s, a * 1.01)
    assert np.all(nb.coordination(s.n_sites) == 12)


def test_neighbours_match_ase_neighbor_list_in_a_large_cell():
    # ASE's own neighbour list is the external reference; 4x4x4 conventional fcc = 256 atoms.
    from ase.neighborlist import neighbor_list

    atoms = bulk("Cu", "fcc", a=3.61, cubic=True).repeat(4)
    atoms.rattle(0.05, seed=3)
    s = Structure.from_atoms(atoms)
    nb = find_neighbours(s, 4.0)
    i, j, d = neighbor_list("ijd", atoms, 4.0)
    assert nb.n_bonds == len(i)
    np.testing.assert_allclose(np.sort(nb.distances), np.sort(d))


def test_per_pair_cutoffs_filter_bonds():
    s = build_structure("CuZn bcc 2.95")
    d1 = 2.95 * np.sqrt(3) / 2
    # Cu–Zn bonds are first neighbours; Cu–Cu and Zn–Zn second neighbours at a.
    only_unlike = find_neighbours(s, lambda a, b: 3.2 if a != b else 2.6)
    assert np.all(only_unlike.distances < d1 + 1e-9)
    both = find_neighbours(s, 3.2)
    assert both.n_bonds == 2 * (8 + 6)


def test_supercell_repeat_keeps_density():
    s = build_structure("Cu fcc")
    big = s.repeat((2, 2, 2))
    assert big.n_sites == 8
    assert big.volume == pytest.approx(8 * s.volume)


def test_read_formats_round_trip(tmp_path):
    import ase.io

    atoms = bulk("Pd", "fcc", a=3.89)
    for name, fmt in (("p.cif", "cif"), ("POSCAR", "vasp"), ("p.xyz", "extxyz")):
        ase.io.write(tmp_path / name, atoms, format=fmt)
        s = read_structure(tmp_path / name)
        assert s.symbols == ("Pd",)
        assert s.volume == pytest.approx(atoms.get_volume(), rel=1e-6)


def test_demo_structures_are_installed_unchanged(repo_root):
    # The package carries a copy of the top-level structures/ folder for `valband demo`.
    top = repo_root / "structures"
    inst = repo_root / "src" / "valband" / "data" / "demo"
    names = sorted(p.name for p in top.iterdir() if p.is_file())
    assert names == sorted(p.name for p in inst.iterdir() if p.is_file())
    match, mismatch, errors = filecmp.cmpfiles(top, inst, names, shallow=False)
    assert not mismatch and not errors


def test_demo_structures_read(repo_root):
    for p in (repo_root / "structures").iterdir():
        if p.suffix in (".cif", ".vasp", ".xyz"):
            s = read_structure(p)
            assert s.n_sites >= 1


# ----------------------------------------------------------------------------- bad input
def test_missing_file(tmp_path):
    with pytest.raises(StructureError, match="no such structure file"):
        read_structure(tmp_path / "nope.cif")


def test_malformed_file(tmp_path):
    bad = tmp_path / "broken.cif"
    bad.write_text("data_x\n_cell_length_a 3.6\nthis is not a cif loop\n")
    with pytest.raises(StructureError, match="broken.cif"):
        read_structure(bad)


def test_unreadable_format(tmp_path):
    bad = tmp_path / "notes.xyz"
    bad.write_text("two\nwords here\n")
    with pytest.raises(StructureError, match="notes.xyz"):
        read_structure(bad)


def test_unknown_element():
    with pytest.raises(StructureError, match="unknown element 'Xx'"):
        Structure(cell=np.eye(3) * 3, positions=[[0, 0, 0]], symbols=("Xx",))


def test_unknown_element_in_spec():
    with pytest.raises(StructureError, match="not one or two chemical symbols|unknown element"):
        build_structure("Qq fcc 3.6")


def test_overlapping_atoms():
    with pytest.raises(StructureError, match="overlap"):
        Structure(cell=np.eye(3) * 4, positions=[[0, 0, 0], [0.3, 0, 0]], symbols=("Cu", "Cu"))


def test_overlap_with_own_image():
    with pytest.raises(StructureError, match="periodic image"):
        Structure(cell=np.eye(3) * (MIN_DISTANCE * 0.8), positions=[[0, 0, 0]], symbols=("Cu",))


def test_nan_positions():
    with pytest.raises(StructureError, match="NaN"):
        Structure(cell=np.eye(3) * 4, positions=[[np.nan, 0, 0]], symbols=("Cu",))


def test_degenerate_cell():
    with pytest.raises(StructureError, match="degenerate"):
        Structure(cell=[[1, 0, 0], [2, 0, 0], [0, 0, 1]], positions=[[0, 0, 0]], symbols=("Cu",))


def test_not_periodic():
    from ase import Atoms

    with pytest.raises(StructureError, match="periodic"):
        Structure.from_atoms(Atoms("Cu2", positions=[[0, 0, 0], [2.5, 0, 0]]))


@pytest.mark.parametrize("spec", ["Cu", "Cu xyz", "Cu fcc abc", "Cu fcc -3"])
def test_bad_build_specs(spec):
    with pytest.raises(StructureError, match="build spec"):
        build_structure(spec)


def test_neither_file_nor_spec():
    with pytest.raises(StructureError, match="neither an existing structure file nor a build spec"):
        load_structure("copper please")


@pytest.mark.parametrize("spec, word", [
    ("Cu hcp 2.5 4.1", "given twice"),          # a second bare number was taken as a
    ("Cu fcc 3.61 9.99", "given twice"),
    ("Cu fcc c=4", "hcp only"),                 # c on a cubic lattice was ignored
    ("Co hcp 2.5 c=4 c=4.1", "given twice"),
])
def test_every_spec_number_is_used_or_refused(spec, word):
    with pytest.raises(StructureError, match=word):
        build_structure(spec)
