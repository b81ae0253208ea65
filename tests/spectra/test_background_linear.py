"""Linear background and the shared input checks."""

from __future__ import annotations

import numpy as np
import pytest

from valband.errors import SettingsError
from valband.spectra.background import end_intensity, linear_background


def test_passes_through_endpoints():
    # A straight line through the two end intensities (definition, common practice).
    rng = np.random.default_rng(1)
    be = np.sort(rng.uniform(0.0, 10.0, 200))
    y = 5.0 + 0.3 * be + 40.0 * np.exp(-((be - 5.0) ** 2))
    bg = linear_background(be, y, n_average=1)
    assert bg[0] == pytest.approx(y[0], rel=1e-12)
    assert bg[-1] == pytest.approx(y[-1], rel=1e-12)
    np.testing.assert_allclose(np.diff(bg) / np.diff(be), (y[-1] - y[0]) / (be[-1] - be[0]),
                               rtol=1e-9)
    lo, hi = 2.0, 8.0
    bg = linear_background(be, y, endpoints=(lo, hi), n_average=1)
    inside = (be >= lo) & (be <= hi)
    line = np.polynomial.Polynomial.fit(be[inside], bg[inside], 1)   # the points are collinear
    np.testing.assert_allclose(line(be[inside]), bg[inside], rtol=1e-10)
    assert line(lo) == pytest.approx(np.interp(lo, be, y), rel=1e-9)
    assert line(hi) == pytest.approx(np.interp(hi, be, y), rel=1e-9)
    # constant continuation outside the window (documented choice)
    np.testing.assert_allclose(bg[be < lo], line(lo), rtol=1e-9)
    np.testing.assert_allclose(bg[be > hi], line(hi), rtol=1e-9)


def test_end_average_is_unbiased_on_a_slope():
    # The straight-line end estimate reproduces a noise-free sloping line exactly, and averages
    # noise (the mean of n points would be biased by the slope; common practice).
    be = np.linspace(0.0, 10.0, 101)
    y = 2.0 + 0.5 * be
    assert end_intensity(be, y, 0.0, 7) == pytest.approx(2.0, abs=1e-12)
    np.testing.assert_allclose(linear_background(be, y), y, rtol=1e-12)


def test_bad_input_named():
    be = np.linspace(0.0, 10.0, 20)
    y = np.ones_like(be)
    with pytest.raises(SettingsError, match="strictly ascending"):
        linear_background(np.r_[be[:5], be[3], be[5:]], np.r_[y, 1.0])
    with pytest.raises(SettingsError, match="NaN"):
        linear_background(np.r_[be[:-1], np.nan], y)
    with pytest.raises(SettingsError, match="outside the data"):
        linear_background(be, y, endpoints=(1.0, 12.0))
    with pytest.raises(SettingsError, match="at least 3"):
        linear_background(be[:2], y[:2])
    with pytest.raises(SettingsError, match="pair"):
        linear_background(be, y, endpoints=3.0)
    with pytest.raises(SettingsError, match="n_average"):
        linear_background(be, y, n_average=0)
    with pytest.raises(SettingsError, match="1-D"):
        linear_background(be.reshape(4, 5), y.reshape(4, 5))
