"""Coulomb functions, Numerov kernels and the phase/normalisation of continuum waves.

Sources
-------
- η = 0: F_l(0, ρ) = ρ j_l(ρ), G_l(0, ρ) = −ρ y_l(ρ) (Abramowitz & Stegun 14.6.4; scipy.special).
- Wronskian F′G − FG′ = 1 (A&S 14.2.4); σ_l − σ_{l−1} = arctan(η/l) (A&S 14.5.6, via 6.1.23).
- F, G solve u″ + (1 − 2η/ρ − l(l+1)/ρ²)u = 0 (A&S 14.1.1): propagating the series values with
  an independent integrator reproduces the series further out.
- Free spherical waves per unit energy: u = √(2/(πk))·kr·j_l(kr) (Bethe & Salpeter Sec. 4;
  common practice).
- Pure Coulomb potential: the regular solution is F_l itself, δ̂_l = 0 (textbook).
- First Born approximation for a Yukawa potential V = −g e^{−μr}/r: tan δ_l ≈ (g/k)·Q_l(1 +
  μ²/(2k²)), Q_l the Legendre function of the second kind (e.g. Joachain, *Quantum Collision
  Theory* (1975), Ch. 8).
- Every numba kernel agrees with its plain-numpy reference on random input (project rule).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.integrate import solve_ivp
from scipy.special import spherical_jn, spherical_yn

from valband.atom.continuum import (
    continuum_wave,
    coulomb_phase,
    coulomb_wave_functions,
    numerov_numba,
    numerov_reference,
)
from valband.errors import CalculationError

RNG = np.random.default_rng(20240611)


@pytest.mark.parametrize("l", [0, 1, 2, 3, 4])
def test_eta_zero_is_riccati_bessel(l):
    rho = np.linspace(3.0, 80.0, 301)
    F, G = coulomb_wave_functions(l, 0.0, rho)
    np.testing.assert_allclose(F, rho * spherical_jn(l, rho), atol=1e-13)
    np.testing.assert_allclose(G, -rho * spherical_yn(l, rho), atol=1e-13)


@pytest.mark.parametrize("l,eta", [(0, -1.0), (1, -3.0), (2, -0.3), (3, 2.0), (1, -8.0)])
def test_wronskian(l, eta):
    rho = np.linspace(60.0, 90.0, 7) + 10 * abs(eta) ** 2
    d = 1e-3

    def deriv(i):
        vals = [coulomb_wave_functions(l, eta, rho + s * d)[i] for s in (-2, -1, 1, 2)]
        return (vals[0] - 8 * vals[1] + 8 * vals[2] - vals[3]) / (12 * d)

    F, G = coulomb_wave_functions(l, eta, rho)
    np.testing.assert_allclose(deriv(0) * G - F * deriv(1), 1.0, atol=1e-9)  # A&S 14.2.4


def test_coulomb_phase_recurrence():
    for eta in (-5.0, -0.7, 0.0, 1.3):
        for l in range(1, 6):
            step = coulomb_phase(l, eta) - coulomb_phase(l - 1, eta)
            assert step == pytest.approx(math.atan(eta / l), abs=1e-13)  # A&S 14.5.6


@pytest.mark.parametrize("l,eta", [(0, -1.0), (2, -2.5), (1, 0.8)])
def test_series_solves_coulomb_equation(l, eta):
    rho1, rho2 = 40.0 + 6 * eta**2, 70.0 + 6 * eta**2
    for i in (0, 1):

        def rhs(x, y):
            return [y[1], (l * (l + 1) / x**2 + 2 * eta / x - 1.0) * y[0]]

        d = 1e-4
        f = [coulomb_wave_functions(l, eta, np.array([rho1 + s * d]))[i][0] for s in (-1, 0, 1)]
        y0 = [f[1], (f[2] - f[0]) / (2 * d)]
        sol = solve_ivp(rhs, (rho1, rho2), y0, rtol=1e-11, atol=1e-12, method="DOP853")
        assert sol.y[0, -1] == pytest.approx(
            coulomb_wave_functions(l, eta, np.array([rho2]))[i][0], abs=1e-6
        )


def test_series_refuses_too_small_rho():
    with pytest.raises(CalculationError, match="larger rho"):
        coulomb_wave_functions(0, -20.0, np.array([2.0]))


@pytest.mark.parametrize("n", [3, 50, 2001])
def test_numerov_numba_matches_reference_on_random_input(n):
    f = RNG.normal(size=n)
    h = 0.03
    a, b = RNG.normal(size=2)
    ref = numerov_reference(f, h, a, b)
    got = numerov_numba(f, h, a, b)
    np.testing.assert_allclose(got, ref, rtol=1e-12, atol=1e-12 * np.max(np.abs(ref)))


def test_numerov_solves_harmonic_equation():
    # φ'' = −φ: φ = sin x (textbook); Numerov global error O(h⁴)
    h = 0.01
    x = h * np.arange(2000)
    phi = numerov_numba(-np.ones_like(x), h, 0.0, math.sin(h))
    np.testing.assert_allclose(phi, np.sin(x), atol=1e-9)


def test_continuum_numba_and_numpy_kernels_agree():
    r = np.geomspace(1e-5, 40.0, 800)
    v = -(1.0 + 5.0 * np.exp(-r)) / r
    a = continuum_wave(r, v, 1, 2.0, kernel="numba")
    b = continuum_wave(r, v, 1, 2.0, kernel="numpy")
    np.testing.assert_allclose(a.u, b.u, rtol=0, atol=1e-12)
    assert a.phase_short_range_rad == pytest.approx(b.phase_short_range_rad, abs=1e-12)


@pytest.mark.parametrize("l", [0, 1, 3])
@pytest.mark.parametrize("energy", [0.05, 2.0, 300.0])
def test_free_wave_is_energy_normalised_riccati_bessel(l, energy):
    r = np.geomspace(1e-6, 30.0, 600)
    cw = continuum_wave(r, np.zeros_like(r), l, energy, Z_ion=0.0)
    k = math.sqrt(2 * energy)
    expect = math.sqrt(2 / (math.pi * k)) * k * cw.r_bohr * spherical_jn(l, k * cw.r_bohr)
    np.testing.assert_allclose(cw.u, expect, atol=2e-5 * math.sqrt(2 / (math.pi * k)))
    assert math.sin(cw.phase_short_range_rad) == pytest.approx(0.0, abs=2e-5)
    assert cw.phase_coulomb_rad == 0.0
    # the grid resolves the wavelength everywhere (METHODS.md: keV pitfall)
    assert np.max(np.diff(cw.r_bohr)) <= 2 * math.pi / k / 40 * 1.001


@pytest.mark.parametrize("l", [0, 1, 2])
@pytest.mark.parametrize("energy", [0.3, 3.0, 40.0, 367.0])
def test_pure_coulomb_regular_solution_is_F(l, energy):
    r = np.geomspace(1e-6, 40.0, 900)
    cw = continuum_wave(r, -1.0 / r, l, energy, Z_ion=1.0)
    assert math.sin(cw.phase_short_range_rad) == pytest.approx(0.0, abs=2e-5)
    k = cw.k_bohr_inv
    far = cw.r_bohr >= cw.r_match_bohr - 0.45 * 2 * math.pi / k  # fit window and beyond
    F, _ = coulomb_wave_functions(l, -1.0 / k, k * cw.r_bohr[far])
    sign = math.cos(cw.phase_short_range_rad)
    np.testing.assert_allclose(cw.u[far], sign * math.sqrt(2 / (math.pi * k)) * F, atol=1e-4)


def _q_legendre(l, x):
    q0 = 0.5 * math.log((x + 1) / (x - 1))
    return q0 if l == 0 else x * q0 - 1.0


@pytest.mark.parametrize("l", [0, 1])
@pytest.mark.parametrize("k", [0.7, 2.0, 6.0])
def test_weak_yukawa_phase_matches_born(l, k):
    g, mu = 1e-3, 1.0
    r = np.geomspace(1e-6, 45.0, 1200)
    v = -g * np.exp(-mu * r) / r
    born = (g / k) * _q_legendre(l, 1 + mu**2 / (2 * k**2))
    # first Born approximation (Joachain Ch. 8); second order is O(g) relative. A fine grid
    # isolates the physics; the default grid (40 points per wavelength) has a Numerov phase
    # error of a few 1e-5 rad at k = 6 bohr^-1 (17 bohr integrated).
    fine = continuum_wave(r, v, l, 0.5 * k * k, Z_ion=0.0, points_per_wavelength=160)
    assert math.tan(fine.phase_short_range_rad) == pytest.approx(born, rel=5e-3)
    assert fine.phase_short_range_rad > 0  # attractive potential → positive phase shift
    default = continuum_wave(r, v, l, 0.5 * k * k, Z_ion=0.0)
    assert default.phase_short_range_rad == pytest.approx(born, abs=6e-5)
