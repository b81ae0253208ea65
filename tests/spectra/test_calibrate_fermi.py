"""Fermi-edge calibration: Fermi–Dirac width, fit recovery on synthetic Poisson data, errors."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.special import expit

from valband.conventions import KB_EV
from valband.errors import CalculationError, SettingsError
from valband.spectra.broadening import fermi_dirac
from valband.spectra.calibrate import FermiEdgeFit, apply_shift, fermi_edge_model, fit_fermi_edge

TRUE_EF = 0.123      # eV, on the "measured" BE scale
TRUE_FWHM = 0.35     # eV
LEVEL = 1.0e4        # counts at the edge
BACKGROUND = 200.0   # counts
SLOPE = 0.1          # relative DOS slope per eV of binding energy


def _truth(be, ef=TRUE_EF, fwhm=TRUE_FWHM, temperature=300.0):
    """Expected counts, built independently of valband: a 1 meV grid, scipy's logistic function
    for the Fermi–Dirac occupation and numpy's direct convolution with a sampled Gaussian."""
    kt = KB_EV * temperature
    fine = np.arange(be[0] - 3.0, be[-1] + 3.0, 0.001)
    x = fine - ef
    y = (1.0 + SLOPE * x) * expit(x / kt)           # f(E − E_F) with E − E_F = −x
    sigma = fwhm / (2.0 * math.sqrt(2.0 * math.log(2.0)))
    u = np.arange(-8 * sigma, 8 * sigma + 5e-4, 0.001)
    k = np.exp(-0.5 * (u / sigma) ** 2)
    yb = np.convolve(y, k / k.sum(), mode="same")
    return LEVEL * np.interp(be, fine, yb) + BACKGROUND


def test_fermi_dirac_10_90_width():
    # 10–90 % width of f(E) = 1/(1+exp(E/kT)) is 2·ln 9·k_BT exactly (solve f = 0.9, 0.1:
    # E = ∓kT ln 9); textbook property of the Fermi–Dirac function.
    for temperature in (30.0, 300.0, 1000.0):
        kt = KB_EV * temperature
        e = np.linspace(-20 * kt, 20 * kt, 400001)
        f = fermi_dirac(e, temperature)
        # f is decreasing: interpolate the energies where it crosses 0.9 and 0.1
        e90 = np.interp(0.9, f[::-1], e[::-1])
        e10 = np.interp(0.1, f[::-1], e[::-1])
        assert e10 - e90 == pytest.approx(2 * math.log(9.0) * kt, rel=1e-6)
    # METHODS.md / textbook value: 0.114 eV at 300 K (4.39 k_BT)
    assert 2 * math.log(9.0) * KB_EV * 300.0 == pytest.approx(0.114, abs=5e-4)


@pytest.mark.parametrize("seed", [20240601, 7, 12345, 99, 31337])
def test_fit_recovers_edge_and_width(seed):
    # Synthetic edge with Poisson noise (numpy Generator, seed recorded in the parameter);
    # the truth is the model definition, evaluated independently in _truth.
    rng = np.random.default_rng(seed)
    be = np.arange(-1.0, 1.5, 0.01)
    data = rng.poisson(_truth(be)).astype(float)
    fit = fit_fermi_edge(be, data, temperature=300.0)
    assert isinstance(fit, FermiEdgeFit)
    assert abs(fit.fermi_level - TRUE_EF) < 0.005
    assert fit.fwhm == pytest.approx(TRUE_FWHM, rel=0.05)
    # uncertainties of the right size: the true error is within 4σ (Gaussian statistics,
    # common practice), and σ is not absurdly large
    assert abs(fit.fermi_level - TRUE_EF) < 4 * fit.fermi_level_err
    assert abs(fit.fwhm - TRUE_FWHM) < 4 * fit.fwhm_err
    assert abs(fit.background - BACKGROUND) < 4 * fit.background_err
    assert abs(fit.dos_edge - LEVEL) < 4 * fit.dos_edge_err
    assert fit.fermi_level_err < 0.005 and fit.fwhm_err < 0.01
    # reduced χ² of a correct model with Poisson weights is 1 ± √(2/dof) (χ² statistics)
    assert abs(fit.reduced_chi2 - 1.0) < 4 * math.sqrt(2.0 / fit.dof)
    assert fit.model.shape == be.shape
    # the public model evaluated at the best fit, and the truth it should match: the
    # independent construction in _truth, within the Poisson noise of one point (4 %)
    model = fermi_edge_model(be, fit.fermi_level, fit.fwhm, fit.dos_edge, fit.dos_slope,
                             fit.background, 300.0)
    np.testing.assert_allclose(model, fit.model, rtol=1e-12)
    truth = _truth(be)
    assert np.max(np.abs(model - truth) / np.sqrt(truth)) < 1.0
    assert fit.window == (be[0], be[-1])


