"""DOS of bands with closed-form densities of states (textbook dispersions)."""

from __future__ import annotations

import math

import numpy as np
import pytest

from tests.dos.models import mesh_fractions, reciprocal, sc_cosine
from valband.dos import smearing_count, smearing_dos, tetrahedron_count, tetrahedron_dos


def test_simple_cubic_cosine_band_edges_and_norm():
    # source: textbook (Ashcroft & Mermin ch. 9 style tight binding) — ε = −2t Σ cos k_a has
    # band edges ±6t and holds one state per spin
    t = 0.8
    mesh = (16, 16, 16)
    eig = sc_cosine(mesh_fractions(mesh), t)[:, None]
    rc = reciprocal(np.eye(3) * 2.5)
    energies = np.linspace(-6 * t - 0.5123, 6 * t + 0.5123, 5001)  # symmetric, off-node
    total, _ = tetrahedron_dos(mesh, rc, np.arange(len(eig)), eig, energies, degeneracy=1.0)
    outside = (energies < -6 * t) | (energies > 6 * t)
    assert np.all(total[outside] == 0.0)
    assert np.all(total[(energies > -6 * t + 0.05) & (energies < 6 * t - 0.05)] > 0)
    assert np.trapezoid(total, energies) == pytest.approx(1.0, rel=1e-5)
    # particle–hole symmetry of the bipartite lattice: D(E) = D(−E) (even mesh)
    np.testing.assert_allclose(total, total[::-1], atol=1e-9 * total.max())


@pytest.fixture(scope="module")
def chain():
    """ε = −2t cos k_x, independent of k_y and k_z: a 1D chain on a 400 × 1 × 1 mesh."""
    t = 1.0
    mesh = (400, 1, 1)
    eig = (-2 * t * np.cos(2 * np.pi * mesh_fractions(mesh)[:, 0]))[:, None]
    return t, mesh, reciprocal(np.eye(3) * 3.0), np.arange(400), eig


def test_chain_dos_and_count_match_closed_form(chain):
    # source: textbook 1D tight binding — D(E) = 1/(π √(4t² − E²)), N(E) = arccos(−E/2t)/π.
    # Linear interpolation along a chain makes the DOS a sum of boxcars (one per segment),
    # so point values scatter by ~1 % around the curve; averages over 0.1 eV are close.
    t, mesh, rc, ir_map, eig = chain
    energies = np.linspace(-1.6, 1.6, 3201)
    total, _ = tetrahedron_dos(mesh, rc, ir_map, eig, energies, degeneracy=1.0)
    exact = 1.0 / (np.pi * np.sqrt(4 * t**2 - energies**2))
    np.testing.assert_allclose(total, exact, rtol=3e-2)
    blocks = lambda y: y[:-1].reshape(32, 100).mean(axis=1)  # noqa: E731
    np.testing.assert_allclose(blocks(total), blocks(exact), rtol=2e-3)
    for e in (-1.9, -0.5, 0.0, 1.2):
        n = tetrahedron_count(mesh, rc, ir_map, eig, e, degeneracy=1.0)
        assert n == pytest.approx(math.acos(-e / (2 * t)) / math.pi, abs=2e-4)


@pytest.mark.parametrize("kind", ["gaussian", "lorentzian"])
def test_single_level_gives_the_line_shape(kind):
    # source: textbook line shapes — Gaussian of standard deviation σ (FWHM 2√(2 ln 2) σ) and
    # Lorentzian of half width γ (FWHM 2γ); their integrals ½ erfc and ½ + arctan/π
    e0, width = 0.37, 0.15
    eig = np.array([[e0]])
    w = np.array([1.0])
    energies = np.linspace(-2, 2, 4001)
    total, _ = smearing_dos(eig, w, energies, width, kind, degeneracy=2.0)
    x = energies - e0
    if kind == "gaussian":
        exact = 2.0 * np.exp(-0.5 * (x / width) ** 2) / (math.sqrt(2 * math.pi) * width)
        fwhm = 2 * math.sqrt(2 * math.log(2)) * width
        count = 2.0 * 0.5 * math.erfc(-(0.1) / (math.sqrt(2) * width))
    else:
        exact = 2.0 * (width / math.pi) / (x**2 + width**2)
        fwhm = 2 * width
        count = 2.0 * (0.5 + math.atan(0.1 / width) / math.pi)
    # Gaussians are cut at ±8σ (documented): beyond that the exact values are < 1e-14·peak
    np.testing.assert_allclose(total, exact, rtol=1e-12, atol=1e-13 * exact.max())
    above = energies[total >= 0.5 * total.max()]
    assert above[-1] - above[0] == pytest.approx(fwhm, abs=2 * (energies[1] - energies[0]))
    assert smearing_count(eig, w, e0 + 0.1, width, kind) == pytest.approx(count, rel=1e-13)
