"""Tougaard background: universal cross-section convolution, its integral, B refit."""

from __future__ import annotations

import numpy as np
import pytest

from valband.errors import CalculationError, SettingsError
from valband.spectra.background import (
    TOUGAARD_B,
    TOUGAARD_C,
    tougaard_background,
    tougaard_kernel,
    tougaard_kernel_integral,
)


def _k(t, b=2866.0, c=1643.0):
    # Tougaard, Surf. Interface Anal. 11, 453 (1988): K(T) = B T / (C + T²)², written out here
    return b * t / (c + t * t) ** 2


def test_constants():
    # Tougaard 1988–89 universal cross-section (also METHODS.md): B = 2866 eV², C = 1643 eV²
    assert (TOUGAARD_B, TOUGAARD_C) == (2866.0, 1643.0)
    t = np.array([-1.0, 0.0, 10.0, 40.0, 200.0])
    np.testing.assert_allclose(tougaard_kernel(t), [0.0, 0.0, *_k(t[2:])], rtol=1e-14)


@pytest.mark.parametrize("uniform", [True, False])
def test_narrow_peak_background_is_area_times_k(uniform):
    # For J = narrow peak of area A at E0, B(E0 + T) = ∫K(E − E')J(E')dE' = A·K(T)
    # (definition of the cross-section convolution, Tougaard 1988); to 1 %. The loss appears
    # at HIGHER binding energy than the peak.
    rng = np.random.default_rng(77)
    if uniform:
        be = np.linspace(80.0, 300.0, 4401)
    else:
        be = np.sort(np.concatenate([[80.0, 300.0], rng.uniform(80.0, 300.0, 4000)]))
    e0, s, area = 100.0, 0.08, 5000.0
    j = area * np.exp(-0.5 * ((be - e0) / s) ** 2) / (s * np.sqrt(2 * np.pi))
    bg = tougaard_background(be, j)
    for loss in (5.0, 20.0, 40.0, 100.0, 190.0):
        got = np.interp(e0 + loss, be, bg)
        assert got == pytest.approx(area * _k(loss), rel=0.01)
    # nothing below the peak (no gain of energy)
    assert np.max(np.abs(bg[be < e0 - 1.0])) < 1e-9 * bg.max()


def test_integral_of_k_closed_form():
    # ∫_0^∞ K(T) dT = B/(2C) (closed form), and ∫_0^L = (B/2)[1/C − 1/(C+L²)]. A flat J = 1
    # starting at E0 gives bg(E0 + L) = ∫_0^L K dT: check the implementation's integration.
    # J jumps from 0 to 1 over 1e-4 eV just below E0 = 0 (a ramp that short shifts the result
    # by ~1e-6 relative); the low-BE end (J = 0) is the baseline.
    be = np.concatenate([[-1.0, -1e-4], np.linspace(0.0, 50.0, 501),
                         np.geomspace(50.5, 20000.0, 3000)])
    j = np.where(be >= 0.0, 1.0, 0.0)
    bg = tougaard_background(be, j, n_average=1)
    for loss in (30.0, 100.0, 1000.0):
        exact = 0.5 * 2866.0 * (1 / 1643.0 - 1 / (1643.0 + loss**2))
        assert np.interp(loss, be, bg) == pytest.approx(exact, rel=1e-4)
    assert bg[-1] == pytest.approx(2866.0 / (2 * 1643.0), rel=1e-4)  # C/(C+L²) ≈ 4e-6
    assert tougaard_kernel_integral(np.inf) == pytest.approx(2866.0 / (2 * 1643.0), rel=1e-15)
    # numerical quadrature of the written-out kernel against the closed form
    t = np.linspace(0.0, 5000.0, 2_000_001)
    assert np.trapezoid(_k(t), t) == pytest.approx(float(tougaard_kernel_integral(5000.0)),
                                                   rel=1e-6)


def test_fit_b_meets_data_and_scales():
    # fit_B: background linear in B, chosen so that bg(endpoint) = data there (Tougaard's
    # common practice of refitting B).
    # Tougaard 1988: the measured j = F + B∫K(E − E') j(E') dE' (losses computed from the
    # measured spectrum itself). Build j from a primary peak F on a baseline by solving that
    # equation (fixed-point iteration, contraction since B·∫K = B/(2C) < 1); the refit must
    # return the B that made it, and the background must meet the data at the end.
    be = np.linspace(0.0, 120.0, 1201)
    peak = 2000.0 * np.exp(-0.5 * ((be - 20.0) / 0.7) ** 2)
    true_b = 1200.0
    data = peak + 40.0
    for _ in range(200):
        new = peak + tougaard_background(be, data, B=true_b, n_average=1)
        if np.max(np.abs(new - data)) < 1e-12 * data.max():
            break
        data = new
    data = new
    bg, b = tougaard_background(be, data, fit_B=True, full_output=True, n_average=1)
    assert bg[-1] == pytest.approx(data[-1], rel=1e-9)
    assert b == pytest.approx(true_b, rel=1e-6)
    np.testing.assert_allclose(data - bg, peak, atol=1e-6 * peak.max())
    bg2 = tougaard_background(be, data, B=2 * b, n_average=1)
    np.testing.assert_allclose(bg2 - bg2[0], 2 * (bg - bg[0]), rtol=1e-12, atol=1e-9)
    bg3 = tougaard_background(be, data, fit_B=True, endpoint=60.0, n_average=1)
    assert np.interp(60.0, be, bg3) == pytest.approx(np.interp(60.0, be, data), rel=1e-9)


def test_bad_input():
    be = np.linspace(0.0, 10.0, 50)
    j = np.exp(-((be - 3) ** 2))
    with pytest.raises(SettingsError, match="C"):
        tougaard_background(be, j, C=-1.0)
    with pytest.raises(SettingsError, match="ascending"):
        tougaard_background(be[::-1], j)
    with pytest.raises(SettingsError, match="NaN"):
        tougaard_background(be, np.where(be > 5, np.nan, j))
    with pytest.raises(SettingsError, match="endpoint"):
        tougaard_background(be, j, fit_B=True, endpoint=20.0)
    with pytest.raises(SettingsError, match="only used with fit_B"):
        tougaard_background(be, j, endpoint=5.0)
    with pytest.raises(CalculationError, match="cannot fit B"):
        tougaard_background(be, -j, fit_B=True)
