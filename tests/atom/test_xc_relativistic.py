"""MacDonald–Vosko relativistic correction of the LDA exchange, and where it is switched on.

sources
- MacDonald & Vosko, J. Phys. C 12, 2977 (1979): ε_x^R = Φ(β) ε_x, v_x^R = ψ(β) v_x with
  β = (3π²ρ)^{1/3}/c, Φ = 1 − (3/2)[(β√(1+β²) − asinh β)/β²]², ψ = −1/2 + (3/2) asinh β /
  (β√(1+β²)). Checks that do not reuse our formulas: (i) the potential is the functional
  derivative, so ψ v_x must equal a numerical derivative d(ρ ε_x Φ)/dρ (central differences
  of the energy density alone); (ii) the limits β → 0 (Φ, ψ → 1, the non-relativistic gas;
  Taylor series Φ = 1 − 2β²/3 + O(β⁴), ψ = 1 − β² + O(β⁴) worked out by hand from the
  closed forms) and β → ∞ (Φ, ψ → −1/2, the ultra-relativistic limit of the same paper:
  (β√(1+β²) − asinh β)/β² → 1).
- NIST SRD 141 non-relativistic LDA (Kotochigova et al., Phys. Rev. A 55, 191 (1997)) has no
  such term: relativity="none" must leave it off (tests/atom/test_atom_nist_lda.py keeps the
  1e-5 Ha agreement).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
import scipy.constants as sc

from valband.atom import solve_atom
from valband.atom.xc import (
    functional_description,
    lda_xc,
    relativistic_exchange_factors,
    resolve_relativistic_exchange,
    slater_exchange,
)
from valband.errors import SettingsError

C = 1.0 / sc.fine_structure  # speed of light in atomic units (CODATA via SciPy)


def _rho_of_beta(beta):
    return (np.asarray(beta) * C) ** 3 / (3.0 * math.pi**2)


def _exchange_energy_density(rho):
    ex, _ = slater_exchange(rho)
    phi, _ = relativistic_exchange_factors(rho)
    return rho * ex * phi


@pytest.mark.parametrize("rho, rel_step", [
    # β from 1.1e-3 to 5.3 (electrons/bohr³ up to the Au nucleus); error of the central
    # difference ~1e-10 at a relative step 1e-5
    (np.logspace(-4, 8, 49), 1e-5),
    # β just below and above 1e-3, where the code changes from the series to the closed form
    (_rho_of_beta(np.array([0.5e-3, 0.9e-3, 0.999e-3, 1.001e-3, 1.1e-3, 2e-3])), 1e-4),
], ids=["wide range", "series switch"])
def test_potential_is_the_derivative_of_the_energy_density(rho, rel_step):
    # v_x^R = d(ρ ε_x Φ)/dρ by central differences: an independent route to ψ
    h = rel_step * rho
    numeric = (_exchange_energy_density(rho + h) - _exchange_energy_density(rho - h)) / (2 * h)
    _, vx = slater_exchange(rho)
    _, psi = relativistic_exchange_factors(rho)
    np.testing.assert_allclose(psi * vx, numeric, rtol=1e-8)


def test_small_beta_limit():
    beta = np.array([1e-6, 1e-4, 1e-3, 3e-3, 1e-2, 3e-2])
    phi, psi = relativistic_exchange_factors(_rho_of_beta(beta))
    # leading corrections −2β²/3 and −β²; the next term is O(β⁴) with a coefficient below 1
    assert np.all(np.abs(phi - (1.0 - 2.0 / 3.0 * beta**2)) <= beta**4 + 1e-15)
    assert np.all(np.abs(psi - (1.0 - beta**2)) <= beta**4 + 1e-15)
    zero_phi, zero_psi = relativistic_exchange_factors(np.array([0.0, 1e-40]))
    np.testing.assert_array_equal(zero_phi, 1.0)
    np.testing.assert_array_equal(zero_psi, 1.0)


def test_ultrarelativistic_limit():
    # β → ∞: both factors tend to −1/2, with corrections of order ln β / β²
    beta = np.array([1e3, 1e4])
    phi, psi = relativistic_exchange_factors(_rho_of_beta(beta))
    assert np.all(np.abs(phi + 0.5) < 5 * np.log(beta) / beta**2)
    assert np.all(np.abs(psi + 0.5) < 5 * np.log(beta) / beta**2)


def test_factors_decrease_monotonically():
    # the relativistic exchange hole is weaker at every density (MacDonald & Vosko 1979, Fig. 1)
    phi, psi = relativistic_exchange_factors(_rho_of_beta(np.logspace(-3, 2, 200)))
    assert np.all(np.diff(phi) < 0) and np.all(np.diff(psi) < 0)
    assert np.all(psi < phi)  # ψ = Φ + βΦ′/4 with Φ′ < 0


def test_lda_xc_switch():
    rho = np.logspace(-6, 6, 13)
    e0, v0 = lda_xc(rho)
    e1, v1 = lda_xc(rho, "vwn", relativistic_exchange=True)
    ex, vx = slater_exchange(rho)
    phi, psi = relativistic_exchange_factors(rho)
    np.testing.assert_allclose(e1, e0 + ex * (phi - 1.0), rtol=1e-13)
    np.testing.assert_allclose(v1, v0 + vx * (psi - 1.0), rtol=1e-13)


@pytest.mark.parametrize(("value", "relativity", "expected"), [
    (None, "scalar", True), ("auto", "scalar", True), (None, "none", False),
    ("auto", "none", False), ("on", "none", True), (True, "none", True), ("off", "scalar", False),
    (False, "scalar", False),
])
def test_resolution_of_the_switch(value, relativity, expected):
    assert resolve_relativistic_exchange(value, relativity) is expected


def test_bad_switch_value_names_the_choices():
    with pytest.raises(SettingsError, match="auto.*on.*off"):
        resolve_relativistic_exchange("yes", "scalar")
    with pytest.raises(SettingsError, match="relativistic_exchange"):
        solve_atom("He", relativistic_exchange="sometimes")


def test_defaults_of_the_atom_and_its_record():
    nr = solve_atom("Ne")
    sr = solve_atom("Ne", relativity="scalar")
    assert not nr.relativistic_exchange and sr.relativistic_exchange
    assert "MacDonald & Vosko" in sr.functional and "MacDonald" not in nr.functional
    assert nr.functional == functional_description("vwn", False)
    # explicit off gives back the uncorrected scalar-relativistic atom
    off = solve_atom("Ne", relativity="scalar", relativistic_exchange="off")
    assert not off.relativistic_exchange
    # Ne: β ≈ 0.15 at the nucleus, so the correction is small but positive in energy (a weaker
    # exchange hole) and the 1s level, the deepest, moves most (common practice: the
    # correction acts where the density is highest)
    de = sr.total_energy - off.total_energy
    assert 0 < de < 1e-3 * abs(sr.total_energy)
    shift = {k: sr.eigenvalues[k] - off.eigenvalues[k] for k in sr.eigenvalues}
    assert shift["1s"] > 0
    assert abs(shift["1s"]) > abs(shift["2p"])
