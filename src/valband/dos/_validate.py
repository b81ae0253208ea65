"""Input checks shared by the DOS modules; every failure raises :class:`SettingsError`.

Each helper returns a clean float64 (or int64) array so callers never re-check.
"""

from __future__ import annotations

import math

import numpy as np
from numpy.typing import NDArray

from valband.errors import SettingsError

__all__ = [
    "UNIFORM_RTOL",
    "WEIGHT_SUM_TOL",
    "check_width",
    "check_uniform_grid",
    "check_eigenvalues",
    "check_k_weights",
    "check_channel_weights",
    "check_degeneracy",
    "check_window",
]

#: Largest allowed deviation of a grid step from the mean step, relative to the mean step.
UNIFORM_RTOL = 1e-6
#: Allowed deviation of Σ k-weights from 1.
WEIGHT_SUM_TOL = 1e-8


def check_width(width: float, name: str = "width") -> float:
    """Return ``width`` as float; SettingsError unless it is finite and > 0 (eV)."""
    try:
        w = float(width)
    except (TypeError, ValueError):
        raise SettingsError(f"{name} must be a number in eV, got {width!r}") from None
    if not math.isfinite(w) or w <= 0.0:
        raise SettingsError(f"{name} must be a finite number > 0 eV, got {width!r}")
    return w


def check_degeneracy(degeneracy: float) -> float:
    """Return the spin degeneracy as float; SettingsError unless finite and > 0."""
    try:
        d = float(degeneracy)
    except (TypeError, ValueError):
        raise SettingsError(f"degeneracy must be a number (1 or 2), got {degeneracy!r}") from None
    if not math.isfinite(d) or d <= 0.0:
        raise SettingsError(f"degeneracy must be a finite number > 0 (1 or 2), got {degeneracy!r}")
    return d


def check_uniform_grid(energies, name: str = "energies") -> tuple[NDArray[np.float64], float]:
    """Check a uniform, strictly ascending 1-D energy grid (eV) of at least two points.

    Returns
    -------
    grid : ndarray (ne,)
    step : float
        The mean spacing (eV).
    """
    e = np.asarray(energies, dtype=np.float64)
    if e.ndim != 1 or e.size < 2:
        raise SettingsError(
            f"{name} must be a 1-D grid of at least 2 energies (eV), got shape {e.shape}"
        )
    if not np.all(np.isfinite(e)):
        raise SettingsError(f"{name} contains NaN or infinite values")
    d = np.diff(e)
    if np.any(d <= 0.0):
        raise SettingsError(
            f"{name} must be strictly ascending (accepted: a uniform ascending grid)"
        )
    step = (e[-1] - e[0]) / (e.size - 1)
    if np.max(np.abs(d - step)) > UNIFORM_RTOL * step:
        raise SettingsError(
            f"{name} must be a uniform grid: spacings range from {d.min():.6g} to "
            f"{d.max():.6g} eV (accepted: all equal within {UNIFORM_RTOL:g} relative)"
        )
    return e, float(step)


def check_eigenvalues(eigenvalues, name: str = "eigenvalues") -> NDArray[np.float64]:
    """Check a finite (nk, nb) eigenvalue array (eV)."""
    e = np.asarray(eigenvalues, dtype=np.float64)
    if e.ndim != 2 or e.shape[0] == 0 or e.shape[1] == 0:
        raise SettingsError(f"{name} must have shape (nk, nb) with nk, nb > 0, got {e.shape}")
    if not np.all(np.isfinite(e)):
        bad = int(np.count_nonzero(~np.isfinite(e)))
        raise SettingsError(f"{name} contains {bad} NaN or infinite values (accepted: finite eV)")
    return e


def check_k_weights(k_weights, nk: int) -> NDArray[np.float64]:
    """Check non-negative k-point weights of shape (nk,) that sum to 1 (within 1e-8)."""
    w = np.asarray(k_weights, dtype=np.float64)
    if w.shape != (nk,):
        raise SettingsError(
            f"k_weights must have shape (nk,) = ({nk},) to match eigenvalues, got {w.shape}"
        )
    if not np.all(np.isfinite(w)):
        raise SettingsError("k_weights contain NaN or infinite values")
    if np.any(w < 0.0):
        raise SettingsError(
            f"k_weights must be non-negative, smallest is {w.min():.6g} (accepted: w ≥ 0, Σw = 1)"
        )
    s = float(w.sum())
    if abs(s - 1.0) > WEIGHT_SUM_TOL:
        raise SettingsError(
            f"k_weights must sum to 1 within {WEIGHT_SUM_TOL:g}, they sum to {s:.12g}"
        )
    return w


def check_channel_weights(channel_weights, nk: int, nb: int, name: str = "channel_weights"):
    """Check finite projections of shape (nk, nb, nch); None passes through."""
    if channel_weights is None:
        return None
    p = np.asarray(channel_weights, dtype=np.float64)
    if p.ndim != 3 or p.shape[:2] != (nk, nb) or p.shape[2] == 0:
        raise SettingsError(
            f"{name} must have shape (nk, nb, nch) = ({nk}, {nb}, nch) with nch > 0, got {p.shape}"
        )
    if not np.all(np.isfinite(p)):
        raise SettingsError(f"{name} contain NaN or infinite values")
    return np.ascontiguousarray(p)


def check_window(window, grid: NDArray[np.float64], step: float) -> tuple[float, float]:
    """Check an energy window (emin, emax) in eV that lies inside ``grid``.

    The ends may lie outside the grid by at most 1e-9 of a grid step (rounding);
    they are then clipped to the grid.
    """
    lo_g, hi_g = float(grid[0]), float(grid[-1])
    if window is None:
        return lo_g, hi_g
    try:
        emin, emax = (float(x) for x in window)
    except (TypeError, ValueError):
        raise SettingsError(f"window must be a pair (emin, emax) in eV, got {window!r}") from None
    if not (math.isfinite(emin) and math.isfinite(emax)):
        raise SettingsError(f"window ends must be finite, got ({emin}, {emax})")
    if emin >= emax:
        raise SettingsError(f"window must have emin < emax, got ({emin:g}, {emax:g}) eV")
    slack = 1e-9 * step
    if emin < lo_g - slack or emax > hi_g + slack:
        raise SettingsError(
            f"window ({emin:g}, {emax:g}) eV lies outside the energy grid "
            f"[{lo_g:g}, {hi_g:g}] eV (accepted: inside the grid)"
        )
    return max(emin, lo_g), min(emax, hi_g)
