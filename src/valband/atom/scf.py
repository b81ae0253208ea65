"""Self-consistent spherical Kohn–Sham atom (LDA, non- or scalar-relativistic).

Kohn–Sham equations for a spherically averaged atom with fixed (possibly fractional)
subshell occupations f_nl, spin-unpolarised:

    V(r) = −Z/r + V_H[ρ](r) + v_xc[ρ](r) (+ an optional extra potential, e.g. a confinement)
    ρ(r) = Σ_nl f_nl u_nl(r)² / (4π r²)

Total energy (Hartree), evaluated at the output density ρ of the last iteration with the
orbitals of the potential V_in that produced them (variational form):

    T_s = Σ f ε − ∫ ρ V_in,  E_nuc = −Z ∫ ρ/r,  E_H = ½ ∫ ρ V_H[ρ],  E_xc = ∫ ρ ε_xc[ρ],
    E = T_s + E_nuc + E_H + E_xc (+ ∫ ρ V_extra)

Mixing: Pulay/Anderson extrapolation of the density (Pulay, Chem. Phys. Lett. 73, 393 (1980))
on a history of input densities and residuals ρ_out − ρ_in, metric ∫ · 4πr² dr, with a
damping factor β; converged when ∫|ρ_out − ρ_in| 4πr² dr < ``density_tol`` and the total energy
changes by less than ``energy_tol`` between iterations.

Units: everything in Hartree and bohr inside; :meth:`AtomResult.eigenvalues_ev`,
:meth:`AtomResult.total_energy_ev` and :meth:`AtomResult.r_angstrom` convert at the public edge.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass, field

import numpy as np
import scipy.constants as _sc
from numpy.typing import NDArray

from valband.arrays import readonly
from valband.errors import CalculationError, SettingsError

from .configurations import (
    L_LETTERS,
    Configuration,
    _check_charge,
    check_electron_count,
    electron_count,
    format_configuration,
    ground_state_configuration,
    normalize_configuration,
    parse_configuration,
    resolve_element,
)
from .grid import RadialGrid, hartree_potential, make_grid
from .radial import alpha_squared, solve_bound_state
from .xc import CORRELATIONS, functional_description, lda_xc, resolve_relativistic_exchange

__all__ = [
    "HARTREE_EV",
    "BOHR_ANGSTROM",
    "Orbital",
    "EnergyComponents",
    "AtomResult",
    "solve_atom",
]

#: Hartree energy in eV (CODATA via scipy.constants); the one conversion factor used.
HARTREE_EV: float = _sc.physical_constants["Hartree energy in eV"][0]
#: Bohr radius in Å (CODATA via scipy.constants).
BOHR_ANGSTROM: float = _sc.physical_constants["Bohr radius"][0] * 1e10


@dataclass(frozen=True, eq=False)
class Orbital:
    """One Kohn–Sham orbital of the atom.

    Attributes
    ----------
    n, l : int
        Quantum numbers.
    occupation : float
        Electrons in the subshell (0 … 2(2l+1)).
    energy : float
        Eigenvalue (Hartree).
    u : ndarray
        u(r) = r·R(r) (bohr^-1/2), ∫u² dr = 1 (large component), outermost lobe positive.
    du : ndarray
        du/dr (bohr^-3/2).
    """

    n: int
    l: int  # noqa: E741
    occupation: float
    energy: float
    u: NDArray[np.float64] = field(repr=False)
    du: NDArray[np.float64] = field(repr=False)

    @property
    def label(self) -> str:
        """Subshell label such as ``"3d"``."""
        return f"{self.n}{L_LETTERS[self.l]}"

    @property
    def energy_ev(self) -> float:
        """Eigenvalue in eV (absolute, vacuum zero)."""
        return self.energy * HARTREE_EV


@dataclass(frozen=True)
class EnergyComponents:
    """Total energy and its parts (Hartree).

    Attributes
    ----------
    total, kinetic, nuclear, hartree, xc, external : float
        E, T_s, electron–nucleus, Hartree, exchange–correlation, extra-potential energy.
    xc_virial : float
        3∫ρ(v_xc − ε_xc) d³r, the exchange–correlation term of the LDA virial theorem
        2T_s + E_nuc + E_H + 3∫ρ(v_xc − ε_xc) = 0 (equal to E_x for exchange alone).
    """

    total: float
    kinetic: float
    nuclear: float
    hartree: float
    xc: float
    external: float
    xc_virial: float

    def as_ev(self) -> dict[str, float]:
        """Return the components in eV."""
        return {k: getattr(self, k) * HARTREE_EV for k in self.__dataclass_fields__}


@dataclass(frozen=True, eq=False)
class AtomResult:
    """Self-consistent atom.

    Attributes
    ----------
    z : int
        Nuclear charge.
    symbol : str
        Element symbol.
    charge : float
        Ionic charge (e).
    configuration : tuple of (n, l, occupation)
        Subshell occupations used.
    relativity : str
        "none" or "scalar".
    correlation : str
        LDA correlation ("vwn" or "pw92").
    grid : RadialGrid
        Radial grid.
    r : ndarray
        Grid radii (bohr).
    potential : ndarray
        Total Kohn–Sham potential V(r) that produced the orbitals (Hartree): nuclear + Hartree
        + xc (+ extra).
    hartree_potential, xc_potential : ndarray
        Its Hartree and xc parts (Hartree).
    density : ndarray
        Electron density ρ(r) (electrons/bohr³), from the final orbitals.
    orbitals : tuple of Orbital
        In configuration order.
    energies : EnergyComponents
        Total energy and parts (Hartree).
    iterations : int
        SCF iterations.
    converged : bool
        Always True for a returned result (non-convergence raises).
    density_residual : float
        ∫|ρ_out − ρ_in| 4πr² dr of the last iteration (electrons).
    energy_change : float
        |ΔE| between the last two iterations (Hartree).
    relativistic_exchange : bool
        Whether the exchange carries the MacDonald–Vosko relativistic correction
        (:mod:`valband.atom.xc`); on by default for relativity="scalar".
    """

    z: int
    symbol: str
    charge: float
    configuration: Configuration
    relativity: str
    correlation: str
    grid: RadialGrid = field(repr=False)
    r: NDArray[np.float64] = field(repr=False)
    potential: NDArray[np.float64] = field(repr=False)
    hartree_potential: NDArray[np.float64] = field(repr=False)
    xc_potential: NDArray[np.float64] = field(repr=False)
    density: NDArray[np.float64] = field(repr=False)
    orbitals: tuple[Orbital, ...] = field(repr=False)
    energies: EnergyComponents
    iterations: int
    converged: bool
    density_residual: float
    energy_change: float
    relativistic_exchange: bool = False

    @property
    def functional(self) -> str:
        """Text of the exchange–correlation functional used (for provenance records)."""
        return functional_description(self.correlation, self.relativistic_exchange)

    @property
    def total_energy(self) -> float:
        """Total energy (Hartree)."""
        return self.energies.total

    @property
    def eigenvalues(self) -> dict[str, float]:
        """Eigenvalues by subshell label, e.g. ``{"1s": -320.79, ...}`` (Hartree)."""
        return {o.label: o.energy for o in self.orbitals}

    def orbital(self, label: str | tuple[int, int]) -> Orbital:
        """Return the orbital ``"3d"`` or ``(3, 2)``."""
        for o in self.orbitals:
            if label == o.label or label == (o.n, o.l):
                return o
        have = ", ".join(o.label for o in self.orbitals)
        raise SettingsError(f"no orbital {label!r} in this atom; available: {have}")

    def eigenvalues_ev(self) -> dict[str, float]:
        """Eigenvalues by subshell label in eV (absolute, vacuum zero)."""
        return {o.label: o.energy * HARTREE_EV for o in self.orbitals}

    def total_energy_ev(self) -> float:
        """Total energy in eV."""
        return self.energies.total * HARTREE_EV

    def r_angstrom(self) -> NDArray[np.float64]:
        """Grid radii in Å."""
        return self.r * BOHR_ANGSTROM

    def virial_residual(self) -> float:
        """(2T_s + E_nuc + E_H + 3∫ρ(v_xc − ε_xc))/|E|, zero for an exact non-relativistic solution."""
        e = self.energies
        return (2 * e.kinetic + e.nuclear + e.hartree + e.xc_virial) / abs(e.total)

    def configuration_text(self) -> str:
        """Return the configuration as text, e.g. ``"[Ar] 3d10 4s1"``."""
        return format_configuration(self.configuration)


# ----------------------------------------------------------------------------------------------


def _thomas_fermi_density(z: int, n_el: float, grid: RadialGrid) -> NDArray[np.float64]:
    """Return the Thomas–Fermi starting density scaled to ``n_el`` electrons.

    ρ = (2Zφ(r/b)/r)^{3/2}/(3π²), b = 0.8853 Z^{-1/3}: the shell-free density of the neutral atom.
    """
    r = grid.r
    b = 0.8853 * z ** (-1.0 / 3.0)
    x = r / b
    sx = np.sqrt(x)
    # rational fit to the Thomas–Fermi screening function (→ 144/x³ far out)
    phi = 1.0 / (
        1.0
        + 0.02747 * sx
        + 1.243 * x
        - 0.1486 * x * sx
        + 0.2302 * x**2
        + 0.007298 * x**2 * sx
        + 0.006944 * x**3
    )
    rho = (2.0 * z * phi / r) ** 1.5 / (3.0 * math.pi**2)
    return rho * n_el / grid.integrate(4.0 * math.pi * r * r * rho)


_MAX_BACKOFFS = 8


class _Pulay:
    """Pulay/Anderson density mixing with a finite history."""

    def __init__(self, metric: NDArray[np.float64], beta: float, history: int) -> None:
        self.metric = metric
        self.beta = beta
        self.history = history
        self.rhos: list[NDArray[np.float64]] = []
        self.res: list[NDArray[np.float64]] = []

    def __call__(self, rho: NDArray[np.float64], res: NDArray[np.float64]) -> NDArray[np.float64]:
        self.rhos.append(rho)
        self.res.append(res)
        if len(self.rhos) > self.history:
            self.rhos.pop(0)
            self.res.pop(0)
        m = len(self.res)
        rr = np.array(self.res)
        bmat = (rr * self.metric) @ rr.T
        a = np.zeros((m + 1, m + 1))
        scale = max(float(np.max(np.abs(np.diag(bmat)))), 1e-300)
        a[:m, :m] = bmat / scale
        a[:m, :m] += 1e-12 * np.eye(m)
        a[m, :m] = a[:m, m] = 1.0
        rhs = np.zeros(m + 1)
        rhs[m] = 1.0
        coef = np.linalg.lstsq(a, rhs, rcond=None)[0][:m]
        new = coef @ (np.array(self.rhos) + self.beta * rr)
        return np.maximum(new, 0.0)


def _resolve_configuration(z: int, configuration, charge: float) -> Configuration:
    if configuration is None:
        return ground_state_configuration(z, charge)
    if isinstance(configuration, str):
        cfg = parse_configuration(configuration)
    else:
        cfg = normalize_configuration(configuration)
    check_electron_count(cfg, z, charge)
    return cfg


def _density(orbitals, occupations, r):
    rho = np.zeros_like(r)
    for st, f in zip(orbitals, occupations, strict=True):
        if f > 0:
            rho += f * st.u * st.u
    return rho / (4.0 * math.pi * r * r)


def solve_atom(
    element: str | int,
    configuration: str | Sequence[Sequence] | None = None,
    relativity: str = "none",
    charge: float = 0.0,
    *,
    correlation: str = "vwn",
    relativistic_exchange: bool | str | None = None,
    grid: RadialGrid | None = None,
    extra_potential: Callable[[NDArray[np.float64]], NDArray[np.float64]] | None = None,
    density_tol: float = 1e-9,
    energy_tol: float = 1e-10,
    max_iterations: int = 200,
    mixing: float = 0.3,
    history: int = 8,
) -> AtomResult:
    """Self-consistent LDA atom.

    Parameters
    ----------
    element : str or int
        Element symbol or atomic number (1–92).
    configuration : str or sequence of (n, l, occupation), optional
        Subshell occupations (text such as ``"[Ar] 3d10 4s1"`` or triples); default the ground
        state of the ion of this ``charge`` (:func:`ground_state_configuration`). Zero
        occupations give the eigenvalue of an empty level (it must be bound on the grid).
    relativity : {"none", "scalar"}
        Schrödinger or scalar-relativistic (Koelling–Harmon without spin–orbit) orbitals.
    charge : float
        Ionic charge (e); the configuration must hold Z − charge electrons.
    correlation : {"vwn", "pw92"}
        LDA correlation (VWN5 as in NIST SRD 141, or PW92).
    relativistic_exchange : bool, {"auto", "on", "off"} or None
        MacDonald–Vosko relativistic correction of the exchange (:mod:`valband.atom.xc`).
        Default (None or "auto"): on for relativity="scalar", off for "none" (the
        non-relativistic NIST SRD 141 tables have no such term).
    grid : RadialGrid, optional
        Default :func:`valband.atom.grid.make_grid` (r_min = 1e-6/Z, r_max = 60 bohr, h = 0.005).
    extra_potential : callable, optional
        Additional potential V_extra(r) (r in bohr → Hartree), e.g. a confinement (r/r₀)².
    density_tol : float
        Convergence of ∫|ρ_out − ρ_in| 4πr² dr (electrons).
    energy_tol : float
        Convergence of the total energy between iterations (Hartree).
    max_iterations : int
        Maximum SCF iterations.
    mixing : float
        Damping β of the Pulay mixing, 0 < β ≤ 1.
    history : int
        Number of previous densities kept by the mixer (≥ 1; 1 is linear mixing).

    Returns
    -------
    AtomResult

    Raises
    ------
    ConfigurationError
        Unknown element, invalid configuration or electron count ≠ Z − charge.
    SettingsError
        Invalid numerical settings.
    CalculationError
        The SCF does not converge in ``max_iterations`` or a level is not bound.
    """
    z, symbol = resolve_element(element)
    charge = _check_charge(z, charge)
    cfg = _resolve_configuration(z, configuration, charge)
    alpha_squared(relativity)  # validates
    rel_x = resolve_relativistic_exchange(relativistic_exchange, relativity)
    if correlation not in CORRELATIONS:
        raise SettingsError(
            f"unknown correlation {correlation!r}; accepted: {', '.join(CORRELATIONS)}"
        )
    if not (0.0 < mixing <= 1.0):
        raise SettingsError(f"mixing must lie in (0, 1], got {mixing!r}")
    if not (isinstance(history, int) and history >= 1):
        raise SettingsError(f"history must be an integer >= 1, got {history!r}")
    if not (isinstance(max_iterations, int) and max_iterations >= 1):
        raise SettingsError(f"max_iterations must be an integer >= 1, got {max_iterations!r}")
    for name, val in (("density_tol", density_tol), ("energy_tol", energy_tol)):
        if not (val > 0 and math.isfinite(val)):
            raise SettingsError(f"{name} must be a positive number, got {val!r}")
    if grid is None:
        grid = make_grid(z)
    elif not isinstance(grid, RadialGrid):
        raise SettingsError(f"grid must be a RadialGrid, got {type(grid).__name__}")
    r = grid.r
    dvol = grid.weights * 4.0 * math.pi * r * r
    v_nuc = -z / r
    if extra_potential is None:
        v_extra = np.zeros_like(r)
    else:
        v_extra = np.asarray(extra_potential(r), dtype=float)
        if v_extra.shape != r.shape or not np.all(np.isfinite(v_extra)):
            raise SettingsError(
                "extra_potential(r) must return finite values of the same shape as r (Hartree)"
            )
    n_el = electron_count(cfg)
    occ = [f for _, _, f in cfg]
    guesses: list[float | None] = [None] * len(cfg)

    def solve_orbitals(v):
        states = []
        for k, (n, l, _) in enumerate(cfg):  # noqa: E741
            st = solve_bound_state(grid, v, n, l, relativity=relativity, energy_guess=guesses[k])
            guesses[k] = st.energy
            states.append(st)
        return states

    rho_in = _thomas_fermi_density(z, n_el, grid)
    mixer = _Pulay(dvol, mixing, history)
    e_prev = math.inf
    res_norm = math.inf
    d_e = math.inf
    rho_good = rho_in
    failures = 0
    states: list = []
    for it in range(1, max_iterations + 1):
        v_h = hartree_potential(grid, rho_in)
        _, v_xc = lda_xc(rho_in, correlation, rel_x)
        v_in = v_nuc + v_h + v_xc + v_extra
        try:
            states = solve_orbitals(v_in)
        except CalculationError as exc:
            # A level pushed out of the well by an overshooting density step: step back
            # halfway towards the last density whose levels were all bound, damp harder.
            failures += 1
            if failures > _MAX_BACKOFFS or it == 1:
                raise CalculationError(
                    f"SCF for {symbol} ({format_configuration(cfg)}) lost a bound level {failures} "
                    f"times in a row: {exc}"
                ) from exc
            rho_in = 0.5 * (rho_in + rho_good)
            mixer = _Pulay(dvol, mixer.beta * 0.5, history)
            e_prev = math.inf
            continue
        failures = 0
        rho_good = rho_in
        rho_out = _density(states, occ, r)
        band = sum(f * st.energy for st, f in zip(states, occ, strict=True))
        eps_out, vxc_out = lda_xc(rho_out, correlation, rel_x)
        vh_out = hartree_potential(grid, rho_out)
        kinetic = band - float(dvol @ (rho_out * v_in))
        nuclear = float(dvol @ (rho_out * v_nuc))
        e_h = 0.5 * float(dvol @ (rho_out * vh_out))
        e_xc = float(dvol @ (rho_out * eps_out))
        e_ext = float(dvol @ (rho_out * v_extra))
        total = kinetic + nuclear + e_h + e_xc + e_ext
        res = rho_out - rho_in
        res_norm = float(dvol @ np.abs(res))
        d_e = abs(total - e_prev)
        e_prev = total
        if res_norm < density_tol and d_e < energy_tol:
            break
        rho_in = mixer(rho_in, res)
    else:
        raise CalculationError(
            f"SCF for {symbol} ({format_configuration(cfg)}, relativity={relativity}) did not converge "
            f"in {max_iterations} iterations: density residual {res_norm:.3g} electrons "
            f"(tolerance {density_tol:g}), energy change {d_e:.3g} Ha (tolerance {energy_tol:g}); "
            "try smaller mixing or more iterations"
        )
    energies = EnergyComponents(
        total=total,
        kinetic=kinetic,
        nuclear=nuclear,
        hartree=e_h,
        xc=e_xc,
        external=e_ext,
        xc_virial=3.0 * float(dvol @ (rho_out * (vxc_out - eps_out))),
    )
    orbitals = tuple(
        Orbital(n=st.n, l=st.l, occupation=float(f), energy=st.energy, u=st.u, du=st.du)
        for st, f in zip(states, occ, strict=True)
    )
    return AtomResult(
        z=z,
        symbol=symbol,
        charge=float(charge),
        configuration=cfg,
        relativity=relativity,
        correlation=correlation,
        grid=grid,
        r=grid.r,
        potential=readonly(v_in),
        hartree_potential=readonly(v_h),
        xc_potential=readonly(v_xc),
        density=readonly(rho_out),
        orbitals=orbitals,
        energies=energies,
        iterations=it,
        converged=True,
        density_residual=res_norm,
        energy_change=d_e,
        relativistic_exchange=rel_x,
    )
