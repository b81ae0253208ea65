"""Spin-unpolarised LDA exchange–correlation (Hartree atomic units).

Exchange: Slater/Dirac, ε_x = −(3/4)(3/π)^{1/3} ρ^{1/3}, v_x = (4/3) ε_x.

Correlation:

``"vwn"``
    Vosko, Wilk, Nusair, Can. J. Phys. 58, 1200 (1980), paramagnetic fit to the
    Ceperley–Alder data ("VWN5"), A = 0.0310907, x₀ = −0.10498, b = 3.72744, c = 12.9352.
    This is the correlation of NIST SRD 141 (Kotochigova et al., Phys. Rev. A 55, 191 (1997)).
``"pw92"``
    Perdew & Wang, Phys. Rev. B 45, 13244 (1992), paramagnetic G(r_s) with
    A = 0.031091, α₁ = 0.21370, β = (7.5957, 3.5876, 1.6382, 0.49294).

v_c = ε_c − (r_s/3) dε_c/dr_s. Densities below 1e-30 electrons/bohr³ give ε = v = 0.

Relativistic exchange (optional, ``relativistic_exchange=True``): MacDonald & Vosko, J. Phys.
C 12, 2977 (1979). With β = ħk_F/(mc) = (3π²ρ)^{1/3}/c (atomic units, c = 1/α, α from
``scipy.constants``) the exchange energy density is multiplied by

    Φ(β) = 1 − (3/2)·[(β√(1+β²) − asinh β)/β²]²

and the exchange potential by

    ψ(β) = −1/2 + (3/2)·asinh β/(β√(1+β²)),

which is exactly d(ρ ε_x Φ)/dρ ÷ v_x (ψ = Φ + βΦ′/4). Both tend to 1 as β → 0
(Φ ≈ 1 − 2β²/3, ψ ≈ 1 − β²); below β = 1e-3 the series to β⁴ is used, which avoids the
cancellation in β√(1+β²) − asinh β. Correlation is left non-relativistic. The correction
matters where ρ is large (β ≈ 0.5 at the Cu nucleus, 1.5 at Au's); it is what a
relativistic atom should use (:func:`resolve_relativistic_exchange` switches it on with
relativity="scalar"), and it is absent from non-relativistic LDA tables.
"""

from __future__ import annotations

import math

import numpy as np
import scipy.constants as _sc
from numpy.typing import ArrayLike, NDArray

from valband.errors import SettingsError

__all__ = [
    "CORRELATIONS",
    "RELATIVISTIC_EXCHANGE_CHOICES",
    "functional_description",
    "lda_xc",
    "relativistic_exchange_factors",
    "resolve_relativistic_exchange",
    "slater_exchange",
    "vwn_correlation",
    "pw92_correlation",
]

#: Accepted names of the correlation functional.
CORRELATIONS = ("vwn", "pw92")

_RHO_FLOOR = 1e-30
_CX = -0.75 * (3.0 / math.pi) ** (1.0 / 3.0)

#: Speed of light in atomic units, c = 1/α (CODATA via scipy.constants).
SPEED_OF_LIGHT_AU: float = 1.0 / _sc.fine_structure
#: Below this β the series Φ ≈ 1 − 2β²/3 + 2β⁴/5, ψ ≈ 1 − β² + 4β⁴/5 is used (error < 1e-18).
_BETA_SERIES = 1e-3
#: Accepted values of the relativistic-exchange switch (see resolve_relativistic_exchange).
RELATIVISTIC_EXCHANGE_CHOICES = ("auto", "on", "off")

# VWN5 paramagnetic parameters (Hartree).
_VWN_A = 0.0310907
_VWN_X0 = -0.10498
_VWN_B = 3.72744
_VWN_C = 12.9352

# PW92 paramagnetic parameters (Hartree).
_PW_A = 0.031091
_PW_A1 = 0.21370
_PW_B = (7.5957, 3.5876, 1.6382, 0.49294)


