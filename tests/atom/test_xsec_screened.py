"""A screened model potential with a Latter tail, thresholds and input checking.

Sources
-------
- Latter, Phys. Rev. 99, 510 (1955): V = min(V_model, −1/r).
- Length and velocity forms agree for exact eigenstates of one local potential (common
  practice, Bethe & Salpeter Sec. 59); the bound states here come from an independent
  finite-difference solver in this file (checked on hydrogen, −0.5 and −0.125 Ha).
- Below threshold the subshell is closed: σ = 0 (common practice).
- Near threshold σ stays finite and continuous for an attractive Coulomb tail (Wigner
  threshold law with a Coulomb tail, e.g. Bethe & Salpeter Sec. 71; common practice).
"""

from __future__ import annotations

import math
import time

import numpy as np
import pytest
from scipy.linalg import eigh_tridiagonal

from valband.atom.continuum import continuum_wave, latter_tail
from valband.atom.cross_section import HARTREE_EV, subshell_cross_section, subshell_cross_section_ev
from valband.errors import InputError, SettingsError

X = np.arange(math.log(1e-6), math.log(60.0), 0.002)
R = np.exp(X)


def v_model(r, z=3.0, a=0.8):
    """Neutral-like screened Coulomb potential (decays faster than 1/r)."""
    return -z * np.exp(-r / a) * (1 + r / (2 * a)) / r


def bound_states(v, l, count):
    """Lowest eigenpairs of −½u″ + [l(l+1)/2r² + V]u = εu (FD in x = ln r, u = √r φ)."""
    h = X[1] - X[0]
    w = 2 * R**2
    diag = (2 / h**2 + (l + 0.5) ** 2 + 2 * R**2 * v) / w
    off = -1 / h**2 / np.sqrt(w[:-1] * w[1:])
    eps, vec = eigh_tridiagonal(diag, off, select="i", select_range=(0, count - 1), tol=1e-13)
    out = []
    for e, psi in zip(eps, vec.T, strict=True):
        u = np.sqrt(R) * psi / np.sqrt(w)  # φ = B^{-1/2} ψ, u = √r φ
        u /= math.sqrt(np.sum(u**2 * R) * h)
        if u[np.argmax(np.abs(u))] < 0:
            u = -u
        out.append((e, u))
    return out


V = latter_tail(R, v_model(R), 1.0)


def test_bound_solver_on_hydrogen():
    # Bethe & Salpeter: ε_1s = −1/2, ε_2p = −1/8 Ha
    assert bound_states(-1 / R, 0, 1)[0][0] == pytest.approx(-0.5, rel=1e-5)
    assert bound_states(-1 / R, 1, 1)[0][0] == pytest.approx(-0.125, rel=1e-5)


def test_latter_tail_is_min():
    assert np.all(V <= v_model(R))
    assert np.all(V <= -1 / R + 1e-15)
    np.testing.assert_allclose(V[R > 10], -1 / R[R > 10])
    np.testing.assert_allclose(V[R < 0.05], v_model(R[R < 0.05]))


@pytest.mark.parametrize("l,index", [(0, 0), (0, 1), (1, 0)])
@pytest.mark.parametrize("hv_over_i", [1.05, 2.0, 10.0, 200.0])
def test_gauges_agree_in_screened_potential(l, index, hv_over_i):
    e, u = bound_states(V, l, index + 1)[index]
    res = subshell_cross_section(R, V, u, l, -e, -e * hv_over_i, 2.0 * (2 * l + 1))
    assert res.sigma_mb > 0
    assert res.sigma_velocity_mb == pytest.approx(res.sigma_mb, rel=2e-3)
    assert -1 <= res.beta <= 2


