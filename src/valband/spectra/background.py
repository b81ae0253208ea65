"""Inelastic backgrounds of photoemission spectra: Shirley, Tougaard and linear.

Every function works on plain arrays: ``be`` is the binding energy (eV), strictly ascending
(need not be uniform), and ``intensity`` the measured signal on it (any unit). Inelastic
losses appear at *higher* binding energy than the peak that causes them, so every background
here grows from the low-BE end of its window towards the high-BE end.

End intensities
---------------
Where an intensity "at an endpoint" is needed (Shirley, linear, the Tougaard baseline), it is
the value *at the endpoint energy* of a least-squares straight line through the ``n_average``
data points nearest to it (default :data:`DEFAULT_N_AVERAGE`). This averages the noise of a
few points without the bias a plain mean would have on a sloping spectrum; ``n_average=1``
is linear interpolation of the data at the endpoint.

Outside the window
------------------
Shirley and linear backgrounds are defined between two endpoints. The returned array always
has the length of the input: below the window it is the low-end intensity, above the window
the high-end intensity (constant continuation), so ``intensity − background`` is defined
everywhere and is the background-free signal inside the window.

References
----------
D. A. Shirley, Phys. Rev. B 5, 4709 (1972); A. Proctor and P. M. A. Sherwood, Anal. Chem. 54,
13 (1982) (iterative form); S. Tougaard, Surf. Interface Anal. 11, 453 (1988) (universal
cross-section).
"""

from __future__ import annotations

import math

import numpy as np
from numpy.typing import NDArray

from valband.errors import CalculationError, SettingsError

__all__ = [
    "TOUGAARD_B",
    "TOUGAARD_C",
    "DEFAULT_N_AVERAGE",
    "check_spectrum",
    "end_intensity",
    "shirley_background",
    "tougaard_kernel",
    "tougaard_kernel_integral",
    "tougaard_background",
    "linear_background",
    "shirley_shape",
    "tougaard_shape",
]

#: Tougaard's universal cross-section coefficients, eV² (Tougaard 1988–89; B usually refitted).
TOUGAARD_B = 2866.0
TOUGAARD_C = 1643.0
#: Data points averaged (by a straight-line fit) for an end intensity.
DEFAULT_N_AVERAGE = 5

_MIN_POINTS = 3


# --------------------------------------------------------------------------------- validation
def check_spectrum(be, intensity, min_points: int = _MIN_POINTS,
                   what: str = "spectrum") -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    """Validate a spectrum and return (be, intensity) as float arrays.

    Raises SettingsError naming the problem: not 1-D, lengths differ, fewer than
    ``min_points`` points, NaN/inf, binding energies not strictly ascending.
    """
    try:
        e = np.asarray(be, dtype=np.float64)
        y = np.asarray(intensity, dtype=np.float64)
    except (TypeError, ValueError):
        raise SettingsError(f"{what}: binding energy and intensity must be numeric "
                            "1-D arrays") from None
    if e.ndim != 1 or y.ndim != 1:
        raise SettingsError(f"{what}: binding energy and intensity must be 1-D arrays "
                            f"(got shapes {e.shape} and {y.shape})")
    if e.size != y.size:
        raise SettingsError(f"{what}: binding energy has {e.size} points but intensity has "
                            f"{y.size}; they must be the same length")
    if e.size < min_points:
        raise SettingsError(f"{what}: {e.size} points, need at least {min_points}")
    if not np.all(np.isfinite(e)):
        raise SettingsError(f"{what}: binding energy contains NaN or infinite values")
    if not np.all(np.isfinite(y)):
        raise SettingsError(f"{what}: intensity contains NaN or infinite values")
    d = np.diff(e)
    if np.any(d <= 0):
        k = int(np.flatnonzero(d <= 0)[0])
        raise SettingsError(f"{what}: binding energy must be strictly ascending (eV); it is "
                            f"not at index {k + 1} ({e[k]:.6g} → {e[k + 1]:.6g} eV); sort "
                            "the data first")
    return e, y


def _n_average(n_average) -> int:
    try:
        n = int(n_average)
    except (TypeError, ValueError):
        raise SettingsError(f"n_average {n_average!r}: must be an integer ≥ 1") from None
    if n < 1 or n != n_average:
        raise SettingsError(f"n_average {n_average!r}: must be an integer ≥ 1")
    return n


