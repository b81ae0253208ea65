"""Numba kernels of the Chebyshev recursion, with plain scipy/numpy references.

* :func:`csr_matmat` — Y = A·X for a CSR matrix and a dense block X (n, m), rows in parallel;
* :func:`chebyshev_step` — the fused step  P ← 2(α A X + β X) − P  (in place on P), i.e. one
  term of T_{n+1} = 2 Ã T_n − T_{n−1} with Ã = αA + β (Weiße et al., Rev. Mod. Phys. 78, 275
  (2006), Eq. (13));
* :func:`channel_dots` — D[c, k] = Σ_{i in channel c} L[i, k]·V[i, k], the projected moments.

Each row's sum runs in a fixed order and the channel reduction uses a fixed number of row
chunks (:data:`N_CHUNKS`, independent of the thread count), so the results are bitwise the
same whatever ``numba.set_num_threads`` says. The ``*_reference`` functions are the plain
scipy/numpy versions the tests compare against.
"""

from __future__ import annotations

import numba
import numpy as np
import scipy.sparse as sp
from numpy.typing import NDArray

__all__ = [
    "N_CHUNKS",
    "csr_matmat",
    "chebyshev_step",
    "channel_dots",
    "csr_matmat_reference",
    "chebyshev_step_reference",
    "channel_dots_reference",
]

#: Below this many (matrix element × column) pairs a product runs on one thread.
_PARALLEL_WORK = 400_000
#: Row chunks of the channel reduction (fixed, so the summation order never changes).
N_CHUNKS = 16


def _matmat_impl(indptr, indices, data, x, out, nchunks):
    n = indptr.shape[0] - 1
    m = x.shape[1]
    size = (n + nchunks - 1) // nchunks
    for q in numba.prange(nchunks):
        for i in range(q * size, min(n, (q + 1) * size)):
            for k in range(m):
                out[i, k] = 0.0
            for p in range(indptr[i], indptr[i + 1]):
                v = data[p]
                j = indices[p]
                for k in range(m):
                    out[i, k] += v * x[j, k]


def _step_impl(indptr, indices, data, alpha, beta, x, prev, nchunks):
    n = indptr.shape[0] - 1
    m = x.shape[1]
    size = (n + nchunks - 1) // nchunks
    for q in numba.prange(nchunks):
        acc = np.empty(m)
        for i in range(q * size, min(n, (q + 1) * size)):
            for k in range(m):
                acc[k] = 0.0
            for p in range(indptr[i], indptr[i + 1]):
                v = data[p]
                j = indices[p]
                for k in range(m):
                    acc[k] += v * x[j, k]
            for k in range(m):
                prev[i, k] = 2.0 * (alpha * acc[k] + beta * x[i, k]) - prev[i, k]


def _dots_impl(left, v, chan, nch, nchunks):
    n, m = v.shape
    part = np.zeros((nchunks, nch, m))
    size = (n + nchunks - 1) // nchunks
    for q in numba.prange(nchunks):
        for i in range(q * size, min(n, (q + 1) * size)):
            c = chan[i]
            for k in range(m):
                part[q, c, k] += left[i, k] * v[i, k]
    out = np.zeros((nch, m))
    for q in range(nchunks):
        for c in range(nch):
            for k in range(m):
                out[c, k] += part[q, c, k]
    return out


# parallel and serial builds of the same bodies (prange is range when not parallel); the
# serial ones avoid the thread launch cost on small blocks
_matmat_par = numba.njit(parallel=True, cache=True)(_matmat_impl)
_matmat_ser = numba.njit(cache=True)(_matmat_impl)
_step_par = numba.njit(parallel=True, cache=True)(_step_impl)
_step_ser = numba.njit(cache=True)(_step_impl)
_dots_par = numba.njit(parallel=True, cache=True)(_dots_impl)
_dots_ser = numba.njit(cache=True)(_dots_impl)


def _csr_parts(a: sp.csr_matrix):
    return (np.ascontiguousarray(a.indptr, dtype=np.int64),
            np.ascontiguousarray(a.indices, dtype=np.int64),
            np.ascontiguousarray(a.data, dtype=np.float64))


def _plan(n: int, work: int):
    """(parallel?, chunks) for a product touching ``work`` matrix-element × column pairs."""
    if work < _PARALLEL_WORK:
        return False, 1
    return True, max(1, min(n, 4 * numba.get_num_threads()))


def csr_matmat(parts, x: NDArray[np.float64], out: NDArray[np.float64] | None = None):
    """A·X for ``parts = (indptr, indices, data)`` of a CSR matrix and X of shape (n, m)."""
    if out is None:
        out = np.empty_like(x)
    n = len(parts[0]) - 1
    par, chunks = _plan(n, len(parts[2]) * x.shape[1])
    (_matmat_par if par else _matmat_ser)(parts[0], parts[1], parts[2], x, out, chunks)
    return out


def chebyshev_step(parts, alpha: float, beta: float, x, prev) -> NDArray[np.float64]:
    """In place: ``prev ← 2(α A x + β x) − prev``; returns ``prev``."""
    n = len(parts[0]) - 1
    par, chunks = _plan(n, len(parts[2]) * x.shape[1])
    (_step_par if par else _step_ser)(parts[0], parts[1], parts[2], float(alpha), float(beta),
                                      x, prev, chunks)
    return prev


def channel_dots(left, v, chan: NDArray[np.int64], nch: int) -> NDArray[np.float64]:
    """(nch, m) array of Σ_{i: chan[i] = c} left[i, k]·v[i, k]."""
    par = v.size * 8 >= _PARALLEL_WORK
    return (_dots_par if par else _dots_ser)(left, v, chan, int(nch), N_CHUNKS)


# ------------------------------------------------------------------------------ references
def csr_matmat_reference(a: sp.csr_matrix, x: NDArray[np.float64]) -> NDArray[np.float64]:
    """Compute A·X with scipy (reference of :func:`csr_matmat`)."""
    return np.asarray(a @ x)


def chebyshev_step_reference(a: sp.csr_matrix, alpha, beta, x, prev) -> NDArray[np.float64]:
    """Out of place reference of :func:`chebyshev_step`."""
    return 2.0 * (alpha * np.asarray(a @ x) + beta * x) - prev


def channel_dots_reference(left, v, chan, nch) -> NDArray[np.float64]:
    """Sum channel products with ``np.add.at`` (reference of :func:`channel_dots`)."""
    out = np.zeros((nch, v.shape[1]))
    np.add.at(out, chan, left * v)
    return out
