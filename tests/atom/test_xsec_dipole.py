"""radial_dipole on closed-form integrands.

Sources: Laplace transforms ∫₀^∞ rⁿ e^{−r} e^{ikr} dr = n!/(1 − ik)^{n+1} (e.g. Abramowitz &
Stegun 29.3.11); the velocity-form operators d/dr − (l+1)/r and d/dr + l/r (gradient formula,
Bethe & Salpeter Sec. 59).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from valband.atom.cross_section import radial_dipole
from valband.errors import InputError, SettingsError

K = 1.7
OMEGA = 2.3


def _grids():
    yield np.linspace(0.0, 60.0, 6001)  # linear, starting at the nucleus
    yield np.geomspace(1e-6, 60.0, 3000)  # logarithmic


@pytest.mark.parametrize("r", list(_grids()), ids=["linear", "log"])
def test_length_and_velocity_integrals(r):
    ub = 2 * r * np.exp(-r)
    uc = np.sin(K * r)
    # ∫ 2r² e^{−r} sin kr dr = 2·Im[2/(1 − ik)³]
    expect_len = 2 * (2 / (1 - 1j * K) ** 3).imag
    assert radial_dipole(r, ub, uc) == pytest.approx(expect_len, rel=1e-7)
    # l = 0 → 1: (d/dr − 1/r) u = −2r e^{−r};  −(1/ω)∫ uc·(−2r e^{−r}) = (2/ω)·Im[1/(1 − ik)²]
    expect_vel = 2 / OMEGA * (1 / (1 - 1j * K) ** 2).imag
    got = radial_dipole(r, ub, uc, "velocity", l_bound=0, l_cont=1, transition_energy=OMEGA)
    # (default derivative: quintic spline in ln r, made for log grids; ~3e-6 on a linear one)
    assert got == pytest.approx(expect_vel, rel=1e-5)
    # with an explicit derivative
    dub = 2 * np.exp(-r) * (1 - r)
    got2 = radial_dipole(
        r, ub, uc, "velocity", du_bound=dub, l_bound=0, l_cont=1, transition_energy=OMEGA
    )
    assert got2 == pytest.approx(expect_vel, rel=2e-6)  # Simpson on the linear grid


def test_l_minus_one_operator():
    # p → s: (d/dr + 1/r) applied to u = r² e^{−r} gives (3r − r²) e^{−r}
    r = np.geomspace(1e-6, 60.0, 3000)
    ub = r**2 * np.exp(-r)
    uc = np.sin(K * r)
    z = 1 - 1j * K
    # ∫ sin(kr)(3r − r²)e^{−r} dr = Im[3/z² − 2/z³]
    expect = -(3 / z**2 - 2 / z**3).imag / OMEGA
    got = radial_dipole(r, ub, uc, "velocity", l_bound=1, l_cont=0, transition_energy=OMEGA)
    assert got == pytest.approx(expect, rel=1e-6)
    assert math.isfinite(got)


def test_radial_dipole_errors():
    r = np.geomspace(1e-6, 60.0, 100)
    u = np.exp(-r) * r
    with pytest.raises(SettingsError, match="gauge"):
        radial_dipole(r, u, u, "acceleration")
    with pytest.raises(SettingsError, match="velocity form needs"):
        radial_dipole(r, u, u, "velocity")
    with pytest.raises(InputError, match="selection rule"):
        radial_dipole(r, u, u, "velocity", l_bound=1, l_cont=3, transition_energy=1.0)
    with pytest.raises(InputError, match="u_cont"):
        radial_dipole(r, u, u[:-1])
    with pytest.raises(InputError, match="transition_energy"):
        radial_dipole(r, u, u, "velocity", l_bound=0, l_cont=1, transition_energy=-1.0)
