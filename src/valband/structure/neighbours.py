"""Neighbour tables with periodic images and per-pair cutoffs, fully vectorised.

Built on :func:`ase.neighborlist.primitive_neighbor_list` (a binned, numpy-vectorised search:
no Python loop over atom pairs), then filtered per element pair.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from valband.errors import SettingsError
from valband.structure.record import Structure

__all__ = ["NeighbourTable", "find_neighbours"]


@dataclass(frozen=True, eq=False)
class NeighbourTable:
    """Directed bonds i → j + R of a periodic cell (both directions are listed).

    Attributes
    ----------
    first, second : ndarray, shape (n_bonds,), int64
        Site indices i and j.
    shifts : ndarray, shape (n_bonds, 3), int64
        Lattice translation R (in lattice-vector units) of the image of j.
    vectors : ndarray, shape (n_bonds, 3), float64, Å
        Bond vector r_j + R·cell − r_i.
    distances : ndarray, shape (n_bonds,), float64, Å
        Bond lengths.
    """

    first: NDArray[np.int64]
    second: NDArray[np.int64]
    shifts: NDArray[np.int64]
    vectors: NDArray[np.float64]
    distances: NDArray[np.float64]

    def __post_init__(self) -> None:
        for name in ("first", "second", "shifts", "vectors", "distances"):
            getattr(self, name).setflags(write=False)

    @property
    def n_bonds(self) -> int:
        """Number of directed bonds."""
        return len(self.first)

    def coordination(self, n_sites: int) -> NDArray[np.int64]:
        """Number of neighbours of each site, shape (n_sites,)."""
        return np.bincount(self.first, minlength=n_sites)


def find_neighbours(
    structure: Structure,
    cutoff: float | Callable[[str, str], float],
) -> NeighbourTable:
    """All directed bonds shorter than a cutoff.

    Parameters
    ----------
    structure
        The cell (periodic in 3D).
    cutoff
        Either one radius in Å for every pair, or ``cutoff(element_a, element_b) -> Å``
        (symmetric in its arguments) giving a radius per element pair.

    Returns
    -------
    NeighbourTable
        Bonds ordered by (first, distance).
    """
    elements = structure.elements
    if callable(cutoff):
        table = np.array([[float(cutoff(a, b)) for b in elements] for a in elements])
    else:
        table = np.full((len(elements), len(elements)), float(cutoff))
    if not np.all(np.isfinite(table)) or np.any(table <= 0):
        raise SettingsError(f"neighbour cutoffs must be positive finite radii in Å, got {table}")
    rmax = float(table.max())
    from ase.neighborlist import primitive_neighbor_list

    i, j, d, vec, shift = primitive_neighbor_list(
        "ijdDS", [True] * 3, structure.cell, structure.positions, rmax, self_interaction=False
    )
    kind = np.array([elements.index(s) for s in structure.symbols], dtype=np.int64)
    keep = d <= table[kind[i], kind[j]]
    i, j, d, vec, shift = i[keep], j[keep], d[keep], vec[keep], shift[keep]
    order = np.lexsort((d, i))
    return NeighbourTable(
        first=i[order].astype(np.int64),
        second=j[order].astype(np.int64),
        shifts=shift[order].astype(np.int64),
        vectors=vec[order].astype(np.float64),
        distances=d[order].astype(np.float64),
    )
