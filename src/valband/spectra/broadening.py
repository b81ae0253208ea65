"""Broadening of photoemission spectra: Fermi–Dirac cut-off, lifetime and instrument kernels.

All functions work on a *uniform* energy grid (eV) and along the last axis of the intensity
array, so one call broadens every component at once.

Conventions
-----------
Fermi–Dirac
    ``f(E, T) = 1 / (1 + exp(E / k_B T))`` with E relative to E_F (eV) and T in K; T = 0 is the
    step (1 below E_F, ½ at E_F, 0 above).
Lifetime (Lorentzian)
    Γ(E) = Γ₀ + a·(E − E_F)² is the **half width at half maximum** (HWHM, eV) of the Lorentzian
    that a state at energy E is spread into — the width belongs to the *source* state (the hole),
    so each input point i is spread with Γ(E_i). The quadratic law is the Fermi-liquid form of the
    hole decay rate. Defaults (the d-hole law): :data:`DEFAULT_A_PER_EV` = 0.01 eV⁻¹ makes the
    FWHM 2Γ = 0.10 eV at the top of the Cu d band (E − E_F = −2 eV) and 0.52 eV near its
    bottom (−5 eV), the hole widths measured there by angle-resolved photoemission (about
    0.1 and 0.5 eV FWHM: Knapp, Himpsel & Eastman, Phys. Rev. B 19, 4952 (1979), from memory,
    within a factor 2); :data:`DEFAULT_GAMMA0_EV` = 0.01 eV is the electron–phonon width at
    E_F at room temperature, Γ ≈ πλk_BT with λ ≈ 0.1–0.15 for the noble metals (Grimvall,
    The Electron–Phonon Interaction in Metals (1981), from memory). The law is fitted to those
    two Cu values and is therefore not validated by them; the same law is used for every
    element (Ni's d holes are known to be broader: ``compare`` fits a by default).
Instrument (Gaussian)
    given by its FWHM (eV); σ = FWHM / (2 √(2 ln 2)).

Discretisation
--------------
Both kernels are *bin-integrated*: the weight that input point i sends to output bin j is the
integral of the continuous kernel over bin j, [E_j − h/2, E_j + h/2], divided by h. Hence a zero
width is exactly the identity and the discrete sum of every kernel over an infinite grid is 1.
With ``keep_area=True`` (default) the part of a kernel that would fall outside the grid is
given back to the same source point (each source point's in-grid kernel is renormalised to 1),
so Σ_j out_j = Σ_i in_i exactly; with ``keep_area=False`` that weight is lost.

The Gaussian is applied by FFT with zero padding (a linear, not circular, convolution), kernel
cut at ±:data:`GAUSS_CUTOFF` σ; :func:`gaussian_reference` is the direct sum. The Lorentzian has
an energy-dependent width, so it is not a convolution; :func:`lorentzian_numba` evaluates it
directly (O(n × n_source), parallel, no n×n matrix stored; sources below
:data:`SKIP_BELOW` of the peak are skipped) and
:func:`lorentzian_reference` is its plain-numpy twin.
"""

from __future__ import annotations

import math

import numba
import numpy as np
from numpy.typing import NDArray
from scipy import fft as _fft
from scipy.special import erf, expit

from valband.conventions import KB_EV
from valband.errors import SettingsError

__all__ = [
    "DEFAULT_GAMMA0_EV",
    "DEFAULT_A_PER_EV",
    "LIFETIME_SOURCE",
    "GAUSS_CUTOFF",
    "FWHM_PER_SIGMA",
    "fermi_dirac",
    "lifetime_width",
    "lorentzian_broaden",
    "lorentzian_numba",
    "lorentzian_reference",
    "gaussian_broaden",
    "gaussian_reference",
    "check_uniform_grid",
]

#: Lifetime width at E_F, HWHM in eV: electron–phonon width at 300 K (module docstring).
DEFAULT_GAMMA0_EV = 0.01
#: Quadratic coefficient of the lifetime HWHM, eV⁻¹: Cu d-hole widths (module docstring).
DEFAULT_A_PER_EV = 0.01
#: Where the lifetime defaults come from (recorded in every spectrum's settings).
LIFETIME_SOURCE = ("d-hole law HWHM = 0.01 eV + 0.01/eV (E-E_F)^2: Cu d-hole widths ~0.1 eV "
                   "FWHM at -2 eV and ~0.5 eV at -5 eV (Knapp, Himpsel & Eastman, PRB 19, 4952 "
                   "(1979), from memory, factor 2); 0.01 eV = electron-phonon width at 300 K")
