"""Logarithmic radial grid, its quadrature and the radial Poisson solve (atomic units).

The grid is uniform in x = ln r: r_i = r_min·e^{i h}, i = 0 … n−1, with n odd so that
Simpson's rule applies on the whole x range (dr = r dx). Defaults (:func:`make_grid`):

    r_min = 1e-6/Z bohr,  r_max ≥ 60 bohr,  h = 0.005

With these the non-relativistic LDA total energy of Ag changes by less than 1e-7 Ha when h is
halved (see ``tests/atom/test_atom_grid.py``), and the hydrogen-like eigenvalues are exact to
1e-10 Ha. Lengths are in bohr, everything here is internal to :mod:`valband.atom`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
from numpy.typing import NDArray

from valband.errors import SettingsError

__all__ = [
    "DEFAULT_H",
    "DEFAULT_R_MAX",
    "DEFAULT_R_MIN_TIMES_Z",
    "RadialGrid",
    "make_grid",
    "hartree_potential",
]

#: Default step in x = ln r.
DEFAULT_H = 0.005
#: Default outer radius (bohr); the grid ends at the first point at or beyond it.
DEFAULT_R_MAX = 60.0
#: Default innermost radius times the nuclear charge (bohr).
DEFAULT_R_MIN_TIMES_Z = 1e-6


@dataclass(frozen=True, eq=False)
class RadialGrid:
    """Logarithmic grid r_i = r_min·exp(i·h), i = 0 … n−1 (n odd), in bohr.

    Attributes
    ----------
    r_min : float
        First grid point (bohr).
    h : float
        Step in x = ln r.
    n : int
        Number of points (odd).
    r, x, weights : ndarray
        Radii (bohr), ln r, and Simpson weights w_i such that Σ w_i f(r_i) ≈ ∫ f dr.
    """

    r_min: float
    h: float
    n: int
    r: NDArray[np.float64] = field(init=False, repr=False)
    x: NDArray[np.float64] = field(init=False, repr=False)
    weights: NDArray[np.float64] = field(init=False, repr=False)

    def __post_init__(self) -> None:
        if not (self.r_min > 0 and math.isfinite(self.r_min)):
            raise SettingsError(f"grid r_min must be a positive number of bohr, got {self.r_min!r}")
        if not (0 < self.h <= 0.05):
            raise SettingsError(f"grid step h must lie in (0, 0.05], got {self.h!r}")
        if self.n < 9 or self.n % 2 == 0:
            raise SettingsError(f"grid size n must be odd and at least 9, got {self.n!r}")
        x = math.log(self.r_min) + self.h * np.arange(self.n)
        r = np.exp(x)
        simpson = np.ones(self.n)
        simpson[1:-1:2] = 4.0
        simpson[2:-1:2] = 2.0
        w = simpson * (self.h / 3.0) * r
        for name, arr in (("x", x), ("r", r), ("weights", w)):
            arr.setflags(write=False)
            object.__setattr__(self, name, arr)

    @property
    def r_max(self) -> float:
        """Last grid point (bohr)."""
        return float(self.r[-1])

    def integrate(self, f: NDArray[np.float64]) -> float:
        """∫ f(r) dr over the grid by Simpson's rule in x (f sampled on :attr:`r`)."""
        return float(self.weights @ f)

    def cumulative(self, f: NDArray[np.float64]) -> NDArray[np.float64]:
        """Return the running integral F_i = ∫_{r_0}^{r_i} f dr, fourth order in h.

        Interior intervals use the four-point rule h/24·(−g_{i−1} + 13g_i + 13g_{i+1} − g_{i+2})
        on g = f·r (the integrand in x); the two end intervals use the one-sided
        Adams–Moulton weights h/24·(9, 19, −5, 1).
        """
        g = np.asarray(f, dtype=float) * self.r
        n, h = self.n, self.h
        piece = np.empty(n - 1)
        piece[1 : n - 2] = (h / 24.0) * (
            -g[0 : n - 3] + 13.0 * g[1 : n - 2] + 13.0 * g[2 : n - 1] - g[3:n]
        )
        piece[0] = (h / 24.0) * (9.0 * g[0] + 19.0 * g[1] - 5.0 * g[2] + g[3])
        piece[n - 2] = (h / 24.0) * (9.0 * g[n - 1] + 19.0 * g[n - 2] - 5.0 * g[n - 3] + g[n - 4])
        out = np.empty(n)
        out[0] = 0.0
        np.cumsum(piece, out=out[1:])
        return out


def make_grid(
    z: float,
    *,
    r_max: float = DEFAULT_R_MAX,
    h: float = DEFAULT_H,
    r_min: float | None = None,
) -> RadialGrid:
    """Default logarithmic grid for nuclear charge ``z``.

    Parameters
    ----------
    z : float
        Nuclear charge (sets r_min = 1e-6/z bohr unless ``r_min`` is given).
    r_max : float
        The grid extends to the first point at or beyond ``r_max`` (bohr).
    h : float
        Step in ln r.
    r_min : float, optional
        First point (bohr).

    Returns
    -------
    RadialGrid
    """
    if not (z > 0 and math.isfinite(z)):
        raise SettingsError(f"nuclear charge for the grid must be positive, got {z!r}")
    if r_min is None:
        r_min = DEFAULT_R_MIN_TIMES_Z / z
    if not (r_min > 0 and math.isfinite(r_min)):
        raise SettingsError(f"grid r_min must be a positive number of bohr, got {r_min!r}")
    if not (r_max > 10 * r_min and math.isfinite(r_max)):
        raise SettingsError(f"grid r_max must be finite and well above r_min, got {r_max!r}")
    if not (0 < h <= 0.05):
        raise SettingsError(f"grid step h must lie in (0, 0.05], got {h!r}")
    n = int(math.ceil(math.log(r_max / r_min) / h)) + 1
    if n % 2 == 0:
        n += 1
    return RadialGrid(r_min=float(r_min), h=float(h), n=max(n, 9))


def hartree_potential(grid: RadialGrid, rho: NDArray[np.float64]) -> NDArray[np.float64]:
    """Hartree potential of a spherical density (Hartree).

    V_H(r) = q(r)/r + 4π ∫_r^∞ ρ(r') r' dr',  q(r) = 4π ∫_0^r ρ(r') r'² dr',

    both running integrals to fourth order in h (:meth:`RadialGrid.cumulative`); the charge
    inside r_min is added as 4πρ(r_0)r_0³/3.

    Parameters
    ----------
    grid : RadialGrid
    rho : ndarray
        Electron density (electrons/bohr³) on ``grid.r``.
    """
    r = grid.r
    q = 4.0 * math.pi * (grid.cumulative(rho * r * r) + rho[0] * r[0] ** 3 / 3.0)
    outer_cum = grid.cumulative(rho * r)
    outer = 4.0 * math.pi * (outer_cum[-1] - outer_cum)
    return q / r + outer