def test_uncertainty_matches_scatter_over_seeds():
    # The spread of E_F over independent noise realisations equals the covariance σ
    # (least-squares theory); 40 seeds give the spread to about ±11 %, so allow 35 %.
    be = np.arange(-0.8, 1.2, 0.01)
    mu = _truth(be)
    rng = np.random.default_rng(424242)
    efs, errs = [], []
    for _ in range(40):
        fit = fit_fermi_edge(be, rng.poisson(mu).astype(float))
        efs.append(fit.fermi_level)
        errs.append(fit.fermi_level_err)
    assert np.std(efs, ddof=1) == pytest.approx(np.mean(errs), rel=0.35)


def test_fit_non_uniform_grid_window_and_shift():
    # Non-uniform axis (random steps) and a window: still E_F within 5 meV; apply_shift puts
    # the edge at BE = 0 (definition of the calibration).
    rng = np.random.default_rng(2718)
    be = np.cumsum(rng.uniform(0.005, 0.015, 400)) - 2.0
    data = rng.poisson(_truth(be)).astype(float)
    fit = fit_fermi_edge(be, data, window=(-0.9, 1.2))
    assert abs(fit.fermi_level - TRUE_EF) < 0.005
    assert fit.window[0] >= -0.9 and fit.window[1] <= 1.2
    shifted = apply_shift(be, fit)
    np.testing.assert_allclose(shifted, be - fit.fermi_level)
    refit = fit_fermi_edge(shifted, data, window=(-1.0, 1.0))
    assert abs(refit.fermi_level) < 1e-3


def test_counts_false_scales_errors():
    # Non-count data (scaled by 1e-3): the same edge, uncertainties from the scatter.
    rng = np.random.default_rng(5)
    be = np.arange(-1.0, 1.5, 0.01)
    data = rng.poisson(_truth(be)).astype(float)
    a = fit_fermi_edge(be, data)
    b = fit_fermi_edge(be, data * 1e-3, counts=False)
    assert abs(b.fermi_level - TRUE_EF) < 0.005
    # errors from the scatter agree with the Poisson ones within the χ² spread (±30 %)
    assert b.fermi_level_err == pytest.approx(a.fermi_level_err, rel=0.3)


def test_sharper_edge_at_low_temperature():
    # A narrow instrument (30 meV) at 10 K: the fit resolves it within 5 %.
    rng = np.random.default_rng(11)
    be = np.arange(-0.3, 0.5, 0.002)
    data = rng.poisson(_truth(be, fwhm=0.03, temperature=10.0)).astype(float)
    fit = fit_fermi_edge(be, data, temperature=10.0)
    assert abs(fit.fermi_level - TRUE_EF) < 0.002
    assert fit.fwhm == pytest.approx(0.03, rel=0.05)


def test_errors():
    be = np.arange(-1.0, 1.5, 0.01)
    data = np.random.default_rng(3).poisson(_truth(be)).astype(float)
    with pytest.raises(SettingsError, match="no Fermi edge"):
        fit_fermi_edge(be, data, window=(0.8, 1.5))            # only the occupied plateau
    with pytest.raises(SettingsError, match="no Fermi edge"):
        fit_fermi_edge(be, data, window=(0.5, 1.5))            # only the tail of the edge
    flat = np.random.default_rng(4).poisson(np.full(be.size, 500.0)).astype(float)
    with pytest.raises(SettingsError, match="no Fermi edge"):
        fit_fermi_edge(be, flat)
    with pytest.raises(SettingsError, match="need at least"):
        fit_fermi_edge(be[:6], data[:6])
    bad = data.copy()
    bad[10] = np.nan
    with pytest.raises(SettingsError, match="NaN"):
        fit_fermi_edge(be, bad)
    with pytest.raises(SettingsError, match="ascending"):
        fit_fermi_edge(be[::-1], data[::-1])
    with pytest.raises(SettingsError, match="does not overlap"):
        fit_fermi_edge(be, data, window=(5.0, 6.0))
    with pytest.raises(SettingsError, match="negative"):
        fit_fermi_edge(be, data - 1000.0)
    with pytest.raises(SettingsError, match="temperature"):
        fit_fermi_edge(be, data, temperature=-1.0)
    with pytest.raises(SettingsError, match="initial"):
        fit_fermi_edge(be, data, initial={"E0": 0.1})
    with pytest.raises(SettingsError, match="FermiEdgeFit"):
        apply_shift(be, 0.1)
    assert issubclass(CalculationError, RuntimeError)
