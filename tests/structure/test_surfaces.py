"""Slabs and pseudomorphic overlayers: layers, spacings, vacuum, coordination."""

from __future__ import annotations

import numpy as np
import pytest
from ase.build import fcc111

from valband.errors import StructureError
from valband.structure import find_neighbours
from valband.structure.surfaces import (
    DEFAULT_VACUUM,
    FACETS,
    interlayer_spacing,
    overlayer,
    slab,
)

A_PT = 3.92
A_FE = 2.87


def _gap(st) -> float:
    """Vacuum from the positions: cell height minus slab thickness (cell[2] is along z)."""
    z = st.positions[:, 2]
    return st.cell[2, 2] - (z.max() - z.min())


@pytest.mark.parametrize(
    ("element", "facet", "a", "c", "spacing"),
    [
        # Interlayer spacings of ideal lattices (geometry facts, textbook):
        ("Pt", "fcc111", A_PT, None, A_PT / np.sqrt(3)),
        ("Pt", "fcc100", A_PT, None, A_PT / 2),
        ("Pt", "fcc110", A_PT, None, A_PT / (2 * np.sqrt(2))),
        ("Fe", "bcc110", A_FE, None, A_FE / np.sqrt(2)),
        ("Fe", "bcc100", A_FE, None, A_FE / 2),
        ("Ru", "hcp0001", 2.70, 4.28, 4.28 / 2),
    ],
)
def test_layers_and_spacings(element, facet, a, c, spacing):
    st, info = slab(element, facet, 5, a=a, c=c, vacuum=11.0)
    assert info.n_layers == 5
    assert len(np.unique(np.round(st.positions[:, 2], 6))) == 5
    np.testing.assert_allclose(info.spacings, spacing, rtol=1e-10)
    assert interlayer_spacing(facet, a, c) == pytest.approx(spacing, rel=1e-12)
    # layer 0 is the top (largest z) layer; depth counts from the nearer surface
    top = np.flatnonzero(info.layer == 0)
    assert np.all(st.positions[top, 2] == pytest.approx(st.positions[:, 2].max()))
    np.testing.assert_array_equal(np.unique(info.depth), [0, 1, 2])
    assert info.symmetric
    assert all(lab.endswith(f"@L{k}") for lab, k in zip(st.labels, info.layer, strict=True))
    # vacuum gap ≥ requested (here equal: the cell height is thickness + vacuum)
    assert _gap(st) >= 11.0 - 1e-9 and info.vacuum == pytest.approx(11.0)


def test_default_vacuum_blocks_hopping_across_the_gap():
    # With the default vacuum (12 Å) and a 5 Å cutoff no bond crosses the gap (common practice:
    # vacuum wider than the interaction range); every bond stays in the slab's own image.
    st, _ = slab("Pt", "fcc111", 4)
    assert _gap(st) >= DEFAULT_VACUUM - 1e-9
    nb = find_neighbours(st, 5.0)
    assert np.all(nb.shifts[:, 2] == 0)


def test_fcc111_in_plane_nearest_neighbours():
    # Close-packed (111) layer (geometry): 6 in-plane neighbours at a/√2.
    st, info = slab("Pt", "fcc111", 3, a=A_PT, size=(2, 2))
    nb = find_neighbours(st, A_PT / np.sqrt(2) * 1.01)
    in_plane = np.abs(nb.vectors[:, 2]) < 1e-6
    np.testing.assert_allclose(nb.distances[in_plane], A_PT / np.sqrt(2), rtol=1e-12)
    top = np.flatnonzero(info.layer == 0)
    counts = np.bincount(nb.first[in_plane], minlength=st.n_sites)
    assert np.all(counts[top] == 6)


@pytest.mark.parametrize(
    ("element", "facet", "a", "d_nn", "surface_cn"),
    [
        # Nearest-neighbour coordination of the top-layer atoms (textbook surface geometry):
        # fcc(111) 9, fcc(100) 8, fcc(110) 7 at a/√2; bcc(110) 6, bcc(100) 4 at a√3/2.
        ("Pt", "fcc111", A_PT, A_PT / np.sqrt(2), 9),
        ("Pt", "fcc100", A_PT, A_PT / np.sqrt(2), 8),
        ("Pt", "fcc110", A_PT, A_PT / np.sqrt(2), 7),
        ("Fe", "bcc110", A_FE, A_FE * np.sqrt(3) / 2, 6),
        ("Fe", "bcc100", A_FE, A_FE * np.sqrt(3) / 2, 4),
    ],
)
def test_surface_and_bulk_coordination(element, facet, a, d_nn, surface_cn):
    st, info = slab(element, facet, 7, a=a)
    cn = find_neighbours(st, d_nn * 1.01).coordination(st.n_sites)
    assert np.all(cn[info.depth == 0] == surface_cn)
    bulk_cn = 12 if facet.startswith("fcc") else 8  # fcc 12, bcc 8 (textbook)
    assert np.all(cn[info.depth == 3] == bulk_cn)


