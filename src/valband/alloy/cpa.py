"""Single-site coherent potential approximation (CPA) for substitutional random alloys.

Model
    Every site of the parent lattice is occupied at random by component a with probability
    x_a (no short-range order). Diagonal disorder: the components differ in their onsite
    energies ε_a (per orbital, from the parameter set). The hopping is the concentration-
    weighted average of :mod:`valband.alloy.vca` (Σ_ab x_a x_b V_{a→b}(r)); the real alloy's
    off-diagonal (hopping) disorder is beyond single-site CPA and is left out — an
    approximation, small when the components' bond integrals are alike.

Equations (Soven, Phys. Rev. 156, 809 (1967); Velický, Kirkpatrick & Ehrenreich, Phys. Rev.
175, 747 (1968); multi-orbital form e.g. Faulkner, Prog. Mater. Sci. 27, 1 (1982))
    The medium has a site-local coherent potential Σ(z), an orbital matrix per site:

        G(z)    = Σ_k w_k [z − W(k) − Σ(z)]⁻¹ (site-diagonal block),  W = H_VCA − diag(ε_VCA)
        𝒢⁻¹     = G⁻¹ + Σ                                   (cavity, the medium without the site)
        G_a     = [𝒢⁻¹ − ε_a]⁻¹                              (component a on the site)
        Σ_a x_a G_a = G                                     (CPA condition)

    solved as the fixed point Σ = 𝒢⁻¹ − (Σ_a x_a G_a)⁻¹ from the VCA start Σ = ε_VCA, each energy
    independently (all energies of the grid are vectorised; converged ones leave the batch),
    with Anderson mixing per energy (:func:`_anderson_step`; Anderson, J. ACM 12, 547 (1965)).
    The plain iteration (``history=0``) diverges where the medium Green function is large
    and the disorder strong (in the gap of a split band the map's slope exceeds 1); Anderson's
    secant update converges there. A step that would make an onsite Im Σ positive (acausal)
    is replaced by a damped plain step.
    Σ is a full orbital matrix per site, so no orbital-diagonal assumption is made; on a cubic
    site symmetry makes it diagonal with four channels s, p, t2g, eg (and p–d, s–d blocks
    vanish), in general (e.g. hcp) it has the blocks the site symmetry allows.

k-sum
    On the irreducible wedge of the k-mesh (:func:`valband.kspace.make_mesh`) with its weights,
    symmetrised over the point group (:mod:`valband.alloy.orbital_symmetry`) — exact for
    one-site Bravais parents; other parents use the full mesh. Each (k, z) needs the inverse
    of z − W(k) − Σ(z): Σ is not proportional to the identity, so one eigen-decomposition of
    W(k) does not serve all z; the compiled Gauss–Jordan kernel of
    :mod:`valband.alloy._cpa_kernels` does the inverses.

Energies and counts
    z = E + iη on a uniform absolute grid covering the band (the alloy spectrum lies within
    [λ_min(W + min_a ε_a), λ_max(W + max_a ε_a)] by Weyl's monotonicity, since every
    configuration's onsite matrix lies between the two), so the DOS is Lorentzian-broadened
    with half width η, exactly like the ``lorentzian`` method of
    :func:`valband.workflows.compute_dos`. Component DOS ρ_a = −(2/π) Im Tr G_a (per atom of a,
    both spins). Counts N_a(E) = tail + ∫ρ_a (trapezoid); the Lorentzian tail below the grid,
    Σ_n (1/π) arctan(η/(λ_n − E_0)), is taken from the eigenvalues λ of W + ε_a (exact in the
    pure limit, first-moment exact otherwise). E_F solves Σ_a x_a N_a(E_F) = N_el with
    N_el = Σ_a x_a N_val,a per site. Orthogonal parameter sets only: with an overlap S(k) the
    "onsite" part of a Löwdin-orthogonalised H is k-dependent and not site-diagonal, so the
    diagonal-disorder CPA would not apply; a ParameterError says so.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import asdict, dataclass, field

import numpy as np
from numpy.typing import NDArray

from valband.alloy._cpa_kernels import local_green_numba, local_green_numpy
from valband.alloy.components import check_composition, common_shells, component_onsite
from valband.alloy.orbital_symmetry import site_symmetriser
from valband.alloy.vca import vca_model, vegard_parent
from valband.conventions import SHELL_ORBITALS, SPIN_DEGENERACY
from valband.dos import band_descriptors
from valband.errors import CalculationError, InputError, ParameterError, SettingsError
from valband.kspace import make_mesh
from valband.results import Channel, DOSResult
from valband.structure import Structure
from valband.workflows import DOSSettings
from valband.workflows.provenance import provenance_of

__all__ = [
    "CPASettings",
    "CPAResult",
    "CPAScan",
    "cpa_dos",
    "cpa_scan",
    "cpa_solve",
    "iterate_cpa",
]

#: Statement of the approximations, recorded in every result.
APPROXIMATIONS = (
    "single-site CPA (Soven 1967; Velicky, Kirkpatrick & Ehrenreich 1968), random occupation, "
    "no short-range order",
    "diagonal disorder only: component onsite energies from the parameter set; hopping is the "
    "virtual-crystal average sum_ab x_a x_b V_ab(r) (off-diagonal disorder neglected)",
    "coherent potential: full orbital matrix per site (diagonal s, p, t2g, eg on cubic sites)",
    "Lorentzian broadening: z = E + i*eta",
)


@dataclass(frozen=True)
class CPASettings:
    """Numerical settings of the CPA.

    eta : imaginary part of z, eV (None: the DOS settings' Lorentzian width)
    tol : convergence of the cavity Ω = G⁻¹ + Σ: max |ΔΩ| over orbitals ≤ tol eV, or
        ≤ tol·max|Ω| where |Ω| exceeds 1 eV (see :func:`iterate_cpa`)
    max_iter : iterations per energy and pass (energies still unconverged restart from the
        nearest converged energy's Σ, see :func:`iterate_cpa`)
    mixing : step β of the update, 0 < β ≤ 1
    history : Anderson history length (0: plain damped iteration Σ ← Σ + β(Σ_new − Σ))
    kernel : "numba" (default) or "numpy" (the reference)
    """

    eta: float | None = None
    tol: float = 1e-6
    max_iter: int = 100
    mixing: float = 1.0
    history: int = 5
    kernel: str = "numba"

    def validate(self) -> None:
        """Raise :class:`SettingsError` naming the first invalid setting."""
        if self.eta is not None and not (np.isfinite(self.eta) and self.eta > 0):
            raise SettingsError(f"CPA eta {self.eta!r} eV: must be a positive number of eV")
        if not (np.isfinite(self.tol) and self.tol > 0):
            raise SettingsError(f"CPA tolerance {self.tol!r} eV: must be > 0")
        if int(self.max_iter) < 1:
            raise SettingsError(f"CPA max_iter {self.max_iter!r}: must be ≥ 1")
        if not (0 < self.mixing <= 1):
            raise SettingsError(f"CPA mixing {self.mixing!r}: accepted 0 < β ≤ 1")
        if int(self.history) < 0:
            raise SettingsError(f"CPA history {self.history!r}: must be ≥ 0")
        if self.kernel not in ("numba", "numpy"):
            raise SettingsError(f"CPA kernel {self.kernel!r}: accepted 'numba' or 'numpy'")


# ------------------------------------------------------------------------------------------
# the self-consistency at a set of complex energies
# ------------------------------------------------------------------------------------------
def _blockdiag(blocks: NDArray) -> NDArray:
    nz, ns, m, _ = blocks.shape
    out = np.zeros((nz, ns * m, ns * m), dtype=np.complex128)
    for s in range(ns):
        out[:, s * m : (s + 1) * m, s * m : (s + 1) * m] = blocks[:, s]
    return out


def _site_blocks(full: NDArray, ns: int, m: int) -> NDArray:
    return np.stack([full[:, s * m : (s + 1) * m, s * m : (s + 1) * m] for s in range(ns)], 1)


def _anderson_step(x, f, dxs, dfs, beta):
    """Anderson update for a batch of complex vectors (rows), histories aligned across rows.

    γ = argmin ‖f − ΔF γ‖ per row (normal equations with a small Tikhonov term),
    x ← x + β f − (ΔX + β ΔF) γ.
    """
    if not dfs:
        return x + beta * f
    dfm = np.stack(dfs, axis=2)  # (n, L, h)
    dxm = np.stack(dxs, axis=2)
    a = np.einsum("nlh,nlg->nhg", dfm.conj(), dfm)
    rhs = np.einsum("nlh,nl->nh", dfm.conj(), f)
    reg = 1e-12 * np.einsum("nhh->n", a).real[:, None, None] + 1e-300
    gamma = np.linalg.solve(a + reg * np.eye(a.shape[1]), rhs[..., None])[..., 0]
    return x + beta * f - np.einsum("nlh,nh->nl", dxm + beta * dfm, gamma)


def _causal(part: dict, tol: float = 1e-9) -> NDArray[np.bool_]:
    """Energies whose Σ and component G have negative semi-definite anti-Hermitian parts.

    A retarded (Herglotz) solution has Im Σ ≤ 0 and Im G_a ≤ 0 as matrices; the CPA equations
    also have acausal roots, which the iteration can reach where the disorder is strong.
    """
    def worst(a):
        anti = (a - np.conj(np.swapaxes(a, -1, -2))) / 2j
        lam = np.linalg.eigvalsh(anti)[..., -1]  # largest eigenvalue of the Im part
        return lam / (1.0 + np.abs(a).max(axis=(-2, -1)))

    ok = worst(part["sigma"]).max(axis=1) <= tol
    ok &= worst(part["g_comp"]).max(axis=(0, 2)) <= tol
    return ok


class _Problem:
    """The CPA map at a set of energies: cavity Ω = 𝒢⁻¹ → (Σ, G_a, G, Ω_new)."""

    def __init__(self, w, wk, eps, x, ns, symmetrise, green) -> None:
        self.w, self.wk, self.x, self.ns = w, wk, np.asarray(x, dtype=float), int(ns)
        self.m = eps.shape[1]
        self.eps = eps
        self.eps_mat = eps[:, None, None, :, None] * np.eye(self.m)  # (c, 1, 1, m, m)
        self.symmetrise, self.green = symmetrise, green

    def local(self, z, sigma):
        """Site blocks of Σ_k w_k [z − W(k) − Σ]⁻¹, symmetrised."""
        g = _site_blocks(self.green(self.w, self.wk, z, _blockdiag(sigma)), self.ns, self.m)
        return g if self.symmetrise is None else self.symmetrise(g)

    def omega_of_sigma(self, z, sigma):
        """Cavity G⁻¹ + Σ of a given coherent potential (one k-sum)."""
        return np.linalg.inv(self.local(z, sigma)) + sigma

    def __call__(self, z, omega):
        gc = np.linalg.inv(omega[None] - self.eps_mat)  # (c, n, s, m, m)
        gavg = np.einsum("c,c...->...", self.x, gc)
        sigma = omega - np.linalg.inv(gavg)
        g = self.local(z, sigma)
        return sigma, gc, g, np.linalg.inv(g) + sigma


#: Relative rounding floor of the cavity update (see :func:`_iterate_batch`).
_NOISE = 1e-7


def _iterate_batch(prob: _Problem, z, omega, tol, max_iter, mixing, history):
    """Iterate the cavities ``omega`` (nz, ns, m, m) at energies z: (converged, results).

    Converged when max |Ω_new − Ω| ≤ tol·max(1, max|Ω|/eV), or below the rounding floor
    :data:`_NOISE`·max|Σ| (Ω = G⁻¹ + Σ cancels two large terms where |Σ| is large, next to the
    poles of Σ in a gap, so Ω cannot be computed more accurately than that).
    """
    nz = len(z)
    ns, m = prob.ns, prob.m
    out = {
        "omega": np.array(omega, dtype=np.complex128),
        "sigma": np.zeros((nz, ns, m, m), dtype=np.complex128),
        "g": np.zeros((nz, ns, m, m), dtype=np.complex128),
        "g_comp": np.zeros((len(prob.x), nz, ns, m, m), dtype=np.complex128),
        "iterations": np.zeros(nz, dtype=np.int64),
        "residual": np.full(nz, np.inf),
    }
    om = out["omega"].copy()
    converged = np.zeros(nz, dtype=bool)
    active = np.arange(nz)
    dxs: list[NDArray] = []
    dfs: list[NDArray] = []
    prev: tuple[NDArray, NDArray] | None = None
    for it in range(1, int(max_iter) + 1):
        oa = om[active]
        sig, gc, g, new = prob(z[active], oa)
        change = np.abs(new - oa).max(axis=(1, 2, 3))
        floor = _NOISE * np.abs(sig).max(axis=(1, 2, 3))
        done = change <= np.maximum(tol * np.maximum(1.0, np.abs(oa).max(axis=(1, 2, 3))), floor)
        last = it == int(max_iter)
        put = done | last
        idx = active[put]
        out["sigma"][idx], out["g"][idx], out["g_comp"][:, idx] = sig[put], g[put], gc[:, put]
        out["omega"][idx], out["iterations"][idx], out["residual"][idx] = oa[put], it, change[put]
        converged[active[done]] = True
        keep = ~done
        if last or not keep.any():
            break
        xv = oa[keep].reshape(int(keep.sum()), -1)
        fv = (new[keep] - oa[keep]).reshape(len(xv), -1)
        if history > 0:
            if prev is not None:
                dxs = [d[keep] for d in dxs] + [xv - prev[0][keep]]
                dfs = [d[keep] for d in dfs] + [fv - prev[1][keep]]
                dxs, dfs = dxs[-history:], dfs[-history:]
            prev = (xv, fv)
            step = _anderson_step(xv, fv, dxs, dfs, mixing)
        else:
            step = xv + mixing * fv
        om[active[keep]] = step.reshape((-1, ns, m, m))
        active = active[keep]
    return converged, out


def _rough(omega: NDArray, order: NDArray[np.int64], ratio: float = 2.0) -> NDArray[np.bool_]:
    """Energies where the cavity Ω(E) jumps: a second difference above ratio × max(|Ω|, 1 eV).

    Ω(E + iη) is analytic in E for η > 0 (and, unlike Σ, has no poles in a gap), so on a grid
    of step h ≤ η its relative second difference stays far below 2h²/η²; a jump to another
    root of the CPA equations shows as a larger one. Flagged energies and two neighbours on
    each side are returned.
    """
    flat = omega.reshape(len(omega), -1)[order]
    flag = np.zeros(len(omega), dtype=bool)
    if len(omega) >= 3:
        d2 = np.abs(flat[:-2] - 2.0 * flat[1:-1] + flat[2:]).max(axis=1)
        scale = np.maximum(np.abs(flat).max(axis=1), 1.0)
        big = np.maximum(np.maximum(scale[:-2], scale[1:-1]), scale[2:])
        hit = np.flatnonzero(d2 > ratio * big) + 1
        for shift in (-2, -1, 0, 1, 2):
            flag[np.clip(hit + shift, 0, len(omega) - 1)] = True
    out = np.zeros(len(omega), dtype=bool)
    out[order] = flag
    return out


def _march(solve_one, z, order, ok, out, depth: int = 6) -> None:
    """Re-solve the energies not ``ok`` one by one along E from a trusted neighbour.

    Each run of untrusted energies (in the order of E) is walked from its upper trusted
    neighbour downwards (from the lower one upwards if there is none above); each energy
    starts from the linear extrapolation of the cavity Ω of the two previous ones, and a
    failed step is bisected (``depth`` levels) through intermediate energies.
    """
    trusted = ok[order]
    runs, i = [], 0
    while i < len(order):
        if trusted[i]:
            i += 1
            continue
        j = i
        while j + 1 < len(order) and not trusted[j + 1]:
            j += 1
        runs.append((i, j))
        i = j + 1
    for i, j in runs:
        if j + 1 < len(order):
            seq, anchor = range(j, i - 1, -1), order[j + 1]
        else:
            seq, anchor = range(i, j + 1), order[i - 1]
        prev2, prev1 = None, (z[anchor], out["omega"][anchor])
        for p in seq:
            k = order[p]
            got, part = _walk(solve_one, z[k], prev2, prev1, depth)
            for key in ("omega", "sigma", "g", "residual"):
                out[key][k] = part[key][0]
            out["g_comp"][:, k] = part["g_comp"][:, 0]
            out["iterations"][k] += int(part["iterations"][0])
            if not got:
                return
            ok[k] = True
            prev2, prev1 = prev1, (z[k], part["omega"][0])


def _walk(solve_one, target, prev2, prev1, depth):
    """Solve at ``target`` from an extrapolated start, bisecting the step if that fails."""
    z1, o1 = prev1
    if prev2 is None:
        guess = o1
    else:
        z2, o2 = prev2
        guess = o1 + (target - z1) / (z1 - z2) * (o1 - o2)
    got, part = solve_one(target, guess)
    if got or depth == 0:
        return got, part
    mid = 0.5 * (z1 + target)
    got_mid, part_mid = _walk(solve_one, mid, prev2, prev1, depth - 1)
    if not got_mid:
        return False, part
    return _walk(solve_one, target, prev1, (mid, part_mid["omega"][0]), depth - 1)


def iterate_cpa(
    w: NDArray[np.complex128],
    wk: NDArray[np.float64],
    z: NDArray[np.complex128],
    eps: NDArray[np.float64],
    x: NDArray[np.float64],
    n_sites: int,
    *,
    symmetrise=None,
    tol: float = 1e-6,
    max_iter: int = 100,
    mixing: float = 1.0,
    history: int = 5,
    kernel: str = "numba",
    sigma0: NDArray[np.complex128] | None = None,
) -> dict:
    """Solve the CPA condition at each complex energy (module docstring).

    The unknown iterated is the cavity Ω = 𝒢⁻¹ = G⁻¹ + Σ (smooth in E; Σ has poles in the gap
    of a split band), Ω → Σ = Ω − (Σ_a x_a (Ω − ε_a)⁻¹)⁻¹ → G(Σ) → Ω_new = G⁻¹ + Σ, with
    Anderson mixing; all energies together, from the Ω of ``sigma0`` (default: the VCA onsite
    energies). A solution counts only if it is causal (:func:`_causal`) and continuous along E
    (:func:`_rough`): the CPA equations have further (even causal) roots, which a fixed-point
    iteration can reach where the disorder is strong. Energies without a trusted solution are
    tried again from the atomic-limit start Ω = z, and any still left are solved one by one
    along E from a trusted neighbour (:func:`_march`), which follows the analytic branch.

    Parameters
    ----------
    w : (n_k, n, n) hopping part of H(k), eV (n = n_sites · m orbitals)
    wk : (n_k,) k-weights
    z : (n_z,) complex energies, eV
    eps : (n_comp, m) component onsite energies per orbital of a site, eV
    x : (n_comp,) fractions
    n_sites : sites per cell (all disordered alike)
    symmetrise : callable on (…, m, m) site blocks (wedge → full mesh), or None
    tol, max_iter, mixing, history, kernel : see :class:`CPASettings`
    sigma0 : (n_z, n_sites, m, m) start values

    Returns
    -------
    dict with ``sigma``, ``omega``, ``g`` (n_z, n_sites, m, m), ``g_comp`` (n_comp, n_z,
    n_sites, m, m), ``iterations`` (n_z,) (all passes), ``residual`` (n_z,) (|ΔΩ|, eV),
    ``restarted`` (n_z,) bool (solved again along E).

    Raises
    ------
    CalculationError
        Some energy did not converge (names the worst one).
    """
    green = local_green_numba if kernel == "numba" else local_green_numpy
    z = np.asarray(z, dtype=np.complex128)
    nz = len(z)
    m = eps.shape[1]
    ns = int(n_sites)
    x = np.asarray(x, dtype=float)
    prob = _Problem(w, wk, eps, x, ns, symmetrise, green)
    if sigma0 is None:
        sigma = np.broadcast_to((x @ eps)[:, None] * np.eye(m), (nz, ns, m, m))
        sigma = sigma.astype(np.complex128)
    else:
        sigma = np.array(sigma0, dtype=np.complex128).reshape(nz, ns, m, m)
    omega0 = prob.omega_of_sigma(z, sigma)
    ok, out = _iterate_batch(prob, z, omega0, tol, max_iter, mixing, history)
    ok &= _causal(out)
    order = np.argsort(z.real, kind="stable")
    ok &= ~_rough(out["omega"], order)
    restarted = ~ok
    if not ok.all():
        # second start: the atomic-limit cavity Ω = z (exact when the hopping is negligible
        # against the distance to the components' levels, i.e. deep in a gap)
        todo = np.flatnonzero(~ok)
        start = z[todo, None, None, None] * np.eye(m)[None, None]
        got, part = _iterate_batch(prob, z[todo], np.broadcast_to(start, (len(todo), ns, m, m)),
                                   tol, max_iter, mixing, history)  # fmt: skip
        got &= _causal(part)
        for key in ("omega", "sigma", "g", "residual"):
            out[key][todo[got]] = part[key][got]
        out["g_comp"][:, todo[got]] = part["g_comp"][:, got]
        out["iterations"][todo] += part["iterations"]
        ok[todo[got]] = True
        ok &= ~_rough(out["omega"], order)

    def solve_one(zz, om):
        got, part = _iterate_batch(prob, np.array([zz]), om[None], tol, max_iter, mixing,
                                   history)  # fmt: skip
        return bool(got[0] and _causal(part)[0]), part

    if not ok.all() and ok.any():
        _march(solve_one, z, order, ok, out)
    if not ok.all():
        bad = np.flatnonzero(~ok)
        worst = bad[np.argmax(out["residual"][bad])]
        raise CalculationError(
            f"CPA did not converge at {len(bad)} of {nz} energies within {max_iter} "
            f"iterations; worst at E = {z[worst].real:.4f} eV with |ΔΩ| = "
            f"{out['residual'][worst]:.3g} eV (tolerance {tol:g} eV); try more iterations, "
            "a smaller mixing β or a larger η"
        )
    out["restarted"] = restarted
    return out


# ------------------------------------------------------------------------------------------
# the calculation on a parent lattice
# ------------------------------------------------------------------------------------------
@dataclass(frozen=True, eq=False)
class CPAResult:
    """A CPA calculation: DOS, coherent potential, component Green functions, convergence.

    Attributes
    ----------
    dos : DOSResult
        Per parent cell; channels Channel(site, element=component, shell[, orbital]) hold
        x_a ρ_a (so they add up to the total); components with x = 0 are left out.
    composition : dict
        Fractions (zeros kept).
    energies : (n_e,) eV, relative to E_F (the grid of ``dos``)
    component_dos : dict element → (n_sites, n_shells, n_e), states/eV per atom of that
        element (both spins), also for x = 0 (a single impurity in the medium)
    shells : tuple of str
    sigma : (n_e, n_sites, m, m) complex, eV (absolute energy scale)
    iterations : (n_e,) int
    residual : (n_e,) eV
    component_electrons : dict element → electrons per atom below E_F
    fermi_level : eV (absolute)
    eta : eV
    medium_dos : (n_e,) states/eV per cell from the k-summed medium Green function,
        −(2/π) Im Tr G; equals ``dos.total`` (= Σ_a x_a ρ_a) when the CPA condition holds
    report : dict (JSON-ready summary)
    """

    dos: DOSResult
    composition: dict
    energies: NDArray[np.float64]
    component_dos: dict
    shells: tuple[str, ...]
    sigma: NDArray[np.complex128]
    iterations: NDArray[np.int64]
    residual: NDArray[np.float64]
    component_electrons: dict
    fermi_level: float
    eta: float
    medium_dos: NDArray[np.float64]
    report: dict = field(default_factory=dict)

    def component_descriptors(self, shell: str = "d", window=None) -> dict:
        """Band descriptors of each component's ``shell`` DOS per atom (also for x = 0)."""
        if shell not in self.shells:
            raise SettingsError(f"shell {shell!r}: the components carry {', '.join(self.shells)}")
        i = self.shells.index(shell)
        return {
            el: band_descriptors(self.energies, rho[:, i].sum(axis=0) / rho.shape[0], window)
            for el, rho in self.component_dos.items()
        }


def _check_inputs(parent, composition, params, settings, cpa):
    if not isinstance(parent, Structure):
        raise InputError(f"parent must be a valband Structure, got {type(parent).__name__}")
    comp = check_composition(composition, params)
    if not params.orthogonal:
        raise ParameterError(
            f"parameter set {params.name!r} is non-orthogonal; the CPA here needs an orthogonal "
            "set (with an overlap the Löwdin-orthogonalised onsite part is k-dependent and not "
            "site-diagonal, so diagonal-disorder CPA does not apply); accepted: an orthogonal "
            f"set, e.g. its counterpart valband.params.orthogonal_counterpart({params.name!r}) "
            "(made by 'valband params orthogonal SET'; the CLI and campaigns use it by themselves)"
        )
    s = settings or DOSSettings(method="lorentzian", width=0.05, step=0.05)
    s.validate()
    c = cpa or CPASettings()
    c.validate()
    if c.eta is not None:
        eta = float(c.eta)
    elif s.method == "lorentzian":
        eta = float(s.width)
    else:
        raise SettingsError(
            f"DOS method {s.method!r}: the CPA broadens through z = E + iη, a Lorentzian; use "
            "method='lorentzian' (width = η in eV) or give CPASettings(eta=...)"
        )
    return comp, s, c, eta


def _band_bounds(w, eps_lo, eps_hi, ns):
    def eig(e):
        return np.linalg.eigvalsh(w + np.diag(np.tile(e, ns))[None])

    return float(eig(eps_lo).min()), float(eig(eps_hi).max())


def _tail(w, wk, eps, ns, e0, eta):
    """Lorentzian weight below e0 per site of each component (both spins)."""
    out = []
    for e in eps:
        lam = np.linalg.eigvalsh(w + np.diag(np.tile(e, ns))[None])
        t = np.arctan(eta / np.maximum(lam - e0, 1e-300)) / np.pi
        out.append(SPIN_DEGENERACY * float(wk @ t.sum(axis=1)) / ns)
    return np.array(out)


#: Energy axis of each array of :func:`_derived`.
_E_AXIS = {"rho": 1, "medium": 0, "sigma": 0, "iterations": 0, "residual": 0}


def _derived(sol: dict) -> dict:
    """Component DOS per orbital (c, e, s, m), medium DOS per cell (e,), and the rest."""
    rho = -SPIN_DEGENERACY / np.pi * np.diagonal(sol["g_comp"], axis1=-2, axis2=-1).imag
    medium = -SPIN_DEGENERACY / np.pi * np.trace(sol["g"], axis1=-2, axis2=-1).imag.sum(axis=1)
    return {"rho": rho, "medium": medium, "sigma": sol["sigma"],
            "iterations": sol["iterations"], "residual": sol["residual"]}  # fmt: skip


def _cumulative(y, step):
    out = np.zeros_like(y)
    out[..., 1:] = np.cumsum(0.5 * (y[..., 1:] + y[..., :-1]), axis=-1) * step
    return out


def cpa_solve(
    parent: Structure,
    composition: Mapping[str, float],
    params,
    settings: DOSSettings | None = None,
    cpa: CPASettings | None = None,
) -> CPAResult:
    """CPA DOS, coherent potential and component Green functions of a random alloy.

    Parameters
    ----------
    parent
        The lattice; every site is disordered with ``composition`` (geometry as given, Å).
    composition
        ``{element: fraction}`` summing to 1 (binary, ternary, …; zeros allowed).
    params
        Orthogonal parameter set with all components and component pairs.
    settings
        DOS settings: ``mesh``, ``step`` (eV), ``emin``/``emax`` (eV relative to E_F; default
        the whole band), ``resolve`` ("l" shells, "m" orbitals), ``symmetry`` and, with
        ``method="lorentzian"``, ``width`` = η. Default: Lorentzian η = 0.05 eV, step 0.05 eV,
        24³ mesh.
    cpa
        :class:`CPASettings` (tolerance, iterations, mixing, kernel; ``eta`` overrides).
    """
    comp, s, c, eta = _check_inputs(parent, composition, params, settings, cpa)
    elements = list(comp)
    x = np.array([comp[e] for e in elements])
    shells = common_shells(comp, params)
    eps = component_onsite(comp, params, shells)  # (c, m)
    model = vca_model(parent, comp, params)
    ns = parent.n_sites
    one_site = ns == 1
    kmesh = make_mesh(parent, s.mesh, kind=s.mesh_kind, symmetry=s.symmetry and one_site)
    sym = site_symmetriser(parent, shells, kmesh) if kmesh.symmetry else None
    if kmesh.symmetry and sym is None:
        kmesh = make_mesh(parent, s.mesh, kind=s.mesh_kind, symmetry=False)
    w = model.hamiltonian(kmesh.kpoints) - np.diag(model.onsite)[None]
    wk = kmesh.weights

    lo, hi = _band_bounds(w, eps.min(axis=0), eps.max(axis=0), ns)
    pad = 1.0 + 5.0 * eta
    e0 = np.floor((lo - pad) / s.step) * s.step
    n_e = int(np.ceil((hi + pad - e0) / s.step)) + 1
    if n_e > 200_000:
        raise SettingsError(f"CPA energy grid of {n_e} points: increase the step")
    energies = e0 + s.step * np.arange(n_e)

    def solve(en):
        return iterate_cpa(
            w, wk, en + 1j * eta, eps, x, ns, symmetrise=sym, tol=c.tol,
            max_iter=c.max_iter, mixing=c.mixing, history=c.history, kernel=c.kernel,
        )  # fmt: skip

    arrays = _derived(solve(energies))
    rho_orb = arrays["rho"]  # (c, e, s, m) per atom of each component
    per_site = rho_orb.sum(axis=3)  # (c, e, s)
    counts = _tail(w, wk, eps, ns, e0, eta)[:, None] + _cumulative(
        per_site.mean(axis=2), s.step
    )  # (c, e) per atom of each component
    total_count = ns * (x @ counts)  # per cell
    n_el = float(model.n_electrons)
    if not (total_count[0] < n_el < total_count[-1]):
        raise CalculationError(
            f"the CPA Fermi level is not bracketed: N = {total_count[0]:.4g} … "
            f"{total_count[-1]:.4g} electrons on the grid, {n_el:g} needed"
        )
    e_f = float(np.interp(n_el, total_count, energies))
    n_comp = np.array([np.interp(e_f, energies, cnt) for cnt in counts])

    # optional window relative to E_F, extending the grid where needed
    if s.emin is not None or s.emax is not None:
        j0 = 0 if s.emin is None else int(np.floor((e_f + s.emin - e0) / s.step + 1e-9))
        j1 = n_e - 1 if s.emax is None else int(np.ceil((e_f + s.emax - e0) / s.step - 1e-9))
        parts = []
        if j0 < 0:
            parts.append(_derived(solve(e0 + s.step * np.arange(j0, 0))))
        parts.append(arrays)
        if j1 >= n_e:
            parts.append(_derived(solve(e0 + s.step * np.arange(n_e, j1 + 1))))
        lo_j = min(j0, 0)
        pick = np.arange(j0, j1 + 1) - lo_j
        arrays = {key: np.concatenate([q[key] for q in parts], axis=_E_AXIS[key]).take(
            pick, axis=_E_AXIS[key]) for key in arrays}  # fmt: skip
        rho_orb = arrays["rho"]
        energies = e0 + s.step * np.arange(j0, j1 + 1)
    sigma, iters, resid = arrays["sigma"], arrays["iterations"], arrays["residual"]

    # channels
    orb_shell = [sh for sh in shells for _ in SHELL_ORBITALS[sh]]
    orb_name = [o for sh in shells for o in SHELL_ORBITALS[sh]]
    labels, rows = [], []
    comp_dos = {}
    for ic, el in enumerate(elements):
        by_shell = np.stack(
            [rho_orb[ic][:, :, [i for i, t in enumerate(orb_shell) if t == sh]].sum(axis=2).T
             for sh in shells], axis=1,
        )  # fmt: skip  (s, shells, e)
        comp_dos[el] = by_shell
        if x[ic] == 0.0:
            continue
        for site in range(ns):
            if s.resolve == "m":
                for i, o in enumerate(orb_name):
                    labels.append(Channel(site, el, orb_shell[i], o))
                    rows.append(x[ic] * rho_orb[ic][:, site, i])
            else:
                for k, sh in enumerate(shells):
                    labels.append(Channel(site, el, sh))
                    rows.append(x[ic] * by_shell[site, k])
    channels = np.array(rows)
    total = channels.sum(axis=0)
    rel = energies - e_f
    report = {
        "method": "coherent potential approximation",
        "approximations": list(APPROXIMATIONS),
        "composition": comp,
        "eta_eV": eta,
        "tolerance_eV": c.tol,
        "mixing": c.mixing,
        "anderson_history": c.history,
        "kernel": c.kernel,
        "iterations": {"max": int(iters.max()), "mean": float(iters.mean()),
                       "total_energies": int(len(iters))},
        "max_residual_eV": float(resid.max()),
        "k_sum": "irreducible wedge, point-group symmetrised" if sym is not None else "full mesh",
        "component_electrons_per_atom": {e: float(n) for e, n in zip(elements, n_comp,
                                                                      strict=True)},
        "fermi_level_eV": e_f,
        "energy_grid": "absolute grid E0 + j*step; energies relative to E_F are not rounded",
    }  # fmt: skip
    recorded = asdict(s)
    recorded.update(
        method="lorentzian", approximation="cpa", width=eta, mesh=kmesh.to_dict(),
        n_electrons=n_el,
        energy_range_eV=[float(rel[0]), float(rel[-1])],
        band_range_eV=[lo - e_f, hi - e_f], cpa=report,
    )  # fmt: skip
    dos = DOSResult(
        energies=rel,
        total=total,
        channels=channels,
        channel_labels=tuple(labels),
        fermi_level=e_f,
        n_electrons=n_el,
        n_sites=ns,
        settings=recorded,
        provenance=provenance_of(model),
    )
    return CPAResult(
        dos=dos, composition=comp, energies=rel, component_dos=comp_dos, shells=shells,
        sigma=sigma, iterations=iters, residual=resid,
        component_electrons={e: float(n) for e, n in zip(elements, n_comp, strict=True)},
        fermi_level=e_f, eta=eta, medium_dos=arrays["medium"], report=report,
    )  # fmt: skip


def cpa_dos(
    parent: Structure,
    composition: Mapping[str, float],
    params,
    settings: DOSSettings | None = None,
    cpa: CPASettings | None = None,
) -> DOSResult:
    """Return the CPA density of states (see :func:`cpa_solve`).

    The CPA report is in ``settings["cpa"]``; component channels are labelled by element.
    """
    return cpa_solve(parent, composition, params, settings, cpa).dos


@dataclass(frozen=True)
class CPAScan:
    """Per-component and average descriptors across compositions.

    ``rows[i]`` = {"composition", "fermi_level_eV", "iterations_max", "average": {...},
    "components": {element: {...}}, "electrons_per_atom": {element: n}}.
    """

    shell: str
    rows: tuple[dict, ...]

    def to_dict(self) -> dict:
        """JSON-ready."""
        return {"method": "coherent potential approximation", "shell": self.shell,
                "rows": list(self.rows)}  # fmt: skip


def cpa_scan(
    parent: Structure | str,
    compositions: Sequence[Mapping[str, float]],
    params,
    settings: DOSSettings | None = None,
    cpa: CPASettings | None = None,
    *,
    shell: str = "d",
    window: tuple[float, float] | None = None,
) -> CPAScan:
    """CPA descriptors (each component's and the average site's) for each composition.

    ``parent`` is a Structure (fixed geometry) or a lattice name (Vegard's lattice constant per
    composition, :func:`valband.alloy.vca.vegard_parent`). Components with x = 0 get the
    descriptors of a single impurity in the medium.
    """
    from valband.workflows import describe

    if not compositions:
        raise InputError("no compositions given for the scan")
    rows = []
    for comp in compositions:
        cell = vegard_parent(parent, comp) if isinstance(parent, str) else parent
        res = cpa_solve(cell, comp, params, settings, cpa)
        avg = describe(res.dos, shell, window).cell
        rows.append({
            "composition": res.composition,
            "cell_vector_A": float(np.linalg.norm(cell.cell[0])),
            "fermi_level_eV": res.fermi_level,
            "iterations_max": int(res.iterations.max()),
            "average": avg.to_dict(),
            "components": {e: d.to_dict() for e, d in
                           res.component_descriptors(shell, window).items()},
            "electrons_per_atom": res.component_electrons,
        })  # fmt: skip
    return CPAScan(shell, tuple(rows))
