"""Chebyshev expansion of a spectral density: scaling, Jackson kernel, reconstruction.

Following Weiße, Wellein, Alvermann & Fehske, Rev. Mod. Phys. 78, 275 (2006) (WWAF):

* the spectrum [E_min, E_max] is mapped into [−1, 1] by x = (E − b)/a with
  a = (E_max − E_min)/(2 − ε), b = (E_max + E_min)/2 (WWAF Eq. (4); ε a safety margin);
* a density with moments μ_n = ∫ ρ(x) T_n(x) dx is reconstructed as
  ρ(x) = [g_0 μ_0 + 2 Σ_{n≥1} g_n μ_n T_n(x)] / (π √(1 − x²))  (WWAF Eq. (19));
* the Jackson kernel g_n = [(N − n + 1) cos(πn/(N+1)) + sin(πn/(N+1)) cot(π/(N+1))]/(N+1)
  (WWAF Eq. (71)) keeps the approximation positive and turns δ(x − x₀) into a near-Gaussian
  of width σ(x₀)² = [N − x₀²(N − 1)] / [2(N + 1)] · [1 − cos(2π/(N + 1))] ≈ (π/N)²(1 − x₀²)
  (WWAF Eq. (72), as we recall it; ``tests/kpm`` measures the width numerically).

Integrated density (exact for the truncated series, used for the Fermi level): with
x = cos θ, ∫_{−1}^{x} T_n(t)/(π√(1−t²)) dt = (π − θ)/π for n = 0 and −sin(nθ)/(nπ) for n ≥ 1.
"""

from __future__ import annotations

import math

import numpy as np
from numpy.typing import NDArray

from valband.errors import SettingsError

__all__ = [
    "jackson_kernel",
    "jackson_sigma",
    "moments_for_resolution",
    "scale_factors",
    "reconstruct",
    "integrated",
]


def jackson_kernel(n_moments: int) -> NDArray[np.float64]:
    """Jackson damping factors g_n, n = 0 … N − 1 (WWAF Eq. (71))."""
    n_moments = int(n_moments)
    if n_moments < 2:
        raise SettingsError(f"KPM needs at least 2 moments, got {n_moments}")
    big = n_moments + 1.0
    n = np.arange(n_moments, dtype=np.float64)
    q = math.pi / big
    return ((big - n) * np.cos(q * n) + np.sin(q * n) / math.tan(q)) / big


def jackson_sigma(n_moments: int, x0: float = 0.0) -> float:
    """Width (in x units) of a Jackson-broadened δ at x₀ (WWAF Eq. (72))."""
    n = float(n_moments)
    return math.sqrt((n - x0 * x0 * (n - 1.0)) / (2.0 * (n + 1.0))
                     * (1.0 - math.cos(2.0 * math.pi / (n + 1.0))))


def moments_for_resolution(half_width: float, resolution: float) -> int:
    """Smallest N whose Jackson width at the band centre, a·σ(N, 0), is ≤ ``resolution``.

    Starts from N = ⌈π a / resolution⌉ (σ ≈ π/N) and corrects by the exact Eq. (72).
    """
    if not (math.isfinite(resolution) and resolution > 0):
        raise SettingsError(f"KPM resolution {resolution!r} eV: must be a positive number of eV")
    n = max(2, math.ceil(math.pi * half_width / resolution))
    while n > 2 and half_width * jackson_sigma(n - 1) <= resolution:
        n -= 1
    while half_width * jackson_sigma(n) > resolution:
        n += 1
    return n


def scale_factors(emin: float, emax: float, epsilon: float) -> tuple[float, float]:
    """Return (a, b) of x = (E − b)/a with the margin ε (WWAF Eq. (4)); eV."""
    if not 0 < epsilon < 1:
        raise SettingsError(f"KPM spectral margin {epsilon!r}: accepted 0 < ε < 1")
    width = max(emax - emin, 1e-6)
    return width / (2.0 - epsilon), 0.5 * (emax + emin)


def _cheb_matrix(x: NDArray[np.float64], n: int) -> NDArray[np.float64]:
    """T_k(x_j), shape (len(x), n), by the three-term recurrence (stable on [−1, 1])."""
    t = np.empty((len(x), n))
    t[:, 0] = 1.0
    if n > 1:
        t[:, 1] = x
    for k in range(2, n):
        t[:, k] = 2.0 * x * t[:, k - 1] - t[:, k - 2]
    return t


def reconstruct(moments: NDArray[np.float64], x: NDArray[np.float64],
                chunk: int = 4096) -> NDArray[np.float64]:
    """ρ(x) from moments with the Jackson kernel; zero outside (−1, 1).

    Parameters
    ----------
    moments : (..., N)
    x : (n_x,) points in scaled units

    Returns
    -------
    (..., n_x) density per unit x.
    """
    mu = np.asarray(moments, dtype=np.float64)
    n = mu.shape[-1]
    g = jackson_kernel(n)
    coef = mu * g * 2.0
    coef[..., 0] *= 0.5
    x = np.asarray(x, dtype=np.float64)
    out = np.zeros(mu.shape[:-1] + (len(x),))
    inside = np.flatnonzero(np.abs(x) < 1.0 - 1e-9)
    for c0 in range(0, len(inside), chunk):
        idx = inside[c0:c0 + chunk]
        xi = x[idx]
        series = coef @ _cheb_matrix(xi, n).T
        out[..., idx] = series / (math.pi * np.sqrt(1.0 - xi * xi))
    return out


def integrated(moments: NDArray[np.float64], x: float | NDArray[np.float64]):
    """∫_{−1}^{x} ρ(t) dt of the Jackson-damped series of one density (exact; x clipped).

    ``moments`` has shape (N,); ``x`` is a number or an array (the result has its shape).
    """
    mu = np.asarray(moments, dtype=np.float64)
    if mu.ndim != 1:
        raise SettingsError(f"integrated(): moments of one density, shape (N,), got {mu.shape}")
    n = mu.shape[0]
    g = jackson_kernel(n)
    theta = np.arccos(np.clip(np.asarray(x, dtype=np.float64), -1.0, 1.0))
    k = np.arange(1, n, dtype=np.float64)
    sines = np.sin(np.multiply.outer(theta, k)) / (k * math.pi)
    return mu[0] * g[0] * (math.pi - theta) / math.pi - 2.0 * (sines @ (g[1:] * mu[1:]))