def _split(rho: ArrayLike) -> tuple[NDArray[np.float64], NDArray[np.bool_]]:
    rho = np.asarray(rho, dtype=float)
    return rho, rho > _RHO_FLOOR


def _rs(rho: NDArray[np.float64]) -> NDArray[np.float64]:
    return (3.0 / (4.0 * math.pi * rho)) ** (1.0 / 3.0)


def slater_exchange(rho: ArrayLike) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    """Exchange energy per electron and potential (Hartree) of the uniform gas.

    Parameters
    ----------
    rho : array_like
        Density (electrons/bohr³).

    Returns
    -------
    eps_x, v_x : ndarray
    """
    rho, ok = _split(rho)
    eps = np.zeros_like(rho)
    eps[ok] = _CX * np.cbrt(rho[ok])
    return eps, (4.0 / 3.0) * eps


def relativistic_exchange_factors(
    rho: ArrayLike,
) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    """MacDonald–Vosko factors Φ (energy) and ψ (potential) of the LDA exchange.

    MacDonald & Vosko, J. Phys. C 12, 2977 (1979); the form of the relativistic LDA tables
    (Kotochigova et al., Phys. Rev. A 55, 191 (1997)). ε_x^R = Φ(β) ε_x, v_x^R = ψ(β) v_x with
    β = (3π²ρ)^{1/3}/c.

    Parameters
    ----------
    rho : array_like
        Density (electrons/bohr³).

    Returns
    -------
    phi, psi : ndarray
        Dimensionless factors (1 where ρ ≤ 1e-30).
    """
    rho = np.asarray(rho, dtype=float)
    beta = np.cbrt(3.0 * math.pi**2 * np.maximum(rho, 0.0)) / SPEED_OF_LIGHT_AU
    phi = np.ones_like(beta)
    psi = np.ones_like(beta)
    small = beta < _BETA_SERIES
    b2 = beta[small] ** 2
    phi[small] = 1.0 - (2.0 / 3.0) * b2 + 0.4 * b2 * b2
    psi[small] = 1.0 - b2 + 0.8 * b2 * b2
    big = ~small
    b = beta[big]
    root = np.sqrt(1.0 + b * b)
    ash = np.arcsinh(b)
    phi[big] = 1.0 - 1.5 * ((b * root - ash) / (b * b)) ** 2
    psi[big] = -0.5 + 1.5 * ash / (b * root)
    return phi, psi


def resolve_relativistic_exchange(value: bool | str | None, relativity: str) -> bool:
    """Whether the MacDonald–Vosko exchange correction applies.

    Parameters
    ----------
    value : bool, {"auto", "on", "off"} or None
        ``None``/"auto": on exactly when ``relativity`` is "scalar" (the default of every
        relativistic atom); True/"on", False/"off": as given.
    relativity : {"none", "scalar"}
        The atom's treatment of the kinetic energy.

    Raises
    ------
    SettingsError
        For any other value.
    """
    if value is None or value == "auto":
        return relativity == "scalar"
    if value is True or value == "on":
        return True
    if value is False or value == "off":
        return False
    raise SettingsError(
        f"relativistic_exchange {value!r}; accepted: True/False, None or "
        f"{', '.join(repr(c) for c in RELATIVISTIC_EXCHANGE_CHOICES)} (auto: on when "
        "relativity='scalar')"
    )


def functional_description(correlation: str = "vwn", relativistic_exchange: bool = False) -> str:
    """One-line text of the functional, for provenance records."""
    corr = {
        "vwn": "VWN5 correlation (Vosko, Wilk, Nusair 1980)",
        "pw92": "PW92 correlation (Perdew, Wang 1992)",
    }.get(correlation)
    if corr is None:
        raise SettingsError(
            f"unknown correlation {correlation!r}; accepted: {', '.join(CORRELATIONS)}"
        )
    exch = "Slater exchange"
    if relativistic_exchange:
        exch += " with the relativistic correction of MacDonald & Vosko (1979)"
    return f"LDA: {exch} + {corr}"


