"""Broadening kernels: Fermi–Dirac edge, area conservation, Gaussian widths, numba vs numpy."""

from __future__ import annotations

import math

import numpy as np
import pytest

from valband.conventions import KB_EV
from valband.errors import SettingsError
from valband.spectra.broadening import (
    FWHM_PER_SIGMA,
    fermi_dirac,
    gaussian_broaden,
    gaussian_reference,
    lifetime_width,
    lorentzian_broaden,
    lorentzian_numba,
    lorentzian_reference,
)


def _fwhm(x, y):
    """Full width at half maximum of a single peak by linear interpolation."""
    half = y.max() / 2
    above = np.flatnonzero(y >= half)
    i0, i1 = above[0], above[-1]
    left = np.interp(half, [y[i0 - 1], y[i0]], [x[i0 - 1], x[i0]])
    right = np.interp(half, [y[i1 + 1], y[i1]], [x[i1 + 1], x[i1]])
    return right - left


@pytest.mark.parametrize("temperature", [30.0, 300.0, 900.0])
def test_fermi_edge_10_90_width(temperature):
    # Exact property of f = 1/(1+e^{x/kT}): f = 0.9 at x = −kT ln 9, f = 0.1 at x = +kT ln 9,
    # so the 90 %–10 % width is 2 ln 9 k_B T (textbook, Fermi–Dirac statistics).
    e = np.linspace(-1.0, 1.0, 400001)
    f = fermi_dirac(e, temperature)
    x90 = np.interp(-0.9, -f, e)
    x10 = np.interp(-0.1, -f, e)
    assert x10 - x90 == pytest.approx(2 * math.log(9) * KB_EV * temperature, rel=1e-6)


def test_fermi_zero_temperature_is_step():
    # T → 0 limit of Fermi–Dirac: a step, ½ at E_F (textbook).
    e = np.array([-1.0, -1e-9, 0.0, 1e-9, 1.0])
    assert fermi_dirac(e, 0.0).tolist() == [1.0, 1.0, 0.5, 0.0, 0.0]
    np.testing.assert_allclose(fermi_dirac(e[[0, -1]], 1e-3), [1.0, 0.0])


