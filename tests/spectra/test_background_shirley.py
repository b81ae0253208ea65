"""Shirley background: recovers Shirley's own construction; convergence and window handling."""

from __future__ import annotations

import numpy as np
import pytest
from scipy.special import erf

from valband.errors import CalculationError, SettingsError
from valband.spectra.background import shirley_background


def _gauss(x, x0, fwhm):
    s = fwhm / 2.3548200450309493
    return np.exp(-0.5 * ((x - x0) / s) ** 2)


def _gauss_cdf(x, x0, fwhm):
    s = fwhm / 2.3548200450309493
    return 0.5 * (1.0 + erf((x - x0) / (np.sqrt(2.0) * s)))


@pytest.mark.parametrize("uniform", [True, False])
def test_recovers_shirley_step(uniform):
    # Shirley, Phys. Rev. B 5, 4709 (1972): the background under a peak is proportional to the
    # peak area at lower binding energy. Build peak + offset + step·(normalised integral of the
    # peak), with the integral in closed form (erf); the iteration must return offset + step·Q
    # to 1 % of the step.
    rng = np.random.default_rng(8)
    if uniform:
        be = np.linspace(925.0, 940.0, 1501)
    else:
        be = np.sort(rng.uniform(925.0, 940.0, 1200))
    peaks = 1000.0 * _gauss(be, 932.6, 1.2) + 450.0 * _gauss(be, 934.0, 1.8)
    q = (1000.0 * 1.2 * _gauss_cdf(be, 932.6, 1.2) + 450.0 * 1.8 * _gauss_cdf(be, 934.0, 1.8)) \
        / (1000.0 * 1.2 + 450.0 * 1.8)
    offset, step = 120.0, 300.0
    intensity = peaks + offset + step * q
    bg = shirley_background(be, intensity)
    assert np.max(np.abs(bg - (offset + step * q))) < 0.01 * step


def test_window_and_outside_values():
    be = np.linspace(0.0, 20.0, 2001)
    q = _gauss_cdf(be, 10.0, 1.0)
    intensity = 500.0 * _gauss(be, 10.0, 1.0) + 50.0 + 100.0 * q
    bg = shirley_background(be, intensity, endpoints=(5.0, 15.0))
    inside = (be >= 5.0) & (be <= 15.0)
    truth = 50.0 + 100.0 * q
    assert np.max(np.abs(bg[inside] - truth[inside])) < 1.0   # 1 % of the step (Shirley 1972)
    # documented choice: constant continuation of the end intensities outside the window
    np.testing.assert_allclose(bg[be < 5.0], bg[inside][0], rtol=0, atol=1e-3)
    np.testing.assert_allclose(bg[be > 15.0], bg[inside][-1], rtol=0, atol=1e-3)
    # endpoints given in either order
    np.testing.assert_allclose(shirley_background(be, intensity, endpoints=(15.0, 5.0)), bg)


def test_flat_spectrum_is_its_own_background():
    # No step: the Shirley background is the constant end level (definition).
    be = np.linspace(0.0, 10.0, 101)
    intensity = 10.0 + 100.0 * _gauss(be, 5.0, 1.0)
    np.testing.assert_allclose(shirley_background(be, intensity), 10.0, rtol=1e-9)


def test_not_converged_and_bad_input():
    be = np.linspace(0.0, 20.0, 401)
    intensity = 500.0 * _gauss(be, 10.0, 1.0) + 50.0 + 100.0 * _gauss_cdf(be, 10.0, 1.0)
    with pytest.raises(CalculationError, match="did not converge"):
        shirley_background(be, intensity, max_iter=1)
    with pytest.raises(SettingsError, match="outside the data"):
        shirley_background(be, intensity, endpoints=(-5.0, 10.0))
    with pytest.raises(SettingsError, match="ascending"):
        shirley_background(be[::-1], intensity)
    bad = intensity.copy()
    bad[3] = np.nan
    with pytest.raises(SettingsError, match="NaN"):
        shirley_background(be, bad)
    with pytest.raises(SettingsError, match="at least 3"):
        shirley_background(be[:2], intensity[:2])
    with pytest.raises(SettingsError, match="holds 1 data points"):
        shirley_background(be, intensity, endpoints=(10.0, 10.01))
    with pytest.raises(SettingsError, match="tol"):
        shirley_background(be, intensity, tol=0.0)
    with pytest.raises(SettingsError, match="same length"):
        shirley_background(be, intensity[:-1])