#: Gaussian kernels are cut at ±GAUSS_CUTOFF σ (discarded weight erfc(8/√2) ≈ 1e-15).
GAUSS_CUTOFF = 8.0
#: FWHM / σ of a Gaussian, 2 √(2 ln 2).
FWHM_PER_SIGMA = 2.0 * math.sqrt(2.0 * math.log(2.0))

#: Source points whose every value is below SKIP_BELOW × the largest |value| are skipped by the
#: compiled Lorentzian (their contribution is below double-precision rounding of the peak; e.g.
#: the Fermi–Dirac tail far above E_F).
SKIP_BELOW = 1e-16

_UNIFORM_RTOL = 1e-6


# --------------------------------------------------------------------------------- validation
def _number(value, name: str, unit: str, allow_zero: bool = True) -> float:
    try:
        x = float(value)
    except (TypeError, ValueError):
        raise SettingsError(f"{name} {value!r}: must be a number ({unit})") from None
    if not math.isfinite(x) or x < 0 or (x == 0 and not allow_zero):
        accepted = "≥ 0" if allow_zero else "> 0"
        raise SettingsError(f"{name} {value!r} {unit}: must be finite and {accepted}")
    return x


def check_uniform_grid(energies, name: str = "energy grid") -> float:
    """Return the step (eV) of a strictly ascending uniform grid; SettingsError otherwise."""
    e = np.asarray(energies, dtype=np.float64)
    if e.ndim != 1 or e.size < 2:
        raise SettingsError(f"{name}: need a 1-D grid of at least 2 energies (eV)")
    if not np.all(np.isfinite(e)):
        raise SettingsError(f"{name}: contains NaN or infinite values")
    d = np.diff(e)
    h = (e[-1] - e[0]) / (e.size - 1)
    if h <= 0 or np.any(np.abs(d - h) > _UNIFORM_RTOL * abs(h) + 1e-12):
        raise SettingsError(f"{name}: must be uniform and ascending (steps from {d.min():.6g} to "
                            f"{d.max():.6g} eV); resample it onto a uniform grid first")
    return float(h)


def _check_values(y, n: int, name: str = "intensity") -> NDArray[np.float64]:
    y = np.asarray(y, dtype=np.float64)
    if y.shape[-1:] != (n,):
        raise SettingsError(f"{name}: last axis has length {y.shape[-1:] or 0}, the grid has {n}")
    if not np.all(np.isfinite(y)):
        raise SettingsError(f"{name}: contains NaN or infinite values")
    return y


# --------------------------------------------------------------------------------- Fermi–Dirac
def fermi_dirac(energies, temperature: float) -> NDArray[np.float64]:
    """Fermi–Dirac occupation f(E, T).

    Parameters
    ----------
    energies : array, eV
        E − E_F.
    temperature : float, K
        ≥ 0; 0 gives the step (½ exactly at E_F).

    Returns
    -------
    ndarray, same shape as ``energies``, values in [0, 1].
    """
    t = _number(temperature, "temperature", "K")
    e = np.asarray(energies, dtype=np.float64)
    if not np.all(np.isfinite(e)):
        raise SettingsError("energies for the Fermi–Dirac occupation contain NaN or infinite "
                            "values")
    if t == 0.0:
        return np.where(e < 0, 1.0, np.where(e > 0, 0.0, 0.5))
    return expit(-e / (KB_EV * t))


def lifetime_width(energies, gamma0: float = DEFAULT_GAMMA0_EV,
                   a: float = DEFAULT_A_PER_EV) -> NDArray[np.float64]:
    """Lifetime HWHM Γ(E) = Γ₀ + a·(E − E_F)² in eV (E relative to E_F, eV; a in eV⁻¹)."""
    g0 = _number(gamma0, "lifetime width Γ0", "eV")
    aa = _number(a, "lifetime coefficient a", "1/eV")
    e = np.asarray(energies, dtype=np.float64)
    return g0 + aa * e * e


# --------------------------------------------------------------------------------- Lorentzian
def _lorentz_norm(e, gamma, lo, hi):
    """In-grid weight of each source point's bin-integrated Lorentzian (closed form)."""
    with np.errstate(divide="ignore", invalid="ignore"):
        w = (np.arctan((hi - e) / gamma) - np.arctan((lo - e) / gamma)) / math.pi
    return np.where(gamma > 0, w, 1.0)