def test_threshold_is_continuous_and_below_is_closed():
    e, u = bound_states(V, 0, 1)[0]
    i = -e
    below = subshell_cross_section(R, V, u, 0, i, i * 0.999, 2.0)
    assert below.sigma_mb == 0.0 and below.sigma_velocity_mb == 0.0
    assert "below" in below.note and not below.is_open and math.isnan(below.beta)
    s = [subshell_cross_section(R, V, u, 0, i, i + d, 2.0).sigma_mb for d in (1e-3, 4e-3, 1.6e-2)]
    # finite at threshold with a Coulomb tail; smooth: successive differences shrink ∝ Δε
    assert all(x > 0 for x in s)
    assert abs(s[0] - s[1]) < 0.3 * abs(s[1] - s[2]) + 1e-9 * s[0]


def test_neutral_potential_without_tail_needs_zion_zero():
    vm = v_model(R)
    e, u = bound_states(vm, 0, 1)[0]
    for hv in (2.0, 10.0):  # checked below and above threshold
        with pytest.raises(InputError, match="Z_ion"):
            subshell_cross_section(R, vm, u, 0, -e, hv, 2.0, Z_ion=1.0)
    res = subshell_cross_section(R, vm, u, 0, -e, 10.0, 2.0, Z_ion=0.0)
    assert res.sigma_velocity_mb == pytest.approx(res.sigma_mb, rel=2e-3)
    assert res.phase_coulomb_rad == (0.0,)


def _args():
    e, u = bound_states(V, 1, 1)[0]
    return dict(r=R, V=V, u_bound=u, l=1, binding_energy=-e, photon_energy=3.0, occupation=6.0)


@pytest.mark.parametrize(
    "change,match",
    [
        (dict(photon_energy=-1.0), "photon_energy"),
        (dict(photon_energy=float("nan")), "photon_energy"),
        (dict(binding_energy=-0.3), "binding_energy"),
        (dict(binding_energy=float("nan")), "binding_energy"),
        (dict(occupation=7.0), "occupation"),
        (dict(occupation=-1.0), "occupation"),
        (dict(l=-1), "l must be"),
        (dict(l=1.5), "l must be"),
        (dict(r=R[::-1].copy()), "strictly increasing"),
        (dict(V=V[:-1]), "shape"),
        (dict(u_bound=np.zeros(5)), "shape"),
        (dict(u_bound="unnormalised"), "normalised"),
        (dict(Z_ion=-1.0), "Z_ion"),
    ],
)
def test_bad_input_names_the_problem(change, match):
    kwargs = _args()
    if isinstance(change.get("u_bound"), str):
        change = dict(u_bound=kwargs["u_bound"] * 1.5)
    kwargs.update(change)
    with pytest.raises(InputError, match=match):
        subshell_cross_section(**kwargs)


def test_bad_settings():
    with pytest.raises(SettingsError, match="relativity"):
        continuum_wave(R, V, 0, 1.0, relativity="scalar")
    with pytest.raises(SettingsError, match="points_per_wavelength"):
        continuum_wave(R, V, 0, 1.0, points_per_wavelength=5)
    with pytest.raises(InputError, match="kinetic_energy"):
        continuum_wave(R, V, 0, 0.0)
    with pytest.raises(InputError, match="kinetic_energy"):
        continuum_wave(R, V, 0, float("nan"))


def test_speed_all_valence_subshells_at_one_energy():
    # target from the brief: all valence subshells of an atom at one energy in < 1 s;
    # here three subshells (2 s-like, 1 p-like; 5 continuum waves) at Al Kα and at 10 keV
    states = [
        (0, *bound_states(V, 0, 2)[0]),
        (0, *bound_states(V, 0, 2)[1]),
        (1, *bound_states(V, 1, 1)[0]),
    ]
    subshell_cross_section(R, V, states[0][2], 0, -states[0][1], 5.0, 2.0)  # compile/warm up
    for hv in (1486.6, 10000.0):
        t0 = time.perf_counter()
        for l, e, u in states:
            subshell_cross_section_ev(R, V, u, l, -e * HARTREE_EV, hv, 2.0 * (2 * l + 1))
        elapsed = time.perf_counter() - t0
        print(f"three subshells at {hv} eV: {elapsed * 1e3:.0f} ms")
        assert elapsed < 1.0
