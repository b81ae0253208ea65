"""Hydrogen photoionisation: closed forms for the 1s cross section, gauge equivalence, β.

Sources
-------
- Stobbe formula (Bethe & Salpeter, *Quantum Mechanics of One- and Two-Electron Atoms* (1957),
  Sec. 71, eq. (71.4)): σ_1s = (2⁹π²α a₀²/3)(I/ħω)⁴ exp(−4ν′ arccot ν′)/(1 − exp(−2πν′)),
  ν′ = 1/√(ħω/I − 1). Its threshold value 6.30 Mb is a well-known figure (from memory).
- Length and velocity forms agree exactly for exact eigenstates of one local potential
  (common practice; Bethe & Salpeter Sec. 59).
- β = 2 for any s subshell in the non-relativistic dipole limit (Cooper & Zare, J. Chem. Phys.
  48, 942 (1968); common practice); −1 ≤ β ≤ 2 always (positivity of dσ/dΩ).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from valband.atom.cross_section import (
    A0_SQUARED_MB,
    ALPHA,
    HARTREE_EV,
    subshell_cross_section,
    subshell_cross_section_ev,
)

R = np.geomspace(1e-6, 120.0, 2500)
V_H = -1.0 / R
U_1S = 2.0 * R * np.exp(-R)  # Bethe & Salpeter eq. (3.17)
U_2P = R**2 * np.exp(-R / 2.0) / math.sqrt(24.0)
I_1S_EV = 0.5 * HARTREE_EV


def stobbe_mb(hv_ev: float) -> float:
    """Bethe & Salpeter eq. (71.4), hydrogen 1s, Mb."""
    x = hv_ev / I_1S_EV
    nu = 1.0 / math.sqrt(x - 1.0)
    return (
        2**9
        * math.pi**2
        * ALPHA
        * A0_SQUARED_MB
        / 3.0
        * x**-4
        * math.exp(-4.0 * nu * math.atan(1.0 / nu))  # arccot ν = arctan(1/ν)
        / (1.0 - math.exp(-2.0 * math.pi * nu))
    )


def test_stobbe_threshold_value_is_6p30_mb():
    # the closed form itself against the textbook figure 6.30 Mb (from memory, ±0.5 %)
    assert stobbe_mb(I_1S_EV * (1 + 1e-9)) == pytest.approx(6.30, rel=5e-3)


@pytest.mark.parametrize("hv", [13.7, 15.0, 20.0, 40.0, 100.0, 300.0, 1000.0, 1486.6, 3000.0])
def test_h1s_matches_stobbe(hv):
    res = subshell_cross_section_ev(R, V_H, U_1S, 0, I_1S_EV, hv, 1.0)
    # Stobbe closed form (Bethe & Salpeter eq. 71.4); brief asks 1 %, we hold 0.1 %
    assert res.sigma_mb == pytest.approx(stobbe_mb(hv), rel=1e-3)
    # gauge equivalence for exact eigenstates (common practice)
    assert res.sigma_velocity_mb == pytest.approx(res.sigma_mb, rel=1e-3)
    assert res.beta == pytest.approx(2.0, abs=1e-12)  # s subshell (Cooper & Zare 1968)
    assert res.kinetic_energy_ev == pytest.approx(hv - I_1S_EV, rel=1e-12)
    assert res.sigma_per_electron_mb == res.sigma_mb  # one electron


@pytest.mark.parametrize("hv", [5000.0, 10000.0])
def test_h1s_high_energy(hv):
    # at 5 and 10 keV the outgoing wavelength is 0.33 / 0.23 bohr (METHODS.md pitfall)
    res = subshell_cross_section_ev(R, V_H, U_1S, 0, I_1S_EV, hv, 1.0)
    assert res.sigma_mb == pytest.approx(stobbe_mb(hv), rel=1e-2)  # Stobbe, brief: 1 %
    assert res.sigma_velocity_mb == pytest.approx(res.sigma_mb, rel=2e-2)  # brief: 2 %
    # what we actually reach with the default grid (observed ~2e-4)
    assert res.sigma_mb == pytest.approx(stobbe_mb(hv), rel=1e-3)
    assert res.gauge_discrepancy < 1e-3


def test_occupation_scales_subshell_not_per_electron():
    one = subshell_cross_section_ev(R, V_H, U_1S, 0, I_1S_EV, 40.0, 1.0)
    two = subshell_cross_section_ev(R, V_H, U_1S, 0, I_1S_EV, 40.0, 2.0)
    assert two.sigma_mb == pytest.approx(2.0 * one.sigma_mb, rel=1e-14)
    assert two.sigma_per_electron_mb == pytest.approx(one.sigma_per_electron_mb, rel=1e-14)


def test_hartree_and_ev_entry_points_agree():
    a = subshell_cross_section(R, V_H, U_1S, 0, 0.5, 3.0, 1.0)
    b = subshell_cross_section_ev(R, V_H, U_1S, 0, 0.5 * HARTREE_EV, 3.0 * HARTREE_EV, 1.0)
    assert a.sigma_mb == pytest.approx(b.sigma_mb, rel=1e-12)


@pytest.mark.parametrize("hv", [3.6, 6.0, 15.0, 60.0, 300.0, 3000.0])
def test_h2p_channels_gauges_and_beta_bounds(hv):
    res = subshell_cross_section_ev(R, V_H, U_2P, 1, 0.125 * HARTREE_EV, hv, 1.0)
    assert res.channels == (0, 2)
    # each channel separately: length = velocity for exact eigenstates (common practice)
    for rl, rv in zip(res.radial_length_bohr, res.radial_velocity_bohr, strict=True):
        assert rv == pytest.approx(rl, rel=1e-3)
    assert -1.0 <= res.beta <= 2.0  # positivity of dσ/dΩ (Cooper & Zare 1968)
    # Coulomb phases: σ_2 − σ_0 = arctan(η) + arctan(η/2), η = −1/k (A&S 14.5.6)
    k = math.sqrt(2.0 * res.kinetic_energy_hartree)
    eta = -1.0 / k
    diff = res.phase_coulomb_rad[1] - res.phase_coulomb_rad[0]
    assert math.cos(diff) == pytest.approx(math.cos(math.atan(eta) + math.atan(eta / 2)), abs=1e-12)
    # pure Coulomb: the short-range phases vanish (regular solution is F_l), so δ = σ
    for dt, dc in zip(res.phase_total_rad, res.phase_coulomb_rad, strict=True):
        assert math.sin(dt - dc) == pytest.approx(0.0, abs=1e-4)  # grid error ~1e-5 rad