def lorentzian_reference(energies, values, gamma, keep_area: bool = True) -> NDArray[np.float64]:
    """Plain-numpy reference of :func:`lorentzian_numba` (builds the n×n kernel).

    ``out_j = Σ_i values_i K_ji`` with K_ji = [atan((E_j + h/2 − E_i)/Γ_i) −
    atan((E_j − h/2 − E_i)/Γ_i)] / π (identity where Γ_i = 0).
    """
    e = np.asarray(energies, dtype=np.float64)
    y = np.asarray(values, dtype=np.float64)
    g = np.broadcast_to(np.asarray(gamma, dtype=np.float64), e.shape)
    h = (e[-1] - e[0]) / (e.size - 1)
    d = e[:, None] - e[None, :]  # (j, i): E_j − E_i
    gi = g[None, :]
    with np.errstate(divide="ignore", invalid="ignore"):
        k = (np.arctan((d + 0.5 * h) / gi) - np.arctan((d - 0.5 * h) / gi)) / math.pi
    k = np.where(gi > 0, k, np.eye(e.size))
    if keep_area:
        k = k / _lorentz_norm(e, g, e[0] - 0.5 * h, e[-1] + 0.5 * h)[None, :]
    return y @ k.T


@numba.njit(cache=True, parallel=True)
def _lorentz_kernel(e, yt, g, scale, src, out, j0):  # pragma: no cover - compiled
    # src: indices of the source points with any value above the skip threshold.
    # K_ji = [atan(u) − atan(v)]/π with u, v = (d ± h/2)/Γ; when 1 + uv > 0 this is
    # atan(x)/π with x = hΓ / (Γ² + d² − h²/4) (one atan per pair), and for x < 1e-3 the
    # series x − x³/3 + x⁵/5 − x⁷/7 is exact to double precision (next term x⁹/9 < 1e-27 x).
    n = e.size
    nc = yt.shape[1]
    h = (e[n - 1] - e[0]) / (n - 1)
    inv_pi = 1.0 / math.pi
    for jj in numba.prange(out.shape[0]):
        j = j0 + jj
        ej = e[j]
        acc = np.zeros(nc)
        for q in range(src.size):
            i = src[q]
            gi = g[i]
            if gi > 0.0:
                d = ej - e[i]
                den = gi * gi + d * d - 0.25 * h * h
                if den > 0.0:
                    x = h * gi / den
                    if x < 1e-3:
                        x2 = x * x
                        kji = x * (1.0 - x2 * (1.0 / 3.0 - x2 * (0.2 - x2 / 7.0))) * inv_pi
                    else:
                        kji = math.atan(x) * inv_pi
                else:
                    kji = (math.atan((d + 0.5 * h) / gi) - math.atan((d - 0.5 * h) / gi)) * inv_pi
            elif i == j:
                kji = 1.0
            else:
                continue
            kji *= scale[i]
            for c in range(nc):
                acc[c] += kji * yt[i, c]
        for c in range(nc):
            out[jj, c] = acc[c]


def lorentzian_numba(energies, values, gamma, keep_area: bool = True,
                     out_range: tuple[int, int] | None = None) -> NDArray[np.float64]:
    """Energy-dependent Lorentzian broadening, compiled (same result as the reference).

    ``out_range = (j0, j1)`` computes only the output points j0 ≤ j < j1 (every source point
    still contributes); the result then has j1 − j0 points along the last axis.
    """
    e = np.ascontiguousarray(energies, dtype=np.float64)
    y = np.asarray(values, dtype=np.float64)
    shape = y.shape
    y2 = np.ascontiguousarray(y.reshape(-1, e.size))
    g = np.ascontiguousarray(np.broadcast_to(np.asarray(gamma, dtype=np.float64), e.shape))
    h = (e[-1] - e[0]) / (e.size - 1)
    scale = (1.0 / _lorentz_norm(e, g, e[0] - 0.5 * h, e[-1] + 0.5 * h) if keep_area
             else np.ones_like(e))
    peak = float(np.abs(y2).max(initial=0.0))
    src = np.flatnonzero(np.any(np.abs(y2) > SKIP_BELOW * peak, axis=0)).astype(np.int64)
    j0, j1 = (0, e.size) if out_range is None else (int(out_range[0]), int(out_range[1]))
    if not 0 <= j0 < j1 <= e.size:
        raise SettingsError(f"out_range {out_range!r}: need 0 ≤ j0 < j1 ≤ {e.size}")
    out = np.zeros((j1 - j0, y2.shape[0]))
    _lorentz_kernel(e, np.ascontiguousarray(y2.T), g, np.ascontiguousarray(scale), src, out,
                    j0)
    return np.ascontiguousarray(out.T).reshape(*shape[:-1], j1 - j0)


