"""Inelastic mean free paths (TPP-2M) and depth weights for layer-resolved spectra.

TPP-2M (Tanuma, Powell & Penn, Surf. Interface Anal. 21, 165 (1994)), for electron kinetic
energy E (eV)::

    λ = E / {E_p² [β ln(γE) − C/E + D/E²]}   (Å)
    E_p = 28.8 (N_v ρ / M)^½ eV             (free-electron plasmon energy)
    β = −0.10 + 0.944 / (E_p² + E_g²)^½ + 0.069 ρ^0.1
    γ = 0.191 ρ^−½,  C = 1.97 − 0.91 U,  D = 53.4 − 20.8 U,  U = N_v ρ / M

with ρ in g/cm³, M in g/mol, N_v valence electrons per atom and E_g the band gap (0 for
metals). The fit covers 50–2000 eV; beyond it (HAXPES) the formula is an extrapolation that is
commonly used (common practice) — :func:`tpp2m_imfp` accepts it and says so in its docstring
rather than refusing.

Material table (:data:`ELEMENTS`)
    densities: common handbook values at room temperature, from memory (CRC Handbook of
    Chemistry and Physics level, 3 significant figures); atomic weights: IUPAC standard atomic
    weights, from memory; N_v: the TPP-2M convention for the transition and noble metals —
    all electrons outside the preceding noble-gas core (plus filled f shell for Pt, Au), i.e.
    d + s electrons: Cu, Ag, Au 11; Ni, Pd, Pt 10; Fe 8; Al 3 (3s² 3p¹).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from valband.errors import InputError, SettingsError

__all__ = ["Material", "ELEMENTS", "tpp2m_imfp", "imfp_of", "depth_weights"]


@dataclass(frozen=True)
class Material:
    """Inputs of TPP-2M for one material: density (g/cm³), molar mass (g/mol), N_v, gap (eV)."""

    name: str
    density_g_cm3: float
    molar_mass_g_mol: float
    valence_electrons: float
    band_gap_ev: float = 0.0
    source: str = ""


_SRC = ("ρ: handbook value at room temperature, from memory; M: IUPAC standard atomic weight, "
        "from memory; N_v: TPP-2M convention (electrons outside the noble-gas core)")

#: TPP-2M inputs of the elemental metals of the shipped parameter sets (sources: module docstring).
ELEMENTS: dict[str, Material] = {
    "Al": Material("Al", 2.70, 26.982, 3, 0.0, _SRC),
    "Fe": Material("Fe", 7.874, 55.845, 8, 0.0, _SRC),
    "Ni": Material("Ni", 8.908, 58.693, 10, 0.0, _SRC),
    "Cu": Material("Cu", 8.96, 63.546, 11, 0.0, _SRC),
    "Pd": Material("Pd", 12.02, 106.42, 10, 0.0, _SRC),
    "Ag": Material("Ag", 10.49, 107.868, 11, 0.0, _SRC),
    "Pt": Material("Pt", 21.45, 195.084, 10, 0.0, _SRC),
    "Au": Material("Au", 19.30, 196.967, 11, 0.0, _SRC),
}


def _positive(value, name: str, unit: str, allow_zero: bool = False) -> float:
    try:
        x = float(value)
    except (TypeError, ValueError):
        raise SettingsError(f"{name} {value!r}: must be a number ({unit})") from None
    if not math.isfinite(x) or x < 0 or (x == 0 and not allow_zero):
        raise SettingsError(f"{name} {value!r} {unit}: must be finite and "
                            f"{'≥ 0' if allow_zero else '> 0'}")
    return x


def tpp2m_imfp(kinetic_energy_ev, density_g_cm3: float, molar_mass_g_mol: float,
               valence_electrons: float, band_gap_ev: float = 0.0):
    """TPP-2M inelastic mean free path in Å (formula in the module docstring).

    Parameters
    ----------
    kinetic_energy_ev : float or array, eV (> 0; fitted for 50–2000 eV, extrapolated beyond)
    density_g_cm3 : g/cm³
    molar_mass_g_mol : g/mol
    valence_electrons : electrons per atom (or per molecule), TPP-2M convention
    band_gap_ev : eV, 0 for metals

    Returns
    -------
    float or ndarray, Å
    """
    rho = _positive(density_g_cm3, "density", "g/cm³")
    m = _positive(molar_mass_g_mol, "molar mass", "g/mol")
    nv = _positive(valence_electrons, "valence electrons N_v", "per atom")
    eg = _positive(band_gap_ev, "band gap", "eV", allow_zero=True)
    e = np.asarray(kinetic_energy_ev, dtype=np.float64)
    if not np.all(np.isfinite(e)) or np.any(e <= 0):
        raise SettingsError(f"kinetic energy {kinetic_energy_ev!r} eV: must be finite and > 0")
    u = nv * rho / m
    ep2 = 28.8**2 * u
    beta = -0.10 + 0.944 / math.sqrt(ep2 + eg * eg) + 0.069 * rho**0.1
    gamma = 0.191 / math.sqrt(rho)
    c = 1.97 - 0.91 * u
    d = 53.4 - 20.8 * u
    lam = e / (ep2 * (beta * np.log(gamma * e) - c / e + d / (e * e)))
    return float(lam) if lam.ndim == 0 else lam


def imfp_of(element: str, kinetic_energy_ev) -> float | NDArray[np.float64]:
    """TPP-2M IMFP (Å) of an elemental metal of :data:`ELEMENTS` at a kinetic energy (eV)."""
    mat = ELEMENTS.get(str(element))
    if mat is None:
        raise InputError(f"no TPP-2M material data for {element!r}; available: "
                         f"{', '.join(ELEMENTS)} (or call tpp2m_imfp with ρ, M and N_v)")
    return tpp2m_imfp(kinetic_energy_ev, mat.density_g_cm3, mat.molar_mass_g_mol,
                      mat.valence_electrons, mat.band_gap_ev)


def depth_weights(z_angstrom, imfp_angstrom: float, theta_deg: float = 0.0) -> NDArray[np.float64]:
    """Escape weights exp(−z / (λ cos θ)) of layers at depths ``z`` (Å below the surface).

    Parameters
    ----------
    z_angstrom : array of depths, Å (≥ 0)
    imfp_angstrom : inelastic mean free path λ, Å (> 0)
    theta_deg : emission angle from the surface normal, degrees, 0 ≤ θ < 90

    Returns
    -------
    ndarray of weights in (0, 1], 1 at the surface. Elastic scattering is neglected
    (straight-line approximation).
    """
    lam = _positive(imfp_angstrom, "inelastic mean free path", "Å")
    try:
        th = float(theta_deg)
    except (TypeError, ValueError):
        raise SettingsError(f"emission angle {theta_deg!r}: must be a number of degrees") from None
    if not math.isfinite(th) or not 0.0 <= th < 90.0:
        raise SettingsError(f"emission angle {theta_deg!r}°: accepted 0 ≤ θ < 90 (from the "
                            "surface normal)")
    z = np.asarray(z_angstrom, dtype=np.float64)
    if not np.all(np.isfinite(z)) or np.any(z < 0):
        raise SettingsError("layer depths z: must be finite and ≥ 0 Å (below the surface)")
    return np.exp(-z / (lam * math.cos(math.radians(th))))
