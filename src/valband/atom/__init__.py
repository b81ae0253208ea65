"""Radial Kohn–Sham atom: LDA (VWN or PW92), non- or scalar-relativistic, bound states.

A scalar-relativistic atom uses the MacDonald–Vosko relativistic exchange by default
(:mod:`valband.atom.xc`); ``AtomResult.functional`` says what was used.

Public entry points
    :func:`solve_atom` → :class:`AtomResult`; :func:`ground_state_configuration` and
    :func:`parse_configuration` for electron configurations. Internals work in Hartree and
    bohr; the result converts at its edge (``eigenvalues_ev()``, ``r_angstrom()``).

This package does not import the tight-binding code.
"""

from .configurations import (
    ConfigurationError,
    format_configuration,
    ground_state_configuration,
    parse_configuration,
)
from .photoionization import ValenceCrossSection, valence_cross_sections
from .scf import AtomResult, EnergyComponents, Orbital, solve_atom
from .spin_orbit import spin_orbit_constant, spin_orbit_constant_ev

__all__ = [
    "AtomResult",
    "ConfigurationError",
    "EnergyComponents",
    "Orbital",
    "format_configuration",
    "ground_state_configuration",
    "parse_configuration",
    "solve_atom",
    "spin_orbit_constant",
    "spin_orbit_constant_ev",
    "ValenceCrossSection",
    "valence_cross_sections",
]
