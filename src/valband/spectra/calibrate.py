"""Fermi-edge calibration of a measured binding-energy axis.

Model (binding energy BE ascending, eV; x = BE − E_F, positive for occupied states)::

    I(BE) = ([a + b·x] · f(−x, T)) ⊛ Gaussian(FWHM) + c

a linear density of states (a at the edge, slope b per eV of binding energy) times the
Fermi–Dirac occupation :func:`~valband.spectra.broadening.fermi_dirac` (its argument is
E − E_F = −x), convolved with the instrument Gaussian
(:func:`~valband.spectra.broadening.gaussian_broaden`) plus a constant background c.

The temperature T is *fixed*, not fitted: the thermal and instrumental widths are nearly
interchangeable at an edge (they almost add in quadrature), so fitting both is ill-conditioned;
give the sample temperature. The product is evaluated on an internal uniform grid (step
≤ k_BT/4 and ≤ the median data step) padded by 4·FWHM + 15 k_BT beyond the fit window, so the
convolution has no edge effects in the window, then interpolated linearly to the data.

Fitting uses :func:`scipy.optimize.least_squares` (trust-region reflective, FWHM bounded at
≥ 0) with residuals (data − model)/σ. With ``counts=True`` the intensities are counts and
σ = √max(I, 1) (Poisson); the covariance is then (JᵀJ)⁻¹. With ``counts=False`` σ = 1 and the
covariance is scaled by the reduced χ² (errors estimated from the scatter).

The fitted E_F is on the input BE scale: it is the shift to subtract, BE_corrected =
BE − E_F, so that the Fermi level sits at BE = 0 (:func:`apply_shift`).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray
from scipy.optimize import least_squares

from valband.conventions import KB_EV
from valband.errors import CalculationError, SettingsError
from valband.spectra.background import check_spectrum
from valband.spectra.broadening import FWHM_PER_SIGMA, fermi_dirac, gaussian_broaden

__all__ = ["FermiEdgeFit", "fermi_edge_model", "fit_fermi_edge", "apply_shift"]

#: Fewest data points in a fit window (5 free parameters plus a few degrees of freedom).
MIN_FIT_POINTS = 10
#: Significance (in σ of the step) below which a window is said to hold no edge.
_EDGE_SIGNIFICANCE = 5.0


@dataclass(frozen=True)
class FermiEdgeFit:
    """Result of :func:`fit_fermi_edge` (energies in eV on the input binding-energy scale).

    Attributes
    ----------
    fermi_level, fermi_level_err : E_F and its 1σ uncertainty, eV (subtract it from BE)
    fwhm, fwhm_err : Gaussian (instrument) FWHM and 1σ, eV
    dos_edge, dos_edge_err : a, the DOS step height at the edge (intensity units)
    dos_slope, dos_slope_err : b, intensity per eV of binding energy
    background, background_err : c, the constant background
    temperature : K (fixed)
    chi2, reduced_chi2, dof : χ² = Σ((I − model)/σ)², χ²/dof, dof = N − 5
    window : (BE_low, BE_high) of the fitted points, eV
    energies, intensity, model : (N,) fitted binding energies, data and best-fit model
    covariance : (5, 5) for (E_F, FWHM, a, b, c)
    counts : whether Poisson weights were used
    """

    fermi_level: float
    fermi_level_err: float
    fwhm: float
    fwhm_err: float
    dos_edge: float
    dos_edge_err: float
    dos_slope: float
    dos_slope_err: float
    background: float
    background_err: float
    temperature: float
    chi2: float
    reduced_chi2: float
    dof: int
    window: tuple[float, float]
    energies: NDArray[np.float64]
    intensity: NDArray[np.float64]
    model: NDArray[np.float64]
    covariance: NDArray[np.float64]
    counts: bool


def fermi_edge_model(be, fermi_level: float, fwhm: float, dos_edge: float, dos_slope: float,
                     background: float, temperature: float = 300.0) -> NDArray[np.float64]:
    """Evaluate the edge model of the module docstring at binding energies ``be`` (eV).

    ``be`` need not be uniform; the model is built on an internal uniform grid and interpolated.
    """
    e = np.asarray(be, dtype=np.float64)
    t = float(temperature)
    return _model(e, np.array([fermi_level, fwhm, dos_edge, dos_slope, background]), t,
                  _grid_step(e, t))


def _grid_step(e: NDArray, temperature: float) -> float:
    d = np.diff(e)
    h = float(np.median(d)) if d.size else 0.01
    kt = KB_EV * temperature
    if kt > 0:
        h = min(h, kt / 4.0)
    return max(h, 1e-5)


def _model(e: NDArray, p: NDArray, temperature: float, h: float) -> NDArray[np.float64]:
    ef, fwhm, a, b, c = (float(v) for v in p)
    fwhm = max(fwhm, 0.0)
    pad = 4.0 * fwhm + 15.0 * KB_EV * temperature + 2.0 * h
    # grid anchored at multiples of h, so changing the padding never moves the inner points
    k0 = math.floor((e[0] - pad) / h)
    k1 = math.ceil((e[-1] + pad) / h)
    g = np.arange(k0, k1 + 1) * h
    x = g - ef
    y = (a + b * x) * fermi_dirac(-x, temperature)
    if fwhm > 0:
        y = gaussian_broaden(g, y, fwhm)
    return np.interp(e, g, y) + c


def _initial_guess(e: NDArray, y: NDArray, temperature: float) -> NDArray[np.float64]:
    n = e.size
    m = max(3, n // 10)
    c0 = float(np.median(y[:m]))        # low BE: above E_F, background only
    top = float(np.median(y[-m:]))      # high BE: occupied states
    a0 = top - c0
    if not a0 > 0:  # no step up towards high BE: the caller reports "no Fermi edge"
        return np.array([0.5 * (e[0] + e[-1]), 0.0, a0, 0.0, c0])
    # smooth a little, then find where the signal crosses half height from the low-BE side
    w = max(1, n // 50)
    ys = np.convolve(y, np.ones(2 * w + 1) / (2 * w + 1), mode="same")
    ys[:w], ys[-w:] = y[:w].mean(), y[-w:].mean()
    frac = (ys - c0) / a0
    def crossing(level):
        above = np.flatnonzero(frac >= level)
        return float(e[above[0]]) if above.size else float(e[-1])
    ef0 = crossing(0.5)
    width = max(crossing(0.9) - crossing(0.1), 0.0)
    thermal = 2.0 * math.log(9.0) * KB_EV * temperature
    # 10-90 % width of a Gaussian-broadened step is ≈ 2·1.2816 σ = 1.09 FWHM
    sig_width = math.sqrt(max(width**2 - thermal**2, 0.0))
    fwhm0 = max(sig_width / (2 * 1.2816) * FWHM_PER_SIGMA, 2 * float(np.median(np.diff(e))))
    return np.array([ef0, fwhm0, a0, 0.0, c0])


def fit_fermi_edge(be, intensity, counts: bool = True, window=None, temperature: float = 300.0,
                   initial=None) -> FermiEdgeFit:
    """Fit a Fermi edge and return the Fermi level on the input binding-energy scale.

    Parameters
    ----------
    be : (n,) binding energy, eV, strictly ascending (non-uniform accepted)
    intensity : (n,) measured intensity; counts (≥ 0) when ``counts``
    counts : Poisson weights σ = √max(I, 1); else unit weights and covariance scaled by χ²_red
    window : (BE_low, BE_high), eV — only these points are fitted; None uses all data
    temperature : sample temperature, K (fixed in the fit)
    initial : optional dict of starting values with keys among ``fermi_level``, ``fwhm``,
        ``dos_edge``, ``dos_slope``, ``background``; missing keys are estimated from the data

    Returns
    -------
    FermiEdgeFit

    Raises
    ------
    SettingsError for bad input (NaN, unsorted axis, too few points, a window outside the data
    or without an edge — also when the fitted step is not significant at 5σ or lies less than
    one edge width from an end of the window); CalculationError when the fit fails.
    """
    e, y = check_spectrum(be, intensity, what="Fermi-edge fit")
    try:
        t = float(temperature)
    except (TypeError, ValueError):
        raise SettingsError(f"Fermi-edge fit: temperature {temperature!r} must be a number "
                            "(K)") from None
    if not (math.isfinite(t) and t >= 0):
        raise SettingsError(f"Fermi-edge fit: temperature {temperature!r} K must be finite "
                            "and ≥ 0")
    if window is not None:
        try:
            lo, hi = sorted(float(v) for v in window)
        except (TypeError, ValueError):
            raise SettingsError(f"Fermi-edge fit: window {window!r} must be a pair "
                                "(BE_low, BE_high) in eV") from None
        if not (math.isfinite(lo) and math.isfinite(hi)) or hi <= e[0] or lo >= e[-1]:
            raise SettingsError(f"Fermi-edge fit: window ({lo:.6g}, {hi:.6g}) eV does not "
                                f"overlap the data ({e[0]:.6g} to {e[-1]:.6g} eV)")
        mask = (e >= lo) & (e <= hi)
        e, y = e[mask], y[mask]
    if e.size < MIN_FIT_POINTS:
        raise SettingsError(f"Fermi-edge fit: {e.size} points in the fit window, need at "
                            f"least {MIN_FIT_POINTS}")
    if counts and np.any(y < 0):
        raise SettingsError("Fermi-edge fit: counts=True but the intensity has negative "
                            "values; pass counts=False for non-count data")
    sigma = np.sqrt(np.maximum(y, 1.0)) if counts else np.ones_like(y)

    p0 = _initial_guess(e, y, t)
    # is there an edge at all? compare the step with the scatter of the two ends
    m = max(3, e.size // 10)
    noise = math.sqrt((np.var(y[:m]) + np.var(y[-m:])) / m) if not counts else \
        math.sqrt((np.mean(sigma[:m] ** 2) + np.mean(sigma[-m:] ** 2)) / m)
    if not p0[2] > _EDGE_SIGNIFICANCE * max(noise, 1e-300):
        raise SettingsError(f"Fermi-edge fit: no Fermi edge in the window ({e[0]:.6g} to "
                            f"{e[-1]:.6g} eV) — the high-BE side (occupied) is not clearly "
                            "above the low-BE side; choose a window that spans the edge")
    names = ("fermi_level", "fwhm", "dos_edge", "dos_slope", "background")
    if initial is not None:
        if not isinstance(initial, dict) or not set(initial) <= set(names):
            raise SettingsError(f"Fermi-edge fit: initial {initial!r} must be a dict with "
                                f"keys among {names}")
        for k, v in initial.items():
            p0[names.index(k)] = float(v)
        if not np.all(np.isfinite(p0)):
            raise SettingsError("Fermi-edge fit: initial values must be finite")
    p0[1] = max(p0[1], 0.0)

    h = _grid_step(e, t)
    span = float(e[-1] - e[0])
    x_scale = np.array([0.01, 0.01, abs(p0[2]) or 1.0, (abs(p0[2]) or 1.0) / max(span, 1e-3),
                        abs(p0[2]) or 1.0])

    def resid(p):
        return (y - _model(e, p, t, h)) / sigma

    lower = np.array([-np.inf, 0.0, -np.inf, -np.inf, -np.inf])
    try:
        res = least_squares(resid, p0, bounds=(lower, np.full(5, np.inf)), x_scale=x_scale,
                            method="trf", xtol=1e-10, ftol=1e-10, gtol=1e-10, max_nfev=2000,
                            diff_step=1e-6)
    except (ValueError, np.linalg.LinAlgError) as exc:
        raise CalculationError(f"Fermi-edge fit failed: {exc}") from None
    p = res.x
    if not res.success:
        if not (e[0] <= p[0] <= e[-1]) or p[2] <= 0 or p[1] > span:
            # the optimiser wandered off: the window has no edge it can settle on
            raise SettingsError(f"Fermi-edge fit: no Fermi edge in the window ({e[0]:.6g} to "
                                f"{e[-1]:.6g} eV) — the fit did not settle ({res.message}); "
                                "choose a window that spans the edge by at least its width")
        raise CalculationError(f"Fermi-edge fit did not converge: {res.message}")
    if not (e[0] <= p[0] <= e[-1]) or p[2] <= 0:
        raise CalculationError(f"Fermi-edge fit ended without an edge in the window (E_F = "
                               f"{p[0]:.4g} eV, step height {p[2]:.4g}); narrow the window "
                               "around the edge or give initial values")
    dof = e.size - p.size
    chi2 = float(np.sum(res.fun ** 2))
    red = chi2 / dof if dof > 0 else float("nan")
    jac = res.jac
    try:
        cov = np.linalg.inv(jac.T @ jac)
    except np.linalg.LinAlgError:
        cov = np.linalg.pinv(jac.T @ jac)
    if not counts:
        cov = cov * red
    err = np.sqrt(np.clip(np.diag(cov), 0.0, None))
    # an edge must be significant and the window must cover it on both sides: at least one
    # edge width (FWHM + thermal 10–90 % width) of data below and above E_F
    edge_width = p[1] + 2.0 * math.log(9.0) * KB_EV * t
    if (not p[2] > _EDGE_SIGNIFICANCE * err[2] or p[0] - edge_width < e[0]
            or p[0] + edge_width > e[-1]):
        raise SettingsError(f"Fermi-edge fit: no Fermi edge in the window ({e[0]:.6g} to "
                            f"{e[-1]:.6g} eV) — the best fit (E_F = {p[0]:.4g} eV, width "
                            f"{edge_width:.3g} eV, step {p[2]:.4g} ± {err[2]:.2g}) is not a "
                            "significant edge with data on both sides; choose a window that "
                            "spans the edge by at least its width")
    return FermiEdgeFit(
        fermi_level=float(p[0]), fermi_level_err=float(err[0]),
        fwhm=float(p[1]), fwhm_err=float(err[1]),
        dos_edge=float(p[2]), dos_edge_err=float(err[2]),
        dos_slope=float(p[3]), dos_slope_err=float(err[3]),
        background=float(p[4]), background_err=float(err[4]),
        temperature=t, chi2=chi2, reduced_chi2=red, dof=dof,
        window=(float(e[0]), float(e[-1])), energies=e, intensity=y,
        model=_model(e, p, t, h), covariance=cov, counts=bool(counts))


def apply_shift(be, fit: FermiEdgeFit) -> NDArray[np.float64]:
    """Binding-energy axis with the Fermi level moved to 0 eV: ``be − fit.fermi_level``."""
    if not isinstance(fit, FermiEdgeFit):
        raise SettingsError(f"apply_shift: fit must be a FermiEdgeFit, got {type(fit).__name__}")
    e = np.asarray(be, dtype=np.float64)
    if not np.all(np.isfinite(e)):
        raise SettingsError("apply_shift: binding energy contains NaN or infinite values")
    return e - fit.fermi_level
