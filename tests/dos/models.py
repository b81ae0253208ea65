"""Model bands on Γ-centred meshes for the DOS tests (textbook dispersions)."""

from __future__ import annotations

import numpy as np


def mesh_fractions(mesh) -> np.ndarray:
    """Fractional coordinates (nfull, 3) of a Γ-centred mesh, index i0 + m0·(i1 + m1·i2)."""
    m = np.asarray(mesh)
    i2, i1, i0 = np.meshgrid(np.arange(m[2]), np.arange(m[1]), np.arange(m[0]), indexing="ij")
    idx = np.stack([i0.ravel(), i1.ravel(), i2.ravel()], axis=1)
    return idx / m


def reciprocal(cell) -> np.ndarray:
    """Reciprocal lattice vectors as rows, including 2π (1/Å)."""
    return 2.0 * np.pi * np.linalg.inv(np.asarray(cell, dtype=float)).T


def sc_cosine(frac: np.ndarray, t: float = 1.0) -> np.ndarray:
    """ε = −2t (cos kx + cos ky + cos kz) on a simple-cubic lattice (k·a = 2π f)."""
    return -2.0 * t * np.cos(2.0 * np.pi * frac).sum(axis=1)


def free_electron(frac: np.ndarray, rc: np.ndarray) -> np.ndarray:
    """Lowest folded free-electron band |k − G|² (k nearest the origin image), eV units."""
    f = frac - np.round(frac)
    k = f @ rc
    return (k**2).sum(axis=1)


def to_ase_grid(values: np.ndarray, mesh) -> np.ndarray:
    """(nfull, ...) in index order i0 + m0·(i1 + m1·i2) → ASE's (m0, m1, m2, ...) layout."""
    m0, m1, m2 = (int(x) for x in mesh)
    rest = values.shape[1:]
    v = values.reshape((m2, m1, m0) + rest)
    return np.transpose(v, (2, 1, 0) + tuple(range(3, 3 + len(rest))))