def _window(e: NDArray, endpoints, what: str) -> tuple[float, float, NDArray[np.bool_]]:
    """(lo, hi, mask) of the window; defaults to the ends of the data."""
    if endpoints is None:
        lo, hi = float(e[0]), float(e[-1])
    else:
        try:
            lo, hi = (float(v) for v in endpoints)
        except (TypeError, ValueError):
            raise SettingsError(f"{what}: endpoints {endpoints!r} must be a pair "
                                "(BE_low, BE_high) of numbers in eV") from None
        if not (math.isfinite(lo) and math.isfinite(hi)):
            raise SettingsError(f"{what}: endpoints {endpoints!r} must be finite (eV)")
        if lo > hi:
            lo, hi = hi, lo
        tol = 1e-9 * max(1.0, abs(e[0]), abs(e[-1]))
        if lo < e[0] - tol or hi > e[-1] + tol:
            raise SettingsError(f"{what}: endpoints ({lo:.6g}, {hi:.6g}) eV lie outside the "
                                f"data ({e[0]:.6g} to {e[-1]:.6g} eV)")
        lo, hi = max(lo, float(e[0])), min(hi, float(e[-1]))
    mask = (e >= lo) & (e <= hi)
    if np.count_nonzero(mask) < _MIN_POINTS:
        raise SettingsError(f"{what}: the window ({lo:.6g}, {hi:.6g}) eV holds "
                            f"{np.count_nonzero(mask)} data points, need at least {_MIN_POINTS}")
    return lo, hi, mask


def end_intensity(be, intensity, energy: float, n_average: int = DEFAULT_N_AVERAGE) -> float:
    """Intensity at ``energy`` (eV) from a straight line through the nearest ``n_average`` points.

    ``n_average = 1`` is linear interpolation of the data. See the module docstring.
    """
    e = np.asarray(be, dtype=np.float64)
    y = np.asarray(intensity, dtype=np.float64)
    n = min(_n_average(n_average), e.size)
    if n == 1:
        return float(np.interp(energy, e, y))
    idx = np.sort(np.argsort(np.abs(e - energy), kind="stable")[:n])
    x = e[idx] - energy
    _slope, offset = np.polyfit(x, y[idx], 1)
    return float(offset)


# --------------------------------------------------------------------------------- integrals
def _cumtrapz(x: NDArray, y: NDArray) -> NDArray[np.float64]:
    """Cumulative trapezoid ∫_{x0}^{x_i} y dx, starting at 0 (non-uniform x)."""
    out = np.zeros_like(y)
    out[1:] = np.cumsum(0.5 * (y[1:] + y[:-1]) * np.diff(x))
    return out


# --------------------------------------------------------------------------------- Shirley
def shirley_background(be, intensity, endpoints=None, tol: float = 1e-6, max_iter: int = 100,
                       n_average: int = DEFAULT_N_AVERAGE) -> NDArray[np.float64]:
    """Compute the iterative Shirley background (Shirley 1972; Proctor & Sherwood 1982).

    Inside the window [BE_low, BE_high],
    ``B(E) = I_low + (I_high − I_low) · ∫_{BE_low}^{E} (I − B) dE' / ∫_{window} (I − B) dE'``,
    iterated from B = I_low until the largest change of B is below
    ``tol · max(|I_high − I_low|, max|I|·1e-12)``. Integrals are cumulative trapezoids over
    the data points inside the window (non-uniform grids accepted).

    Parameters
    ----------
    be : (n,) binding energy, eV, strictly ascending
    intensity : (n,) measured intensity
    endpoints : (BE_low, BE_high) in eV inside the data, or None for the ends of the data
    tol : relative convergence tolerance (> 0)
    max_iter : largest number of iterations (≥ 1)
    n_average : points averaged for the end intensities (module docstring)

    Returns
    -------
    (n,) background; constant I_low below and I_high above the window.

    Raises
    ------
    SettingsError for bad input; CalculationError when the iteration does not converge or the
    background-subtracted area vanishes.
    """
    e, y = check_spectrum(be, intensity, what="Shirley background")
    if not (math.isfinite(float(tol)) and tol > 0):
        raise SettingsError(f"Shirley background: tol {tol!r} must be a finite number > 0")
    if int(max_iter) != max_iter or max_iter < 1:
        raise SettingsError(f"Shirley background: max_iter {max_iter!r} must be an integer ≥ 1")
    lo, hi, mask = _window(e, endpoints, "Shirley background")
    i_lo = end_intensity(e, y, lo, n_average)
    i_hi = end_intensity(e, y, hi, n_average)
    ew, yw = e[mask], y[mask]
    step = i_hi - i_lo
    scale = max(abs(step), float(np.max(np.abs(y))) * 1e-12, np.finfo(float).tiny)
    bw = np.full_like(yw, i_lo)
    converged = step == 0.0
    for _ in range(int(max_iter)):
        if converged:
            break
        cum = _cumtrapz(ew, yw - bw)
        total = cum[-1]
        if total == 0.0 or not math.isfinite(total):
            raise CalculationError("Shirley background: the background-subtracted area in the "
                                   f"window ({lo:.6g}, {hi:.6g}) eV is zero; the window holds no "
                                   "peak above the background")
        new = i_lo + step * cum / total
        change = float(np.max(np.abs(new - bw)))
        bw = new
        converged = change < tol * scale
    if not converged:
        raise CalculationError(f"Shirley background did not converge in {max_iter} iterations "
                               f"(last change {change:.3g}, tolerance {tol * scale:.3g}); check "
                               "the window or raise max_iter")
    out = np.where(e < lo, i_lo, i_hi).astype(np.float64)
    out[mask] = bw
    return out