def test_matches_ase_builder_with_half_vacuum_on_each_side():
    # ase.build.fcc111 (general-purpose library) adds `vacuum` on both sides; ours is the
    # whole gap, so ASE with vacuum/2 must give the same cell and positions.
    st, _ = slab("Pt", "fcc111", 4, a=A_PT, vacuum=12.0)
    ref = fcc111("Pt", size=(1, 1, 4), a=A_PT, vacuum=6.0)
    np.testing.assert_allclose(st.cell, ref.cell[:], atol=1e-10)
    order = np.lexsort(ref.positions.T[::-1])
    ours = np.lexsort(st.positions.T[::-1])
    np.testing.assert_allclose(st.positions[ours], ref.positions[order], atol=1e-10)


def test_overlayer_is_pseudomorphic():
    # Pseudomorphic overlayer (definition): A takes the substrate's in-plane lattice and
    # continues its stacking, so in-plane positions equal those of a pure B slab.
    st, info = overlayer("Pd", "Cu", "fcc111", 5, over_layers=2, a=3.61, a_over=3.89)
    ref, _ = slab("Cu", "fcc111", 7, a=3.61)
    np.testing.assert_allclose(st.cell[:2], ref.cell[:2], atol=1e-12)
    np.testing.assert_allclose(st.positions[:, :2], ref.positions[:, :2], atol=1e-10)
    assert [st.symbols[i] for i in info.groups["overlayer"]] == ["Pd", "Pd"]
    assert set(info.layer[list(info.groups["overlayer"])]) == {0, 1}
    assert not info.symmetric
    # spacings (module docstring): A–A = d_A, A–B = mean of the bulk (111) spacings a/√3
    d_a, d_b = 3.89 / np.sqrt(3), 3.61 / np.sqrt(3)
    np.testing.assert_allclose(info.spacings[:2], [d_a, (d_a + d_b) / 2], rtol=1e-10)
    np.testing.assert_allclose(info.spacings[2:], d_b, rtol=1e-10)
    assert info.vacuum == pytest.approx(DEFAULT_VACUUM)


def test_overlayer_elastic_spacing():
    # Biaxially strained film, isotropic linear elasticity (textbook):
    # ε⊥ = −2ν/(1 − ν)·ε∥, ε∥ = a_B/a_A − 1.
    nu = 0.39
    st, info = overlayer("Pd", "Cu", "fcc100", 4, over_layers=2, a=3.61, a_over=3.89, poisson=nu)
    e_par = 3.61 / 3.89 - 1
    d_aa = 3.89 / 2 * (1 - 2 * nu / (1 - nu) * e_par)
    np.testing.assert_allclose(info.spacings[0], d_aa, rtol=1e-10)
    np.testing.assert_allclose(info.spacings[1], (d_aa + 3.61 / 2) / 2, rtol=1e-10)
    assert info.details["in_plane_strain_overlayer"] == pytest.approx(e_par)


def test_with_structure_follows_a_strain():
    from valband.structure.strain import apply_strain

    st, info = slab("Pt", "fcc111", 4, a=A_PT)
    strained = apply_strain(st, 0.02)
    new = info.with_structure(strained)
    # uniform strain scales every spacing and the gap by 1.02 (geometry)
    np.testing.assert_allclose(new.spacings, info.spacings * 1.02, rtol=1e-12)
    assert new.vacuum == pytest.approx(info.vacuum * 1.02)


@pytest.mark.parametrize(
    ("call", "match"),
    [
        (lambda: slab("Pt", "fcc112", 3), "unknown facet 'fcc112'"),
        (lambda: slab("Pt", "fcc111", 0), "layers must be an integer ≥ 1"),
        (lambda: slab("Pt", "fcc111", 3, vacuum=-1), "vacuum"),
        (lambda: slab("Pt", "fcc111", 3, size=(0, 1)), "in-plane size"),
        (lambda: slab("Pt", "fcc111", 3, a=-3.9), "lattice constant"),
        (lambda: overlayer("Cu", "Cu", "fcc111", 3), "use slab"),
        (lambda: overlayer("Pd", "Cu", "fcc111", 3, poisson=0.7), "Poisson"),
    ],
)
def test_bad_slab_input(call, match):
    with pytest.raises(StructureError, match=match):
        call()


def test_every_facet_builds_with_reference_constants():
    # ASE's reference lattice constants as defaults; each facet yields one site per layer.
    for facet, (lattice, _) in FACETS.items():
        element = {"fcc": "Cu", "bcc": "Fe", "hcp": "Co"}[lattice]
        st, info = slab(element, facet, 3)
        assert st.n_sites == 3 and info.n_layers == 3
