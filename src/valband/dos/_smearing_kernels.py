"""Kernels of the smeared DOS: a numba kernel and its plain-numpy reference.

Both evaluate, at every grid energy E_j,

    D(E_j) = Σ_s w_s δ_σ(E_j − ε_s),   D_c(E_j) = Σ_s w_s p_sc δ_σ(E_j − ε_s),

with s running over all (k, band) states, w_s the k-weight and p_sc the projection.
The numba kernel sorts the states by energy and splits the grid into blocks that are
processed in parallel (no write conflicts: each block owns its energies); for a Gaussian
only states within ``GAUSS_CUTOFF`` σ of a block are visited, for a Lorentzian every state
is (its tails are long, so no truncation).
"""

from __future__ import annotations

import math

import numba
import numpy as np
from numpy.typing import NDArray

__all__ = ["GAUSS_CUTOFF", "smear_numba", "smear_reference"]

#: Gaussians are cut at ±GAUSS_CUTOFF σ: the discarded weight is erfc(8/√2) ≈ 1.2e-15.
GAUSS_CUTOFF = 8.0

_BLOCK = 64
_INV_SQRT_2PI = 1.0 / math.sqrt(2.0 * math.pi)


@numba.njit(cache=True, parallel=True)
def _smear_kernel(eps, w, proj, energies, width, kind, cutoff, out_tot, out_ch):  # pragma: no cover
    ne = energies.size
    nch = out_ch.shape[0]
    e0 = energies[0]
    de = (energies[ne - 1] - e0) / (ne - 1)
    nblock = (ne + _BLOCK - 1) // _BLOCK
    q = math.exp(-de * de / (width * width))
    for ib in numba.prange(nblock):
        j0 = ib * _BLOCK
        j1 = min(ne, j0 + _BLOCK)
        vals = np.empty(_BLOCK)
        if kind == 0:
            s0 = np.searchsorted(eps, energies[j0] - cutoff, side="left")
            s1 = np.searchsorted(eps, energies[j1 - 1] + cutoff, side="right")
        else:
            s0 = 0
            s1 = eps.size
        for s in range(s0, s1):
            es = eps[s]
            ws = w[s]
            if kind == 0:
                jlo = max(j0, int(math.ceil((es - cutoff - e0) / de)) - 1)
                jhi = min(j1, int(math.floor((es + cutoff - e0) / de)) + 2)
            else:
                jlo = j0
                jhi = j1
            if jhi <= jlo:
                continue
            if kind == 0:
                # exp(−x²/2σ²) along the grid by recurrence: g_{j+1} = g_j·r_j,
                # r_{j+1} = r_j·q with q = exp(−h²/σ²) — two exps per state and block.
                x = energies[jlo] - es
                g = ws * _INV_SQRT_2PI / width * math.exp(-0.5 * (x / width) ** 2)
                r = math.exp(-(x * de + 0.5 * de * de) / (width * width))
                for j in range(jlo, jhi):
                    vals[j - jlo] = g
                    out_tot[j] += g
                    g *= r
                    r *= q
            else:
                for j in range(jlo, jhi):
                    x = energies[j] - es
                    v = ws * width / (math.pi * (x * x + width * width))
                    vals[j - jlo] = v
                    out_tot[j] += v
            for c in range(nch):
                p = proj[s, c]
                for j in range(jlo, jhi):
                    out_ch[c, j] += p * vals[j - jlo]


def _flatten(eigenvalues, k_weights, channel_weights):
    nk, nb = eigenvalues.shape
    eps = eigenvalues.reshape(-1)
    w = np.repeat(k_weights, nb)
    order = np.argsort(eps, kind="stable")
    if channel_weights is None:
        proj = np.zeros((eps.size, 0))
    else:
        proj = channel_weights.reshape(nk * nb, -1)[order]
    return (
        np.ascontiguousarray(eps[order]),
        np.ascontiguousarray(w[order]),
        np.ascontiguousarray(proj),
    )


def smear_numba(
    eigenvalues: NDArray[np.float64],
    k_weights: NDArray[np.float64],
    energies: NDArray[np.float64],
    width: float,
    kind: str,
    channel_weights: NDArray[np.float64] | None,
) -> tuple[NDArray[np.float64], NDArray[np.float64] | None]:
    """Smeared DOS per spin (numba); inputs already validated. Returns (total, channels)."""
    eps, w, proj = _flatten(eigenvalues, k_weights, channel_weights)
    ne = energies.size
    out_tot = np.zeros(ne)
    out_ch = np.zeros((proj.shape[1], ne))
    kind_code = 0 if kind == "gaussian" else 1
    cutoff = GAUSS_CUTOFF * width if kind_code == 0 else math.inf
    _smear_kernel(eps, w, proj, energies, float(width), kind_code, cutoff, out_tot, out_ch)
    return out_tot, (out_ch if channel_weights is not None else None)


def smear_reference(
    eigenvalues: NDArray[np.float64],
    k_weights: NDArray[np.float64],
    energies: NDArray[np.float64],
    width: float,
    kind: str,
    channel_weights: NDArray[np.float64] | None,
) -> tuple[NDArray[np.float64], NDArray[np.float64] | None]:
    """Plain-numpy reference of :func:`smear_numba`: every (state, energy) pair, no cut-off."""
    nk, nb = eigenvalues.shape
    x = energies[None, :] - eigenvalues.reshape(-1)[:, None]  # (ns, ne)
    if kind == "gaussian":
        kern = np.exp(-0.5 * (x / width) ** 2) / (math.sqrt(2.0 * math.pi) * width)
    else:
        kern = (width / math.pi) / (x**2 + width**2)
    w = np.repeat(k_weights, nb)
    total = w @ kern
    if channel_weights is None:
        return total, None
    p = channel_weights.reshape(nk * nb, -1) * w[:, None]
    return total, p.T @ kern
