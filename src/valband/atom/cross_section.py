"""Dipole photoionisation cross sections and asymmetry parameters of atomic subshells.

Inside: Hartree atomic units (bohr, Hartree). :func:`subshell_cross_section_ev` is the eV
wrapper (radial arrays stay in bohr/Hartree, as the atom code produces them).

Formulas
--------
Cross section per subshell (dipole, one-electron, Manson & Cooper, Phys. Rev. 165, 126 (1968)):

    σ_nl = (4π²/3)·α·ω·N_nl/(2l+1)·[l·R²_{l−1} + (l+1)·R²_{l+1}]·a₀²,
    R_{l′} = ∫ u_nl(r) r u_{εl′}(r) dr        (length form),

u_{εl′} normalised per Hartree (:mod:`valband.atom.continuum`), ω the photon energy in
Hartree, a₀² from :mod:`scipy.constants` (≈ 28.0028 Mb). The velocity form replaces R_{l′} by

    R^v_{l+1} = −(1/ω)·∫ u_{εl+1} (d/dr − (l+1)/r) u_nl dr,
    R^v_{l−1} = −(1/ω)·∫ u_{εl−1} (d/dr + l/r) u_nl dr,

(from [H, r] = −∇ and the gradient formula), equal to R_{l′} for exact eigenstates of one local
potential with ω = ε − ε_nl; their agreement is the accuracy check, especially at keV energies.

Asymmetry parameter (Cooper & Zare, J. Chem. Phys. 48, 942 (1968)):

    β = [l(l−1)R²_{l−1} + (l+1)(l+2)R²_{l+1} − 6l(l+1)R_{l−1}R_{l+1} cos(δ_{l+1} − δ_{l−1})]
        / [(2l+1)(l·R²_{l−1} + (l+1)·R²_{l+1})],

δ_{l′} = σ_{l′} + δ̂_{l′} including the Coulomb phase, and u ∝ sin(kr − l′π/2 + … + δ_{l′}).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import scipy.constants as _sc
from numpy.typing import NDArray
from scipy.integrate import simpson
from scipy.interpolate import make_interp_spline

from valband.atom.continuum import (
    _check_grid_and_values,
    _check_l,
    _check_positive,
    _check_tail,
    _check_zion,
    continuum_wave,
)
from valband.errors import InputError, SettingsError

__all__ = [
    "A0_SQUARED_MB",
    "ALPHA",
    "HARTREE_EV",
    "MAGIC_ANGLE_DEG",
    "SubshellCrossSection",
    "angular_factor",
    "asymmetry_parameter",
    "radial_dipole",
    "subshell_cross_section",
    "subshell_cross_section_ev",
]

#: Fine-structure constant (CODATA via scipy.constants).
ALPHA: float = _sc.fine_structure
#: Hartree energy in eV.
HARTREE_EV: float = _sc.physical_constants["Hartree energy in eV"][0]
#: a₀² in megabarn (1 Mb = 10⁻²² m²), ≈ 28.0028.
A0_SQUARED_MB: float = _sc.physical_constants["Bohr radius"][0] ** 2 / 1e-22
#: θ with 3cos²θ = 1 (degrees), ≈ 54.7356°.
MAGIC_ANGLE_DEG: float = math.degrees(math.acos(1.0 / math.sqrt(3.0)))

#: Allowed |∫u_nl² dr − 1| of the bound orbital.
NORM_TOL = 1e-3
#: The bound orbital is treated as zero where |u| < BOUND_CUT·max|u| (outer region).
BOUND_CUT = 1e-12


# --------------------------------------------------------------------------------------------
def radial_dipole(
    r,
    u_bound,
    u_cont,
    gauge: str = "length",
    *,
    weights=None,
    du_bound=None,
    l_bound: int | None = None,
    l_cont: int | None = None,
    transition_energy: float | None = None,
) -> float:
    """Radial dipole integral between a bound and a continuum function (bohr units).

    Parameters
    ----------
    r : array_like (m,)
        Common radial grid, bohr.
    u_bound, u_cont : array_like (m,)
        u_nl (normalised, bohr^-1/2) and u_εl′ (per Hartree) on ``r``.
    gauge : {"length", "velocity"}
        "length": ∫ u_nl r u_εl′ dr. "velocity": −(1/ω)∫ u_εl′ (d/dr ∓ …) u_nl dr as in the
        module docstring (needs ``l_bound``, ``l_cont`` = l_bound ± 1, ``transition_energy`` ω
        in Hartree); it equals the length form for exact eigenstates.
    weights : array_like (m,), optional
        Quadrature weights for ∫ … dr (e.g. :attr:`ContinuumWave.weights_bohr`); default
        Simpson's rule on ``r``.
    du_bound : array_like (m,), optional
        du_nl/dr on ``r`` (velocity form); default: derivative of a quintic spline in ln r.

    Returns
    -------
    float
        The integral in bohr (times Ha^-1/2 from the continuum normalisation).
    """
    r_arr, ub = _check_grid_and_values(r, u_bound, "u_bound")
    uc = np.asarray(u_cont, dtype=np.float64)
    if np.asarray(r).size != uc.size or np.asarray(u_cont).ndim != 1:
        raise InputError(f"u_cont must have the shape of r, got {np.shape(u_cont)}")
    if not np.all(np.isfinite(uc)):
        raise InputError("u_cont contains NaN or infinite values")
    dropped = np.asarray(r).size - r_arr.size  # 1 if the grid starts at r = 0
    uc = uc[dropped:]
    # a point at r = 0 adds no integrand (u ∝ r^{l+1}) but its interval [0, r_1] counts
    r_q = np.concatenate([[0.0], r_arr]) if dropped else r_arr
    if weights is not None:
        wts = np.asarray(weights, dtype=np.float64)
        if wts.shape != np.asarray(r).shape:
            raise InputError(f"weights must have the shape of r, got {np.shape(weights)}")

        def integrate(y):
            return float(np.dot(wts[dropped:], y))
    else:

        def integrate(y):
            y_q = np.concatenate([[0.0], y]) if dropped else y
            return float(simpson(y_q, x=r_q))

    if gauge == "length":
        return integrate(ub * r_arr * uc)
    if gauge != "velocity":
        raise SettingsError(f"gauge must be 'length' or 'velocity', got {gauge!r}")
    if l_bound is None or l_cont is None or transition_energy is None:
        raise SettingsError("the velocity form needs l_bound, l_cont and transition_energy")
    lb, lc = _check_l(l_bound), _check_l(l_cont)
    omega = _check_positive(transition_energy, "transition_energy (Hartree)")
    if du_bound is None:
        spl = make_interp_spline(np.log(r_arr), ub, k=5)
        dub = spl.derivative()(np.log(r_arr)) / r_arr
    else:
        dub = np.asarray(du_bound, dtype=np.float64)
        if dub.shape != np.asarray(r).shape:
            raise InputError(f"du_bound must have the shape of r, got {np.shape(du_bound)}")
        dub = dub[dropped:]
    if lc == lb + 1:
        op = dub - (lb + 1) * ub / r_arr
    elif lc == lb - 1:
        op = dub + lb * ub / r_arr
    else:
        raise InputError(f"dipole selection rule: l_cont must be l_bound ± 1, got {lb} -> {lc}")
    return -integrate(uc * op) / omega


def asymmetry_parameter(
    l: int, r_minus: float, r_plus: float, delta_minus: float, delta_plus: float
) -> float:
    """Cooper–Zare β of a subshell with orbital angular momentum l (see module docstring).

    Parameters
    ----------
    l : int
        Bound-state angular momentum.
    r_minus, r_plus : float
        R_{l−1} (ignored for l = 0) and R_{l+1}.
    delta_minus, delta_plus : float
        Total phases δ_{l−1}, δ_{l+1} (radians, Coulomb phase included).
    """
    lq = _check_l(l)
    rm = 0.0 if lq == 0 else float(r_minus)
    rp = float(r_plus)
    den = (2 * lq + 1) * (lq * rm * rm + (lq + 1) * rp * rp)
    if den == 0.0:
        return math.nan
    num = (
        lq * (lq - 1) * rm * rm
        + (lq + 1) * (lq + 2) * rp * rp
        - 6.0 * lq * (lq + 1) * rm * rp * math.cos(delta_plus - delta_minus)
    )
    return num / den


def angular_factor(beta: float, theta_deg: float, polarization: str = "unpolarized") -> float:
    """Dipole angular factor dσ/dΩ ÷ (σ/4π).

    ``1 − (β/4)(3cos²θ − 1)`` for unpolarised light (θ between photon beam and analyser),
    ``1 + (β/2)(3cos²θ − 1)`` for linear polarisation (θ to the polarisation vector); both are
    1 at the magic angle 54.7356° (Cooper & Zare 1968; Yang's theorem).

    Parameters
    ----------
    beta : float
        Asymmetry parameter, −1 ≤ β ≤ 2.
    theta_deg : float
        Angle in degrees.
    polarization : {"unpolarized", "linear"}
    """
    try:
        b = float(beta)
        th = float(theta_deg)
    except (TypeError, ValueError):
        raise InputError(
            f"beta and theta_deg must be numbers, got {beta!r}, {theta_deg!r}"
        ) from None
    if not math.isfinite(b) or not -1.0 - 1e-9 <= b <= 2.0 + 1e-9:
        raise InputError(f"beta must be finite and in [-1, 2], got {beta!r}")
    if not math.isfinite(th):
        raise InputError(f"theta_deg must be finite (degrees), got {theta_deg!r}")
    p2 = 1.5 * math.cos(math.radians(th)) ** 2 - 0.5  # Legendre P2
    if polarization == "unpolarized":
        return 1.0 - 0.5 * b * p2
    if polarization == "linear":
        return 1.0 + b * p2
    raise SettingsError(f"polarization must be 'unpolarized' or 'linear', got {polarization!r}")


# --------------------------------------------------------------------------------------------
@dataclass(frozen=True)
class SubshellCrossSection:
    """Photoionisation of one subshell at one photon energy (dipole, one-electron).

    Attributes
    ----------
    l : int
        Orbital angular momentum of the subshell.
    occupation : float
        Electrons in the subshell N_nl.
    photon_energy_hartree, binding_energy_hartree, kinetic_energy_hartree : float
        ω, I and ε = ω − I (Hartree); ε ≤ 0 means closed (σ = 0).
    sigma_mb : float
        Subshell cross section σ_nl, length form, Mb.
    sigma_per_electron_mb : float
        σ_nl / N_nl, length form, Mb.
    sigma_velocity_mb, sigma_velocity_per_electron_mb : float
        The same from the velocity form (for comparison), Mb.
    beta : float
        Cooper–Zare asymmetry parameter (length-form radial integrals); NaN when closed.
    channels : tuple of int
        Photoelectron angular momenta l′ (l−1 if l ≥ 1, then l+1).
    radial_length_bohr, radial_velocity_bohr : tuple of float
        R_{l′} in the two forms, per channel.
    phase_total_rad, phase_coulomb_rad : tuple of float
        δ_{l′} = σ_{l′} + δ̂_{l′} and σ_{l′}, per channel.
    note : str
        Empty, or why the result is special (e.g. below threshold).
    """

    l: int
    occupation: float
    photon_energy_hartree: float
    binding_energy_hartree: float
    kinetic_energy_hartree: float
    sigma_mb: float
    sigma_per_electron_mb: float
    sigma_velocity_mb: float
    sigma_velocity_per_electron_mb: float
    beta: float
    channels: tuple[int, ...]
    radial_length_bohr: tuple[float, ...]
    radial_velocity_bohr: tuple[float, ...]
    phase_total_rad: tuple[float, ...]
    phase_coulomb_rad: tuple[float, ...]
    note: str = ""

    @property
    def is_open(self) -> bool:
        """True if the photon energy is above the ionisation threshold."""
        return self.kinetic_energy_hartree > 0.0

    @property
    def photon_energy_ev(self) -> float:
        """Photon energy, eV."""
        return self.photon_energy_hartree * HARTREE_EV

    @property
    def binding_energy_ev(self) -> float:
        """Binding (ionisation) energy, eV."""
        return self.binding_energy_hartree * HARTREE_EV

    @property
    def kinetic_energy_ev(self) -> float:
        """Photoelectron kinetic energy ω − I, eV (≤ 0 when closed)."""
        return self.kinetic_energy_hartree * HARTREE_EV

    @property
    def gauge_discrepancy(self) -> float:
        """|σ_velocity/σ_length − 1| (NaN when closed)."""
        if self.sigma_mb == 0.0:
            return math.nan
        return abs(self.sigma_velocity_mb / self.sigma_mb - 1.0)


def _bound_on(r_c: NDArray, u_c: NDArray, l: int, rq: NDArray) -> tuple[NDArray, NDArray]:
    """u_nl and du_nl/dr at ``rq`` from a quintic spline of u in ln r on the caller's grid."""
    spl = make_interp_spline(np.log(r_c), u_c, k=5)
    dspl = spl.derivative()
    u = np.zeros_like(rq)
    du = np.zeros_like(rq)
    mid = (rq >= r_c[0]) & (rq <= r_c[-1])
    xq = np.log(rq[mid])
    u[mid] = spl(xq)
    du[mid] = dspl(xq) / rq[mid]
    low = rq < r_c[0]  # u ∝ r^{l+1} below the first point
    u[low] = u_c[0] * (rq[low] / r_c[0]) ** (l + 1)
    du[low] = (l + 1) * u[low] / rq[low]
    return u, du


def subshell_cross_section(
    r,
    V,
    u_bound,
    l: int,
    binding_energy: float,
    photon_energy: float,
    occupation: float,
    Z_ion: float = 1.0,
    *,
    relativity: str = "none",
    points_per_wavelength: float = 40.0,
    log_step: float = 0.01,
    kernel: str = "numba",
) -> SubshellCrossSection:
    """Dipole photoionisation cross section of one subshell (Hartree atomic units inside).

    Parameters
    ----------
    r : array_like (n,)
        Radial grid of the atom code, bohr, strictly increasing.
    V : array_like (n,)
        Potential of the photoelectron, Hartree (e.g. :func:`~valband.atom.continuum.latter_tail`
        of the LDA potential); → −Z_ion/r at the grid end.
    u_bound : array_like (n,)
        Bound radial function u_nl = r·R_nl on ``r``, ∫u² dr = 1 (to 1e-3).
    l : int
        Orbital angular momentum of the subshell.
    binding_energy : float
        Ionisation energy I > 0, Hartree (−ε_nl for a Koopmans-type estimate).
    photon_energy : float
        ω > 0, Hartree.
    occupation : float
        Electrons in the subshell, 0 ≤ N ≤ 2(2l+1).
    Z_ion : float
        Charge of the potential's Coulomb tail.
    relativity, points_per_wavelength, log_step, kernel
        Passed to :func:`~valband.atom.continuum.continuum_wave`.

    Returns
    -------
    SubshellCrossSection
        Below threshold (ω ≤ I): σ = 0, β = NaN and a note — not an error.
    """
    r_arr, v_arr = _check_grid_and_values(r, V, "V")
    r_arr2, ub = _check_grid_and_values(r, u_bound, "u_bound")
    lq = _check_l(l)
    ib = _check_positive(binding_energy, "binding_energy (Hartree)")
    om = _check_positive(photon_energy, "photon_energy (Hartree)")
    z_ion = _check_zion(Z_ion)
    _check_tail(r_arr, v_arr, z_ion)
    try:
        occ = float(occupation)
    except (TypeError, ValueError):
        raise InputError(f"occupation must be a number, got {occupation!r}") from None
    if not math.isfinite(occ) or occ < 0.0 or occ > 2 * (2 * lq + 1):
        raise InputError(
            f"occupation must be between 0 and 2(2l+1) = {2 * (2 * lq + 1)} for l = {lq}, "
            f"got {occupation!r}"
        )
    spl_norm = float(simpson(ub * ub * r_arr, x=np.log(r_arr)))
    if abs(spl_norm - 1.0) > NORM_TOL:
        raise InputError(f"u_bound must be normalised (integral of u^2 dr = 1), got {spl_norm:.6g}")
    channels = (lq - 1, lq + 1) if lq >= 1 else (lq + 1,)
    eps = om - ib
    if eps <= 0.0:
        return SubshellCrossSection(
            l=lq,
            occupation=occ,
            photon_energy_hartree=om,
            binding_energy_hartree=ib,
            kinetic_energy_hartree=eps,
            sigma_mb=0.0,
            sigma_per_electron_mb=0.0,
            sigma_velocity_mb=0.0,
            sigma_velocity_per_electron_mb=0.0,
            beta=math.nan,
            channels=channels,
            radial_length_bohr=(),
            radial_velocity_bohr=(),
            phase_total_rad=(),
            phase_coulomb_rad=(),
            note="photon energy below the ionisation threshold: subshell closed, sigma = 0",
        )
    big = np.nonzero(np.abs(ub) > BOUND_CUT * np.max(np.abs(ub)))[0]
    r_bound = float(r_arr[min(big[-1] + 1, r_arr.size - 1)])

    rl, rv, dt, dc = [], [], [], []
    for lc in channels:
        cw = continuum_wave(
            r_arr,
            v_arr,
            lc,
            eps,
            z_ion,
            relativity,
            r_max=r_bound,
            points_per_wavelength=points_per_wavelength,
            log_step=log_step,
            kernel=kernel,
        )
        keep = cw.r_bohr <= r_bound
        rq = cw.r_bohr[keep]
        u_b, du_b = _bound_on(r_arr2, ub, lq, rq)
        w = cw.weights_bohr[keep]
        uc = cw.u[keep]
        rl.append(radial_dipole(rq, u_b, uc, "length", weights=w))
        rv.append(
            radial_dipole(
                rq,
                u_b,
                uc,
                "velocity",
                weights=w,
                du_bound=du_b,
                l_bound=lq,
                l_cont=lc,
                transition_energy=om,
            )
        )
        dt.append(cw.phase_total_rad)
        dc.append(cw.phase_coulomb_rad)

    pref = (4.0 * math.pi**2 / 3.0) * ALPHA * om / (2 * lq + 1) * A0_SQUARED_MB

    def bracket(R):
        if lq == 0:
            return R[0] ** 2
        return lq * R[0] ** 2 + (lq + 1) * R[1] ** 2

    s_len = pref * bracket(rl)
    s_vel = pref * bracket(rv)
    if lq == 0:
        beta = asymmetry_parameter(0, 0.0, rl[0], 0.0, dt[0])
    else:
        beta = asymmetry_parameter(lq, rl[0], rl[1], dt[0], dt[1])
    return SubshellCrossSection(
        l=lq,
        occupation=occ,
        photon_energy_hartree=om,
        binding_energy_hartree=ib,
        kinetic_energy_hartree=eps,
        sigma_mb=occ * s_len,
        sigma_per_electron_mb=s_len,
        sigma_velocity_mb=occ * s_vel,
        sigma_velocity_per_electron_mb=s_vel,
        beta=beta,
        channels=channels,
        radial_length_bohr=tuple(rl),
        radial_velocity_bohr=tuple(rv),
        phase_total_rad=tuple(dt),
        phase_coulomb_rad=tuple(dc),
    )


def subshell_cross_section_ev(
    r_bohr,
    V_hartree,
    u_bound,
    l: int,
    binding_energy_ev: float,
    photon_energy_ev: float,
    occupation: float,
    Z_ion: float = 1.0,
    **options,
) -> SubshellCrossSection:
    """:func:`subshell_cross_section` with the energies in eV (σ in Mb).

    The radial arrays stay in the atom code's units: ``r_bohr`` in bohr, ``V_hartree`` in
    Hartree, ``u_bound`` in bohr^-1/2. Energies are converted with the CODATA Hartree energy.
    The result carries eV views (``photon_energy_ev``, ``binding_energy_ev``,
    ``kinetic_energy_ev``).
    """
    ib = _check_positive(binding_energy_ev, "binding_energy_ev")
    om = _check_positive(photon_energy_ev, "photon_energy_ev")
    return subshell_cross_section(
        r_bohr,
        V_hartree,
        u_bound,
        l,
        ib / HARTREE_EV,
        om / HARTREE_EV,
        occupation,
        Z_ion,
        **options,
    )
