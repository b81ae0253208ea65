"""Kernel polynomial method (KPM): DOS of very large cells without diagonalisation.

Route: :func:`build_sparse` assembles the real-space H and S of the cell at Γ as CSR matrices
straight from the neighbour table and the Slater–Koster blocks; :func:`compute_kpm_dos` finds
the spectral bounds by Lanczos, runs the Chebyshev recursion on A = S⁻¹H (S⁻¹ by conjugate
gradients, no factorisation) for random-phase vectors streamed in blocks, projects the moments
on channels (element × shell, site × shell, or site groups such as slab layers), damps them
with the Jackson kernel and returns a :class:`valband.results.DOSResult` that
:func:`valband.workflows.describe` and :func:`valband.spectra.simulate_spectrum` take like any
other. Cost O(nnz · N · R): linear in the cell size at fixed resolution.

k-points: Γ of the cell only. For a supercell of L₁×L₂×L₃ primitive cells this equals the
Γ-centred L₁×L₂×L₃ mesh of the primitive cell, which is the regime KPM is for (cells of
thousands of atoms); small periodic cells belong to the k-mesh path.

Reference: A. Weiße, G. Wellein, A. Alvermann, H. Fehske, Rev. Mod. Phys. 78, 275 (2006).

Modules: :mod:`.sparse` (H, S), :mod:`._kernels` (numba + scipy reference), :mod:`.operators`
(S⁻¹H, CG, Lanczos), :mod:`.chebyshev` (scaling, Jackson kernel, reconstruction),
:mod:`.moments` (recursion, stochastic trace), :mod:`.settings` (moment and vector rules),
:mod:`.dos` (the verb and the channel bookkeeping).
"""

from valband.kpm.chebyshev import jackson_kernel, jackson_sigma, moments_for_resolution
from valband.kpm.dos import compute_kpm_dos, describe_kpm, kpm_channels
from valband.kpm.settings import KPMSettings, vectors_for_accuracy
from valband.kpm.sparse import SparseModel, build_sparse, sparse_from_model

__all__ = [
    "KPMSettings",
    "SparseModel",
    "build_sparse",
    "sparse_from_model",
    "compute_kpm_dos",
    "describe_kpm",
    "kpm_channels",
    "jackson_kernel",
    "jackson_sigma",
    "moments_for_resolution",
    "vectors_for_accuracy",
]
