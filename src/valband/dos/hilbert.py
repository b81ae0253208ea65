"""Hilbert transform of a DOS on a uniform grid, and the d-band upper edge from it.

H(E) = (1/π) P∫ ρ(E') / (E − E') dE'.

Method (exact for the piecewise-linear interpolant of ρ)
    ρ is taken as the piecewise-linear interpolant of its grid values inside the window,
    falling linearly to zero one grid step beyond each end of the window, and zero
    elsewhere. For hat functions on a uniform grid the principal-value integral is closed
    form: at node i,

        H_i = (1/π) Σ_j ρ_j K(i − j),   K(m) = (m+1) ln|m+1| − 2m ln|m| + (m−1) ln|m−1|

    (0·ln 0 = 0; K is the second difference of x ln|x|, K(0) = 0, K(m) → 1/m). The sum is
    a linear convolution done by zero-padded FFT (:func:`_linear_convolution`), so
    there is no circular wrap-around; the only error is that of interpolating ρ linearly.

Upper edge
    The energy of the maximum of H over the window nodes (Vojvodic, Abild-Pedersen &
    Nørskov, Top. Catal. 57, 25 (2014)). For a semicircular band of half width W centred at
    c, H has a cusp-shaped maximum exactly at c + W; the grid node nearest to it is
    returned, so the result is accurate to one grid step.
"""

from __future__ import annotations

import math

import numpy as np
from numpy.typing import NDArray

from valband.dos._validate import check_uniform_grid, check_window
from valband.errors import SettingsError

__all__ = ["hilbert_transform", "hilbert_upper_edge"]


def _linear_convolution(a: NDArray[np.float64], b: NDArray[np.float64]) -> NDArray[np.float64]:
    """Full linear convolution of two real sequences by FFT, zero-padded (no wrap-around)."""
    n = a.size + b.size - 1
    size = 1 << (n - 1).bit_length()
    return np.fft.irfft(np.fft.rfft(a, size) * np.fft.rfft(b, size), size)[:n]


def _xlogx(x: NDArray[np.float64]) -> NDArray[np.float64]:
    ax = np.abs(x)
    out = np.zeros_like(ax)
    nz = ax > 0
    out[nz] = x[nz] * np.log(ax[nz])
    return out


def _kernel(n: int) -> NDArray[np.float64]:
    """K(m) for m = −(n−1) … n−1."""
    m = np.arange(-(n - 1), n, dtype=np.float64)
    return _xlogx(m + 1.0) - 2.0 * _xlogx(m) + _xlogx(m - 1.0)


def check_dos(dos, ne: int, name: str = "dos") -> NDArray[np.float64]:
    """Check a finite DOS of shape (ne,)."""
    d = np.asarray(dos, dtype=np.float64)
    if d.shape != (ne,):
        raise SettingsError(f"{name} must have shape (ne,) = ({ne},) like energies, got {d.shape}")
    if not np.all(np.isfinite(d)):
        raise SettingsError(f"{name} contains NaN or infinite values")
    return d


def window_nodes(grid, step, window) -> tuple[NDArray[np.intp], tuple[float, float]]:
    """Indices of the grid nodes inside the (checked) window, and the window."""
    emin, emax = check_window(window, grid, step)
    slack = 1e-9 * step
    idx = np.nonzero((grid >= emin - slack) & (grid <= emax + slack))[0]
    if idx.size < 3:
        raise SettingsError(
            f"window ({emin:g}, {emax:g}) eV holds {idx.size} grid points; at least 3 are needed"
        )
    return idx, (emin, emax)


def hilbert_transform(
    energies, dos, window=None
) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    """Hilbert transform of the DOS restricted to a window, at the window's grid nodes.

    Parameters
    ----------
    energies : array (ne,), eV
        Uniform ascending grid.
    dos : array (ne,), states / eV
    window : (emin, emax) in eV or None
        Part of the DOS to transform (default: the whole grid); must lie in the grid.

    Returns
    -------
    e : ndarray (nw,), eV
        The grid nodes inside the window.
    h : ndarray (nw,), states / eV
        H(e) = (1/π) P∫ ρ(E')/(e − E') dE' of the windowed DOS.
    """
    grid, step = check_uniform_grid(energies)
    d = check_dos(dos, grid.size)
    idx, _ = window_nodes(grid, step, window)
    rho = d[idx]
    n = rho.size
    h = _linear_convolution(rho, _kernel(n))[n - 1 : 2 * n - 1] / math.pi
    return grid[idx], h


def hilbert_upper_edge(energies, dos, window=None) -> float:
    """d-band upper edge: the energy (eV) of the maximum of the Hilbert transform.

    Parameters
    ----------
    energies, dos, window
        As in :func:`hilbert_transform` (energies usually relative to E_F).

    Returns
    -------
    float, eV
        The window node where H is largest (accurate to one grid step).
    """
    e, h = hilbert_transform(energies, dos, window)
    return float(e[int(np.argmax(h))])
