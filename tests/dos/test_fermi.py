"""Fermi level from integrated DOS functions."""

from __future__ import annotations

import math

import numpy as np
import pytest

from tests.dos.models import mesh_fractions, reciprocal, sc_cosine
from valband.dos import find_fermi_level, smearing_count, tetrahedron_count
from valband.errors import CalculationError, SettingsError


@pytest.fixture(scope="module")
def cosine():
    mesh = (12, 12, 12)
    frac = mesh_fractions(mesh)
    eig = np.stack([sc_cosine(frac), sc_cosine(frac, 0.5) + 0.3], axis=1)
    return mesh, reciprocal(np.eye(3) * 2.0), np.arange(len(frac)), eig


def test_half_filling_of_symmetric_band_is_zero(cosine):
    # source: symmetry — D(E) = D(−E) for the bipartite sc cosine band (even mesh), so half
    # filling puts E_F at the band centre
    mesh, rc, ir_map, eig = cosine
    one = np.ascontiguousarray(eig[:, :1])
    ef_t = find_fermi_level(
        lambda e: tetrahedron_count(mesh, rc, ir_map, one, e), 1.0, -7, 7, 2.0
    )
    assert ef_t == pytest.approx(0.0, abs=1e-8)
    w = np.full(len(one), 1.0 / len(one))
    ef_s = find_fermi_level(lambda e: smearing_count(one, w, e, 0.1), 1.0, -7, 7, 2.0)
    assert ef_s == pytest.approx(0.0, abs=1e-8)


@pytest.mark.parametrize("n", [0.3, 1.7, 2.0, 3.1, 3.99])
def test_count_at_fermi_level_equals_electrons(cosine, n):
    # source: definition of the Fermi level (common practice)
    mesh, rc, ir_map, eig = cosine
    count = lambda e: tetrahedron_count(mesh, rc, ir_map, eig, e)  # noqa: E731
    ef = find_fermi_level(count, n, -8, 8, 4.0)
    assert count(ef) == pytest.approx(n, abs=1e-8)
    w = np.full(len(eig), 1.0 / len(eig))
    scount = lambda e: smearing_count(eig, w, e, 0.05, "lorentzian")  # noqa: E731
    ef = find_fermi_level(scount, n, -1e3, 1e3, 4.0)
    assert scount(ef) == pytest.approx(n, abs=1e-8)


def test_gap_gives_midpoint_and_filled_edges(cosine):
    # source: common practice — with linear tetrahedra the bands end at their extreme mesh
    # energies; a Fermi level in a gap is placed at the gap centre (documented convention).
    # The plateau ends are found where N leaves n by δ = 1e-12·4; as N − n ∝ (E − edge)³
    # near a 3D band edge, that locates each end to ~(δ/c)^(1/3) ≈ 1e-4 eV.
    mesh, rc, ir_map, eig = cosine
    bands = np.stack([0.2 * eig[:, 0] - 3.0, 0.1 * eig[:, 0] + 2.0], axis=1)
    count = lambda e: tetrahedron_count(mesh, rc, ir_map, bands, e)  # noqa: E731
    gap_mid = 0.5 * (bands[:, 0].max() + bands[:, 1].min())
    assert find_fermi_level(count, 2.0, -10, 10, 4.0, tol=1e-11) == pytest.approx(gap_mid, abs=2e-4)
    assert find_fermi_level(count, 0.0, -10, 10, 4.0, tol=1e-11) == pytest.approx(
        bands.min(), abs=2e-4
    )
    assert find_fermi_level(count, 4.0, -10, 10, 4.0, tol=1e-11) == pytest.approx(
        bands.max(), abs=2e-4
    )


@pytest.mark.parametrize("n", [-0.5, math.nan, 4.5])
def test_impossible_electron_count_raises(n):
    with pytest.raises(SettingsError, match=r"n_electrons.*accepted range is \[0, 4\]"):
        find_fermi_level(lambda e: 0.0, n, -1, 1, 4.0)


def test_bracket_that_misses_raises():
    with pytest.raises(CalculationError, match="not bracketed"):
        find_fermi_level(lambda e: 2 * (math.atan(e) / math.pi + 0.5), 1.0, 1.0, 2.0, 2.0)
    with pytest.raises(SettingsError, match="lower < upper"):
        find_fermi_level(lambda e: e, 1.0, 2.0, 1.0, 2.0)
