"""Bloch sums H(k) = Σ_R H(R) e^{ik·d}, assembled Hermitian by construction.

Only the canonical half of the bonds is stored (i < j, or i = j with the lattice shift R in the
half-space whose first non-zero component is positive). With B(k) = Σ_half h_b e^{ik·d_b},

    H(k) = diag(onsite) + B(k) + B(k)^†,

so H(k) is Hermitian to the last bit without any symmetrisation after the fact. The phase uses
the bond vector d_b = r_j + R − r_i (atomic gauge), so the block of a bond depends on k only
through e^{ik·d_b}.

:func:`bloch_sum` is the numba kernel (matrix elements as a flat list); :func:`bloch_sum_reference`
is a plain-numpy loop over bond blocks used to check it.
"""

from __future__ import annotations

from collections.abc import Sequence

import numba
import numpy as np
from numpy.typing import NDArray

__all__ = ["bloch_sum", "bloch_sum_reference"]


#: Size (in doubles) of each k-blocked accumulation buffer of the kernel; sets how many
#: k-points are processed together (at most :data:`_MAX_K_BLOCK`).
_BUFFER_DOUBLES = 1 << 20
_MAX_K_BLOCK = 128


@numba.njit(cache=True)
def _bloch_kernel(kcart, vectors, rows, cols, bond, values, diag, kb):
    """B(k) accumulated for ``kb`` k-points at a time (k innermost, so the loops vectorise)."""
    nmat = values.shape[0]
    ne = values.shape[1]
    norb = diag.shape[1]
    nk = kcart.shape[0]
    nb = vectors.shape[0]
    out = np.empty((nmat, nk, norb, norb), dtype=np.complex128)
    cs = np.empty((nb, kb))
    sn = np.empty((nb, kb))
    re = np.empty((norb, norb, kb))
    im = np.empty((norb, norb, kb))
    for k0 in range(0, nk, kb):
        nkb = min(kb, nk - k0)
        for b in range(nb):
            for q in range(nkb):
                ik = k0 + q
                x = (
                    kcart[ik, 0] * vectors[b, 0]
                    + kcart[ik, 1] * vectors[b, 1]
                    + kcart[ik, 2] * vectors[b, 2]
                )
                cs[b, q] = np.cos(x)
                sn[b, q] = np.sin(x)
        for mat in range(nmat):
            re[:, :, :nkb] = 0.0
            im[:, :, :nkb] = 0.0
            for e in range(ne):
                v = values[mat, e]
                r = rows[e]
                c = cols[e]
                b = bond[e]
                for q in range(nkb):
                    re[r, c, q] += v * cs[b, q]
                    im[r, c, q] += v * sn[b, q]
            # (B + B^†)[a, j] = B[a, j] + conj(B[j, a]); written so that the result is exactly
            # Hermitian: equal real parts, exactly opposite imaginary parts, real diagonal
            for a in range(norb):
                for j in range(norb):
                    for q in range(nkb):
                        out[mat, k0 + q, a, j] = complex(
                            re[a, j, q] + re[j, a, q], im[a, j, q] - im[j, a, q]
                        )
                for q in range(nkb):
                    out[mat, k0 + q, a, a] += diag[mat, a]
    return out


def bloch_sum(
    kcart: NDArray[np.float64],
    vectors: NDArray[np.float64],
    rows: NDArray[np.int64],
    cols: NDArray[np.int64],
    bond: NDArray[np.int64],
    values: NDArray[np.float64],
    diag: NDArray[np.float64],
) -> NDArray[np.complex128]:
    """Bloch matrices for a chunk of k-points (numba kernel).

    Parameters
    ----------
    kcart : ndarray, shape (nk, 3), 1/Å
        Cartesian k-points (including 2π).
    vectors : ndarray, shape (n_half, 3), Å
        Bond vectors of the canonical half of the bonds.
    rows, cols, bond : ndarray, shape (n_elements,), int64
        Global row and column index and bond index of every stored matrix element.
    values : ndarray, shape (n_matrices, n_elements), eV (or 1 for overlaps)
        Matrix element values, one row per matrix (e.g. H and S together).
    diag : ndarray, shape (n_matrices, norb)
        Onsite (diagonal) part of each matrix.

    Returns
    -------
    ndarray, shape (n_matrices, nk, norb, norb), complex128
        ``diag + B(k) + B(k)^†`` with ``B(k)[rows, cols] += values·exp(i k·vectors[bond])``.
    """
    return _bloch_kernel(
        np.ascontiguousarray(kcart, dtype=np.float64),
        np.ascontiguousarray(vectors, dtype=np.float64),
        np.ascontiguousarray(rows, dtype=np.int64),
        np.ascontiguousarray(cols, dtype=np.int64),
        np.ascontiguousarray(bond, dtype=np.int64),
        np.ascontiguousarray(values, dtype=np.float64),
        np.ascontiguousarray(diag, dtype=np.float64),
        _k_block(np.shape(diag)[-1]),
    )


def _k_block(norb: int) -> int:
    """Number of k-points accumulated together for a basis of ``norb`` orbitals."""
    return int(max(1, min(_MAX_K_BLOCK, _BUFFER_DOUBLES // max(1, norb * norb))))


def bloch_sum_reference(
    kcart: NDArray[np.float64],
    first: NDArray[np.int64],
    second: NDArray[np.int64],
    vectors: NDArray[np.float64],
    blocks: Sequence[NDArray[np.float64]],
    site_slices: Sequence[slice],
    diag: NDArray[np.float64],
) -> NDArray[np.complex128]:
    """Plain-numpy Bloch sum of one matrix from per-bond blocks (for tests).

    Parameters
    ----------
    kcart : ndarray, shape (nk, 3), 1/Å
    first, second : ndarray, shape (n_half,)
        Sites of each stored (canonical half) bond.
    vectors : ndarray, shape (n_half, 3), Å
    blocks : sequence of ndarray, each (norb_first, norb_second)
    site_slices : sequence of slice
        Basis indices of each site.
    diag : ndarray, shape (norb,)

    Returns
    -------
    ndarray, shape (nk, norb, norb), complex128
    """
    kcart = np.asarray(kcart, dtype=np.float64)
    norb = len(diag)
    half = np.zeros((len(kcart), norb, norb), dtype=np.complex128)
    phases = np.exp(1j * (kcart @ np.asarray(vectors, dtype=np.float64).T))  # (nk, n_half)
    for b, (i, j) in enumerate(zip(first, second, strict=True)):
        half[:, site_slices[i], site_slices[j]] += phases[:, b, None, None] * blocks[b][None]
    return half + np.conj(np.swapaxes(half, 1, 2)) + np.diag(diag)[None]
