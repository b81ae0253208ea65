"""Tetrahedron DOS from irreducible points + ir_map equals the full-mesh one.

source: spglib ``get_ir_reciprocal_mesh`` (general-purpose library) for the reduction of a
Γ-centred mesh of a simple-cubic cell; its grid order is i0 + m0·(i1 + m1·i2).
"""

from __future__ import annotations

import numpy as np
import pytest
import spglib

from tests.dos.models import mesh_fractions, reciprocal
from valband.dos import tetrahedron_count, tetrahedron_dos

spglib.error.OLD_ERROR_HANDLING = False


def _bands(frac):
    """Two O_h-symmetric bands and O_h-invariant projections (for channel unfolding)."""
    c = np.cos(2 * np.pi * frac)
    c2 = np.cos(4 * np.pi * frac)
    e1 = -(c.sum(axis=1)) + 0.3 * c.prod(axis=1)
    pairs = c[:, 0] * c[:, 1] + c[:, 1] * c[:, 2] + c[:, 0] * c[:, 2]
    e2 = 1.5 + 0.4 * c2.sum(axis=1) - 0.2 * pairs
    eig = np.stack([e1, e2], axis=1)
    p1 = 0.5 + 0.5 * c.prod(axis=1) ** 2
    proj = np.stack([np.stack([p1, 1 - p1], -1), np.stack([1 - p1, p1], -1)], axis=1)
    return eig, proj


@pytest.mark.parametrize("mesh", [(8, 8, 8), (9, 9, 9)])
def test_irreducible_unfolding_equals_full_mesh(mesh):
    cell = np.eye(3) * 2.7
    mapping, grid = spglib.get_ir_reciprocal_mesh(
        mesh, (cell, [[0.0, 0.0, 0.0]], [1]), is_shift=[0, 0, 0]
    )
    m = np.asarray(mesh)
    addr = np.mod(grid, m)
    # spglib's index order is the documented one
    index = addr[:, 0] + m[0] * (addr[:, 1] + m[1] * addr[:, 2])
    assert np.array_equal(index, np.arange(len(grid)))
    reps, ir_map = np.unique(mapping, return_inverse=True)
    assert len(reps) < len(mapping) / 10  # really reduced (48 operations)
    frac_ir = grid[reps] / m
    eig_ir, proj_ir = _bands(frac_ir)
    eig_full, proj_full = _bands(mesh_fractions(mesh))
    rc = reciprocal(cell)
    # grid offset from the "round" band energies of high-symmetry points: at a degenerate
    # corner energy the linear DOS jumps, and rounding would decide which side a node is on
    energies = np.linspace(-4.0123, 4.0123, 321)
    t_ir, c_ir = tetrahedron_dos(mesh, rc, ir_map, eig_ir, energies, proj_ir)
    t_full, c_full = tetrahedron_dos(
        mesh, rc, np.arange(len(eig_full)), eig_full, energies, proj_full
    )
    assert np.max(np.abs(t_ir - t_full)) <= 1e-11 * np.max(t_full)
    assert np.max(np.abs(c_ir - c_full)) <= 1e-11 * np.max(t_full)
    for e in (-1.0, 0.3, 1.7):
        assert tetrahedron_count(mesh, rc, ir_map, eig_ir, e) == pytest.approx(
            tetrahedron_count(mesh, rc, np.arange(len(eig_full)), eig_full, e), abs=1e-11
        )
