"""Spin-resolved tight-binding models that quack like :class:`valband.tb.TBModel`.

:class:`SpinModel` doubles the basis (spin-major: all orbitals ↑, then all ↓; see
:mod:`valband.spin.angular`) and adds onsite terms to H(k):

    H(k) = [[H₀(k) + X↑, 0], [0, H₀(k) + X↓]] + Σ_shells ξ L·S,   S(k) = 1₂ ⊗ S₀(k),

with X_σ the diagonal Stoner shifts of the d orbitals (∓ΔE_i/2, ΔE_i = I_i m_i, moment along
z) and the spin–orbit term onsite per p and d shell (the onsite overlap is the identity, so
non-orthogonal sets take it unchanged; common practice). Each state holds one electron:
``spin_degeneracy = 1``. With spin–orbit coupling H is complex, so the solver's real-gauge
test fails and it takes the complex LAPACK path.

:class:`SpinBlockModel` is one spin block of a collinear model without spin–orbit coupling,
H₀(k) + X_σ: real-gauge friendly and half the size, for the Stoner iterations.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from functools import cached_property

import numpy as np
from numpy.typing import ArrayLike, NDArray

from valband.conventions import SHELL_L, OrbitalLabel
from valband.errors import SettingsError
from valband.spin.angular import l_dot_s
from valband.spin.kmesh import ColouredCell, colours_of
from valband.spin.soc import SpinOrbitConstant, spin_orbit_constants

__all__ = ["SPINS", "SpinModel", "SpinBlockModel", "spin_model", "exchange_shifts", "shell_blocks"]

#: Spin labels in basis order, and their sign in the exchange shift ∓ΔE/2.
SPINS = ("up", "down")
_SIGN = {"up": -1.0, "down": 1.0}


def shell_blocks(orbitals: tuple[OrbitalLabel, ...]) -> list[tuple[int, str, str, NDArray]]:
    """(site, element, shell, orbital indices) of every site shell of a basis, in order."""
    out: dict[tuple[int, str, str], list[int]] = {}
    for i, o in enumerate(orbitals):
        out.setdefault((o.site, o.element, o.shell), []).append(i)
    return [(s, e, sh, np.array(ix, dtype=np.int64)) for (s, e, sh), ix in out.items()]


def exchange_shifts(orbitals: tuple[OrbitalLabel, ...], splitting: ArrayLike, spin: str):
    """Diagonal onsite shifts (eV) of one spin: ∓ΔE_i/2 on the d orbitals of site i."""
    dE = np.asarray(splitting, dtype=np.float64)
    site = np.array([o.site for o in orbitals])
    is_d = np.array([o.shell == "d" for o in orbitals])
    return np.where(is_d, _SIGN[spin] * 0.5 * dE[site], 0.0)


def _check_splitting(splitting, n_sites: int) -> NDArray[np.float64]:
    if splitting is None:
        return np.zeros(n_sites)
    dE = np.asarray(splitting, dtype=np.float64).reshape(-1)
    if dE.shape != (n_sites,) or not np.all(np.isfinite(dE)):
        raise SettingsError(
            f"exchange splitting: need {n_sites} finite values (eV, one per site), got {dE.shape}"
        )
    return dE


@dataclass(frozen=True, eq=False)
class SpinBlockModel:
    """One spin block H₀(k) + X_σ of a collinear model (basis and sizes of the base model)."""

    base: object
    spin: str
    splitting: NDArray[np.float64]

    def __post_init__(self) -> None:
        if self.spin not in SPINS:
            raise SettingsError(f"spin {self.spin!r}: accepted {', '.join(SPINS)}")
        dE = _check_splitting(self.splitting, self.base.structure.n_sites)
        object.__setattr__(self, "splitting", dE)

    structure = property(lambda self: self.base.structure)
    orbitals = property(lambda self: self.base.orbitals)
    n_orbitals = property(lambda self: self.base.n_orbitals)
    n_sites = property(lambda self: self.base.structure.n_sites)
    orthogonal = property(lambda self: self.base.orthogonal)
    parameter_set = property(lambda self: self.base.parameter_set)
    parameter_version = property(lambda self: self.base.parameter_version)
    #: Electrons of this spin are not fixed by the model; the pair fixes them together.
    spin_degeneracy = 1

    @cached_property
    def shifts(self) -> NDArray[np.float64]:
        """Diagonal onsite shifts of this spin (eV), shape (norb,)."""
        return exchange_shifts(self.base.orbitals, self.splitting, self.spin)

    def hamiltonian_and_overlap(self, kpts: ArrayLike):
        """(H₀(k) + X_σ, S₀(k)) for a chunk of fractional k-points."""
        h, s = self.base.hamiltonian_and_overlap(kpts)
        d = np.arange(self.n_orbitals)
        h = np.array(h, copy=True)
        h[:, d, d] += self.shifts
        return h, s


@dataclass(frozen=True, eq=False)
class SpinModel:
    """A model in the doubled (spin-major) basis with spin–orbit and Stoner onsite terms.

    Attributes
    ----------
    base : TBModel (or anything with its protocol)
    spin_orbit : dict (element, shell) → SpinOrbitConstant (empty: no spin–orbit coupling)
    splitting : (n_sites,) float, eV — exchange splitting ΔE_i = I_i m_i (zeros: none)
    """

    base: object
    spin_orbit: Mapping[tuple[str, str], SpinOrbitConstant] = field(default_factory=dict)
    splitting: NDArray[np.float64] | None = None

    spin_degeneracy = 1

    def __post_init__(self) -> None:
        dE = _check_splitting(self.splitting, self.base.structure.n_sites)
        object.__setattr__(self, "splitting", dE)
        object.__setattr__(self, "spin_orbit", dict(self.spin_orbit))

    structure = property(lambda self: self.base.structure)
    n_sites = property(lambda self: self.base.structure.n_sites)
    n_electrons = property(lambda self: self.base.n_electrons)
    orthogonal = property(lambda self: self.base.orthogonal)
    parameter_set = property(lambda self: self.base.parameter_set)
    parameter_version = property(lambda self: self.base.parameter_version)

    @property
    def n_orbitals(self) -> int:
        """Size of the doubled basis, 2 × the base model's."""
        return 2 * self.base.n_orbitals

    @property
    def has_spin_orbit(self) -> bool:
        """True when some shell has ξ > 0."""
        return any(c.xi_ev > 0 for c in self.spin_orbit.values())

    @property
    def magnetic(self) -> bool:
        """True when some site has a non-zero exchange splitting."""
        return bool(np.any(self.splitting != 0))

    @property
    def symmetry_cell(self):
        """What may reduce the k-mesh (see :mod:`valband.spin.kmesh`).

        The structure when non-magnetic; the coloured cell of the magnetic pattern when
        magnetic without spin–orbit coupling; None (use the full mesh) when both.
        """
        if not self.magnetic:
            return self.structure
        if self.has_spin_orbit:
            return None
        return ColouredCell(self.structure, colours_of(self.splitting))

    @cached_property
    def orbitals(self) -> tuple[OrbitalLabel, ...]:
        """Doubled basis labels: orbital names carry ``_up`` / ``_down``."""
        return tuple(
            OrbitalLabel(o.site, o.element, o.shell, f"{o.orbital}_{sp}")
            for sp in SPINS for o in self.base.orbitals
        )

    @cached_property
    def onsite_matrix(self) -> NDArray[np.complex128]:
        """The added onsite terms (spin–orbit and exchange), (2n, 2n) complex, eV."""
        n = self.base.n_orbitals
        m = np.zeros((2 * n, 2 * n), dtype=np.complex128)
        for _, el, sh, idx in shell_blocks(self.base.orbitals):
            c = self.spin_orbit.get((el, sh))
            if c is None or c.xi_ev == 0 or SHELL_L[sh] == 0:
                continue
            both = np.concatenate([idx, n + idx])
            m[np.ix_(both, both)] += c.xi_ev * l_dot_s(SHELL_L[sh])
        d = np.arange(n)
        for k, sp in enumerate(SPINS):
            m[k * n + d, k * n + d] += exchange_shifts(self.base.orbitals, self.splitting, sp)
        m.setflags(write=False)
        return m

    def hamiltonian_and_overlap(self, kpts: ArrayLike):
        """(H(k), S(k)) in the doubled basis, (nk, 2n, 2n) complex; S None if orthogonal."""
        h0, s0 = self.base.hamiltonian_and_overlap(kpts)
        n = self.base.n_orbitals
        h = np.zeros((h0.shape[0], 2 * n, 2 * n), dtype=np.complex128)
        h[:, :n, :n] = h0
        h[:, n:, n:] = h0
        h += self.onsite_matrix
        if s0 is None:
            return h, None
        s = np.zeros_like(h)
        s[:, :n, :n] = s0
        s[:, n:, n:] = s0
        return h, s

    def hamiltonian(self, kpts: ArrayLike):
        """H(k) in the doubled basis."""
        return self.hamiltonian_and_overlap(kpts)[0]

    def overlap(self, kpts: ArrayLike):
        """S(k) in the doubled basis, or None if orthogonal."""
        return self.hamiltonian_and_overlap(kpts)[1]

    def describe(self) -> dict:
        """Return the provenance record: spin–orbit constants (with sources) and splittings."""
        return {
            "basis": "spin-major doubled basis (all orbitals up, then down); moment along z",
            "spin_orbit": [c.to_dict() for c in self.spin_orbit.values()],
            "exchange_splitting_eV": self.splitting.tolist(),
        }


def spin_model(model, soc=True, params=None, splitting=None) -> SpinModel:
    """Wrap a TBModel in the doubled basis.

    Parameters
    ----------
    model : valband.tb.TBModel
    soc : True (ξ from the parameter set, else the atom engine), False, or a mapping
        element → ξ_d in eV (or element → {shell: ξ}); see :mod:`valband.spin.soc`
    params : the ParameterSet the model was built from (for ξ it may carry), or None
    splitting : per-site exchange splitting ΔE_i = I_i m_i in eV, or None

    Returns
    -------
    SpinModel, usable by :func:`valband.solve.diagonalise`, :func:`valband.workflows.compute_bands`
    and the functions of :mod:`valband.spin.workflows`.
    """
    if isinstance(model, SpinModel):
        raise SettingsError("spin_model: the model is already in the doubled spin basis")
    shells_of: dict[str, list[str]] = {}
    for o in model.orbitals:
        lst = shells_of.setdefault(o.element, [])
        if o.shell not in lst:
            lst.append(o.shell)
    consts = spin_orbit_constants({e: tuple(s) for e, s in shells_of.items()}, soc, params)
    return SpinModel(model, consts, splitting)
