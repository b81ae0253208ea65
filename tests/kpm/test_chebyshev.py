"""Jackson kernel, reconstruction and the moment rule (Weiße et al., RMP 78, 275 (2006))."""

from __future__ import annotations

import math

import numpy as np
import pytest

from valband.errors import SettingsError
from valband.kpm.chebyshev import (
    integrated,
    jackson_kernel,
    jackson_sigma,
    moments_for_resolution,
    reconstruct,
    scale_factors,
)


def _delta_moments(x0, n):
    """Chebyshev moments of δ(x − x0): μ_k = T_k(x0) (WWAF Eq. (9) with ρ = δ)."""
    return np.cos(np.arange(n) * math.acos(x0))


@pytest.mark.parametrize("n, x0", [(128, 0.0), (512, 0.0), (256, 0.5)])
def test_broadened_delta_has_the_jackson_width(n, x0):
    x = np.linspace(-1 + 1e-7, 1 - 1e-7, 40001)
    rho = reconstruct(_delta_moments(x0, n), x)
    area = np.trapezoid(rho, x)
    mean = np.trapezoid(x * rho, x) / area
    sigma = math.sqrt(np.trapezoid((x - mean) ** 2 * rho, x) / area)
    assert area == pytest.approx(1.0, abs=2e-3)  # μ_0 = 1 is kept (WWAF Eq. (19))
    assert mean == pytest.approx(x0, abs=2e-3)
    # WWAF Eq. (72) (recalled), and its limit π/N at the centre
    assert sigma == pytest.approx(jackson_sigma(n, x0), rel=0.03)
    if x0 == 0.0:
        assert sigma == pytest.approx(math.pi / n, rel=0.03)
    assert rho.min() > -1e-10 * rho.max()  # the Jackson kernel keeps the density positive


def test_kernel_ends():
    g = jackson_kernel(100)
    assert g[0] == pytest.approx(1.0, abs=1e-14)  # g_0 = 1 (WWAF Eq. (71) at n = 0)
    assert np.all(np.diff(g) < 0) and g[-1] > 0


def test_integral_is_exact_for_the_series():
    mu = _delta_moments(0.3, 64) + 0.5 * _delta_moments(-0.6, 64)
    x = np.linspace(-1 + 1e-9, 1 - 1e-9, 100001)
    rho = reconstruct(mu, x)
    numeric = np.concatenate([[0.0], np.cumsum(0.5 * (rho[1:] + rho[:-1]) * np.diff(x))])
    probe = np.array([-0.9, -0.6, 0.0, 0.3, 0.95])
    np.testing.assert_allclose(integrated(mu, probe), np.interp(probe, x, numeric), atol=2e-4)
    assert integrated(mu, 1.0) == pytest.approx(1.5, abs=1e-12)
    assert integrated(mu, -1.0) == pytest.approx(0.0, abs=1e-12)


def test_moment_rule_reaches_the_resolution():
    a = 18.0
    for res in (0.05, 0.1, 0.3):
        n = moments_for_resolution(a, res)
        assert a * jackson_sigma(n) <= res < a * jackson_sigma(n - 1)
        assert n == pytest.approx(math.pi * a / res, rel=0.02)  # σ ≈ π/N


def test_bad_settings():
    with pytest.raises(SettingsError, match="resolution"):
        moments_for_resolution(10.0, 0.0)
    with pytest.raises(SettingsError, match="margin"):
        scale_factors(-1.0, 1.0, 1.5)
    with pytest.raises(SettingsError, match="at least 2"):
        jackson_kernel(1)
