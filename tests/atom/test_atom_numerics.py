"""Kernels, quadrature, Poisson solve and exchange–correlation.

sources
- numba shooting kernel vs its plain Python/numpy reference on random input (common practice:
  two implementations of the same scheme agree to rounding).
- Simpson and running integrals of e^{−r}, r²e^{−r}: closed forms (textbook).
- Hartree potential of the hydrogen 1s density ρ = e^{−2r}/π:
  V_H = 1/r − (1 + 1/r) e^{−2r} (textbook).
- Slater exchange ε_x = −(3/4)(3/π)^{1/3} ρ^{1/3} (textbook); v = d(ρε)/dρ (definition).
- VWN5 and PW92 are two fits to the same Ceperley–Alder data and agree within 1 mHa for
  0.5 ≤ r_s ≤ 20; ε_c(r_s = 1, 2, 5) ≈ −0.0600, −0.0448, −0.0281 Ha (from memory, 1 mHa).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from valband.atom.grid import hartree_potential, make_grid
from valband.atom.radial import ALPHA, shoot_numba, shoot_reference
from valband.atom.xc import lda_xc, pw92_correlation, slater_exchange, vwn_correlation
from valband.errors import SettingsError


@pytest.mark.parametrize("seed", range(6))
def test_atom_shoot_kernel_matches_reference(seed):
    rng = np.random.default_rng(seed)
    z = int(rng.integers(1, 93))
    grid = make_grid(z, h=0.01)
    r = grid.r
    v = (
        -z / r * np.exp(-r * rng.uniform(0.2, 2.0))
        - rng.uniform(0.1, 1.0) / r * (1 - np.exp(-r))
        + 0.1 * rng.normal() * np.exp(-((r - rng.uniform(0, 5)) ** 2))
    )
    ell = int(rng.integers(0, 4))
    alpha2 = ALPHA**2 if seed % 2 else 0.0
    eps = -rng.uniform(0.05, 0.5) * z * z / (ell + 1) ** 2
    a = shoot_numba(r, v, grid.weights, eps, ell, alpha2, grid.h)
    b = shoot_reference(r, v, grid.weights, eps, ell, alpha2, grid.h)
    assert a[0] == b[0] and a[3] == b[3] and a[4] == b[4]  # nodes, matching and last index
    assert a[1] == pytest.approx(b[1], rel=1e-10, abs=1e-12)
    assert a[2] == pytest.approx(b[2], rel=1e-10)
    for x, y in ((a[5], b[5]), (a[6], b[6])):
        assert np.max(np.abs(x - y)) <= 1e-10 * np.max(np.abs(y))


def test_atom_grid_quadrature():
    grid = make_grid(1.0)
    assert grid.n % 2 == 1 and grid.r_max >= 60.0
    assert grid.r[0] == pytest.approx(1e-6)
    r = grid.r
    assert grid.integrate(r * r * np.exp(-r)) == pytest.approx(2.0, abs=1e-11)
    run = grid.cumulative(np.exp(-r))
    assert np.max(np.abs(run - (np.exp(-r[0]) - np.exp(-r)))) < 1e-10


def test_atom_hartree_potential_of_hydrogen_density():
    grid = make_grid(1.0)
    r = grid.r
    rho = np.exp(-2 * r) / math.pi
    exact = 1 / r - (1 + 1 / r) * np.exp(-2 * r)
    assert np.max(np.abs(hartree_potential(grid, rho) - exact)) < 1e-10


def test_atom_exchange_closed_form():
    eps, v = slater_exchange([1.0, 8.0, 0.0])
    cx = -0.75 * (3 / math.pi) ** (1 / 3)
    assert eps == pytest.approx([cx, 2 * cx, 0.0], rel=1e-14)
    assert v == pytest.approx([4 / 3 * cx, 8 / 3 * cx, 0.0], rel=1e-14)


@pytest.mark.parametrize("corr", ["vwn", "pw92"])
def test_atom_xc_potential_is_derivative(corr):
    rho = np.logspace(-6, 4, 41)
    eps, v = lda_xc(rho, corr)
    d = 1e-6 * rho
    ep, _ = lda_xc(rho + d, corr)
    em, _ = lda_xc(rho - d, corr)
    numeric = ((rho + d) * ep - (rho - d) * em) / (2 * d)
    assert np.max(np.abs(numeric - v) / np.abs(v)) < 1e-7


def test_atom_vwn_and_pw92_agree():
    rs = np.array([0.5, 1.0, 2.0, 5.0, 10.0, 20.0])
    rho = 3 / (4 * math.pi * rs**3)
    e_vwn, v_vwn = vwn_correlation(rho)
    e_pw, v_pw = pw92_correlation(rho)
    assert np.max(np.abs(e_vwn - e_pw)) < 1e-3
    assert np.max(np.abs(v_vwn - v_pw)) < 1e-3
    assert e_vwn[1:4] == pytest.approx([-0.0600, -0.0448, -0.0281], abs=1e-3)


def test_atom_xc_rejects_unknown_correlation():
    with pytest.raises(SettingsError, match="vwn"):
        lda_xc([1.0], "pbe")


@pytest.mark.slow
def test_atom_default_grid_converged():
    # halving h (and moving r_min, r_max) changes the Ag LDA energy by far less than 1e-6 Ha
    from valband.atom import solve_atom

    base = solve_atom("Ag")
    for kw in ({"h": 0.0025}, {"r_min": 1e-7 / 47}, {"r_max": 80.0}):
        other = solve_atom("Ag", grid=make_grid(47, **kw))
        assert abs(other.total_energy - base.total_energy) < 2e-7, kw
        for k, e in base.eigenvalues.items():
            assert abs(other.eigenvalues[k] - e) < 2e-8, (kw, k)


def test_atom_grid_rejects_bad_settings():
    with pytest.raises(SettingsError, match="h"):
        make_grid(1, h=0.5)
    with pytest.raises(SettingsError, match="r_max"):
        make_grid(1, r_max=-1.0)
    with pytest.raises(SettingsError, match="nuclear charge"):
        make_grid(0)
