"""Sum rules of smeared and tetrahedron DOS (source: common practice — every band holds
``degeneracy`` states per cell, and projections that sum to one per state sum to the total)."""

from __future__ import annotations

import math

import numpy as np
import pytest

from tests.dos.models import mesh_fractions, reciprocal, sc_cosine
from valband.dos import smearing_count, smearing_dos, tetrahedron_count, tetrahedron_dos


def _random_states(rng, nk=50, nb=4, nch=3):
    eig = rng.uniform(-3, 3, (nk, nb))
    w = rng.random(nk)
    w /= w.sum()
    proj = rng.dirichlet(np.ones(nch), size=(nk, nb))
    return eig, w, proj


@pytest.mark.parametrize("degeneracy", [1.0, 2.0])
def test_gaussian_dos_integrates_to_states_and_channels_sum(degeneracy, rng):
    eig, w, proj = _random_states(rng)
    energies = np.arange(-5.0, 5.0 + 1e-9, 0.01)
    total, ch = smearing_dos(eig, w, energies, 0.1, "gaussian", proj, degeneracy)
    assert np.trapezoid(total, energies) == pytest.approx(degeneracy * eig.shape[1], rel=1e-10)
    assert np.max(np.abs(ch.sum(axis=0) - total)) <= 1e-12 * total.max()


def test_lorentzian_dos_integral_matches_its_count(rng):
    # the trapezoid rule on an analytic Lorentzian sum converges exponentially inside
    # (γ = 10 h); what remains is the Euler–Maclaurin end term h²/12·[D'] ≈ 1e-7 relative
    eig, w, proj = _random_states(rng)
    energies = np.arange(-5.0, 5.0 + 1e-9, 0.01)
    total, ch = smearing_dos(eig, w, energies, 0.1, "lorentzian", proj)
    inside = smearing_count(eig, w, energies[-1], 0.1, "lorentzian") - smearing_count(
        eig, w, energies[0], 0.1, "lorentzian"
    )
    assert np.trapezoid(total, energies) == pytest.approx(inside, rel=1e-6)
    assert np.max(np.abs(ch.sum(axis=0) - total)) <= 1e-12 * total.max()


@pytest.mark.parametrize("kind", ["gaussian", "lorentzian"])
def test_smearing_count_limits(kind, rng):
    eig, w, _ = _random_states(rng)
    nb = eig.shape[1]
    assert smearing_count(eig, w, math.inf, 0.2, kind) == pytest.approx(2.0 * nb, abs=1e-12)
    assert smearing_count(eig, w, -math.inf, 0.2, kind) == 0.0
    far = smearing_count(eig, w, 1e4, 0.2, kind)
    assert far == pytest.approx(2.0 * nb, rel=1e-4)
    grid = np.linspace(-6, 6, 241)
    n = smearing_count(eig, w, grid, 0.2, kind)
    assert n.shape == grid.shape and np.all(np.diff(n) >= 0)


@pytest.fixture(scope="module")
def cosine_problem():
    mesh = (10, 10, 10)
    frac = mesh_fractions(mesh)
    eig = np.stack([sc_cosine(frac), 0.3 * sc_cosine(frac) + 0.5], axis=1)
    c = np.cos(2 * np.pi * frac)
    p = 0.5 + 0.4 * c[:, 0] * c[:, 1]
    proj = np.stack([np.stack([p, 1 - p], -1), np.stack([1 - p, p], -1)], axis=1)
    return mesh, reciprocal(np.eye(3) * 2.0), np.arange(len(frac)), eig, proj


def test_tetrahedron_dos_integrates_to_states_and_channels_sum(cosine_problem):
    mesh, rc, ir_map, eig, proj = cosine_problem
    energies = np.arange(-6.5, 6.5 + 1e-9, 0.002) + 1e-4
    total, ch = tetrahedron_dos(mesh, rc, ir_map, eig, energies, proj)
    assert np.trapezoid(total, energies) == pytest.approx(2.0 * 2, rel=2e-4)
    assert np.max(np.abs(ch.sum(axis=0) - total)) <= 1e-12 * total.max()


@pytest.mark.parametrize("bloechl", [True, False])
def test_tetrahedron_count_monotone_and_complete(cosine_problem, bloechl):
    mesh, rc, ir_map, eig, _ = cosine_problem
    grid = np.linspace(-6.5, 6.5, 131)
    n = np.array([tetrahedron_count(mesh, rc, ir_map, eig, e, bloechl=bloechl) for e in grid])
    assert np.all(np.diff(n) >= -1e-13)
    assert n[0] == 0.0
    assert n[-1] == pytest.approx(4.0, abs=1e-12)
    assert tetrahedron_count(mesh, rc, ir_map, eig, math.inf, bloechl=bloechl) == pytest.approx(4.0)


def test_tetrahedron_count_is_the_integral_of_the_dos(cosine_problem):
    # source: common practice — N(E) = ∫_{-∞}^{E} D(E') dE' (the linear D is exact derivative)
    mesh, rc, ir_map, eig, _ = cosine_problem
    energies = np.arange(-6.2, -0.37, 0.001)
    total, _ = tetrahedron_dos(mesh, rc, ir_map, eig, energies)
    n = tetrahedron_count(mesh, rc, ir_map, eig, energies[-1], bloechl=False)
    assert np.trapezoid(total, energies) == pytest.approx(n, rel=1e-5)
