"""Spin–orbit constants ξ_nl of valence p and d shells from the atom's radial functions.

First-order spin–orbit coupling on top of the scalar-relativistic orbitals (Koelling &
Harmon, J. Phys. C 10, 3107 (1977), Eq. 12; in Hartree atomic units, c = 1/α):

    ξ_nl = ∫ u_nl(r)² · (α²/2) · (1/M(r)²) · (1/r) dV/dr dr,   M(r) = 1 + (α²/2)(ε_nl − V(r)),

so that H_so = ξ_nl L·S and the j = l ± ½ levels split by ΔE = (l + ½)·ξ_nl (for a d shell
(5/2)ξ_d). dV/dr comes from V(x) on the uniform x = ln r grid by fourth-order central
differences. Returned in eV at the public edge, for the tight-binding Hamiltonian.

The atom should be scalar-relativistic with the MacDonald–Vosko relativistic exchange, the
default of :func:`valband.atom.solve_atom` for relativity="scalar" (and what
:mod:`valband.spin.soc` uses); the correction lowers (5/2)ξ_d by 0.1–0.3 % for Cu, Ag, Au
(measured: Au 1.5176 → 1.5129 eV, NIST SRD 141 RLDA splitting 1.5333 eV). On a
non-relativistic atom the same integral is the Pauli estimate (orbitals without the
relativistic contraction).
"""

from __future__ import annotations

import numpy as np
import scipy.constants as _sc

from valband.atom.grid import RadialGrid
from valband.atom.scf import HARTREE_EV, AtomResult
from valband.errors import SettingsError

__all__ = ["radial_spin_orbit", "spin_orbit_constant", "spin_orbit_constant_ev"]

_ALPHA2 = _sc.fine_structure**2


def _derivative_x(f: np.ndarray, h: float) -> np.ndarray:
    """df/dx on a uniform grid: fourth-order central differences, second order at the ends."""
    d = np.empty_like(f)
    d[2:-2] = (f[:-4] - 8.0 * f[1:-3] + 8.0 * f[3:-1] - f[4:]) / (12.0 * h)
    d[:2] = (f[1:3] - f[0:2]) / h
    d[-2:] = (f[-2:] - f[-3:-1]) / h
    return d


def radial_spin_orbit(grid: RadialGrid, potential, u, energy: float) -> float:
    """ξ in Hartree for a radial function u (∫u² dr = 1) of energy ε (Ha) in V(r) (Ha)."""
    r = grid.r
    v = np.asarray(potential, dtype=np.float64)
    dv_dr = _derivative_x(v, grid.h) / r
    mass = 1.0 + 0.5 * _ALPHA2 * (energy - v)
    return grid.integrate(np.asarray(u) ** 2 * 0.5 * _ALPHA2 * dv_dr / (r * mass**2))


def spin_orbit_constant(atom: AtomResult, subshell: str) -> float:
    """ξ_nl in Hartree of the subshell (e.g. ``"5d"``) of a solved atom (l ≥ 1)."""
    orb = atom.orbital(subshell)
    if orb.l < 1:
        raise SettingsError(f"spin–orbit constant of {subshell}: s shells (l = 0) have none")
    return radial_spin_orbit(atom.grid, atom.potential, orb.u, orb.energy)


def spin_orbit_constant_ev(atom: AtomResult, subshell: str) -> float:
    """ξ_nl in eV (see :func:`spin_orbit_constant`)."""
    return spin_orbit_constant(atom, subshell) * HARTREE_EV
