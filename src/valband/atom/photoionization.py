"""Valence-subshell photoionization of a free atom at a photon energy (eV in, Mb out).

Joins the self-consistent LDA atom (:mod:`valband.atom.scf`) and the continuum and dipole code
(:mod:`valband.atom.cross_section`): the photoelectron moves in the atom's LDA potential with
Latter's tail, V = min(V_LDA, −1/r) (Latter, Phys. Rev. 99, 510 (1955)), and the binding energy
is the LDA eigenvalue (−ε). The bound orbitals follow the atom's ``relativity`` (scalar-
relativistic by default, since it moves the 5d levels by about 1 eV); the continuum is
non-relativistic.

Valence subshells are those a tight-binding basis uses: the highest occupied d subshell, and
the s and p subshells above it (n_d + 1; for sp metals the highest occupied s and p), added
empty when the atom has no electrons there (Cu 4p, Pd 5s and 5p) and bound, so that every
partial DOS of a metal gets a per-electron weight.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from valband.atom.configurations import ground_state_configuration, resolve_element
from valband.atom.continuum import latter_tail
from valband.atom.cross_section import subshell_cross_section_ev
from valband.atom.grid import make_grid
from valband.atom.scf import HARTREE_EV, AtomResult, solve_atom
from valband.errors import CalculationError, SettingsError

__all__ = ["ValenceCrossSection", "valence_atom", "valence_cross_sections"]

_L_LETTER = "spdf"


@dataclass(frozen=True)
class ValenceCrossSection:
    """Photoionization of one valence subshell at one photon energy.

    sigma_mb is for the whole subshell, sigma_per_electron_mb per electron (the weight a
    partial DOS needs, defined also for an empty subshell); beta is the dipole asymmetry
    parameter (NaN below threshold); energies in eV.
    """

    element: str
    subshell: str
    l: int  # noqa: E741 - the angular momentum quantum number
    occupation: float
    binding_energy_ev: float
    photon_energy_ev: float
    sigma_mb: float
    sigma_per_electron_mb: float
    beta: float
    note: str = ""

    def to_dict(self) -> dict:
        """JSON form."""
        return {k: getattr(self, k) for k in self.__dataclass_fields__}


def _valence_shells(config) -> tuple[int | None, int]:
    """(n of the valence d shell or None, n of the valence s and p shells)."""
    n_d = max((n for n, l, occ in config if l == 2 and occ > 0), default=None)
    n_s = max((n for n, l, occ in config if l in (0, 1) and occ > 0), default=1)
    if n_d is not None:
        n_s = max(n_s, n_d + 1)
    return n_d, n_s


def _with_empty_valence(config, shells: tuple[tuple[int, int], ...]) -> tuple:
    """``config`` plus the given (n, l) subshells with zero occupation where absent."""
    cfg = list(config)
    for n, l in shells:  # noqa: E741
        if not any(c[0] == n and c[1] == l for c in cfg):
            cfg.append((n, l, 0.0))
    return tuple(cfg)


#: Outer radius (bohr) of the atom grid for cross sections. Empty valence levels of the
#: neutral atom can be bound by only a few tenths of an eV (Pd 5p: 0.35 eV, decay length
#: ≈ 6 bohr); on the SCF default of 60 bohr their tail is cut off, and the length-form
#: integral then carries an end term that oscillates with photon energy (≈ 27 % scatter for
#: Pd 5p above 1 keV). At 150 bohr the tail is below 1e-10 and the length and velocity
#: forms agree within 3 %.
VALENCE_R_MAX = 150.0


@lru_cache(maxsize=64)
def valence_atom(element: str, relativity: str = "scalar") -> AtomResult:
    """The atom whose orbitals feed the cross sections (cached per element and relativity).

    Empty valence s or p levels are added with zero occupation; one that is not bound in the
    neutral atom's potential is left out. The grid reaches :data:`VALENCE_R_MAX`.
    """
    z, symbol = resolve_element(element)
    grid = make_grid(z, r_max=VALENCE_R_MAX)
    base = ground_state_configuration(symbol)
    _, n_sp = _valence_shells(base)
    wanted = tuple((n_sp, l) for l in (0, 1) if n_sp >= l + 1)
    for extra in (wanted, wanted[:1], ()):
        try:
            return solve_atom(symbol, _with_empty_valence(base, extra), relativity=relativity,
                              grid=grid)
        except CalculationError:
            continue
    raise CalculationError(f"{symbol}: the atom did not converge")  # pragma: no cover


def _valence_orbitals(atom: AtomResult):
    n_d, n_sp = _valence_shells(atom.configuration)
    keep = [(n_sp, 0), (n_sp, 1)] + ([(n_d, 2)] if n_d is not None else [])
    return sorted((o for o in atom.orbitals if (o.n, o.l) in keep), key=lambda o: o.l)


def valence_cross_sections(element: str, photon_energy_ev: float, relativity: str = "scalar"
                           ) -> list[ValenceCrossSection]:
    """σ (Mb), σ per electron and β of every valence subshell of ``element`` at ``photon_energy_ev``.

    A subshell whose threshold lies above the photon energy gets σ = 0 and a note.
    """
    e = float(photon_energy_ev)
    if not np.isfinite(e) or e <= 0:
        raise SettingsError(f"photon energy {photon_energy_ev!r} eV: must be a positive number of eV")
    atom = valence_atom(element, relativity)
    v = latter_tail(atom.r, atom.potential, 1.0)
    out = []
    for orb in _valence_orbitals(atom):
        label = f"{orb.n}{_L_LETTER[orb.l]}"
        binding = -orb.energy * HARTREE_EV
        occ_for_calc = orb.occupation if orb.occupation > 0 else 1.0
        res = subshell_cross_section_ev(atom.r, v, orb.u, orb.l, binding, e, occ_for_calc, 1.0)
        per_e = res.sigma_per_electron_mb
        out.append(ValenceCrossSection(
            element=atom.symbol, subshell=label, l=orb.l, occupation=orb.occupation,
            binding_energy_ev=binding, photon_energy_ev=e, sigma_mb=per_e * orb.occupation,
            sigma_per_electron_mb=per_e, beta=float(res.beta), note=res.note,
        ))
    return out
