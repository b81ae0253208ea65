"""The one adapter to spglib: symmetry datasets and irreducible meshes.

spglib ≥ 2.5 reports errors by exception when ``OLD_ERROR_HANDLING`` is off; we switch it off
here, once, and turn its failures into :class:`~valband.errors.SymmetryWarning` fallbacks.
"""

from __future__ import annotations

import functools

import numpy as np
import spglib
from numpy.typing import NDArray

from valband.structure import Structure

__all__ = ["SYMPREC", "equivalent_sites", "ir_reciprocal_mesh", "space_group",
           "space_group_operations"]

#: Distance tolerance (Å) for symmetry finding (spglib's ``symprec``).
SYMPREC = 1e-4

try:  # spglib ≥ 2.5: raise exceptions instead of returning None
    import spglib.error as _spg_error

    _spg_error.OLD_ERROR_HANDLING = False
except (ImportError, AttributeError):  # pragma: no cover - older spglib
    pass


@functools.lru_cache(maxsize=32)
def _dataset(structure: Structure):
    """spglib's symmetry dataset (cached per Structure object, which is immutable)."""
    try:
        return spglib.get_symmetry_dataset(structure.to_spglib(), symprec=SYMPREC)
    except Exception:  # spglib raises its own error types; treat as "no symmetry"
        return None


def space_group_operations(structure: Structure):
    """Fractional rotations W (n, 3, 3) and translations t (n, 3) of the space group, or None."""
    ds = _dataset(structure)
    if ds is None:
        return None
    return np.asarray(ds.rotations, dtype=np.int64), np.asarray(ds.translations, dtype=np.float64)


def space_group(structure: Structure) -> str:
    """International symbol and number, e.g. ``"Fm-3m (225)"``, or ``"P1 (1)"`` if unknown."""
    ds = _dataset(structure)
    if ds is None:
        return "P1 (1)"
    return f"{ds.international} ({ds.number})"


def equivalent_sites(structure: Structure) -> NDArray[np.int64]:
    """For each site the index of the representative of its symmetry orbit, shape (n_sites,)."""
    ds = _dataset(structure)
    if ds is None:
        return np.arange(structure.n_sites)
    return np.asarray(ds.equivalent_atoms, dtype=np.int64)


def ir_reciprocal_mesh(
    structure: Structure, mesh: tuple[int, int, int], shift: tuple[int, int, int], time_reversal: bool
) -> tuple[NDArray[np.int64], NDArray[np.int64]]:
    """spglib's irreducible mesh: (mapping to representative, grid addresses), or raise RuntimeError."""
    mapping, grid = spglib.get_ir_reciprocal_mesh(
        np.asarray(mesh, dtype=np.intc),
        structure.to_spglib(),
        is_shift=np.asarray(shift, dtype=np.intc),
        is_time_reversal=time_reversal,
        symprec=SYMPREC,
    )
    return np.asarray(mapping, dtype=np.int64), np.asarray(grid, dtype=np.int64)
