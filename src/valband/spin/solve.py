"""Eigenstates of a doubled-basis model with projections on general onsite projectors.

The projections of :func:`valband.solve.diagonalise` are diagonal in the basis (0/1 orbital
membership). j = l ± ½ projectors mix orbitals and spins, so this solver takes channels as
Hermitian onsite blocks P_c on index sets I_c and returns the generalised Mulliken weight
w_νc = Re Σ_{i,j∈I_c} c*_iν (P_c)_ij (S c)_jν (Mulliken, J. Chem. Phys. 23, 1833 (1955); for
P_c = 1 on a site shell it is the usual Mulliken weight, and the weights of a complete set of
projectors of that shell add up to it). Orthogonal sets: S = 1.

Dense complex eigenproblems go through batched ``numpy.linalg.eigh`` in k-chunks (memory
bounded by the chunk); non-orthogonal ones through the Cholesky factor, as in
:mod:`valband.solve.eigen`.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from valband.progress import Progress
from valband.solve.eigen import generalized_eigh

__all__ = ["Projector", "diagonalise_projected"]

_CHUNK_BYTES = 32 * 2**20


@dataclass(frozen=True, eq=False)
class Projector:
    """An onsite channel: Hermitian block ``matrix`` on basis ``indices``."""

    indices: NDArray[np.int64]
    matrix: NDArray[np.complex128]


def _weights(c, sc, projectors) -> NDArray[np.float64]:
    out = np.empty((c.shape[0], c.shape[2], len(projectors)))
    for n, p in enumerate(projectors):
        cb = c[:, p.indices, :]
        tmp = p.matrix @ sc[:, p.indices, :]
        out[:, :, n] = np.einsum("kib,kib->kb", np.conj(cb), tmp).real
    return out


def diagonalise_projected(
    model, kpoints: NDArray[np.float64], projectors: list[Projector] | None = None,
    chunk_bytes: int = _CHUNK_BYTES, progress: bool = False,
) -> tuple[NDArray[np.float64], NDArray[np.float64] | None]:
    """Eigenvalues (n_k, n) in eV, ascending, and weights (n_k, n, n_channels) or None."""
    kpoints = np.ascontiguousarray(kpoints, dtype=np.float64)
    n_k, n = len(kpoints), model.n_orbitals
    step = max(1, min(chunk_bytes // (5 * 16 * n * n), 4096))
    eig = np.empty((n_k, n))
    wts = None if projectors is None else np.empty((n_k, n, len(projectors)))
    bar = Progress(n_k, "diagonalising", enabled=progress)
    try:
        for a in range(0, n_k, step):
            b = min(a + step, n_k)
            h, s = model.hamiltonian_and_overlap(kpoints[a:b])
            e, c = generalized_eigh(h, s)
            sc = c if s is None else s @ c
            eig[a:b] = e
            if wts is not None:
                wts[a:b] = _weights(c, sc, projectors)
            bar.update(b - a)
    finally:
        bar.close()
    return eig, wts
