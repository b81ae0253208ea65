"""The validated structure record every calculation works on.

ASE's mutable :class:`ase.Atoms` is accepted at the edge (:meth:`Structure.from_atoms`);
inside valband a structure is this small frozen record with read-only arrays.
"""

from __future__ import annotations

import functools
from dataclasses import dataclass, field

import numpy as np
from ase.data import atomic_numbers, chemical_symbols
from numpy.typing import NDArray

from valband.arrays import readonly
from valband.errors import StructureError

__all__ = ["Structure", "MIN_DISTANCE"]

#: Two atoms closer than this (Å) are taken as overlapping: no metal or alloy has
#: interatomic distances below ~1.5 Å (shortest metallic bonds are ~2.2 Å; common practice).
MIN_DISTANCE = 1.0


@dataclass(frozen=True, eq=False)
class Structure:
    """A periodic crystal cell.

    Attributes
    ----------
    cell : ndarray, shape (3, 3), float64, Å
        Lattice vectors as rows.
    positions : ndarray, shape (n_sites, 3), float64, Å
        Cartesian positions.
    symbols : tuple of str, length n_sites
        Chemical symbol of each site.
    labels : tuple of str, length n_sites
        A name per site (defaults to ``"<symbol><index>"``), used in output files.
    source : str
        Where the structure came from (file path or build spec), for provenance.
    """

    cell: NDArray[np.float64]
    positions: NDArray[np.float64]
    symbols: tuple[str, ...]
    labels: tuple[str, ...] = field(default=())
    source: str = ""

    def __post_init__(self) -> None:
        cell = readonly(self.cell, np.float64)
        pos = readonly(self.positions, np.float64)
        src = self.source or "structure"
        if cell.shape != (3, 3):
            raise StructureError(f"{src}: cell must be 3×3 (lattice vectors as rows), got {cell.shape}")
        if pos.ndim != 2 or pos.shape[1] != 3:
            raise StructureError(f"{src}: positions must have shape (n, 3), got {pos.shape}")
        if len(self.symbols) != len(pos):
            raise StructureError(
                f"{src}: {len(self.symbols)} symbols for {len(pos)} positions"
            )
        if len(pos) == 0:
            raise StructureError(f"{src}: the structure has no atoms")
        if not (np.all(np.isfinite(cell)) and np.all(np.isfinite(pos))):
            raise StructureError(f"{src}: cell or positions contain NaN or infinite values")
        volume = abs(np.linalg.det(cell))
        if volume < 1e-6:
            raise StructureError(
                f"{src}: the cell is degenerate (volume {volume:.3g} Å³); "
                "a periodic cell with three independent lattice vectors is needed"
            )
        for s in self.symbols:
            if s not in atomic_numbers or s == "X":
                raise StructureError(
                    f"{src}: unknown element {s!r}; use a chemical symbol such as 'Cu' or 'Pd'"
                )
        labels = tuple(self.labels) or tuple(f"{s}{i}" for i, s in enumerate(self.symbols))
        if len(labels) != len(pos):
            raise StructureError(f"{src}: {len(labels)} labels for {len(pos)} sites")
        object.__setattr__(self, "cell", cell)
        object.__setattr__(self, "positions", pos)
        object.__setattr__(self, "symbols", tuple(self.symbols))
        object.__setattr__(self, "labels", labels)
        self._check_overlaps()

    # ------------------------------------------------------------------ derived
    @property
    def n_sites(self) -> int:
        """Number of atoms in the cell."""
        return len(self.symbols)

    @property
    def volume(self) -> float:
        """Cell volume in Å³."""
        return float(abs(np.linalg.det(self.cell)))

    @functools.cached_property
    def numbers(self) -> NDArray[np.int64]:
        """Atomic numbers, shape (n_sites,), read-only."""
        out = np.array([atomic_numbers[s] for s in self.symbols], dtype=np.int64)
        out.setflags(write=False)
        return out

    @property
    def scaled_positions(self) -> NDArray[np.float64]:
        """Fractional coordinates, shape (n_sites, 3), wrapped into [0, 1)."""
        frac = np.linalg.solve(self.cell.T, self.positions.T).T
        return frac - np.floor(frac + 1e-12)

    @property
    def reciprocal_cell(self) -> NDArray[np.float64]:
        """Reciprocal lattice vectors as rows, including the 2π, in 1/Å."""
        return 2.0 * np.pi * np.linalg.inv(self.cell).T

    @functools.cached_property
    def elements(self) -> tuple[str, ...]:
        """Distinct elements in order of first appearance."""
        return tuple(dict.fromkeys(self.symbols))

    @property
    def formula(self) -> str:
        """Reduced-order chemical formula such as ``Cu3Au``."""
        counts = {e: self.symbols.count(e) for e in self.elements}
        return "".join(f"{e}{n if n > 1 else ''}" for e, n in counts.items())

    # ------------------------------------------------------------------ adapters
    @classmethod
    def from_atoms(cls, atoms, source: str = "") -> Structure:
        """Make a structure from an :class:`ase.Atoms` (which must be periodic in 3D)."""
        src = source or atoms.get_chemical_formula()
        if not all(atoms.pbc):
            raise StructureError(
                f"{src}: valband needs a cell periodic in all three directions "
                f"(pbc={list(map(bool, atoms.pbc))}); add vacuum in a periodic cell for slabs"
            )
        symbols = tuple(atoms.get_chemical_symbols())
        labels = ()
        if "site_labels" in atoms.arrays:
            labels = tuple(str(x) for x in atoms.arrays["site_labels"])
        return cls(
            cell=np.asarray(atoms.cell[:]),
            positions=atoms.get_positions(),
            symbols=symbols,
            labels=labels,
            source=src,
        )

    def to_atoms(self):
        """Return an :class:`ase.Atoms` copy (periodic in 3D)."""
        from ase import Atoms

        return Atoms(symbols=list(self.symbols), positions=self.positions, cell=self.cell, pbc=True)

    def to_spglib(self) -> tuple[NDArray, NDArray, NDArray]:
        """The ``(lattice, fractional positions, numbers)`` tuple spglib expects."""
        return (np.array(self.cell), np.array(self.scaled_positions), np.array(self.numbers))

    def repeat(self, reps: tuple[int, int, int]) -> Structure:
        """A supercell repeated ``reps`` times along the three lattice vectors."""
        reps = tuple(int(r) for r in reps)
        if any(r < 1 for r in reps):
            raise StructureError(f"repeat factors must be positive integers, got {reps}")
        grid = np.indices(reps).reshape(3, -1).T  # (n_images, 3)
        shifts = grid @ self.cell
        pos = (self.positions[None, :, :] + shifts[:, None, :]).reshape(-1, 3)
        n_img = len(grid)
        return Structure(
            cell=self.cell * np.array(reps)[:, None],
            positions=pos,
            symbols=self.symbols * n_img,
            labels=tuple(f"{lab}_{i}" for i in range(n_img) for lab in self.labels),
            source=f"{self.source} repeated {reps}",
        )

    def to_dict(self) -> dict:
        """JSON-ready description (cell, positions, symbols, labels, source)."""
        return {
            "cell": self.cell.tolist(),
            "positions": self.positions.tolist(),
            "symbols": list(self.symbols),
            "labels": list(self.labels),
            "source": self.source,
            "formula": self.formula,
        }

    @classmethod
    def from_dict(cls, d: dict) -> Structure:
        """Inverse of :meth:`to_dict`."""
        return cls(
            cell=np.array(d["cell"]),
            positions=np.array(d["positions"]),
            symbols=tuple(d["symbols"]),
            labels=tuple(d.get("labels", ())),
            source=d.get("source", ""),
        )

    # ------------------------------------------------------------------ checks
    def _check_overlaps(self) -> None:
        """Raise if two atoms (including periodic images) are closer than MIN_DISTANCE."""
        from ase.neighborlist import primitive_neighbor_list

        i, j, d = primitive_neighbor_list(
            "ijd", [True] * 3, self.cell, self.positions, MIN_DISTANCE, self_interaction=False
        )
        if len(d):
            k = int(np.argmin(d))
            a, b = int(i[k]), int(j[k])
            what = "itself (a periodic image)" if a == b else f"site {b} ({self.symbols[b]})"
            raise StructureError(
                f"{self.source or 'structure'}: site {a} ({self.symbols[a]}) is {d[k]:.3f} Å from "
                f"{what}; atoms closer than {MIN_DISTANCE} Å overlap. Check the cell and positions."
            )


def symbol_of(number: int) -> str:
    """Chemical symbol of an atomic number."""
    return chemical_symbols[number]