def vwn_correlation(rho: ArrayLike) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    """VWN5 paramagnetic correlation energy per electron and potential (Hartree).

    Vosko, Wilk, Nusair, Can. J. Phys. 58, 1200 (1980), eq. 4.4 with the Ceperley–Alder
    paramagnetic parameters.
    """
    rho, ok = _split(rho)
    eps = np.zeros_like(rho)
    pot = np.zeros_like(rho)
    x = np.sqrt(_rs(rho[ok]))
    a, x0, b, c = _VWN_A, _VWN_X0, _VWN_B, _VWN_C
    q = math.sqrt(4.0 * c - b * b)
    xx = x * x + b * x + c
    xx0 = x0 * x0 + b * x0 + c
    at = np.arctan(q / (2.0 * x + b))
    e = a * (
        np.log(x * x / xx)
        + (2.0 * b / q) * at
        - (b * x0 / xx0) * (np.log((x - x0) ** 2 / xx) + (2.0 * (b + 2.0 * x0) / q) * at)
    )
    den = (2.0 * x + b) ** 2 + q * q
    de_dx = a * (
        2.0 / x
        - (2.0 * x + b) / xx
        - 4.0 * b / den
        - (b * x0 / xx0) * (2.0 / (x - x0) - (2.0 * x + b) / xx - 4.0 * (b + 2.0 * x0) / den)
    )
    eps[ok] = e
    # r_s dε/dr_s = (x/2) dε/dx
    pot[ok] = e - x * de_dx / 6.0
    return eps, pot


def pw92_correlation(rho: ArrayLike) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    """PW92 paramagnetic correlation energy per electron and potential (Hartree).

    Perdew & Wang, Phys. Rev. B 45, 13244 (1992), eq. 10 with the ζ = 0 parameters.
    """
    rho, ok = _split(rho)
    eps = np.zeros_like(rho)
    pot = np.zeros_like(rho)
    rs = _rs(rho[ok])
    srs = np.sqrt(rs)
    b1, b2, b3, b4 = _PW_B
    den = 2.0 * _PW_A * (b1 * srs + b2 * rs + b3 * rs * srs + b4 * rs * rs)
    dden = 2.0 * _PW_A * (0.5 * b1 / srs + b2 + 1.5 * b3 * srs + 2.0 * b4 * rs)
    lg = np.log1p(1.0 / den)
    pre = -2.0 * _PW_A * (1.0 + _PW_A1 * rs)
    e = pre * lg
    de_drs = -2.0 * _PW_A * _PW_A1 * lg + pre * (-dden / (den * den + den))
    eps[ok] = e
    pot[ok] = e - rs * de_drs / 3.0
    return eps, pot


def lda_xc(
    rho: ArrayLike, correlation: str = "vwn", relativistic_exchange: bool = False
) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    """LDA exchange–correlation energy per electron ε_xc and potential v_xc (Hartree).

    Parameters
    ----------
    rho : array_like
        Density (electrons/bohr³), spin-unpolarised.
    correlation : {"vwn", "pw92"}
        Correlation fit (VWN5 is what NIST SRD 141 uses).
    relativistic_exchange : bool
        Multiply ε_x by Φ(β) and v_x by ψ(β) (:func:`relativistic_exchange_factors`).

    Returns
    -------
    eps_xc, v_xc : ndarray
        E_xc = ∫ ρ ε_xc d³r and v_xc = δE_xc/δρ.
    """
    if correlation == "vwn":
        ec, vc = vwn_correlation(rho)
    elif correlation == "pw92":
        ec, vc = pw92_correlation(rho)
    else:
        raise SettingsError(
            f"unknown correlation {correlation!r}; accepted: {', '.join(CORRELATIONS)}"
        )
    ex, vx = slater_exchange(rho)
    if relativistic_exchange:
        phi, psi = relativistic_exchange_factors(rho)
        ex = ex * phi
        vx = vx * psi
    return ex + ec, vx + vc
