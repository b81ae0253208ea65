"""Fermi level, channel occupations and DOS curves of states that hold one electron each.

The array kernels of :mod:`valband.dos` take the degeneracy as an argument; here it is 1
(spin–orbit bands, or the two spin blocks of a collinear run side by side as one band set —
each band is integrated on its own, so concatenating the two blocks along the band axis is
exact for both the smearing and the tetrahedron methods).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray
from scipy.special import erfc

from valband.dos import (
    find_fermi_level,
    smearing_count,
    smearing_dos,
    tetrahedron_classes,
    tetrahedron_count,
    tetrahedron_dos,
    tetrahedron_integrate,
)

__all__ = ["Integrator", "orbit_average"]


@dataclass(frozen=True, eq=False)
class Integrator:
    """Brillouin-zone integration of one mesh with one method (degeneracy 1)."""

    kmesh: object
    reciprocal_cell: NDArray[np.float64]
    method: str
    width: float

    def __post_init__(self) -> None:
        classes = None
        if self.method == "tetrahedron":
            km = self.kmesh
            classes = tetrahedron_classes(km.mesh, self.reciprocal_cell, km.ir_map,
                                          km.n_irreducible)
        object.__setattr__(self, "_classes", classes)

    def count(self, eig, energy: float) -> float:
        """Electrons below ``energy`` (eV)."""
        km = self.kmesh
        if self.method == "tetrahedron":
            return tetrahedron_count(km.mesh, self.reciprocal_cell, km.ir_map, eig, energy,
                                     degeneracy=1.0, classes=self._classes)
        return smearing_count(eig, km.weights, energy, self.width, self.method, degeneracy=1.0)

    def fermi_level(self, eig, n_electrons: float) -> float:
        """E_F (eV) with N(E_F) = n_electrons."""
        margin = 1e-6 if self.method == "tetrahedron" else (
            50.0 * self.width if self.method == "gaussian" else 1e4 * self.width)
        lo, hi = float(eig.min()) - margin, float(eig.max()) + margin
        return find_fermi_level(lambda e: self.count(eig, e), n_electrons, lo, hi,
                                max_electrons=eig.shape[1], tol=1e-8)

    def occupations(self, eig, weights, e_f: float) -> NDArray[np.float64]:
        """Electrons per channel below E_F, shape (n_channels,)."""
        km = self.kmesh
        if self.method == "tetrahedron":
            return np.array([
                tetrahedron_integrate(km.mesh, self.reciprocal_cell, km.ir_map, eig, e_f,
                                      np.ascontiguousarray(weights[:, :, c]), degeneracy=1.0,
                                      classes=self._classes)
                for c in range(weights.shape[2])
            ])
        x = (e_f - eig) / self.width
        theta = 0.5 * erfc(-x / np.sqrt(2.0)) if self.method == "gaussian" else (
            0.5 + np.arctan(x) / np.pi)
        return np.einsum("k,kb,kbc->c", km.weights, theta, weights)

    def dos(self, eig, weights, energies_abs):
        """(total, channels) in states / eV / cell on an absolute energy grid."""
        km = self.kmesh
        if self.method == "tetrahedron":
            return tetrahedron_dos(km.mesh, self.reciprocal_cell, km.ir_map, eig, energies_abs,
                                   weights, degeneracy=1.0, classes=self._classes)
        return smearing_dos(eig, km.weights, energies_abs, self.width, self.method, weights,
                            degeneracy=1.0)


def orbit_average(weights: NDArray, keys: list[tuple], rep: NDArray[np.int64]) -> NDArray:
    """Average channels over orbits of equivalent sites.

    ``keys[c] = (site, rest…)``; channels whose sites share a representative ``rep[site]`` and
    whose ``rest`` agree are averaged (exact on the wedge, see :mod:`valband.workflows.dos`).
    """
    groups: dict[tuple, list[int]] = {}
    for c, key in enumerate(keys):
        groups.setdefault((int(rep[key[0]]),) + tuple(key[1:]), []).append(c)
    if all(len(g) == 1 for g in groups.values()):
        return weights
    avg = np.zeros((len(keys), len(keys)))
    for members in groups.values():
        for a in members:
            avg[a, members] = 1.0 / len(members)
    return weights @ avg.T
