"""Fermi level from a monotone integrated-DOS function N(E).

Convention when the Fermi level is not unique
    N(E) = n can hold on a whole interval (a gap, or a region between tetrahedron corner
    energies where the linear DOS vanishes). The returned Fermi level is then the midpoint
    of that plateau, [E_lo, E_hi] with E_lo = inf{E: N(E) ≥ n − δ} and
    E_hi = sup{E: N(E) ≤ n + δ}, δ = 1e-12·max(1, max_electrons) electrons. If the plateau
    reaches an end of the bracket (n = 0 or n = max_electrons, say), its inner end — the
    band edge — is returned instead, so the result does not depend on the bracket.
    Where the root is unique (a metal, or any smeared count) E_lo = E_hi = the root.
    Plateau ends are located only as sharply as δ allows: next to a 3D band edge
    N − n ∝ (E − edge)³, so an end is placed ~(δ/c)^(1/3) (typically 1e-4 eV) inside the gap.
"""

from __future__ import annotations

import math
from collections.abc import Callable

import numpy as np
from scipy.optimize import brentq

from valband.errors import CalculationError, SettingsError

__all__ = ["find_fermi_level"]


def _bisect_edge(count, target, lo, hi, tol, above):
    """Bisection for an edge of a level set of the non-decreasing ``count``.

    above=True: the smallest E in [lo, hi] with count(E) ≥ target (lo fails, hi passes).
    above=False: the largest E with count(E) ≤ target (lo passes, hi fails).
    """
    while hi - lo > tol:
        mid = 0.5 * (lo + hi)
        c = count(mid)
        passes = c >= target if above else c <= target
        if passes == above:
            hi = mid
        else:
            lo = mid
    return hi if above else lo


def find_fermi_level(
    count: Callable[[float], float],
    n_electrons: float,
    lower: float,
    upper: float,
    max_electrons: float,
    tol: float = 1e-9,
) -> float:
    """Energy E_F with count(E_F) = n_electrons, by Brent's method on a bracket.

    Parameters
    ----------
    count : callable, E (eV) → N(E) (electrons per cell)
        Non-decreasing and continuous (a tetrahedron or smeared count).
    n_electrons : float
        Electrons per cell; accepted range [0, max_electrons].
    lower, upper : float, eV
        Bracket with count(lower) ≤ n_electrons ≤ count(upper).
    max_electrons : float
        Capacity of the bands (degeneracy × number of bands).
    tol : float, eV
        Accuracy of the returned energy.

    Returns
    -------
    float, eV
        The Fermi level (plateau midpoint convention: see the module notes).

    Raises
    ------
    SettingsError
        n_electrons is NaN or outside [0, max_electrons]; bad bracket or tolerance.
    CalculationError
        The bracket does not enclose n_electrons.
    """
    n = float(n_electrons)
    nmax = float(max_electrons)
    if not math.isfinite(nmax) or nmax <= 0:
        raise SettingsError(f"max_electrons must be a finite number > 0, got {max_electrons!r}")
    if math.isnan(n) or n < 0.0 or n > nmax:
        raise SettingsError(
            f"n_electrons = {n_electrons!r} is impossible: accepted range is "
            f"[0, {nmax:g}] electrons per cell (degeneracy × number of bands)"
        )
    lo, hi = float(lower), float(upper)
    if not (math.isfinite(lo) and math.isfinite(hi)) or lo >= hi:
        raise SettingsError(
            f"Fermi-level bracket must be finite with lower < upper, got ({lower}, {upper})"
        )
    tol = float(tol)
    if not (tol > 0.0 and math.isfinite(tol)):
        raise SettingsError(f"tol must be a finite number > 0 eV, got {tol!r}")
    delta = 1e-12 * max(1.0, nmax)
    n_lo, n_hi = float(count(lo)), float(count(hi))
    if not (n_lo <= n + delta and n_hi >= n - delta):
        raise CalculationError(
            f"the Fermi level is not bracketed: N({lo:g} eV) = {n_lo:.6g} and "
            f"N({hi:g} eV) = {n_hi:.6g}, but {n:.6g} electrons are needed; widen the bracket"
        )

    # Fast path: a root, then a check whether it lies on a plateau.
    if n_lo >= n - delta:
        root = lo
    elif n_hi <= n + delta:
        root = hi
    else:
        root = brentq(lambda e: count(e) - n, lo, hi, xtol=tol, rtol=4.0 * np.finfo(float).eps)
    probe = max(10.0 * tol, 1e-7)
    left_flat = root - probe <= lo or count(root - probe) >= n - delta
    right_flat = root + probe >= hi or count(root + probe) <= n + delta
    if not (left_flat and right_flat):
        return float(root)

    # Plateau: locate both of its ends.
    if n_lo >= n - delta:
        e_lo = None  # plateau reaches the lower bracket end
    else:
        e_lo = _bisect_edge(count, n - delta, lo, root, tol, above=True)
    if n_hi <= n + delta:
        e_hi = None
    else:
        e_hi = _bisect_edge(count, n + delta, root, hi, tol, above=False)
    if e_lo is None and e_hi is None:
        raise CalculationError(
            f"N(E) = {n:.6g} over the whole bracket ({lo:g}, {hi:g}) eV: no states to place"
        )
    if e_lo is None:
        return float(e_hi)
    if e_hi is None:
        return float(e_lo)
    return 0.5 * (e_lo + e_hi)
