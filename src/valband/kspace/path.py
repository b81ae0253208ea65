"""Band paths through the special points of the cell's Bravais lattice (via ASE).

ASE names the special points of each lattice (Setyawan & Curtarolo, Comput. Mater. Sci. 49, 299
(2010)); a path string such as ``"GXWKGLUWLK,UX"`` uses those letters, ``G`` for Γ and a comma for
a jump.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from valband.errors import SettingsError
from valband.structure import Structure

__all__ = ["BandPathSpec", "make_band_path"]


@dataclass(frozen=True, eq=False)
class BandPathSpec:
    """A sampled band path.

    Attributes
    ----------
    path : str
        Path string (ASE special-point letters, ``,`` for a jump).
    kpoints : ndarray, shape (n_k, 3), float64
        Fractional reciprocal coordinates.
    distance : ndarray, shape (n_k,), float64, 1/Å
        Cumulative Cartesian distance along the path (2π included), for the x axis.
    label_positions : ndarray, shape (n_labels,), float64, 1/Å
        Distances of the special points.
    labels : tuple of str
        Their names (``Γ`` for G; ``X|U`` at a jump).
    """

    path: str
    kpoints: NDArray[np.float64]
    distance: NDArray[np.float64]
    label_positions: NDArray[np.float64]
    labels: tuple[str, ...]

    def to_dict(self) -> dict:
        """Path settings for provenance."""
        return {
            "path": self.path,
            "n_kpoints": len(self.kpoints),
            "labels": list(self.labels),
            "label_positions_inv_angstrom": self.label_positions.tolist(),
        }


def make_band_path(structure: Structure, path: str | None = None, npoints: int = 200) -> BandPathSpec:
    """Sample a band path; ``path=None`` takes ASE's default path for the lattice."""
    if npoints < 2:
        raise SettingsError(f"band path: npoints must be at least 2, got {npoints}")
    cell = structure.to_atoms().cell
    try:
        bp = cell.bandpath(path=path, npoints=npoints)
    except Exception as exc:  # ASE raises ValueError/KeyError for unknown letters
        special = "".join(cell.bandpath(npoints=0).special_points)
        raise SettingsError(
            f"band path {path!r}: {exc}; special points of this lattice: {special}"
        ) from None
    # ASE's linear axis is already Cartesian 1/Å with the 2π included (Γ–X of fcc = 2π/a).
    x, xlab, labels = bp.get_linear_kpoint_axis()
    labels = tuple("Γ" if lab in ("G", "Gamma") else lab.replace("G", "Γ") for lab in labels)
    return BandPathSpec(
        path=bp.path,
        kpoints=np.asarray(bp.kpts, dtype=np.float64),
        distance=np.asarray(x, dtype=np.float64),
        label_positions=np.asarray(xlab, dtype=np.float64),
        labels=labels,
    )