# --------------------------------------------------------------------------------- Tougaard
def tougaard_kernel(loss, B: float = TOUGAARD_B, C: float = TOUGAARD_C) -> NDArray[np.float64]:
    """Universal inelastic cross-section K(T) = B·T / (C + T²)² (eV⁻¹), zero for T < 0.

    ``loss`` T in eV; B, C in eV² (Tougaard, Surf. Interface Anal. 11, 453 (1988)).
    """
    t = np.asarray(loss, dtype=np.float64)
    return np.where(t > 0, B * t / (C + t * t) ** 2, 0.0)


def tougaard_kernel_integral(t_max, B: float = TOUGAARD_B, C: float = TOUGAARD_C):
    """∫_0^{t_max} K(T) dT = (B/2)·[1/C − 1/(C + t_max²)] (closed form; → B/(2C) as t_max → ∞)."""
    t = np.asarray(t_max, dtype=np.float64)
    return 0.5 * B * (1.0 / C - 1.0 / (C + t * t))


def _g0(t, B, C):
    """Antiderivative of K(T) = B T/(C+T²)²."""
    return -0.5 * B / (C + t * t)


def _g1(t, B, C):
    """Antiderivative of T·K(T) = B T²/(C+T²)²."""
    rc = math.sqrt(C)
    return B * (0.5 / rc * np.arctan(t / rc) - 0.5 * t / (C + t * t))


def _tougaard_convolution(e: NDArray, j: NDArray, B: float, C: float) -> NDArray[np.float64]:
    """``∫_{e_0}^{e_i} K(e_i − E') J(E') dE'`` for every i, J piecewise linear between points.

    Exact for the piecewise-linear J (closed-form antiderivatives of K and T·K), so it holds on
    any non-uniform grid. O(n²) time, O(n) memory.
    """
    n = e.size
    out = np.zeros(n)
    s = np.diff(j) / np.diff(e)  # slope dJ/dE' on each segment
    for i in range(1, n):
        ea, eb = e[:i], e[1:i + 1]          # segments left of e_i
        ta, tb = e[i] - eb, e[i] - ea      # loss range of each segment, ta < tb
        # J(E') = J_a + s (E' − ea) with E' = e_i − T  →  J = alpha + beta T
        beta = -s[:i]
        alpha = j[:i] + s[:i] * tb
        out[i] = np.sum(alpha * (_g0(tb, B, C) - _g0(ta, B, C))
                        + beta * (_g1(tb, B, C) - _g1(ta, B, C)))
    return out


