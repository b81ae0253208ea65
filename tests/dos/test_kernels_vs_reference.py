"""Every numba kernel agrees with its plain-numpy reference on random input.

source: common practice — two independent implementations of the same formula (the
tetrahedron references compute the corner weights by a separate geometric route).
"""

from __future__ import annotations

import numpy as np
import pytest

from tests.dos.models import reciprocal
from valband.dos import cube_tetrahedra
from valband.dos._smearing_kernels import smear_numba, smear_reference
from valband.dos._tetra_kernels import (
    tetra_count_reference,
    tetra_dos_numba,
    tetra_dos_reference,
    tetra_integrate_numba,
    tetra_integrate_reference,
)


@pytest.mark.parametrize("kind", ["gaussian", "lorentzian"])
@pytest.mark.parametrize("width", [0.03, 0.4])
def test_smearing_kernel_matches_reference(kind, width, rng):
    nk, nb, nch = 37, 5, 4
    eig = rng.uniform(-4, 4, (nk, nb))
    w = rng.random(nk)
    w /= w.sum()
    proj = rng.random((nk, nb, nch)) - 0.05
    energies = np.linspace(-6, 6, 1201)
    tot, ch = smear_numba(eig, w, energies, width, kind, proj)
    rtot, rch = smear_reference(eig, w, energies, width, kind, proj)
    scale = np.max(rtot)
    assert np.max(np.abs(tot - rtot)) <= 1e-12 * scale
    assert np.max(np.abs(ch - rch)) <= 1e-12 * scale
    tot2, none = smear_numba(eig, w, energies, width, kind, None)
    assert none is None
    assert np.max(np.abs(tot2 - rtot)) <= 1e-12 * scale


def _random_mesh_problem(rng, mesh, nir, nb, nch):
    nfull = int(np.prod(mesh))
    ir_map = rng.integers(0, nir, nfull)
    ir_map[:nir] = np.arange(nir)  # every row used
    eig = rng.uniform(-2, 2, (nir, nb))
    eig[0, 0] = eig[1, 0]  # a degenerate pair of corners
    proj = rng.random((nir, nb, nch)) - 0.1
    cell = np.array([[2.9, 0.1, 0.0], [0.4, 3.1, 0.2], [0.0, 0.3, 3.6]])
    rc = reciprocal(cell)
    return ir_map, eig, proj, rc


@pytest.mark.parametrize("mesh", [(3, 4, 5), (4, 4, 4)])
def test_tetrahedron_dos_kernel_matches_reference(mesh, rng):
    ir_map, eig, proj, rc = _random_mesh_problem(rng, mesh, 17, 3, 4)
    tets = cube_tetrahedra(mesh, rc)
    energies = np.linspace(-2.5, 2.5, 257)
    tot, ch = tetra_dos_numba(np.array(mesh), tets, ir_map, eig, energies, proj)
    rtot, rch = tetra_dos_reference(np.array(mesh), tets, ir_map, eig, energies, proj)
    scale = np.max(rtot)
    assert np.max(np.abs(tot - rtot)) <= 1e-11 * scale
    assert np.max(np.abs(ch - rch)) <= 1e-11 * scale
    tot2, none = tetra_dos_numba(np.array(mesh), tets, ir_map, eig, energies, None)
    assert none is None
    assert np.max(np.abs(tot2 - rtot)) <= 1e-11 * scale


@pytest.mark.parametrize("bloechl", [False, True])
@pytest.mark.parametrize("energy", [-2.5, -0.7, 0.1, 1.3, 2.5])
def test_tetrahedron_integrate_kernel_matches_reference(bloechl, energy, rng):
    mesh = (3, 4, 5)
    ir_map, eig, _, rc = _random_mesh_problem(rng, mesh, 17, 3, 1)
    values = rng.normal(size=eig.shape)
    tets = cube_tetrahedra(mesh, rc)
    for vals in (values, np.ones_like(eig)):
        got = tetra_integrate_numba(np.array(mesh), tets, ir_map, eig, vals, energy, bloechl)
        ref = tetra_integrate_reference(np.array(mesh), tets, ir_map, eig, vals, energy, bloechl)
        assert got == pytest.approx(ref, rel=1e-11, abs=1e-12)
    closed = tetra_count_reference(np.array(mesh), tets, ir_map, eig, energy)
    ones = np.ones_like(eig)
    got = tetra_integrate_numba(np.array(mesh), tets, ir_map, eig, ones, energy, bloechl)
    assert got == pytest.approx(closed, rel=1e-11, abs=1e-12)
