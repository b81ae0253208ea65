"""Energy-normalised continuum radial functions u_εl(r) in a given atomic potential.

Everything here is in Hartree atomic units (bohr, Hartree): the arrays come from, and go to,
the atom code. The eV wrapper for users lives in :mod:`valband.atom.cross_section`.

Method
------
The radial equation ``u'' = [l(l+1)/r² + 2(V − ε)]·u`` is integrated outward with Numerov's
method on a *mixed* grid, uniform in ``x = ln r + r/c``: logarithmic near the nucleus (step
``h`` in ln r) and linear far out (step ``c·h`` in r). ``c`` is chosen so that the far step is
λ/N with λ = 2π/k and N = ``points_per_wavelength`` (at 10 keV, k ≈ 27 bohr⁻¹ and λ ≈ 0.23
bohr, so the far step is ≈ 6·10⁻³ bohr; a log grid would be far too coarse a few bohr out).
``h`` is reduced further if the local wave number √(k² − 2V) is not resolved by N points per
local wavelength anywhere. With ``u = √(dr/dx)·φ`` the equation becomes ``φ'' = F(x)·φ`` with

    F = p²·[l(l+1) + 2r²(V − ε)] + p³ − ¾·p⁴,   p = c/(r + c),

the last two terms being (minus one half of) the Schwarzian derivative of r(x); for c → ∞
(p = 1) this is the usual log-grid form with (l + ½)².

Normalisation (per unit energy, Hartree): beyond ``r_a``, the last radius at which the
supplied potential differs from −Z_ion/r, the solution is a combination of the regular and
irregular Coulomb functions F_l(η, kr), G_l(η, kr) with η = −Z_ion/k (Z_ion = 0 gives the
Riccati–Bessel functions). They are evaluated from their asymptotic expansion (Abramowitz &
Stegun, *Handbook of Mathematical Functions*, 14.5.1–14.5.8) at radii where the expansion has
converged to 10⁻¹²; the matching radius is moved out until it has. The numerical solution is
fitted by least squares over its last half wavelength to a·F + b·G, which gives

    u = √(2/(πk))·[cos δ̂ F + sin δ̂ G] → √(2/(πk))·sin(kr + (Z_ion/k)·ln 2kr − lπ/2 + σ_l + δ̂_l),

σ_l = arg Γ(l + 1 + iη) the Coulomb phase, δ̂_l the short-range phase. Beyond the matching
radius u *is* that analytic combination. Coulomb matching is used at every energy; no WKB
amplitude is used (so no extra dependency such as mpmath is needed).

References: Numerov integration and the log-grid transformation, e.g. Koonin & Meredith,
*Computational Physics* (1990), Ch. 3; energy normalisation, Bethe & Salpeter, *Quantum
Mechanics of One- and Two-Electron Atoms* (1957), Sec. 4; Latter, Phys. Rev. 99, 510 (1955).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numba
import numpy as np
from numpy.typing import NDArray
from scipy.interpolate import make_interp_spline
from scipy.special import loggamma, wrightomega

from valband.errors import CalculationError, InputError, SettingsError

__all__ = [
    "ContinuumWave",
    "continuum_wave",
    "coulomb_phase",
    "coulomb_wave_functions",
    "latter_tail",
    "mixed_grid",
    "numerov_numba",
    "numerov_reference",
]

#: Relative size of the last kept term at which the Coulomb asymptotic series is accepted.
SERIES_TOL = 1e-12
#: |r·V + Z_ion| below this (charge units) counts as "pure Coulomb tail".
TAIL_EXACT_TOL = 1e-10
#: |r·V + Z_ion| at the last grid point above this means V does not decay as −Z_ion/r.
TAIL_CHECK_TOL = 1e-2
#: Refuse to build grids longer than this (energies extremely close to threshold).
MAX_POINTS = 4_000_000


# --------------------------------------------------------------------------------------------
# Numerov kernels
# --------------------------------------------------------------------------------------------
@numba.njit(cache=True)
def _numerov_kernel(f, h, phi0, phi1, out):  # pragma: no cover - compiled
    n = f.size
    c = h * h / 12.0
    out[0] = phi0
    out[1] = phi1
    for i in range(1, n - 1):
        out[i + 1] = (2.0 * out[i] * (1.0 + 5.0 * c * f[i]) - out[i - 1] * (1.0 - c * f[i - 1])) / (
            1.0 - c * f[i + 1]
        )


def numerov_numba(f: NDArray[np.float64], h: float, phi0: float, phi1: float) -> NDArray:
    """Integrate ``φ'' = f·φ`` outward on a uniform grid (numba kernel).

    Parameters
    ----------
    f : ndarray (n,)
        Coefficient on the uniform grid.
    h : float
        Grid step.
    phi0, phi1 : float
        Starting values at the first two points.

    Returns
    -------
    ndarray (n,)
        φ at every grid point (Numerov's three-term recurrence, local error O(h⁶)).
    """
    f = np.ascontiguousarray(f, dtype=np.float64)
    out = np.empty_like(f)
    _numerov_kernel(f, float(h), float(phi0), float(phi1), out)
    return out


def numerov_reference(f: NDArray[np.float64], h: float, phi0: float, phi1: float) -> NDArray:
    """Plain-numpy reference of :func:`numerov_numba` (same recurrence, Python loop)."""
    f = np.asarray(f, dtype=np.float64)
    c = h * h / 12.0
    a = 1.0 - c * f  # coefficient of φ_{i±1}
    b = 2.0 * (1.0 + 5.0 * c * f)  # coefficient of φ_i
    out = np.empty_like(f)
    out[0], out[1] = phi0, phi1
    for i in range(1, f.size - 1):
        out[i + 1] = (b[i] * out[i] - a[i - 1] * out[i - 1]) / a[i + 1]
    return out


# --------------------------------------------------------------------------------------------
# Coulomb functions
# --------------------------------------------------------------------------------------------
def coulomb_phase(l: int, eta: float) -> float:
    """Coulomb phase σ_l = arg Γ(l + 1 + iη) in radians (A&S 14.5.6).

    η = −Z/k for an attractive charge Z; the branch is that of the continuous log-gamma,
    so σ_l − σ_{l−1} = arctan(η/l) exactly.
    """
    return float(np.imag(loggamma(complex(l + 1.0, eta))))


def coulomb_wave_functions(
    l: int, eta: float, rho, tol: float = SERIES_TOL, max_terms: int = 2000
) -> tuple[NDArray, NDArray]:
    """Regular and irregular Coulomb functions F_l(η, ρ), G_l(η, ρ) for large ρ.

    Asymptotic expansion, Abramowitz & Stegun 14.5.1–14.5.8:
    F = g cos θ + f sin θ, G = f cos θ − g sin θ, θ = ρ − η ln 2ρ − lπ/2 + σ_l, with
    f = Σ f_k, g = Σ g_k, f₀ = 1, g₀ = 0, f_{k+1} = a_k f_k − b_k g_k,
    g_{k+1} = a_k g_k + b_k f_k, a_k = (2k+1)η/((2k+2)ρ), b_k = [l(l+1) − k(k+1) + η²]/((2k+2)ρ).
    For η = 0 the series terminates (Riccati–Bessel functions).

    Parameters
    ----------
    l : int
        Angular momentum, ≥ 0.
    eta : float
        Sommerfeld parameter (η = −Z/k for an attractive charge Z).
    rho : array_like
        ρ = k·r > 0.
    tol : float
        Accept the sum once every new term is below ``tol`` (relative to 1).

    Returns
    -------
    F, G : ndarray
        Same shape as ``rho``.

    Raises
    ------
    CalculationError
        If the (divergent, asymptotic) series does not reach ``tol`` at the smallest ρ:
        ρ is too small for this η and l.
    """
    rho = np.asarray(rho, dtype=np.float64)
    if rho.size == 0:
        return rho.copy(), rho.copy()
    if np.any(~np.isfinite(rho)) or np.any(rho <= 0.0):
        raise InputError("coulomb_wave_functions: rho must be finite and > 0")
    f = np.ones_like(rho)
    g = np.zeros_like(rho)
    fk = np.ones_like(rho)
    gk = np.zeros_like(rho)
    ll = l * (l + 1.0)
    eta2 = eta * eta
    inv_rho = 1.0 / rho
    best = math.inf
    converged = False
    for k in range(max_terms):
        a = (2 * k + 1) * eta / (2 * k + 2) * inv_rho
        b = (ll - k * (k + 1.0) + eta2) / (2 * k + 2) * inv_rho
        fk, gk = a * fk - b * gk, a * gk + b * fk
        f += fk
        g += gk
        size = float(np.max(np.abs(fk) + np.abs(gk)))
        if size < tol:
            converged = True
            break
        if size > 1e3 * best or not math.isfinite(size):
            break  # past the smallest term of a divergent asymptotic series
        best = min(best, size)
    if not converged:
        raise CalculationError(
            f"Coulomb asymptotic series not converged at rho = {float(rho.min()):.4g} "
            f"(l = {l}, eta = {eta:.4g}); a larger rho is needed"
        )
    theta = rho - eta * np.log(2.0 * rho) - 0.5 * l * math.pi + coulomb_phase(l, eta)
    c, s = np.cos(theta), np.sin(theta)
    return g * c + f * s, f * c - g * s


def _series_converges(l: int, eta: float, rho: float) -> bool:
    try:
        coulomb_wave_functions(l, eta, np.array([rho]))
    except CalculationError:
        return False
    return True


# --------------------------------------------------------------------------------------------
# Grid and potential
# --------------------------------------------------------------------------------------------
def mixed_grid(
    r_start: float, r_end: float, h: float, c: float
) -> tuple[NDArray, NDArray, NDArray]:
    """Grid uniform in x = ln r + r/c from ``r_start`` to at least ``r_end`` (bohr).

    Returns
    -------
    x : ndarray (n,)
        Uniform grid, step ``h``.
    r : ndarray (n,)
        r(x) = c·ω(x − ln c), ω the Wright omega function (bohr).
    p : ndarray (n,)
        p = c/(r + c), so that dr/dx = r·p.
    """
    x0 = math.log(r_start) + r_start / c
    x1 = math.log(r_end) + r_end / c
    n = int(math.ceil((x1 - x0) / h)) + 1
    if n > MAX_POINTS:
        raise CalculationError(
            f"continuum grid would need {n} points (> {MAX_POINTS}); the kinetic energy is "
            "too close to threshold for this solver"
        )
    x = x0 + h * np.arange(n)
    r = c * np.real(wrightomega(x - math.log(c)))
    p = c / (r + c)
    return x, r, p


def latter_tail(r, V_lda, Z_ion: float = 1.0) -> NDArray[np.float64]:
    """Latter-corrected potential min(V_LDA(r), −Z_ion/r) in Hartree.

    Latter, Phys. Rev. 99, 510 (1955): the photoelectron sees the ion's Coulomb tail −Z_ion/r
    where the local-density potential decays faster.

    Parameters
    ----------
    r : array_like (n,)
        Radial grid, bohr, > 0.
    V_lda : array_like (n,)
        Local-density potential, Hartree.
    Z_ion : float
        Charge of the ion left behind (1 for single photoionisation of a neutral atom).
    """
    r_arr, v_arr = _check_grid_and_values(r, V_lda, "V_lda")
    z = _check_zion(Z_ion)
    return np.minimum(v_arr, -z / r_arr)


def _check_zion(Z_ion) -> float:
    try:
        z = float(Z_ion)
    except (TypeError, ValueError):
        raise InputError(f"Z_ion must be a number (ionic charge, >= 0), got {Z_ion!r}") from None
    if not math.isfinite(z) or z < 0.0:
        raise InputError(f"Z_ion must be a finite ionic charge >= 0, got {Z_ion!r}")
    return z


def _check_grid_and_values(r, values, name: str) -> tuple[NDArray, NDArray]:
    """Validate a radial grid (bohr) and an array on it; drop a point at r = 0."""
    r_arr = np.asarray(r, dtype=np.float64)
    v_arr = np.asarray(values, dtype=np.float64)
    if r_arr.ndim != 1 or r_arr.size < 8:
        raise InputError(
            f"r must be a 1-D radial grid (bohr) of at least 8 points, got shape {r_arr.shape}"
        )
    if v_arr.shape != r_arr.shape:
        raise InputError(f"{name} must have the shape of r {r_arr.shape}, got {v_arr.shape}")
    if not np.all(np.isfinite(r_arr)):
        raise InputError("r contains NaN or infinite values")
    if r_arr[0] == 0.0:  # a linear grid may start at the nucleus; the point carries no weight
        r_arr, v_arr = r_arr[1:], v_arr[1:]
    if r_arr[0] < 0.0 or np.any(np.diff(r_arr) <= 0.0):
        raise InputError("r must be strictly increasing and > 0 (bohr)")
    if not np.all(np.isfinite(v_arr)):
        raise InputError(f"{name} contains NaN or infinite values")
    return r_arr, v_arr


def _check_l(l) -> int:
    if isinstance(l, bool) or not isinstance(l, (int, np.integer)) or l < 0:
        raise InputError(f"l must be an integer >= 0, got {l!r}")
    return int(l)


def _check_positive(value, name: str) -> float:
    try:
        v = float(value)
    except (TypeError, ValueError):
        raise InputError(f"{name} must be a number, got {value!r}") from None
    if not math.isfinite(v) or v <= 0.0:
        raise InputError(f"{name} must be finite and > 0, got {value!r}")
    return v


def _check_tail(r: NDArray, V: NDArray, z_ion: float) -> None:
    """InputError unless r·V at the last grid point is −Z_ion (within TAIL_CHECK_TOL)."""
    rv_end = float(r[-1] * V[-1])
    if abs(rv_end + z_ion) > TAIL_CHECK_TOL * max(1.0, z_ion):
        raise InputError(
            f"the potential does not approach -Z_ion/r at the grid end: r*V = {rv_end:.4g} "
            f"at r = {r[-1]:.4g} bohr but Z_ion = {z_ion:g}; apply latter_tail() or pass the "
            "Z_ion of the tail (0 for a neutral-atom potential without Latter correction)"
        )


class _RadialPotential:
    """r·V(r) from the caller's grid, as a quintic spline in ln r, with −Z_ion/r beyond it."""

    def __init__(self, r: NDArray, V: NDArray, z_ion: float):
        self.r = r
        self.z_ion = z_ion
        rv = r * V
        _check_tail(r, V, z_ion)
        off = np.nonzero(np.abs(rv + z_ion) > TAIL_EXACT_TOL)[0]
        #: Last radius (bohr) at which V differs from −Z_ion/r.
        self.r_tail = float(r[off[-1]]) if off.size else float(r[0])
        self._spline = make_interp_spline(np.log(r), rv, k=5 if r.size > 10 else 3)
        #: Nuclear charge seen at the first grid point (for the series start).
        self.z_origin = float(-rv[0])

    def r_times_v(self, rq: NDArray) -> NDArray:
        out = np.full(rq.shape, -self.z_ion)
        inside = rq <= self.r[-1]
        below = rq < self.r[0]
        mid = inside & ~below
        out[mid] = self._spline(np.log(rq[mid]))
        out[below] = -self.z_origin
        return out


# --------------------------------------------------------------------------------------------
# Result and solver
# --------------------------------------------------------------------------------------------
@dataclass(frozen=True)
class ContinuumWave:
    """An energy-normalised continuum radial function u_εl(r) (Hartree atomic units).

    Attributes
    ----------
    r_bohr : ndarray (m,)
        Mixed grid (bohr), uniform in x = ln r + r/c with step ``grid_step``.
    weights_bohr : ndarray (m,)
        Trapezoid weights h·dr/dx for ∫ … dr on this grid (bohr); spectrally accurate for
        integrands that vanish smoothly at both ends.
    u : ndarray (m,)
        u_εl(r), normalised per unit energy: ∫ u_ε u_ε′ dr = δ(ε − ε′) with ε in Hartree,
        i.e. u → √(2/(πk))·sin(kr + (Z_ion/k) ln 2kr − lπ/2 + δ_l) far out (units Ha^-1/2).
    l : int
        Angular momentum of the photoelectron.
    kinetic_energy_hartree : float
        ε = k²/2 (Hartree).
    k_bohr_inv : float
        Asymptotic wave number k (bohr⁻¹).
    z_ion : float
        Charge of the −Z_ion/r tail.
    phase_short_range_rad : float
        δ̂_l, phase relative to the Coulomb functions, in (−π, π].
    phase_coulomb_rad : float
        σ_l = arg Γ(l + 1 + iη), η = −Z_ion/k.
    r_match_bohr : float
        Outermost point of the numerical (Numerov) solution; beyond it u is the analytic
        Coulomb combination.
    r_tail_bohr : float
        Last radius at which the potential differs from −Z_ion/r.
    grid_step : float
        Step h of x = ln r + r/c; ``grid_scale_bohr`` is c.
    """

    r_bohr: NDArray[np.float64]
    weights_bohr: NDArray[np.float64]
    u: NDArray[np.float64]
    l: int
    kinetic_energy_hartree: float
    k_bohr_inv: float
    z_ion: float
    phase_short_range_rad: float
    phase_coulomb_rad: float
    r_match_bohr: float
    r_tail_bohr: float
    grid_step: float
    grid_scale_bohr: float
    normalisation: str = "Coulomb functions (asymptotic series, A&S 14.5)"

    @property
    def phase_total_rad(self) -> float:
        """δ_l = σ_l + δ̂_l (radians), the phase entering the Cooper–Zare β."""
        return self.phase_coulomb_rad + self.phase_short_range_rad

    @property
    def eta(self) -> float:
        """Sommerfeld parameter η = −Z_ion/k."""
        return -self.z_ion / self.k_bohr_inv


def continuum_wave(
    r,
    V,
    l: int,
    kinetic_energy: float,
    Z_ion: float = 1.0,
    relativity: str = "none",
    *,
    r_max: float | None = None,
    points_per_wavelength: float = 40.0,
    log_step: float = 0.01,
    kernel: str = "numba",
) -> ContinuumWave:
    """Energy-normalised continuum radial function in the potential V (Hartree atomic units).

    Parameters
    ----------
    r : array_like (n,)
        Strictly increasing radial grid, bohr (any monotonic grid; a leading r = 0 is dropped).
    V : array_like (n,)
        Potential seen by the photoelectron, Hartree; must approach −Z_ion/r at the grid end
        (see :func:`latter_tail`). Beyond the grid V = −Z_ion/r is used; below r[0], r·V is
        held at its first value.
    l : int
        Photoelectron angular momentum, ≥ 0.
    kinetic_energy : float
        ε > 0, Hartree.
    Z_ion : float
        Charge of the Coulomb tail (≥ 0).
    relativity : {"none"}
        Only the non-relativistic radial equation is implemented.
    r_max : float, optional
        Output grid extends at least to here (bohr); default r[-1]. (It always extends to the
        matching radius.)
    points_per_wavelength : float
        Grid points per local wavelength (≥ 12).
    log_step : float
        Largest step in ln r near the nucleus.
    kernel : {"numba", "numpy"}
        Numerov implementation (the numpy one is the slow reference).

    Returns
    -------
    ContinuumWave
    """
    r_arr, v_arr = _check_grid_and_values(r, V, "V")
    lq = _check_l(l)
    eps = _check_positive(kinetic_energy, "kinetic_energy (Hartree)")
    z_ion = _check_zion(Z_ion)
    if relativity != "none":
        raise SettingsError(
            f"relativity={relativity!r} is not implemented for continuum states; accepted: 'none'"
        )
    if kernel not in ("numba", "numpy"):
        raise SettingsError(f"kernel must be 'numba' or 'numpy', got {kernel!r}")
    npw = _check_positive(points_per_wavelength, "points_per_wavelength")
    if npw < 12.0:
        raise SettingsError(f"points_per_wavelength must be >= 12, got {points_per_wavelength!r}")
    h0 = _check_positive(log_step, "log_step")
    if h0 > 0.05:
        raise SettingsError(f"log_step must be <= 0.05 (step in ln r), got {log_step!r}")
    r_out = float(r_arr[-1]) if r_max is None else _check_positive(r_max, "r_max (bohr)")

    pot = _RadialPotential(r_arr, v_arr, z_ion)
    k = math.sqrt(2.0 * eps)
    lam = 2.0 * math.pi / k
    eta = -z_ion / k

    # matching radius: outside the non-Coulomb part of V by half a wavelength, and far enough
    # out for the asymptotic series of F, G to have converged
    r_fit0 = pot.r_tail + 0.5 * lam
    rho = max(k * r_fit0, 1.0)
    while not _series_converges(lq, eta, rho):
        rho *= 1.25
    r_fit0 = rho / k  # fitting window [r_fit0, r_fit0 + λ/2]
    r_match = r_fit0 + 0.5 * lam
    r_end = max(r_out, r_match)

    c = 2.0 * math.pi / (npw * h0 * k)  # far-field step c·h0 = λ/N
    r_start = min(float(r_arr[0]), 1e-4 / max(pot.z_origin, 1.0))
    h = h0
    for _ in range(4):
        x, rg, p = mixed_grid(r_start, r_end, h, c)
        rv = pot.r_times_v(rg)
        k_loc = np.sqrt(np.maximum(k * k - 2.0 * rv / rg, k * k))
        worst = float(np.max(k_loc * rg * p)) * h / (2.0 * math.pi / npw)
        if worst <= 1.0 + 1e-9:
            break
        h = h / (1.05 * worst)
    else:  # pragma: no cover - the step condition is met after one reduction
        raise CalculationError("could not build a continuum grid resolving the local wavelength")

    n_num = int(np.searchsorted(rg, r_match)) + 1
    n_num = min(max(n_num, 3), rg.size)
    f = p[:n_num] ** 2 * (
        lq * (lq + 1) + 2.0 * rg[:n_num] * rv[:n_num] - 2.0 * eps * rg[:n_num] ** 2
    )
    f += p[:n_num] ** 3 - 0.75 * p[:n_num] ** 4
    # start from the series u = r^{l+1}(1 − Z r/(l+1)) near the nucleus, scaled to O(1)
    z0 = pot.z_origin
    r01 = rg[:2]
    u01 = (r01 / r01[0]) ** (lq + 1) * (1.0 - z0 * r01 / (lq + 1))
    phi01 = u01 / np.sqrt(r01 * p[:2])
    solve = numerov_numba if kernel == "numba" else numerov_reference
    phi = solve(f, h, phi01[0], phi01[1])
    u_num = phi * np.sqrt(rg[:n_num] * p[:n_num])
    if not np.all(np.isfinite(u_num)):
        raise CalculationError("continuum integration overflowed (l too large for this grid?)")

    # least-squares fit a·F + b·G over the last half wavelength
    i0 = int(np.searchsorted(rg, r_fit0))
    i0 = min(i0, n_num - 2)
    Fw, Gw = coulomb_wave_functions(lq, eta, k * rg[i0:n_num])
    A = np.column_stack([Fw, Gw])
    (a, b), *_ = np.linalg.lstsq(A, u_num[i0:n_num], rcond=None)
    amp = math.hypot(a, b)
    if not amp > 0.0:
        raise CalculationError("continuum solution vanished at the matching radius")
    delta = math.atan2(b, a)
    norm = math.sqrt(2.0 / (math.pi * k))
    u = np.empty_like(rg)
    u[:n_num] = u_num * (norm / amp)
    if rg.size > n_num:
        Ft, Gt = coulomb_wave_functions(lq, eta, k * rg[n_num:])
        u[n_num:] = norm * (math.cos(delta) * Ft + math.sin(delta) * Gt)
    w = h * rg * p
    w[0] *= 0.5
    w[-1] *= 0.5
    for arr in (rg, w, u):
        arr.flags.writeable = False
    return ContinuumWave(
        r_bohr=rg,
        weights_bohr=w,
        u=u,
        l=lq,
        kinetic_energy_hartree=eps,
        k_bohr_inv=k,
        z_ion=z_ion,
        phase_short_range_rad=delta,
        phase_coulomb_rad=coulomb_phase(lq, eta),
        r_match_bohr=float(rg[n_num - 1]),
        r_tail_bohr=pot.r_tail,
        grid_step=h,
        grid_scale_bohr=c,
    )
