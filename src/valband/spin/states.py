"""Eigenstates and projections of a spin run on a mesh, for one exchange splitting.

Two solvers with one interface, ``solver(splitting) → States``:

* :class:`CollinearSolver` — no spin–orbit coupling: two real spin blocks H₀ + X_σ through
  :func:`valband.solve.diagonalise` (real gauge and the compiled small solver apply), put side
  by side along the band axis; a zero splitting diagonalises once and uses the result twice.
* :class:`DoubledSolver` — spin–orbit coupling: the complex doubled Hamiltonian through
  :func:`valband.spin.solve.diagonalise_projected`, with site × shell × j channels (their sums
  over j are the site × shell channels) and, for magnetic runs, site × shell × spin channels.

Projections of the wedge's representatives are orbit-averaged over equivalent sites (of the
coloured cell in magnetic runs), which is exact for these channel families.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from valband.results import Channel
from valband.results.channels import channel_matrix
from valband.solve import diagonalise
from valband.spin.channels import doubled_channels
from valband.spin.dos import orbit_average
from valband.spin.model import SPINS, SpinBlockModel, SpinModel

__all__ = ["States", "CollinearSolver", "DoubledSolver"]


@dataclass(frozen=True, eq=False)
class States:
    """Eigenvalues (n_k, n_b), one electron per state, and channel weights per family.

    ``families[kind] = (weights (n_k, n_b, n_c), labels, spins)`` for kind in
    "shell" (both spins), "spin" (one spin each) and, with spin–orbit coupling, "j".
    """

    eig: NDArray[np.float64]
    families: dict


def _keys(labels, spins):
    return [(c.site, c.shell, c.orbital, sp) for c, sp in zip(labels, spins, strict=True)]


class CollinearSolver:
    """Both spin blocks of a collinear model without spin–orbit coupling."""

    def __init__(self, model, kpoints, rep, progress: bool = False) -> None:
        self.model = model
        self.kpoints = kpoints
        self.rep = rep
        self.progress = progress
        self.chans, self.cmat = channel_matrix(model.orbitals, "l")

    def __call__(self, splitting) -> States:
        """States for the per-site exchange splitting (eV)."""
        nch = len(self.chans)
        keys = _keys(self.chans, [None] * nch)
        if not np.any(splitting):
            e, w = diagonalise(self.model, self.kpoints, self.cmat, progress=self.progress)
            w = orbit_average(w, keys, self.rep)
            blocks = [(e, w), (e, w)]
        else:
            blocks = []
            for sp in SPINS:
                blk = SpinBlockModel(self.model, sp, splitting)
                e, w = diagonalise(blk, self.kpoints, self.cmat, progress=self.progress)
                blocks.append((e, orbit_average(w, keys, self.rep)))
        nk, nb = blocks[0][0].shape
        eig = np.concatenate([blocks[0][0], blocks[1][0]], axis=1)
        w_spin = np.zeros((nk, 2 * nb, 2 * nch))
        w_spin[:, :nb, :nch] = blocks[0][1]
        w_spin[:, nb:, nch:] = blocks[1][1]
        labels = self.chans + self.chans
        spins = ("up",) * nch + ("down",) * nch
        shell = w_spin[:, :, :nch] + w_spin[:, :, nch:]
        return States(eig, {"spin": (w_spin, labels, spins),
                            "shell": (shell, self.chans, (None,) * nch)})


class DoubledSolver:
    """The doubled (spin–orbit) Hamiltonian with shell, spin and j channels."""

    def __init__(self, model, spin_orbit, kpoints, rep, spin: bool = True,
                 progress: bool = False) -> None:
        self.model = model
        self.spin_orbit = spin_orbit
        self.kpoints = kpoints
        self.rep = rep
        self.progress = progress
        self.sets = doubled_channels(model.orbitals, ("j", "spin") if spin else ("j",))
        self.shell_labels = tuple(dict.fromkeys(Channel(c.site, c.element, c.shell)
                                                for c in self.sets["j"].labels))
        index = {c: i for i, c in enumerate(self.shell_labels)}
        self.j_to_shell = np.zeros((len(self.sets["j"].labels), len(self.shell_labels)))
        for i, c in enumerate(self.sets["j"].labels):
            self.j_to_shell[i, index[Channel(c.site, c.element, c.shell)]] = 1.0
        self.last_model: SpinModel | None = None

    def __call__(self, splitting) -> States:
        """States for the per-site exchange splitting (eV)."""
        from valband.spin.solve import diagonalise_projected

        sm = SpinModel(self.model, self.spin_orbit, splitting)
        self.last_model = sm
        projs = [p for cs in self.sets.values() for p in cs.projectors]
        eig, w = diagonalise_projected(sm, self.kpoints, projs, progress=self.progress)
        fam, start = {}, 0
        for kind, cs in self.sets.items():
            stop = start + len(cs.projectors)
            part = orbit_average(w[:, :, start:stop], _keys(cs.labels, cs.spins), self.rep)
            fam[kind] = (part, cs.labels, cs.spins)
            start = stop
        n_sh = len(self.shell_labels)
        fam["shell"] = (fam["j"][0] @ self.j_to_shell, self.shell_labels, (None,) * n_sh)
        return States(eig, fam)


def site_moments(occupations, labels: tuple[Channel, ...], spins, n_sites: int, shell=None):
    """n↑ − n↓ per site (μB) from channel occupations, optionally of one shell only."""
    m = np.zeros(n_sites)
    for n, c, sp in zip(occupations, labels, spins, strict=True):
        if shell is None or c.shell == shell:
            m[c.site] += n if sp == "up" else -n
    return m
