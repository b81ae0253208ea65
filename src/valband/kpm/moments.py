"""Projected Chebyshev moments μ_n^c = Σ_r Σ_{i∈c} r_i [T_n(Ã) r]_i, streamed in vector blocks.

Local DOS consistent with Mulliken
    With S-normalised eigenvectors c_ν of H c = E S c, f(S⁻¹H) = Σ_ν f(E_ν) c_ν c_νᵀ S, so
    its diagonal element [f(S⁻¹H)]_ii = Σ_ν f(E_ν) c_iν (S c_ν)_i is exactly the Mulliken
    weight w_iν = c_iν (S c_ν)_i of the dense path (:mod:`valband.solve.eigen`) times f(E_ν).
    The channel density of an orbital subset P is therefore Tr[P δ(E − S⁻¹H)], estimated as
    ⟨r|P T_n(Ã)|r⟩: the recursion runs on A = S⁻¹H (non-symmetric, no doubling trick) and the
    projection P acts only on the left vector. Channels sum to the total; like Mulliken
    weights, a channel density may dip slightly below zero.

Random-phase vectors
    Vector j has r_i = exp(iφ_i), φ uniform on [0, 2π), drawn from
    ``numpy.random.default_rng([seed, j])`` — so vector j is the same whatever the block
    size. H and S are real at Γ, so the complex recursion splits exactly into the two real
    recursions on cos φ and sin φ, whose estimates add (cos² + sin² = 1 keeps the diagonal
    of every estimate exact, hence μ_0 = Tr P exactly). The "exact" trace runs the unit
    vectors e_j instead.

Memory: a block holds at most ``block`` real columns (three recursion vectors, plus CG
temporaries for a non-orthogonal set), streamed one block after the other.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from valband.errors import CalculationError
from valband.kpm import _kernels as K
from valband.kpm.operators import Operator
from valband.progress import Progress

__all__ = ["MomentResult", "chebyshev_moments", "random_phase_columns"]

#: A vector whose norm grows beyond this factor signals a spectrum outside [−1, 1].
_GROWTH_LIMIT = 50.0


@dataclass(frozen=True)
class MomentResult:
    """Channel moments (n_ch, N), per-vector total moments (R, N) or None, and counts."""

    moments: NDArray[np.float64]
    per_vector: NDArray[np.float64] | None
    n_columns: int
    n_blocks: int


def random_phase_columns(n: int, seed: int, first: int, count: int) -> NDArray[np.float64]:
    """Real columns [cos φ_j, sin φ_j] of random-phase vectors j = first … first+count−1."""
    out = np.empty((n, 2 * count))
    for q in range(count):
        phi = np.random.default_rng([int(seed), first + q]).uniform(0.0, 2.0 * np.pi, n)
        out[:, 2 * q] = np.cos(phi)
        out[:, 2 * q + 1] = np.sin(phi)
    return out


def _unit_columns(n: int, first: int, count: int) -> NDArray[np.float64]:
    out = np.zeros((n, count))
    out[first + np.arange(count), np.arange(count)] = 1.0
    return out


def _accumulate(d, m, mu, per_vector, trace, start, count, n_channels) -> None:
    """Add one step's channel dots d (n_ch, columns) into moment m."""
    if trace == "exact":
        mu[:, m] += d.sum(axis=1)
    else:
        pairs = d.reshape(n_channels, count, 2).sum(axis=2)  # (n_ch, vectors)
        mu[:, m] += pairs.sum(axis=1)
        per_vector[start:start + count, m] = pairs.sum(axis=0)


def chebyshev_moments(
    op: Operator, a: float, b: float, n_moments: int, channel_of: NDArray[np.int64],
    n_channels: int, trace: str, n_vectors: int, seed: int, block: int,
    progress: bool = False,
) -> MomentResult:
    """Moments of every channel, averaged over the random vectors (or the exact trace).

    Parameters
    ----------
    op : the operator A (H or S⁻¹H)
    a, b : scaling, Ã = (A − b)/a (eV)
    n_moments : N
    channel_of : (n,) channel index of every orbital
    n_channels : number of channels
    trace : "stochastic" (``n_vectors`` random-phase vectors) or "exact"
    seed : random-phase seed
    block : real columns per block (≥ 2 for stochastic)
    progress : progress bar on a terminal

    Returns
    -------
    MomentResult
        ``moments[c, n]`` estimates Tr[P_c T_n(Ã)]; ``per_vector[j, n]`` the total-trace
        estimate of vector j (stochastic only).
    """
    n = op.n
    alpha, beta = 1.0 / a, -b / a
    chan = np.ascontiguousarray(channel_of, dtype=np.int64)
    mu = np.zeros((n_channels, n_moments))
    if trace == "exact":
        units = list(range(0, n, block))
        per_vector = None
        total_cols = n
    else:
        per_block = max(1, block // 2)
        units = list(range(0, n_vectors, per_block))
        per_vector = np.zeros((n_vectors, n_moments))
        total_cols = 2 * n_vectors
    bar = Progress(len(units) * n_moments, "KPM moments", enabled=progress)
    dots = (K.channel_dots if op.backend == "numba" else K.channel_dots_reference)
    try:
        for start in units:
            if trace == "exact":
                count = min(block, n - start)
                left = _unit_columns(n, start, count)
            else:
                count = min(per_block, n_vectors - start)
                left = random_phase_columns(n, seed, start, count)
            norm0 = np.sqrt(np.einsum("ij,ij->j", left, left))

            prev = left.copy()
            cur = 0.5 * op.step(alpha, beta, left, np.zeros_like(left))  # T_1 = Ã r
            args = (mu, per_vector, trace, start, count, n_channels)
            _accumulate(dots(left, left, chan, n_channels), 0, *args)
            _accumulate(dots(left, cur, chan, n_channels), 1, *args)
            for m in range(2, n_moments):
                nxt = op.step(alpha, beta, cur, prev)
                prev, cur = cur, nxt
                _accumulate(dots(left, cur, chan, n_channels), m, *args)
                if m % 64 == 0:
                    grown = np.sqrt(np.einsum("ij,ij->j", cur, cur)) > _GROWTH_LIMIT * norm0
                    if np.any(grown):
                        raise CalculationError(
                            f"KPM recursion diverged at moment {m}: the spectrum reaches "
                            "outside the Lanczos bounds; raise the margin or lanczos_steps"
                        )
                    bar.update(64)
            bar.update(n_moments - 64 * ((n_moments - 1) // 64))
    finally:
        bar.close()
    if trace != "exact":
        mu /= n_vectors
    return MomentResult(mu, per_vector, total_cols, len(units))
