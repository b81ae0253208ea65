"""k-meshes: irreducible wedge and weights against spglib, and band paths."""

from __future__ import annotations

import numpy as np
import pytest
import spglib

from valband.errors import SettingsError
from valband.kspace import make_band_path, make_mesh, parse_mesh
from valband.structure import build_structure

SYSTEMS = {"fcc": "Cu fcc 3.61", "bcc": "Fe bcc 2.87", "hcp": "Co hcp 2.507 c=4.07"}


@pytest.mark.parametrize("lattice", ["fcc", "bcc", "hcp"])
@pytest.mark.parametrize(("mesh", "kind"), [((8, 8, 8), "gamma"), ((6, 6, 6), "monkhorst-pack"),
                                            ((9, 9, 5), "monkhorst-pack")])
def test_irreducible_points_and_weights_equal_spglib(lattice, mesh, kind):
    # External reference: spglib.get_ir_reciprocal_mesh (general-purpose symmetry library).
    s = build_structure(SYSTEMS[lattice])
    km = make_mesh(s, mesh, kind=kind)
    shift = [0, 0, 0] if kind == "gamma" else [(m + 1) % 2 for m in mesh]
    mapping, grid = spglib.get_ir_reciprocal_mesh(mesh, s.to_spglib(), is_shift=shift)
    reps, counts = np.unique(mapping, return_counts=True)
    ref_k = (grid[reps] + 0.5 * np.array(shift)) / np.array(mesh)
    assert km.n_irreducible == len(reps)
    np.testing.assert_allclose(km.weights, counts / mapping.size, atol=1e-15)
    # Same points up to a reciprocal lattice vector.
    diff = km.kpoints - ref_k
    np.testing.assert_allclose(diff - np.round(diff), 0, atol=1e-12)
    # ir_map sends every full-mesh point to the row of its representative.
    np.testing.assert_array_equal(reps[km.ir_map], mapping)


def test_known_irreducible_count_fcc_gamma_8():
    # The Γ-centred 8×8×8 mesh of an fcc lattice has 29 irreducible points (common practice;
    # a figure every plane-wave code prints, from memory).
    assert make_mesh(build_structure("Cu fcc"), 8, kind="gamma").n_irreducible == 29


def test_full_kpoints_follow_spglib_order():
    s = build_structure("Cu fcc")
    km = make_mesh(s, (4, 3, 2), kind="gamma", symmetry=False)
    mapping, grid = spglib.get_ir_reciprocal_mesh([4, 3, 2], s.to_spglib(), is_shift=[0, 0, 0])
    diff = km.full_kpoints() - grid / np.array([4, 3, 2])
    np.testing.assert_allclose(diff - np.round(diff), 0, atol=1e-12)


def test_without_symmetry_every_point_once():
    km = make_mesh(build_structure("Cu fcc"), 5, symmetry=False)
    assert km.n_irreducible == 125
    np.testing.assert_allclose(km.weights, 1 / 125)


def test_monkhorst_pack_points_match_ase():
    # ASE's monkhorst_pack() generates the same (shifted-for-even) mesh (general-purpose library).
    from ase.dft.kpoints import monkhorst_pack

    km = make_mesh(build_structure("Cu fcc"), (4, 4, 4), symmetry=False)
    ref = monkhorst_pack((4, 4, 4))
    ours = km.full_kpoints()
    d = ours[:, None, :] - ref[None, :, :]
    d -= np.round(d)
    assert np.all(np.min(np.abs(d).max(axis=2), axis=1) < 1e-12)


@pytest.mark.parametrize("bad", ["0", "0x4x4", "-2", "4x4", "a", (4, 0, 4)])
def test_bad_mesh(bad):
    with pytest.raises(SettingsError, match="k-mesh"):
        parse_mesh(bad)


def test_bad_mesh_kind():
    with pytest.raises(SettingsError, match="mesh kind"):
        make_mesh(build_structure("Cu fcc"), 4, kind="random")  # type: ignore[arg-type]


def test_band_path_default_fcc():
    # fcc special points (Setyawan & Curtarolo 2010): |Γ–X| = 2π/a.
    a = 3.61
    bp = make_band_path(build_structure(f"Cu fcc {a}"), "GX", npoints=20)
    assert bp.labels == ("Γ", "X")
    assert bp.label_positions[1] == pytest.approx(2 * np.pi / a, rel=1e-10)


def test_band_path_bad_letter():
    with pytest.raises(SettingsError, match="special points"):
        make_band_path(build_structure("Cu fcc"), "GQ")
