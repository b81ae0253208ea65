"""The hot loop of the CPA: G_loc(z) = Σ_k w_k [z − W(k) − Σ(z)]⁻¹ for many z at once.

Σ(z) is not proportional to the identity (it differs between orbital channels), so no single
eigen-decomposition of W(k) diagonalises every z − W(k) − Σ(z): each (k, z) needs its own
inverse of a small complex matrix. :func:`local_green_numba` does it with an in-place
Gauss–Jordan inversion with partial pivoting (n³ complex multiply–adds per matrix), parallel
over z; :func:`local_green_numpy` is the plain-numpy reference (batched ``numpy.linalg.inv``),
and the test compares the two. The matrices are non-singular: Im(z − W − Σ) = Im z − Im Σ is
positive definite for Im z > 0 and a causal (Im Σ ≤ 0) potential.
"""

from __future__ import annotations

import numba
import numpy as np
from numpy.typing import NDArray

__all__ = ["local_green_numba", "local_green_numpy"]


@numba.njit(cache=True, inline="always")
def _invert_in_place(a, perm):  # pragma: no cover - compiled
    """Gauss–Jordan inversion of ``a`` in place (partial pivoting; ``perm`` is scratch)."""
    n = a.shape[0]
    for col in range(n):
        piv = col
        best = abs(a[col, col])
        for r in range(col + 1, n):
            v = abs(a[r, col])
            if v > best:
                best = v
                piv = r
        perm[col] = piv
        if piv != col:
            for j in range(n):
                t = a[col, j]
                a[col, j] = a[piv, j]
                a[piv, j] = t
        inv_p = 1.0 / a[col, col]
        a[col, col] = 1.0
        for j in range(n):
            a[col, j] *= inv_p
        for r in range(n):
            if r != col:
                f = a[r, col]
                if f != 0.0:
                    a[r, col] = 0.0
                    for j in range(n):
                        a[r, j] -= f * a[col, j]
    # undo the row swaps as column swaps, in reverse order
    for col in range(n - 1, -1, -1):
        piv = perm[col]
        if piv != col:
            for r in range(n):
                t = a[r, col]
                a[r, col] = a[r, piv]
                a[r, piv] = t


@numba.njit(cache=True, parallel=True)
def _local_green_kernel(w, wk, z, sigma, out):  # pragma: no cover - compiled
    nk = w.shape[0]
    n = w.shape[1]
    nz = z.shape[0]
    for iz in numba.prange(nz):
        a = np.empty((n, n), dtype=np.complex128)
        acc = np.zeros((n, n), dtype=np.complex128)
        perm = np.empty(n, dtype=np.int64)
        zz = z[iz]
        for ik in range(nk):
            for i in range(n):
                for j in range(n):
                    a[i, j] = -w[ik, i, j] - sigma[iz, i, j]
                a[i, i] += zz
            _invert_in_place(a, perm)
            wt = wk[ik]
            for i in range(n):
                for j in range(n):
                    acc[i, j] += wt * a[i, j]
        for i in range(n):
            for j in range(n):
                out[iz, i, j] = acc[i, j]


def local_green_numba(
    w: NDArray[np.complex128],
    wk: NDArray[np.float64],
    z: NDArray[np.complex128],
    sigma: NDArray[np.complex128],
) -> NDArray[np.complex128]:
    """Σ_k w_k [z − W(k) − Σ(z)]⁻¹.

    Parameters
    ----------
    w : (n_k, n, n) complex, eV
        Hopping part of the Bloch Hamiltonian at each k.
    wk : (n_k,) k-weights.
    z : (n_z,) complex energies, eV (Im z > 0).
    sigma : (n_z, n, n) complex, eV
        Coherent potential (block-diagonal over sites).

    Returns
    -------
    (n_z, n, n) complex, 1/eV
    """
    w = np.ascontiguousarray(w, dtype=np.complex128)
    sigma = np.ascontiguousarray(sigma, dtype=np.complex128)
    out = np.empty((len(z), w.shape[1], w.shape[2]), dtype=np.complex128)
    if len(z):
        _local_green_kernel(
            w, np.ascontiguousarray(wk, dtype=np.float64),
            np.ascontiguousarray(z, dtype=np.complex128), sigma, out,
        )  # fmt: skip
    return out


def local_green_numpy(w, wk, z, sigma, z_chunk: int = 32) -> NDArray[np.complex128]:
    """Plain-numpy reference of :func:`local_green_numba` (batched ``numpy.linalg.inv``)."""
    w = np.asarray(w, dtype=np.complex128)
    n = w.shape[1]
    eye = np.eye(n)
    out = np.empty((len(z), n, n), dtype=np.complex128)
    for s in range(0, len(z), z_chunk):
        zz = np.asarray(z[s : s + z_chunk])
        a = zz[:, None, None, None] * eye - w[None] - np.asarray(sigma[s : s + z_chunk])[:, None]
        out[s : s + z_chunk] = np.einsum("k,zkij->zij", wk, np.linalg.inv(a))
    return out