def tougaard_background(be, intensity, B: float = TOUGAARD_B, C: float = TOUGAARD_C,
                        endpoint=None, fit_B: bool = False, n_average: int = DEFAULT_N_AVERAGE,
                        full_output: bool = False):
    """Tougaard background with the universal cross-section (Tougaard 1988).

    ``bg(E) = I_0 + ∫_{E_0}^{E} K(E − E') [I(E') − I_0] dE'`` with K from
    :func:`tougaard_kernel`: electrons detected at binding energy E' lose T = E − E' > 0 and
    land at the higher binding energy E. E_0 is the low-BE end of the data and I_0 the intensity
    there (module docstring), taken as the loss-free baseline. The integral is exact for the
    piecewise-linear interpolant of the data (any grid).

    Parameters
    ----------
    be : (n,) binding energy, eV, strictly ascending
    intensity : (n,) measured intensity
    B, C : cross-section coefficients, eV² (> 0)
    endpoint : BE (eV) where the background should meet the data when ``fit_B``; default the
        high-BE end of the data
    fit_B : refit B (the background is linear in B) so that bg(endpoint) equals the data there
    n_average : points averaged for the end intensities
    full_output : also return the B used

    Returns
    -------
    (n,) background, or (background, B) with ``full_output``.
    """
    e, y = check_spectrum(be, intensity, what="Tougaard background")
    for name, v in (("B", B), ("C", C)):
        if not (isinstance(v, (int, float, np.floating, np.integer)) and math.isfinite(v)
                and v > 0):
            raise SettingsError(f"Tougaard background: {name} {v!r} must be a finite number "
                                "> 0 (eV²)")
    B, C = float(B), float(C)
    i0 = end_intensity(e, y, float(e[0]), n_average)
    unit = _tougaard_convolution(e, y - i0, 1.0, C)
    if fit_B:
        if endpoint is None:
            e_end = float(e[-1])
        else:
            try:
                e_end = float(endpoint)
            except (TypeError, ValueError):
                raise SettingsError(f"Tougaard background: endpoint {endpoint!r} must be a "
                                    "binding energy in eV") from None
            if not (e[0] < e_end <= e[-1]):
                raise SettingsError(f"Tougaard background: endpoint {e_end:.6g} eV must lie "
                                    f"above the low end of the data and within it ({e[0]:.6g} "
                                    f"to {e[-1]:.6g} eV)")
        target = end_intensity(e, y, e_end, n_average) - i0
        at_end = float(np.interp(e_end, e, unit))
        if not at_end > 0 or not target > 0:
            raise CalculationError("Tougaard background: cannot fit B — the data at "
                                   f"{e_end:.6g} eV are not above the low-BE baseline, or the "
                                   "spectrum has no intensity to lose from")
        B = target / at_end
    elif endpoint is not None:
        raise SettingsError("Tougaard background: endpoint is only used with fit_B=True")
    bg = i0 + B * unit
    return (bg, B) if full_output else bg


# --------------------------------------------------------------------------------- linear
def linear_background(be, intensity, endpoints=None,
                      n_average: int = DEFAULT_N_AVERAGE) -> NDArray[np.float64]:
    """Straight line through the end intensities at BE_low and BE_high (eV).

    Constant continuation outside the window (module docstring). ``endpoints`` as for
    :func:`shirley_background`.
    """
    e, y = check_spectrum(be, intensity, what="linear background")
    lo, hi, mask = _window(e, endpoints, "linear background")
    i_lo = end_intensity(e, y, lo, n_average)
    i_hi = end_intensity(e, y, hi, n_average)
    x = np.clip(e, lo, hi)
    return i_lo + (i_hi - i_lo) * (x - lo) / (hi - lo)


# --------------------------------------------------------------------------------- model shapes
def shirley_shape(h: float, peak) -> NDArray[np.float64]:
    """∫ from the grid start to BE of a *model* peak, on a uniform BE grid of step h (eV).

    Trapezoid rule along the last axis, 0 at the first point. Times an amplitude k (1/eV) this
    is Shirley's background (proportional to the peak area at lower binding energy) of a
    simulated peak; unlike :func:`shirley_background` it needs no iteration, because the
    peak is known.
    """
    y = np.asarray(peak, dtype=np.float64)
    c = np.cumsum(y, axis=-1) * h
    return c - 0.5 * h * (y + y[..., :1])


def tougaard_shape(h: float, peak, C: float = TOUGAARD_C) -> NDArray[np.float64]:
    """∫_0^∞ T/(C + T²)² P(BE − T) dT of a model peak P on a uniform BE grid of step h (eV).

    Times B (eV²) this is the Tougaard universal-cross-section background (Tougaard 1988) of
    a simulated peak; the kernel is integrated over each grid bin in closed form and applied as
    a causal convolution by FFT (losses move intensity to higher BE). Last axis.
    """
    y = np.asarray(peak, dtype=np.float64)
    n = y.shape[-1]
    edges = (np.arange(n + 1) - 0.5).clip(min=0.0) * h
    k = np.diff(tougaard_kernel_integral(edges, B=1.0, C=C))
    nfft = 1 << (2 * n - 1).bit_length()
    f = np.fft.irfft(np.fft.rfft(y, nfft, axis=-1) * np.fft.rfft(k, nfft), nfft, axis=-1)
    return f[..., :n]
