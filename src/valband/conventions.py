"""Conventions shared by every module: units, energy zero, orbital order, array axes.

Units at every public boundary
    energies in eV, lengths in Å, k-points in fractional reciprocal coordinates
    (cycles per lattice vector, i.e. ``k_cart = k_frac @ reciprocal_cell`` with
    ``reciprocal_cell = 2π inv(cell).T``), temperatures in K, photon energies in eV.
    Physical constants come from :mod:`scipy.constants` (CODATA 2018 in current SciPy);
    :data:`HBAR2_OVER_M` is derived from it here and nowhere else.

Cell and positions
    lattice vectors are the *rows* of ``cell`` (ASE's convention); positions are Cartesian Å.

Energy zero
    every energy in a result is relative to the Fermi level, E − E_F (negative when
    occupied), unless the field says ``absolute``. Binding energy is BE = E_F − E.

DOS normalisation
    densities of states are states / eV / cell and include both spin directions
    (spin-degenerate calculations count each orbital twice, :data:`SPIN_DEGENERACY`).

Orbital order inside a site block
    s; p_x, p_y, p_z; d_xy, d_yz, d_zx, d_x²−y², d_3z²−r² (the order of Slater & Koster,
    Phys. Rev. 94, 1498 (1954), Table I). A site carries any subset of the shells s, p, d,
    always in this order. :data:`ORBITALS` is the one place that order is written down.

Array axes
    eigenvalues ``(k, band)``; projections ``(k, band, orbital)``; DOS ``(energy,)`` or
    ``(channel, energy)``; k-points ``(k, 3)``.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Literal

import scipy.constants as _sc

__all__ = [
    "SHELLS",
    "SHELL_L",
    "ORBITALS",
    "SHELL_ORBITALS",
    "SPIN_DEGENERACY",
    "HBAR2_OVER_M",
    "KB_EV",
    "OrbitalLabel",
    "Shell",
]

Shell = Literal["s", "p", "d"]

#: Shells in their fixed order.
SHELLS: tuple[Shell, ...] = ("s", "p", "d")

#: Angular momentum of each shell.
SHELL_L: dict[str, int] = {"s": 0, "p": 1, "d": 2}

#: Orbital names of each shell, in the fixed order.
SHELL_ORBITALS: dict[str, tuple[str, ...]] = {
    "s": ("s",),
    "p": ("px", "py", "pz"),
    "d": ("dxy", "dyz", "dzx", "dx2-y2", "dz2"),
}

#: All nine orbitals of a full s, p, d site in their fixed order (index = position in the
#: 9×9 Slater–Koster block of :mod:`valband.tb.slater_koster`).
ORBITALS: tuple[str, ...] = tuple(o for sh in SHELLS for o in SHELL_ORBITALS[sh])

#: Both spin directions per orbital in spin-degenerate calculations.
SPIN_DEGENERACY = 2

#: ħ²/m_e in eV·Å² (≈ 7.62), from CODATA via scipy.constants.
HBAR2_OVER_M: float = _sc.hbar**2 / _sc.m_e / _sc.e * 1e20

#: Boltzmann constant in eV/K.
KB_EV: float = _sc.k / _sc.e


@dataclass(frozen=True, order=True)
class OrbitalLabel:
    """Explicit label of one basis orbital: site index, element, shell and orbital name."""

    site: int
    element: str
    shell: str
    orbital: str

    def __str__(self) -> str:
        return f"{self.element}{self.site}:{self.orbital}"
