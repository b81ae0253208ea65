"""Asymmetry parameter and angular factors.

Sources
-------
- Cooper & Zare, J. Chem. Phys. 48, 942 (1968): β formula; limits β = (l+2)/(2l+1) for pure
  l+1 emission and (l−1)/(2l+1) for pure l−1 emission; −1 ≤ β ≤ 2.
- Plane-wave approximation (final state e^{ik·r}, e.g. Bethe & Salpeter Sec. 70): for a
  closed p shell φ_j = R(r)·x_j/r, the length-form amplitude is i ε·∇_k φ̃_j(k) with
  φ̃_j ∝ k_j h(k), h = g/k, g(k) = ∫ j₁(kr) R r² dr, so Σ_j |ε·∇_k(k_j h)|² = A + B cos²θ with
  A = h², B = k²h′² + 2khh′ and β = 2B/(3A + B) (derived in this docstring; a direct 3-D
  route independent of the partial-wave formula and of valband's phase conventions).
- Angular factors: 1 − (β/4)(3cos²θ − 1) (unpolarised) and 1 + (β/2)(3cos²θ − 1) (linear);
  both 1 at the magic angle arccos(1/√3) = 54.7356° for any β; their average over the sphere
  is 1; averaging the linear form over polarisation directions perpendicular to the beam gives
  the unpolarised form (common practice; geometry).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st
from scipy.integrate import quad
from scipy.special import spherical_jn

from valband.atom.cross_section import (
    MAGIC_ANGLE_DEG,
    angular_factor,
    asymmetry_parameter,
    subshell_cross_section,
)
from valband.errors import InputError, SettingsError

R = np.geomspace(1e-6, 40.0, 1500)
NORM = 1.0 / math.sqrt(0.75)  # ∫ r⁴ e^{−2r} dr = 4!/2⁵


def u_model_p(r):
    return NORM * r**2 * np.exp(-r)


def beta_plane_wave_3d(k):
    def g(kk):
        return quad(lambda r: spherical_jn(1, kk * r) * u_model_p(r) * r, 0, 60, limit=400)[0]

    def dg(kk):
        return quad(
            lambda r: spherical_jn(1, kk * r, derivative=True) * r * u_model_p(r) * r,
            0,
            60,
            limit=400,
        )[0]

    gk, dgk = g(k), dg(k)
    h = gk / k
    dh = (dgk * k - gk) / k**2
    a = h * h
    b = k * k * dh * dh + 2 * k * h * dh
    return 2 * b / (3 * a + b)


@pytest.mark.parametrize("k", [0.4, 1.0, 2.5, 6.0])
def test_cooper_zare_sign_against_plane_wave_3d(k):
    eps = 0.5 * k * k
    res = subshell_cross_section(
        R, np.zeros_like(R), u_model_p(R), 1, 0.5, 0.5 + eps, 6.0, Z_ion=0.0
    )
    assert res.beta == pytest.approx(beta_plane_wave_3d(k), abs=1e-5)


def test_cooper_zare_limits():
    for l in range(1, 5):
        assert asymmetry_parameter(l, 0.0, 1.3, 0.2, 0.9) == pytest.approx((l + 2) / (2 * l + 1))
        assert asymmetry_parameter(l, 0.7, 0.0, 0.2, 0.9) == pytest.approx((l - 1) / (2 * l + 1))
    assert asymmetry_parameter(0, 99.0, 0.4, 0.0, 1.0) == 2.0


@given(
    l=st.integers(1, 4),
    rm=st.floats(-5, 5),
    rp=st.floats(-5, 5),
    d=st.floats(-10, 10),
)
def test_beta_bounds(l, rm, rp, d):
    b = asymmetry_parameter(l, rm, rp, 0.0, d)
    if abs(rm) + abs(rp) < 1e-3:
        return
    assert -1.0 - 1e-12 <= b <= 2.0 + 1e-12


@given(beta=st.floats(-1, 2))
def test_magic_angle(beta):
    assert MAGIC_ANGLE_DEG == pytest.approx(54.7356, abs=1e-4)
    assert angular_factor(beta, MAGIC_ANGLE_DEG, "unpolarized") == pytest.approx(1.0, abs=1e-12)
    assert angular_factor(beta, MAGIC_ANGLE_DEG, "linear") == pytest.approx(1.0, abs=1e-12)


@pytest.mark.parametrize("beta", [-1.0, 0.3, 2.0])
@pytest.mark.parametrize("pol", ["unpolarized", "linear"])
def test_sphere_average_is_one(beta, pol):
    val = quad(lambda c: angular_factor(beta, math.degrees(math.acos(c)), pol), -1, 1)[0] / 2
    assert val == pytest.approx(1.0, abs=1e-12)


@pytest.mark.parametrize("beta", [-0.8, 1.0, 2.0])
@pytest.mark.parametrize("theta", [0.0, 30.0, 90.0, 140.0])
def test_unpolarised_is_average_of_linear(beta, theta):
    # beam along z, analyser at θ in the xz plane, polarisation ε = (cos φ, sin φ, 0)
    t = math.radians(theta)
    phis = np.linspace(0, 2 * math.pi, 400, endpoint=False)
    vals = [
        angular_factor(
            beta, math.degrees(math.acos(max(-1, min(1, math.sin(t) * math.cos(p))))), "linear"
        )
        for p in phis
    ]
    assert np.mean(vals) == pytest.approx(angular_factor(beta, theta, "unpolarized"), abs=1e-12)


def test_forward_and_perpendicular_values():
    # β = 2: unpolarised factor 1 − (β/4)(3cos²θ − 1) is 0 along the beam, 1.5 at 90°
    assert angular_factor(2.0, 0.0) == pytest.approx(0.0, abs=1e-15)
    assert angular_factor(2.0, 90.0) == pytest.approx(1.5)
    assert angular_factor(2.0, 0.0, "linear") == pytest.approx(3.0)


def test_angular_factor_rejects_bad_input():
    with pytest.raises(InputError, match="beta"):
        angular_factor(2.5, 10.0)
    with pytest.raises(InputError, match="beta"):
        angular_factor(float("nan"), 10.0)
    with pytest.raises(InputError, match="theta"):
        angular_factor(1.0, float("inf"))
    with pytest.raises(SettingsError, match="polarization"):
        angular_factor(1.0, 10.0, "circular")