def test_gaussian_fwhm_of_delta():
    # A broadened delta is the kernel itself: its FWHM must be the requested one (definition
    # of the FWHM; bin integration adds h²/12 to the variance, negligible here).
    e = np.arange(-5.0, 5.0 + 1e-9, 0.005)
    y = np.zeros_like(e)
    y[e.size // 2] = 1.0 / 0.005
    for fwhm in (0.1, 0.35, 0.8):
        out = gaussian_broaden(e, y, fwhm)
        assert _fwhm(e, out) == pytest.approx(fwhm, rel=2e-3)
        # and it is a Gaussian: variance (FWHM/2.3548)² (textbook)
        var = np.sum(out * e**2) / np.sum(out)
        assert math.sqrt(var) == pytest.approx(fwhm / FWHM_PER_SIGMA, rel=2e-3)


def test_gaussian_widths_add_in_quadrature():
    # Convolution of Gaussians: variances add, so FWHMs add in quadrature (textbook).
    e = np.arange(-6.0, 6.0 + 1e-9, 0.005)
    y = np.zeros_like(e)
    y[e.size // 2] = 1.0
    two = gaussian_broaden(e, gaussian_broaden(e, y, 0.3), 0.4)
    assert _fwhm(e, two) == pytest.approx(0.5, rel=2e-3)


def test_area_conserved_gaussian_and_lorentzian():
    # Convolution with a normalised kernel conserves the integral (textbook).
    rng = np.random.default_rng(3)
    e = np.arange(-10.0, 10.0 + 1e-9, 0.01)
    y = np.where(np.abs(e) < 4, rng.random(e.size), 0.0)
    assert gaussian_broaden(e, y, 0.5).sum() == pytest.approx(y.sum(), rel=1e-12)
    # with the area kept on the grid, also for long Lorentzian tails
    assert lorentzian_broaden(e, y, 0.05, 0.05).sum() == pytest.approx(y.sum(), rel=1e-12)
    # without renormalisation a Lorentzian of HWHM Γ loses ≈ (2/π)Γ/D beyond distance D on each
    # side (integral of the Lorentzian tail, textbook): Γ = 0.05, D ≈ 6–14 eV → ~0.4 %
    lost = 1 - lorentzian_broaden(e, y, 0.05, 0.0, keep_area=False).sum() / y.sum()
    assert 5e-4 < lost < 1e-2


def test_lorentzian_half_width():
    # A Lorentzian of constant HWHM Γ applied to a delta has FWHM 2Γ (definition).
    e = np.arange(-8.0, 8.0 + 1e-9, 0.002)
    y = np.zeros_like(e)
    y[e.size // 2] = 1.0
    out = lorentzian_broaden(e, y, 0.1, 0.0)
    assert _fwhm(e, out) == pytest.approx(0.2, rel=2e-3)


def test_lifetime_width_law():
    # Γ(E) = Γ0 + a E² by definition (Fermi-liquid hole lifetime, common practice).
    np.testing.assert_allclose(lifetime_width([-2.0, 0.0, 1.0], 0.03, 0.05), [0.23, 0.03, 0.08])


def test_zero_widths_are_identity():
    e = np.linspace(-1, 1, 11)
    y = np.arange(11.0)
    np.testing.assert_array_equal(gaussian_broaden(e, y, 0.0), y)
    np.testing.assert_array_equal(lorentzian_broaden(e, y, 0.0, 0.0), y)


@pytest.mark.parametrize("seed", [0, 1, 2])
def test_lorentzian_numba_vs_reference(seed):
    # Rule of the project: every numba kernel agrees with its numpy reference on random input.
    rng = np.random.default_rng(seed)
    n = int(rng.integers(20, 300))
    e = rng.uniform(-5, 5) + np.arange(n) * rng.uniform(0.005, 0.05)
    y = rng.random((int(rng.integers(1, 5)), n))
    y[:, rng.random(n) < 0.2] = 0.0
    g = rng.uniform(0, 0.5, n)
    g[rng.random(n) < 0.1] = 0.0
    g[rng.random(n) < 0.1] = 1e-4
    for keep in (True, False):
        ref = lorentzian_reference(e, y, g, keep)
        np.testing.assert_allclose(lorentzian_numba(e, y, g, keep), ref, rtol=1e-12, atol=1e-14)
        j0 = int(rng.integers(0, n - 1))
        j1 = int(rng.integers(j0 + 1, n + 1))
        np.testing.assert_allclose(lorentzian_numba(e, y, g, keep, out_range=(j0, j1)),
                                   ref[:, j0:j1], rtol=1e-12, atol=1e-14)


@pytest.mark.parametrize("seed", [0, 1])
def test_gaussian_fft_vs_direct(seed):
    rng = np.random.default_rng(seed)
    n = int(rng.integers(50, 400))
    e = np.arange(n) * 0.01
    y = rng.random((2, n))
    for keep in (True, False):
        np.testing.assert_allclose(gaussian_broaden(e, y, 0.2, keep),
                                   gaussian_reference(e, y, 0.2, keep), rtol=1e-10, atol=1e-13)


@pytest.mark.parametrize("call, word", [
    (lambda: fermi_dirac([0.0], -1.0), "temperature"),
    (lambda: fermi_dirac([np.nan], 300.0), "NaN"),
    (lambda: gaussian_broaden(np.linspace(0, 1, 5), np.ones(5), -0.1), "FWHM"),
    (lambda: gaussian_broaden(np.array([0, 0.1, 0.3]), np.ones(3), 0.1), "uniform"),
    (lambda: gaussian_broaden(np.linspace(0, 1, 5), [1, 1, np.nan, 1, 1], 0.1), "NaN"),
    (lambda: lorentzian_broaden(np.linspace(0, 1, 5), np.ones(5), -0.01, 0.0), "Γ0"),
    (lambda: lorentzian_broaden(np.linspace(0, 1, 5), np.ones(5), 0.01, np.nan), "coefficient a"),
    (lambda: gaussian_broaden(np.linspace(0, 1, 5), np.ones(4), 0.1), "length"),
])
def test_bad_input_names_problem(call, word):
    with pytest.raises(SettingsError, match=word):
        call()
