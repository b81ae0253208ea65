"""Linear tetrahedron DOS against ASE's ``linear_tetrahedron_integration``.

ASE (general-purpose library) takes the real-space ``cell`` and the full-mesh eigenvalues as
``eigs[i0, i1, i2, band]``; it splits each mesh cube by a Delaunay triangulation of its
corners in Cartesian space and evaluates the DOS at the grid energies. On a cubic cell all
four diagonals are equal and ASE's split uses (100)–(011) while ours uses (000)–(111); the
two give the same DOS for bands that are even in each k-component on a Γ-centred mesh
(the splits are mirror images). On the other cells below ASE's six tetrahedra coincide with
our shortest-diagonal split (asserted), so even random bands and weights must agree.
"""

from __future__ import annotations

import numpy as np
import pytest
from ase.build import bulk
from ase.dft.dos import linear_tetrahedron_integration
from scipy.spatial import Delaunay

from tests.dos.models import free_electron, mesh_fractions, reciprocal, sc_cosine, to_ase_grid
from valband.dos import cube_tetrahedra, tetrahedron_dos


def _ase_tetrahedra(cell, mesh):
    """The six tetrahedra ASE builds for one mesh cube (same construction as its source)."""
    b = (np.linalg.inv(cell) / np.asarray(mesh)).T
    corners = np.array([[i, j, k] for i in (0, 1) for j in (0, 1) for k in (0, 1)])
    simplices = corners[Delaunay(corners @ b).simplices]
    return {frozenset(map(tuple, t)) for t in simplices}


def _ours(mesh, cell):
    return {frozenset(map(tuple, t)) for t in cube_tetrahedra(mesh, reciprocal(cell))}


@pytest.mark.parametrize("mesh", [(8, 8, 8), (6, 8, 10)])
@pytest.mark.parametrize("band", ["free_electron", "cosine"])
def test_cubic_cell_symmetric_bands_match_ase(mesh, band):
    # source: ASE linear_tetrahedron_integration on the same eigenvalues (full mesh)
    cell = np.eye(3) * 2.5
    rc = reciprocal(cell)
    frac = mesh_fractions(mesh)
    if band == "free_electron":
        eig = free_electron(frac, rc)[:, None]
        energies = np.linspace(-0.5, eig.max() + 0.5, 400)
    else:
        eig = np.stack([sc_cosine(frac), 0.5 * sc_cosine(frac) + 1.0], axis=1)
        energies = np.linspace(-7.0, 7.0, 401)
    total, _ = tetrahedron_dos(mesh, rc, np.arange(len(eig)), eig, energies, degeneracy=1.0)
    ase = linear_tetrahedron_integration(cell, to_ase_grid(eig, mesh), energies)
    assert np.max(np.abs(total - ase)) <= 1e-12 * max(1.0, np.max(np.abs(ase)))


@pytest.mark.parametrize(
    "cell",
    [
        bulk("Cu", "fcc", a=3.6).cell.array,
        np.array([[3.0, 0.0, 0.0], [0.5, 3.2, 0.0], [0.3, 0.4, 4.1]]),
    ],
    ids=["fcc", "triclinic"],
)
@pytest.mark.parametrize("mesh", [(6, 6, 6), (5, 6, 7)])
def test_non_cubic_cells_match_ase_with_channels(cell, mesh, rng):
    # source: ASE linear_tetrahedron_integration (DOS and its per-corner weighted DOS)
    assert _ours(mesh, cell) == _ase_tetrahedra(cell, mesh)  # same split of the cube
    rc = reciprocal(cell)
    frac = mesh_fractions(mesh)
    c = np.cos(2 * np.pi * frac)
    eig = np.stack(
        [
            -c[:, 0] - 0.7 * c[:, 1] - 0.4 * np.cos(2 * np.pi * (frac[:, 2] + frac[:, 0])),
            c[:, 0]
            + 0.5 * np.cos(2 * np.pi * (frac[:, 1] - frac[:, 2]))
            + 0.2 * rng.random(len(frac)),
        ],
        axis=1,
    )
    proj = rng.random((len(eig), 2, 3)) - 0.1
    energies = np.linspace(-3.0, 3.0, 301)
    total, channels = tetrahedron_dos(
        mesh, rc, np.arange(len(eig)), eig, energies, proj, degeneracy=1.0
    )
    ase_total = linear_tetrahedron_integration(cell, to_ase_grid(eig, mesh), energies)
    ase_ch = linear_tetrahedron_integration(
        cell, to_ase_grid(eig, mesh), energies, weights=to_ase_grid(proj, mesh)
    )
    assert np.max(np.abs(total - ase_total)) <= 1e-12 * np.max(ase_total)
    assert np.max(np.abs(channels - ase_ch)) <= 1e-12 * np.max(np.abs(ase_ch))


def test_degeneracy_scales_dos():
    # source: common practice — spin degeneracy multiplies the per-spin DOS (ASE returns per spin)
    cell = np.eye(3) * 2.5
    mesh = (6, 6, 6)
    eig = sc_cosine(mesh_fractions(mesh))[:, None]
    energies = np.linspace(-7, 7, 141)
    rc, ir_map = reciprocal(cell), np.arange(len(eig))
    one, _ = tetrahedron_dos(mesh, rc, ir_map, eig, energies, degeneracy=1)
    two, _ = tetrahedron_dos(mesh, rc, ir_map, eig, energies)
    np.testing.assert_allclose(two, 2.0 * one, rtol=1e-14, atol=0)
