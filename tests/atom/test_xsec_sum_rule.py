"""Continuum normalisation through oscillator-strength sum rules of hydrogen.

Sources
-------
- Thomas–Reiche–Kuhn sum rule Σ f = 1 for one electron, and its channel-resolved form
  Σ f(l→l+1) = (l+1)(2l+3)/(3(2l+1)), Σ f(l→l−1) = −l(2l−1)/(3(2l+1))
  (Bethe & Salpeter, *Quantum Mechanics of One- and Two-Electron Atoms* (1957), Sec. 61).
- Discrete 1s → np: f = 2⁸ n⁵ (n−1)^{2n−4} / (3 (n+1)^{2n+4}) (Bethe & Salpeter eq. (63.4));
  f(1s→2p) = 0.4162 (from memory, checked below).
- Discrete 2p → n′l′ from the closed-form hydrogen functions (Bethe & Salpeter eq. (3.16)),
  f = (2/3)·ΔE·(l_>/(2l+1))·R², integrated by quadrature here, independently of valband.
- Continuum: df/dε = (2/3)·ω·(l_>/(2l+1))·R_{l′}(ε)² with R from valband (energy-normalised
  continuum functions); equivalently σ = 2π²α a₀² df/dω.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.integrate import simpson
from scipy.special import eval_genlaguerre, gammaln

from valband.atom.cross_section import subshell_cross_section

R = np.geomspace(1e-6, 120.0, 2500)
V_H = -1.0 / R


def u_hydrogen(n: int, l: int, r):
    """u_nl = r R_nl of hydrogen (Bethe & Salpeter eq. (3.16)), normalised analytically."""
    rho = 2.0 * r / n
    log_norm = 0.5 * (3 * math.log(2.0 / n) + gammaln(n - l) - math.log(2 * n) - gammaln(n + l + 1))
    return r * np.exp(log_norm - r / n) * rho**l * eval_genlaguerre(n - l - 1, 2 * l + 1, rho)


def continuum_f(l, binding, u_bound, n_nodes=40, omega_max=400.0):
    """∫ df/dε dε per channel l′ over the continuum (Gauss–Legendre in t = √(I/ω))."""
    t_min = math.sqrt(binding / omega_max)
    x, w = np.polynomial.legendre.leggauss(n_nodes)
    t = 0.5 * (1 - t_min) * x + 0.5 * (1 + t_min)
    w = 0.5 * (1 - t_min) * w
    totals = None
    last = None
    for ti, wi in zip(t, w, strict=True):
        om = binding / ti**2
        res = subshell_cross_section(R, V_H, u_bound, l, binding, om, 1.0)
        dfde = [
            (2.0 / 3.0) * om * max(l, lc) / (2 * l + 1) * rl**2
            for lc, rl in zip(res.channels, res.radial_length_bohr, strict=True)
        ]
        jac = 2.0 * binding / ti**3  # dω/dt
        contrib = np.array(dfde) * jac * wi
        totals = contrib if totals is None else totals + contrib
        if last is None or om > last[0]:
            last = (om, np.array(dfde))
    # power-law tail beyond omega_max (df/dω ∝ ω^-(l+7/2) for hydrogen), < 1e-6 of the total
    om_hi, d_hi = last
    p = l + 3.5
    totals = totals + d_hi * om_hi / (p - 1.0)
    return dict(zip(res.channels, totals, strict=True))


def test_closed_form_f_1s_2p():
    # the closed form against the textbook value 0.4162 (from memory)
    n = 2
    f = 2**8 * n**5 * (n - 1) ** (2 * n - 4) / (3 * (n + 1) ** (2 * n + 4))
    assert f == pytest.approx(0.4162, abs=1e-4)


def test_trk_hydrogen_1s():
    n = np.arange(2, 200_001, dtype=float)
    log_f = (
        8 * math.log(2)
        + 5 * np.log(n)
        + (2 * n - 4) * np.log(n - 1)
        - math.log(3)
        - (2 * n + 4) * np.log(n + 1)
    )
    discrete = float(np.sum(np.exp(log_f)))
    discrete += float(np.exp(log_f[-1]) * n[-1] ** 3) / (2 * n[-1] ** 2)  # Σ n^-3 tail
    cont = continuum_f(0, 0.5, 2.0 * R * np.exp(-R))[1]
    # Bethe & Salpeter Sec. 61: Σ f = 1; brief asks 1 %, we reach ~4e-7
    assert discrete + cont == pytest.approx(1.0, abs=1e-5)
    # the well-known split 0.565 / 0.435 (from memory)
    assert cont == pytest.approx(0.435, abs=2e-3)


def test_channel_sum_rules_hydrogen_2p():
    l = 1
    u2p = u_hydrogen(2, 1, R)
    assert simpson(u2p**2 * R, x=np.log(R)) == pytest.approx(1.0, abs=1e-9)  # sanity
    r_fine = np.geomspace(1e-6, 150.0, 20000)
    ub = u_hydrogen(2, 1, r_fine)
    e_b = -0.125
    discrete = {0: 0.0, 2: 0.0}
    n_max = 60
    last = {}
    for lc in (0, 2):
        for n in range(lc + 1, n_max + 1):
            dE = -0.5 / n**2 - e_b  # 2p → 2s: ΔE = 0 in hydrogen, f = 0
            un = u_hydrogen(n, lc, r_fine)
            rr = simpson(ub * r_fine * un * r_fine, x=np.log(r_fine))
            f = (2.0 / 3.0) * dE * max(l, lc) / (2 * l + 1) * rr**2
            discrete[lc] += f
            last[lc] = f
        # Rydberg series tail f_n ≈ C n^-3
        c = last[lc] * n_max**3
        discrete[lc] += c * (1.0 / (2 * n_max**2) - 1.0 / (2 * n_max**3))
    cont = continuum_f(l, 0.125, u2p)
    # Bethe & Salpeter Sec. 61: l→l+1 sums to 10/9, l→l−1 to −1/9 (includes 2p→1s, f < 0)
    assert discrete[2] + cont[2] == pytest.approx(10.0 / 9.0, abs=1e-4)
    assert discrete[0] + cont[0] == pytest.approx(-1.0 / 9.0, abs=1e-4)
    # f(2p→1s) = −f(1s→2p)/3 = −0.1387 (detailed balance, from memory)
    f21 = (
        (2.0 / 3.0)
        * (-0.5 + 0.125)
        * (1 / 3)
        * simpson(ub * r_fine * u_hydrogen(1, 0, r_fine) * r_fine, x=np.log(r_fine)) ** 2
    )
    assert f21 == pytest.approx(-0.1387, abs=2e-4)
