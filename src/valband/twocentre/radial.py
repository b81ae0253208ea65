"""Radial functions tabulated on the atom's logarithmic grid, evaluated anywhere (bohr, Ha).

A function f(r) known on the grid r_i = r_min·e^{ih} of :mod:`valband.atom.grid` is stored as
g(x) = f(r)/r^k on x = ln r and interpolated by a cubic spline in x (SciPy ``CubicSpline``,
not-a-knot ends). The power k removes the known behaviour at the nucleus so that g is smooth
and finite there: k = l for a radial orbital R_l(r) ∝ r^l, k = −1 for a potential ∝ −Z/r.
Below the first grid point g is held at g(x_0) (so f ∝ r^k); beyond the last point f is 0,
which is exact to the accuracy of the tables for bound orbitals (they decay faster than
e^{−r}) and harmless for potentials, which only ever multiply orbital products.

With the atom engine's step h = 0.005 the spline error is O(h⁴) relative, far below the
two-centre quadrature error.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
from numpy.typing import ArrayLike, NDArray
from scipy.interpolate import CubicSpline

from valband.errors import SettingsError

__all__ = ["LogGridFunction"]


@dataclass(frozen=True, eq=False)
class LogGridFunction:
    """Callable f(r) from samples on a logarithmic grid (r in bohr; unit of f as given).

    Parameters
    ----------
    r : array (n,)
        Strictly increasing, positive grid radii (bohr), uniform in ln r.
    values : array (n,)
        f(r_i).
    power : int
        k in f = r^k·g(ln r); l for an orbital's R(r), −1 for a potential.
    r_end : float, optional
        f is 0 beyond this radius (bohr); default the last grid point.
    """

    r: NDArray[np.float64] = field(repr=False)
    values: NDArray[np.float64] = field(repr=False)
    power: int = 0
    r_end: float | None = None
    _spline: CubicSpline = field(init=False, repr=False)
    _g0: float = field(init=False, repr=False)

    def __post_init__(self) -> None:
        r = np.asarray(self.r, dtype=float)
        f = np.asarray(self.values, dtype=float)
        if r.ndim != 1 or r.shape != f.shape or r.size < 4:
            raise SettingsError(
                f"radial samples need r and values of the same 1-D shape (>= 4 points), got "
                f"{r.shape} and {f.shape}"
            )
        if not (np.all(r > 0) and np.all(np.diff(r) > 0)):
            raise SettingsError("radial grid must be positive and strictly increasing (bohr)")
        if not np.all(np.isfinite(f)):
            raise SettingsError("radial function values must be finite")
        end = float(r[-1]) if self.r_end is None else float(self.r_end)
        keep = r <= end * (1 + 1e-12)
        r, f = r[keep], f[keep]
        g = f / r**self.power
        object.__setattr__(self, "r_end", float(r[-1]))
        object.__setattr__(self, "_spline", CubicSpline(np.log(r), g, bc_type="not-a-knot"))
        object.__setattr__(self, "_g0", float(g[0]))

    def __call__(self, r: ArrayLike) -> NDArray[np.float64]:
        """Evaluate f at radii ``r`` (bohr, ≥ 0; any shape)."""
        r = np.asarray(r, dtype=float)
        out = np.zeros(r.shape)
        r0 = float(self.r[0])
        inside = (r >= r0) & (r <= self.r_end)
        ri = r[inside]
        out[inside] = self._spline(np.log(ri)) * ri**self.power
        low = (r < r0) & (r > 0)
        if np.any(low):
            out[low] = self._g0 * r[low] ** self.power
        if self.power == 0:
            out[r == 0] = self._g0
        return out
