"""Batched dense eigensolver streamed over chunks of k-points.

For each chunk the Hamiltonian (and overlap) are assembled, diagonalised with LAPACK through
``numpy.linalg.eigh`` (batched), and the eigenvectors are reduced at once to projection weights on
the requested channels, so that the (n_k, n_orb, n_orb) eigenvector array never exists for the
whole mesh: memory is bounded by the chunk size plus O(n_k · n_bands · n_channels).

Real gauge. When every site is an inversion centre of its bonds (every bond i → j along d has
a partner along −d with the parity-transformed block, as in monatomic Bravais lattices,
B2 and L1₂ — not hcp or diamond), H(k) and S(k) become real symmetric after the diagonal unitary
D = diag(i^l) of each orbital's angular momentum l: (D†HD)* = D†HD. The solver detects this
once per model on random k-points and then diagonalises real matrices with the compiled
small-matrix solver of :mod:`valband.solve.small_eigh` (about three times faster than LAPACK
on 9×9); eigenvalues are unchanged and, since |(Dy)_i| = |y_i|, so are the projections.

Non-orthogonal sets solve H c = ε S c through the Cholesky factor S = L Lᴴ:
(L⁻¹ H L⁻ᴴ) y = ε y, c = L⁻ᴴ y. Projections are Mulliken weights w_iν = Re(c*_iν (S c)_iν)
(Mulliken, J. Chem. Phys. 23, 1833 (1955)), which sum to one per state and may be slightly negative.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import NDArray

from valband.errors import CalculationError
from valband.progress import Progress
from valband.solve.small_eigh import SMALL_MAX_SIZE, eigh_small

__all__ = ["diagonalise", "real_gauge", "generalized_eigh", "DEFAULT_CHUNK_BYTES"]

#: Memory budget (bytes) of one chunk's complex matrices (H, S, eigenvectors).
DEFAULT_CHUNK_BYTES = 32 * 2**20


def _chunk_size(n_orb: int, budget: int) -> int:
    per_k = 4 * 16 * n_orb * n_orb  # H, S, vectors, temporaries, complex128
    return max(1, min(budget // per_k, 4096))


def diagonalise(
    model,
    kpoints: NDArray[np.float64],
    channels: NDArray[np.float64] | None = None,
    chunk_bytes: int = DEFAULT_CHUNK_BYTES,
    progress: bool = False,
) -> tuple[NDArray[np.float64], NDArray[np.float64] | None]:
    """Eigenvalues and channel projections at a set of k-points.

    Parameters
    ----------
    model
        A :class:`valband.tb.TBModel` (anything with ``n_orbitals``, ``orthogonal`` and
        ``hamiltonian_and_overlap(kpts)``).
    kpoints : (n_k, 3) fractional reciprocal coordinates.
    channels : (n_orb, n_ch) or None
        Orbital-to-channel matrix (e.g. 0/1 membership of each orbital in a site × shell
        channel). ``None`` skips projections.
    chunk_bytes : memory budget of one chunk.
    progress : draw a progress bar on a terminal.

    Returns
    -------
    eigenvalues : (n_k, n_orb) float64, eV on the model's absolute scale, ascending per k.
    weights : (n_k, n_orb, n_ch) float64 or None
        Projection of each state on each channel (Mulliken for non-orthogonal sets).
    """
    kpoints = np.ascontiguousarray(kpoints, dtype=np.float64)
    gauge = real_gauge(model)
    n_k = len(kpoints)
    n_orb = model.n_orbitals
    step = _chunk_size(n_orb, chunk_bytes)
    eig = np.empty((n_k, n_orb), dtype=np.float64)
    wts = None
    if channels is not None:
        channels = np.ascontiguousarray(channels, dtype=np.float64)
        wts = np.empty((n_k, n_orb, channels.shape[1]), dtype=np.float64)
    bar = Progress(n_k, "diagonalising", enabled=progress)
    try:
        for start in range(0, n_k, step):
            stop = min(start + step, n_k)
            h, s = model.hamiltonian_and_overlap(kpoints[start:stop])
            if gauge is not None:
                h = (h * gauge).real
                s = None if s is None else (s * gauge).real
            elif _exactly_real(h) and (s is None or _exactly_real(s)):
                # e.g. a chunk of Γ (or other time-reversal-invariant) points of a cell whose
                # sites are not inversion centres: real arithmetic, about 4× cheaper
                h = h.real
                s = None if s is None else s.real
            e, w = _solve_chunk(h, s, channels)
            eig[start:stop] = e
            if wts is not None:
                wts[start:stop] = w
            bar.update(stop - start)
    finally:
        bar.close()
    return eig, wts


def _exactly_real(m) -> bool:
    """Tell whether a matrix stack has no imaginary part at all (real stacks: yes)."""
    return not np.iscomplexobj(m) or not np.any(m.imag)


def real_gauge(model, n_test: int = 3, seed: int = 12345) -> NDArray[np.complex128] | None:
    """The (n_orb, n_orb) factor conj(D_a)·D_b that makes H(k) real, or None if it does not.

    D = i^l per orbital. Checked on ``n_test`` pseudo-random k-points (fixed seed, so the
    decision is reproducible); a bond set without the inversion partner fails at generic k.
    """
    from valband.conventions import SHELL_L

    d = np.array([1j ** SHELL_L[o.shell] for o in model.orbitals])
    factor = np.conj(d)[:, None] * d[None, :]
    k = np.random.default_rng(seed).uniform(-0.5, 0.5, size=(n_test, 3))
    h, s = model.hamiltonian_and_overlap(k)
    for m in (h, s):
        if m is None:
            continue
        t = m * factor
        if np.abs(t.imag).max() > 1e-12 * max(np.abs(t).max(), 1.0):
            return None
    return factor


def _eigh(m):
    """Batched eigh: the compiled small-matrix solver for real stacks, else LAPACK."""
    if not np.iscomplexobj(m) and m.shape[-1] <= SMALL_MAX_SIZE:
        return eigh_small(m)
    return np.linalg.eigh(m)


def inverse_cholesky(s):
    """L⁻¹ of S = L Lᴴ, batched; CalculationError when S is not positive definite."""
    try:
        chol = np.linalg.cholesky(s)
    except np.linalg.LinAlgError:
        raise CalculationError(
            "the overlap matrix S(k) is not positive definite at some k-point: the overlap "
            "integrals of the parameter set are too large for this structure (atoms too close?)"
        ) from None
    return np.linalg.inv(chol)


def generalized_eigh(h, s, vectors: bool = True, linv=None):
    """Eigenvalues (ascending) and S-orthonormal eigenvectors of H c = E S c, batched.

    ``s=None`` is the orthogonal case. The Cholesky reduction L⁻¹ H L⁻ᴴ keeps the compiled
    small-matrix solver for real stacks; with ``vectors=False`` the vectors are None.
    ``linv`` is L⁻¹ of :func:`inverse_cholesky` when the caller keeps it (e.g. for many H with
    one S). Raises CalculationError when S is not positive definite.
    """
    if s is None:
        e, c = _eigh(h)
        return e, (c if vectors else None)
    if linv is None:
        linv = inverse_cholesky(s)
    linv_h = np.conj(np.swapaxes(linv, -1, -2))
    e, y = _eigh(linv @ h @ linv_h)
    return e, (linv_h @ y if vectors else None)


def _solve_chunk(h, s, channels):
    """Diagonalise one chunk; return eigenvalues and channel weights (or None)."""
    e, c = generalized_eigh(h, s, vectors=channels is not None)
    if channels is None:
        return e, None
    if s is None:
        w = np.abs(c) ** 2 if np.iscomplexobj(c) else c * c  # (k, orbital, band)
    else:
        w = (np.conj(c) * (s @ c)).real
    # (k, band, orbital) @ (orbital, channel) -> (k, band, channel)
    return e, np.swapaxes(w, 1, 2) @ channels