def lorentzian_broaden(energies, values, gamma0: float = DEFAULT_GAMMA0_EV,
                       a: float = DEFAULT_A_PER_EV, keep_area: bool = True,
                       origin: float = 0.0) -> NDArray[np.float64]:
    """Lifetime broadening with HWHM Γ(E) = Γ₀ + a·(E − origin)² (eV), along the last axis.

    Parameters
    ----------
    energies : (n,) uniform ascending grid, eV
    values : (..., n) intensities
    gamma0 : eV (HWHM at ``origin``), ≥ 0
    a : eV⁻¹, ≥ 0
    keep_area : renormalise each source point's kernel on the grid (module docstring)
    origin : energy of E_F on this grid, eV (0 for E − E_F or binding-energy grids)
    """
    check_uniform_grid(energies)
    e = np.asarray(energies, dtype=np.float64)
    y = _check_values(values, e.size)
    g = lifetime_width(e - float(origin), gamma0, a)
    if not np.any(g > 0):
        return y.copy()
    return lorentzian_numba(e, y, g, keep_area)


# --------------------------------------------------------------------------------- Gaussian
def _gauss_kernel(h: float, fwhm: float) -> NDArray[np.float64]:
    """Bin-integrated Gaussian on offsets m·h, |m| ≤ ceil(GAUSS_CUTOFF σ / h), normalised."""
    sigma = fwhm / FWHM_PER_SIGMA
    m = max(1, int(math.ceil(GAUSS_CUTOFF * sigma / h)))
    x = np.arange(-m, m + 1) * h
    s2 = math.sqrt(2.0) * sigma
    k = 0.5 * (erf((x + 0.5 * h) / s2) - erf((x - 0.5 * h) / s2))
    return k / k.sum()


def _fft_conv_same(y2: NDArray, k: NDArray) -> NDArray:
    n, m = y2.shape[-1], (k.size - 1) // 2
    nfft = _fft.next_fast_len(n + k.size - 1, real=True)
    out = _fft.irfft(_fft.rfft(y2, nfft, axis=-1) * _fft.rfft(k, nfft)[None, :], nfft, axis=-1)
    return out[:, m:m + n]


def gaussian_broaden(energies, values, fwhm: float, keep_area: bool = True) -> NDArray[np.float64]:
    """Gaussian (instrument) broadening by ``fwhm`` (eV) along the last axis, by FFT.

    Zero-padded linear convolution with the bin-integrated kernel; ``fwhm = 0`` returns a copy.
    With ``keep_area`` each source point's in-grid kernel weight is renormalised to 1.
    """
    h = check_uniform_grid(energies)
    w = _number(fwhm, "Gaussian FWHM", "eV")
    e = np.asarray(energies, dtype=np.float64)
    y = _check_values(values, e.size)
    if w == 0.0:
        return y.copy()
    k = _gauss_kernel(h, w)
    y2 = y.reshape(-1, e.size)
    if keep_area:
        norm = _fft_conv_same(np.ones((1, e.size)), k)[0]
        y2 = y2 / norm[None, :]
    return _fft_conv_same(y2, k).reshape(y.shape)


def gaussian_reference(energies, values, fwhm: float,
                       keep_area: bool = True) -> NDArray[np.float64]:
    """Direct-sum reference of :func:`gaussian_broaden` (same kernel, numpy only)."""
    e = np.asarray(energies, dtype=np.float64)
    y = np.asarray(values, dtype=np.float64)
    if fwhm == 0:
        return y.copy()
    h = (e[-1] - e[0]) / (e.size - 1)
    k = _gauss_kernel(h, fwhm)
    m = (k.size - 1) // 2
    n = e.size
    idx = np.arange(n)
    off = idx[:, None] - idx[None, :]  # j − i
    mat = np.where(np.abs(off) <= m, k[np.clip(off + m, 0, k.size - 1)], 0.0)  # (j, i)
    if keep_area:
        mat = mat / mat.sum(axis=0, keepdims=True)
    return y @ mat.T
