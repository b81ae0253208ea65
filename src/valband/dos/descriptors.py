"""Band descriptors of one DOS channel: moments, filling and the Hilbert upper edge.

All quantities are taken over an energy window [emin, emax] (default: the whole grid),
with energies relative to the Fermi level (eV). Integrals use the trapezoid rule on the
grid nodes inside the window plus the two window ends, where the DOS is interpolated
linearly, so a window need not fall on grid nodes.

* n_states = ∫ρ; centre = ∫Eρ / ∫ρ (first moment, the d-band centre);
* width = √μ2, μ_n = ∫(E − centre)^n ρ / ∫ρ;
* skewness = μ3 / μ2^{3/2}; kurtosis = μ4 / μ2² (the plain fourth standardised moment,
  *not* the excess: 3 for a Gaussian, 2 for a semicircle);
* filling = ∫_{emin}^{min(0, emax)} ρ / ∫_{emin}^{emax} ρ (0 when emin ≥ 0);
* upper_edge: maximum of the Hilbert transform of the windowed DOS
  (:func:`valband.dos.hilbert.hilbert_upper_edge`).

References: B. Hammer & J. K. Nørskov, Adv. Catal. 45, 71 (2000) (d-band centre and
filling); Vojvodic, Abild-Pedersen & Nørskov, Top. Catal. 57, 25 (2014) (upper edge).
"""

from __future__ import annotations

import math
from dataclasses import asdict, dataclass

import numpy as np
from numpy.typing import NDArray

from valband.dos._validate import check_uniform_grid, check_window
from valband.dos.hilbert import check_dos, hilbert_upper_edge
from valband.errors import CalculationError, SettingsError

__all__ = ["BandDescriptors", "band_descriptors", "hilbert_upper_edge"]


@dataclass(frozen=True)
class BandDescriptors:
    """Descriptors of one DOS channel over an energy window (energies relative to E_F).

    Attributes
    ----------
    centre : float, eV
        First moment.
    width : float, eV
        Square root of the second central moment.
    filling : float
        Fraction of the window's states below E_F (0 … 1).
    skewness : float
        μ3/σ³.
    kurtosis : float
        μ4/σ⁴ (not the excess kurtosis).
    upper_edge : float, eV
        Maximum of the Hilbert transform.
    window : (float, float), eV
        The window the moments were taken over.
    n_states : float
        ∫ρ over the window (states per cell, spin included when ρ includes it).
    """

    centre: float
    width: float
    filling: float
    skewness: float
    kurtosis: float
    upper_edge: float
    window: tuple[float, float]
    n_states: float

    def to_dict(self) -> dict:
        """Plain-Python dict (window as a two-element list), ready for JSON."""
        d = asdict(self)
        d["window"] = [float(self.window[0]), float(self.window[1])]
        return d


def _segment(grid: NDArray[np.float64], dos: NDArray[np.float64], lo: float, hi: float):
    """Nodes and interpolated DOS on [lo, hi] (the ends included)."""
    inner = (grid > lo) & (grid < hi)
    x = np.concatenate(([lo], grid[inner], [hi]))
    return x, np.interp(x, grid, dos)


def band_descriptors(energies, dos, window=None) -> BandDescriptors:
    """Moments, filling and upper edge of one DOS channel.

    Parameters
    ----------
    energies : array (ne,), eV
        Uniform ascending grid, relative to the Fermi level.
    dos : array (ne,), states / eV
        One channel (e.g. the d DOS of one element).
    window : (emin, emax) in eV or None
        Range of the moments (default: the whole grid); must lie inside the grid.

    Returns
    -------
    BandDescriptors

    Raises
    ------
    SettingsError
        Bad grid, DOS shape or window, or no states (∫ρ ≤ 0) in the window.
    CalculationError
        The second central moment is not positive (e.g. a DOS with negative parts).
    """
    grid, step = check_uniform_grid(energies)
    d = check_dos(dos, grid.size)
    emin, emax = check_window(window, grid, step)
    x, y = _segment(grid, d, emin, emax)
    n_states = float(np.trapezoid(y, x))
    if not n_states > 0.0:
        raise SettingsError(
            f"the DOS holds no states in the window ({emin:g}, {emax:g}) eV "
            f"(∫ρ = {n_states:.3g}); accepted: a window containing the band"
        )
    centre = float(np.trapezoid(x * y, x)) / n_states
    dx = x - centre
    mu2 = float(np.trapezoid(dx**2 * y, x)) / n_states
    mu3 = float(np.trapezoid(dx**3 * y, x)) / n_states
    mu4 = float(np.trapezoid(dx**4 * y, x)) / n_states
    if not mu2 > 0.0:
        raise CalculationError(
            f"the second central moment of the DOS in ({emin:g}, {emax:g}) eV is {mu2:.3g}; "
            "width, skewness and kurtosis need a positive one"
        )
    top = min(0.0, emax)
    if top <= emin:
        filling = 0.0
    else:
        xf, yf = _segment(grid, d, emin, top)
        filling = float(np.trapezoid(yf, xf)) / n_states
    return BandDescriptors(
        centre=centre,
        width=math.sqrt(mu2),
        filling=filling,
        skewness=mu3 / mu2**1.5,
        kurtosis=mu4 / mu2**2,
        upper_edge=hilbert_upper_edge(grid, d, (emin, emax)),
        window=(emin, emax),
        n_states=n_states,
    )
