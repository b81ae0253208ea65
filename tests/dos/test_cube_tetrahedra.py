"""Geometry of the six tetrahedra of a mesh cube (Blöchl, Jepsen, Andersen 1994, Sec. III)."""

from __future__ import annotations

import itertools

import numpy as np
import pytest
from ase.build import bulk

from tests.dos.models import reciprocal
from valband.dos import cube_tetrahedra

_CELLS = {
    "cubic": np.eye(3) * 3.0,
    "fcc": bulk("Cu", "fcc", a=3.6).cell.array,
    "bcc": bulk("Fe", "bcc", a=2.87).cell.array,
    "hcp": bulk("Mg", "hcp", a=3.2, c=5.2).cell.array,
}


def _diag_length(a, b, rc, mesh):
    return np.linalg.norm((np.asarray(b) - np.asarray(a)) @ (rc / np.asarray(mesh)[:, None]))


@pytest.mark.parametrize("name", list(_CELLS))
@pytest.mark.parametrize("mesh", [(8, 8, 8), (4, 6, 9)])
def test_six_tetrahedra_share_the_shortest_diagonal_and_tile_the_cube(name, mesh, rng):
    # source: Blöchl et al., Phys. Rev. B 49, 16223 (1994), Sec. III — six tetrahedra of
    # volume 1/6 around the shortest main diagonal fill the cube
    rc = reciprocal(_CELLS[name])
    tets = cube_tetrahedra(mesh, rc)
    assert tets.shape == (6, 4, 3)
    start, end = tets[0, 0], tets[0, 3]
    assert np.all(np.abs(end - start) == 1)  # a main diagonal
    for t in tets:
        assert {tuple(t[0]), tuple(t[3])} == {tuple(start), tuple(end)}
    corners = list(itertools.product((0, 1), repeat=3))
    diagonals = [(c, tuple(1 - np.array(c))) for c in corners]
    shortest = min(_diag_length(a, b, rc, mesh) for a, b in diagonals)
    assert _diag_length(start, end, rc, mesh) <= shortest * (1 + 1e-9)
    # volumes 1/6 each, and random points of the cube fall into exactly one tetrahedron
    pts = rng.random((2000, 3))
    inside = np.zeros(len(pts), dtype=int)
    for t in tets.astype(float):
        m = (t[1:] - t[0]).T
        assert abs(np.linalg.det(m)) == pytest.approx(1.0, abs=1e-12)  # 6 × (1/6)
        lam = np.linalg.solve(m, (pts - t[0]).T).T
        inside += np.all(lam >= 0, axis=1) & (lam.sum(axis=1) <= 1)
    assert np.all(inside == 1)
