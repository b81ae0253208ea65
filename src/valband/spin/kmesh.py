"""k-meshes for spin-polarised and spin–orbit runs: which symmetry may reduce the mesh.

* Spin–orbit coupling without magnetism: H commutes with every space-group operation acting
  on orbitals and spin together and with time reversal, so the crystal's wedge with k ≡ −k
  is exact for eigenvalues (Kramers pairs E_↑(k) = E_↓(−k)) and for channels invariant under
  the point group (site × shell and site × shell × j, orbit-averaged over equivalent sites).
* Collinear magnetism without spin–orbit coupling: each spin block is a real spinless
  Hamiltonian with the symmetry of the *magnetic pattern* (operations that map every site
  onto one with the same element and moment), and H_σ(−k) = H_σ(k)*, so the wedge of that
  coloured crystal with time reversal is exact for each spin.
* Magnetism with spin–orbit coupling: the moment (an axial vector along z) is flipped by time
  reversal and turned by rotations that do not keep z; the full mesh is used.

The coloured crystal is handed to :func:`valband.kspace.make_mesh` (the only spglib caller
stays :mod:`valband.kspace.symmetry`) as a small stand-in whose ``to_spglib`` gives each
(element, moment) class its own type number.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from valband.kspace import KMesh, make_mesh
from valband.kspace.symmetry import equivalent_sites

__all__ = ["ColouredCell", "colours_of", "spin_mesh", "equivalent_sites_of"]


@dataclass(frozen=True, eq=False)
class ColouredCell:
    """A structure whose sites are told apart by a colour (e.g. the sign of the moment)."""

    structure: object
    colours: tuple[int, ...]

    def to_spglib(self):
        """Return spglib's (lattice, fractional positions, numbers) with colour-coded numbers."""
        lattice, pos, numbers = self.structure.to_spglib()
        return lattice, pos, np.asarray(numbers) * 1000 + np.asarray(self.colours)

    @property
    def n_sites(self) -> int:
        """Number of sites."""
        return self.structure.n_sites


def colours_of(moments) -> tuple[int, ...]:
    """One colour per distinct starting moment (rounded to 1e-6 μB), in order of appearance."""
    keys = [round(float(m), 6) for m in moments]
    order = list(dict.fromkeys(keys))
    return tuple(order.index(k) for k in keys)


def spin_mesh(structure, mesh, kind: str = "monkhorst-pack", symmetry: bool = True,
              colours=None, spin_orbit: bool = False) -> tuple[KMesh, object]:
    """Build the mesh of a spin run and the cell whose symmetry reduced it.

    ``colours`` (one int per site) marks the magnetic pattern, None for a non-magnetic run.
    Returns ``(kmesh, cell)``; pass ``cell`` to :func:`equivalent_sites_of`.
    """
    magnetic = colours is not None
    if magnetic and spin_orbit:
        return make_mesh(structure, mesh, kind=kind, symmetry=False), structure
    cell = ColouredCell(structure, tuple(int(c) for c in colours)) if magnetic else structure
    return make_mesh(cell, mesh, kind=kind, symmetry=symmetry, time_reversal=True), cell


def equivalent_sites_of(cell) -> np.ndarray:
    """Return the representative site of each site's orbit under the (coloured) cell's symmetry."""
    return equivalent_sites(cell)
