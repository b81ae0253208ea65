"""Bound states of a spherical potential: non-relativistic and scalar-relativistic.

Equations (Hartree atomic units, c = 1/α)
    With P(r) = r·g(r) the large component and Q(r) = r g'(r)/(2M),
    M(r) = 1 + α²(ε − V)/2, the scalar-relativistic radial equations of Koelling & Harmon,
    J. Phys. C 10, 3107 (1977), without the spin–orbit term, are

        dP/dr = 2M Q + P/r
        dQ/dr = −Q/r + [l(l+1)/(2M r²) + V − ε] P

    (mass–velocity through M, Darwin through M' in the eliminated second-order form).
    α = 0 gives the Schrödinger equation, u = P, Q = (u' − u/r)/2. For l = 0 they coincide
    with the Dirac equation for κ = −1 (the spin–orbit term is ∝ κ + 1), so scalar-relativistic
    s levels are the Dirac s₁/₂ levels.

Integration
    On the uniform grid in x = ln r (d/dx = r d/dr) by the implicit four-step Adams–Moulton
    formula (fifth order); the equations are linear, so each implicit step is a 2×2 solve.
    Outward from the origin (series start P ∝ r^{l+1}(1 − Zr/(l+1)), or the r^γ eigenvector of
    the Coulomb-dominated system with γ = √(l(l+1) + 1 − α²Z²) in the scalar-relativistic case)
    to the outermost classical turning point; inward from where the WKB exponent reaches 45
    (exp(−45) ≈ 3e-20), matched in P at the turning point. The nodes of the outward part pick
    the state; the eigenvalue is found by bisection on the node count plus the first-order
    correction δε = P_m (Q_out − Q_in)/N, N = ∫ [P²(1 + α² l(l+1)/(4M²r²)) + α²Q²] dr (the
    energy derivative of the Wronskian), to ``tol`` (default 1e-11 Ha, relative 1e-14 for deep
    cores).

Normalisation and sign
    u = P is normalised to ∫ u² dr = 1 (large component only, also in the scalar-relativistic
    case; the small component α Q carries a fraction O((αZ/n)²) of the Dirac norm and is not
    counted). The outermost lobe is positive (u > 0 beyond the last node).

The integration kernel is compiled with numba (:func:`shoot_numba`); :func:`shoot_reference`
is the plain Python/numpy implementation of the same scheme.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numba
import numpy as np
import scipy.constants as _sc
from numpy.typing import NDArray

from valband.errors import CalculationError, SettingsError

from .grid import RadialGrid

__all__ = [
    "ALPHA",
    "RELATIVITY",
    "BoundState",
    "alpha_squared",
    "shoot_numba",
    "shoot_reference",
    "solve_bound_state",
]

#: Fine-structure constant (CODATA via scipy.constants).
ALPHA: float = _sc.fine_structure
#: Accepted values of ``relativity``.
RELATIVITY = ("none", "scalar")

_WKB_DECAY = 45.0
_BIG = 1e200
# Adams–Moulton four-step coefficients /720.
_C0, _C1, _C2, _C3, _C4 = 251.0 / 720.0, 646.0 / 720.0, -264.0 / 720.0, 106.0 / 720.0, -19.0 / 720.0


def alpha_squared(relativity: str) -> float:
    """α² for ``relativity`` ("none" → 0, "scalar" → α²)."""
    if relativity == "none":
        return 0.0
    if relativity == "scalar":
        return ALPHA * ALPHA
    raise SettingsError(f"unknown relativity {relativity!r}; accepted: {', '.join(RELATIVITY)}")


# ----------------------------------------------------------------------------------------------
# numba kernel
# ----------------------------------------------------------------------------------------------


@numba.njit(cache=True)
def _shoot_kernel(r, v, w, eps, ell, alpha2, h, p, q):  # pragma: no cover - compiled
    n = r.size
    ll = ell * (ell + 1.0)
    # outermost classical turning point
    m = -1
    for i in range(n - 1, -1, -1):
        if v[i] + 0.5 * ll / (r[i] * r[i]) < eps:
            m = i
            break
    if m < 0:
        vmin = 1e300
        for i in range(n):
            ve = v[i] + 0.5 * ll / (r[i] * r[i])
            if ve < vmin:
                vmin = ve
                m = i
    # practical infinity from the WKB exponent
    s = 0.0
    i_inf = n - 1
    for i in range(max(m, 0), n - 1):
        d = v[i] + 0.5 * ll / (r[i] * r[i]) - eps
        if d > 0.0:
            s += math.sqrt(2.0 * d) * (r[i + 1] - r[i])
        if s > _WKB_DECAY:
            i_inf = i + 1
            break
    if i_inf < m + 8:
        i_inf = min(n - 1, m + 8)
    if m > i_inf - 8:
        m = i_inf - 8
    if m < 8:
        m = 8
    for i in range(n):
        p[i] = 0.0
        q[i] = 0.0
    # ---- outward start
    z0 = -r[0] * v[0]
    m0 = 1.0 + 0.5 * alpha2 * (eps - v[0])
    if alpha2 > 0.0 and z0 > 0.0 and alpha2 * z0 > 2.0 * r[0]:
        a12 = 2.0 * m0 * r[0]
        a21 = ll / (2.0 * m0 * r[0]) + r[0] * (v[0] - eps)
        gam = math.sqrt(max(1.0 + a12 * a21, 1e-12))
        for i in range(4):
            mi = 1.0 + 0.5 * alpha2 * (eps - v[i])
            b12 = 2.0 * mi * r[i]
            sc = (r[i] / r[0]) ** gam
            p[i] = b12 * sc
            q[i] = (gam - 1.0) * sc
    else:
        for i in range(4):
            mi = 1.0 + 0.5 * alpha2 * (eps - v[i])
            ri = r[i]
            rl = (ri / r[0]) ** ell
            p[i] = rl * ri * (1.0 - z0 * ri / (ell + 1.0))
            q[i] = rl * (ell - z0 * ri) / (2.0 * mi)
    fp = np.empty(4)
    fq = np.empty(4)
    for k in range(4):
        mi = 1.0 + 0.5 * alpha2 * (eps - v[k])
        a12 = 2.0 * mi * r[k]
        a21 = ll / (2.0 * mi * r[k]) + r[k] * (v[k] - eps)
        fp[k] = p[k] + a12 * q[k]
        fq[k] = a21 * p[k] - q[k]
    # fp[0] holds f at i, fp[1] at i-1, ... (rolling)
    t = fp[0]
    fp[0] = fp[3]
    fp[3] = t
    t = fp[1]
    fp[1] = fp[2]
    fp[2] = t
    t = fq[0]
    fq[0] = fq[3]
    fq[3] = t
    t = fq[1]
    fq[1] = fq[2]
    fq[2] = t
    nodes = 0
    for i in range(3):
        if p[i] * p[i + 1] < 0.0:
            nodes += 1
    dx = h
    for i in range(3, m):
        j = i + 1
        mj = 1.0 + 0.5 * alpha2 * (eps - v[j])
        a12 = 2.0 * mj * r[j]
        a21 = ll / (2.0 * mj * r[j]) + r[j] * (v[j] - eps)
        bp = p[i] + dx * (_C1 * fp[0] + _C2 * fp[1] + _C3 * fp[2] + _C4 * fp[3])
        bq = q[i] + dx * (_C1 * fq[0] + _C2 * fq[1] + _C3 * fq[2] + _C4 * fq[3])
        c = _C0 * dx
        d11 = 1.0 - c
        d22 = 1.0 + c
        det = d11 * d22 - c * c * a12 * a21
        pj = (d22 * bp + c * a12 * bq) / det
        qj = (c * a21 * bp + d11 * bq) / det
        p[j] = pj
        q[j] = qj
        fp[3] = fp[2]
        fp[2] = fp[1]
        fp[1] = fp[0]
        fp[0] = pj + a12 * qj
        fq[3] = fq[2]
        fq[2] = fq[1]
        fq[1] = fq[0]
        fq[0] = a21 * pj - qj
        if p[i] * pj < 0.0:
            nodes += 1
        if abs(pj) > _BIG:
            for k in range(j + 1):
                p[k] /= _BIG
                q[k] /= _BIG
            for k in range(4):
                fp[k] /= _BIG
                fq[k] /= _BIG
    p_out = p[m]
    q_out = q[m]
    # ---- inward start (WKB decay)
    kinf = math.sqrt(max(2.0 * (v[i_inf] - eps) + ll / (r[i_inf] * r[i_inf]), 1e-12))
    for k in range(4):
        i = i_inf - k
        mi = 1.0 + 0.5 * alpha2 * (eps - v[i])
        ki = math.sqrt(max(2.0 * (v[i] - eps) + ll / (r[i] * r[i]), 1e-12))
        p[i] = math.exp(-kinf * (r[i] - r[i_inf]))
        q[i] = -(ki + 1.0 / r[i]) * p[i] / (2.0 * mi)
        a12 = 2.0 * mi * r[i]
        a21 = ll / (2.0 * mi * r[i]) + r[i] * (v[i] - eps)
        fp[3 - k] = p[i] + a12 * q[i]
        fq[3 - k] = a21 * p[i] - q[i]
    p_in = 0.0
    q_in = 0.0
    dx = -h
    for i in range(i_inf - 3, m, -1):
        j = i - 1
        mj = 1.0 + 0.5 * alpha2 * (eps - v[j])
        a12 = 2.0 * mj * r[j]
        a21 = ll / (2.0 * mj * r[j]) + r[j] * (v[j] - eps)
        bp = p[i] + dx * (_C1 * fp[0] + _C2 * fp[1] + _C3 * fp[2] + _C4 * fp[3])
        bq = q[i] + dx * (_C1 * fq[0] + _C2 * fq[1] + _C3 * fq[2] + _C4 * fq[3])
        c = _C0 * dx
        d11 = 1.0 - c
        d22 = 1.0 + c
        det = d11 * d22 - c * c * a12 * a21
        pj = (d22 * bp + c * a12 * bq) / det
        qj = (c * a21 * bp + d11 * bq) / det
        if j == m:
            p_in = pj
            q_in = qj
        else:
            p[j] = pj
            q[j] = qj
        fp[3] = fp[2]
        fp[2] = fp[1]
        fp[1] = fp[0]
        fp[0] = pj + a12 * qj
        fq[3] = fq[2]
        fq[2] = fq[1]
        fq[1] = fq[0]
        fq[0] = a21 * pj - qj
        if abs(pj) > _BIG:
            for k in range(j, i_inf + 1):
                if k != m:
                    p[k] /= _BIG
                    q[k] /= _BIG
            p_in /= _BIG
            q_in /= _BIG
            for k in range(4):
                fp[k] /= _BIG
                fq[k] /= _BIG
    scale = 1.0 if p_in == 0.0 else p_out / p_in
    for k in range(m + 1, i_inf + 1):
        p[k] *= scale
        q[k] *= scale
    dq = q_out - q_in * scale
    norm_p = 0.0
    norm_e = 0.0
    for k in range(i_inf + 1):
        pk2 = p[k] * p[k]
        norm_p += w[k] * pk2
        if alpha2 > 0.0:
            mk = 1.0 + 0.5 * alpha2 * (eps - v[k])
            norm_e += w[k] * (
                pk2 * (1.0 + alpha2 * ll / (4.0 * mk * mk * r[k] * r[k])) + alpha2 * q[k] * q[k]
            )
        else:
            norm_e += w[k] * pk2
    delta = p_out * dq / norm_e if norm_e > 0.0 else 0.0
    return nodes, delta, norm_p, m, i_inf


def shoot_numba(r, v, w, eps, ell, alpha2, h):
    """One shooting pass (numba): outward and inward solutions matched in P at the turning point.

    Parameters
    ----------
    r, v, w : ndarray
        Grid radii (bohr), potential (Ha), Simpson weights.
    eps : float
        Trial energy (Ha).
    ell : int
        Angular momentum.
    alpha2 : float
        α² (0 for Schrödinger).
    h : float
        Grid step in ln r.

    Returns
    -------
    nodes : int
        Nodes of the outward solution up to the matching point.
    delta : float
        First-order energy correction (Ha).
    norm : float
        ∫P² dr of the unnormalised solution.
    m, i_inf : int
        Matching index and last non-zero index.
    p, q : ndarray
        Unnormalised P and Q (zero beyond ``i_inf``).
    """
    p = np.empty_like(r)
    q = np.empty_like(r)
    nodes, delta, norm, m, i_inf = _shoot_kernel(
        r, v, w, float(eps), float(ell), float(alpha2), float(h), p, q
    )
    return int(nodes), float(delta), float(norm), int(m), int(i_inf), p, q


# ----------------------------------------------------------------------------------------------
# plain reference of the same scheme
# ----------------------------------------------------------------------------------------------


def _matrix(r, v, eps, ll, alpha2):
    mass = 1.0 + 0.5 * alpha2 * (eps - v)
    return np.array([[1.0, 2.0 * mass * r], [ll / (2.0 * mass * r) + r * (v - eps), -1.0]])


def shoot_reference(r, v, w, eps, ell, alpha2, h):
    """Plain Python/numpy implementation of :func:`shoot_numba` (same outputs)."""
    r = np.asarray(r, dtype=float)
    v = np.asarray(v, dtype=float)
    n = r.size
    ll = ell * (ell + 1.0)
    veff = v + 0.5 * ll / r**2
    below = np.nonzero(veff < eps)[0]
    m = int(below[-1]) if below.size else int(np.argmin(veff))
    i_inf = n - 1
    s = 0.0
    for i in range(max(m, 0), n - 1):
        d = veff[i] - eps
        if d > 0:
            s += math.sqrt(2.0 * d) * (r[i + 1] - r[i])
        if s > _WKB_DECAY:
            i_inf = i + 1
            break
    if i_inf < m + 8:
        i_inf = min(n - 1, m + 8)
    m = max(min(m, i_inf - 8), 8)
    y = np.zeros((n, 2))
    z0 = -r[0] * v[0]
    mass = 1.0 + 0.5 * alpha2 * (eps - v)
    if alpha2 > 0 and z0 > 0 and alpha2 * z0 > 2.0 * r[0]:
        a = _matrix(r[0], v[0], eps, ll, alpha2)
        gam = math.sqrt(max(1.0 + a[0, 1] * a[1, 0], 1e-12))
        sc = (r[:4] / r[0]) ** gam
        y[:4, 0] = 2.0 * mass[:4] * r[:4] * sc
        y[:4, 1] = (gam - 1.0) * sc
    else:
        rl = (r[:4] / r[0]) ** ell
        y[:4, 0] = rl * r[:4] * (1.0 - z0 * r[:4] / (ell + 1.0))
        y[:4, 1] = rl * (ell - z0 * r[:4]) / (2.0 * mass[:4])
    coef = np.array([_C1, _C2, _C3, _C4])

    def step(i, j, f_hist, dx):
        a = _matrix(r[j], v[j], eps, ll, alpha2)
        b = y[i] + dx * (coef @ np.array(f_hist))
        return np.linalg.solve(np.eye(2) - _C0 * dx * a, b), a

    f_hist = [_matrix(r[k], v[k], eps, ll, alpha2) @ y[k] for k in (3, 2, 1, 0)]
    for i in range(3, m):
        yj, a = step(i, i + 1, f_hist, h)
        y[i + 1] = yj
        f_hist = [a @ yj] + f_hist[:3]
        if abs(yj[0]) > _BIG:
            y[: i + 2] /= _BIG
            f_hist = [f / _BIG for f in f_hist]
    nodes = int(np.count_nonzero(y[:m, 0] * y[1 : m + 1, 0] < 0))
    y_out = y[m].copy()
    yin = np.zeros((n, 2))
    kap = np.sqrt(np.maximum(2.0 * (v - eps) + ll / r**2, 1e-12))
    idx = i_inf - np.arange(4)
    yin[idx, 0] = np.exp(-kap[i_inf] * (r[idx] - r[i_inf]))
    yin[idx, 1] = -(kap[idx] + 1.0 / r[idx]) * yin[idx, 0] / (2.0 * mass[idx])
    f_hist = [_matrix(r[k], v[k], eps, ll, alpha2) @ yin[k] for k in idx[::-1]]
    y_keep = y
    y = yin
    for i in range(i_inf - 3, m, -1):
        yj, a = step(i, i - 1, f_hist, -h)
        y[i - 1] = yj
        f_hist = [a @ yj] + f_hist[:3]
        if abs(yj[0]) > _BIG:
            y[i - 1 : i_inf + 1] /= _BIG
            f_hist = [f / _BIG for f in f_hist]
    y_in = y[m].copy()
    scale = 1.0 if y_in[0] == 0 else y_out[0] / y_in[0]
    full = y_keep
    full[m + 1 : i_inf + 1] = yin[m + 1 : i_inf + 1] * scale
    full[m] = y_out
    full[i_inf + 1 :] = 0.0
    p, q = full[:, 0].copy(), full[:, 1].copy()
    dq = y_out[1] - y_in[1] * scale
    norm_p = float(w @ p**2)
    if alpha2 > 0:
        norm_e = float(w @ (p**2 * (1.0 + alpha2 * ll / (4.0 * mass**2 * r**2)) + alpha2 * q**2))
    else:
        norm_e = norm_p
    delta = y_out[0] * dq / norm_e if norm_e > 0 else 0.0
    return nodes, float(delta), norm_p, m, i_inf, p, q


# ----------------------------------------------------------------------------------------------
# eigenvalue search
# ----------------------------------------------------------------------------------------------


@dataclass(frozen=True, eq=False)
class BoundState:
    """One radial eigenfunction.

    Attributes
    ----------
    n, l : int
        Principal and angular quantum numbers (n − l − 1 nodes).
    energy : float
        Eigenvalue (Hartree).
    u : ndarray
        u(r) = r·R(r) (large component), ∫u² dr = 1, outermost lobe positive (bohr^-1/2).
    du : ndarray
        du/dr from the first-order equations (bohr^-3/2).
    iterations : int
        Shooting passes used.
    """

    n: int
    l: int  # noqa: E741
    energy: float
    u: NDArray[np.float64] = field(repr=False)
    du: NDArray[np.float64] = field(repr=False)
    iterations: int = 0


def solve_bound_state(
    grid: RadialGrid,
    potential: NDArray[np.float64],
    n: int,
    l: int,  # noqa: E741
    *,
    relativity: str = "none",
    energy_guess: float | None = None,
    tol: float = 1e-11,
    max_iterations: int = 200,
    kernel=None,
) -> BoundState:
    """Find the bound state (n, l) of a spherical potential.

    Parameters
    ----------
    grid : RadialGrid
        Logarithmic grid (bohr).
    potential : ndarray
        V(r) on ``grid.r`` (Hartree), e.g. −Z/r + V_H + V_xc.
    n, l : int
        Quantum numbers, 0 ≤ l < n.
    relativity : {"none", "scalar"}
        Schrödinger or scalar-relativistic (Koelling–Harmon without spin–orbit).
    energy_guess : float, optional
        Starting energy (Ha); the search is bracketed by node counting either way.
    tol : float
        Convergence of the eigenvalue (Ha); never tighter than 1e-14·|ε|.
    max_iterations : int
        Maximum number of shooting passes.
    kernel : callable, optional
        Shooting kernel (default :func:`shoot_numba`; :func:`shoot_reference` for checks).

    Returns
    -------
    BoundState

    Raises
    ------
    SettingsError
        Invalid quantum numbers or relativity.
    CalculationError
        The state is not bound on this grid or the search does not converge.
    """
    if not (isinstance(n, (int, np.integer)) and isinstance(l, (int, np.integer)) and 0 <= l < n):
        raise SettingsError(f"quantum numbers need integers 0 <= l < n, got n={n!r}, l={l!r}")
    alpha2 = alpha_squared(relativity)
    shoot = shoot_numba if kernel is None else kernel
    r, w, h = grid.r, grid.weights, grid.h
    v = np.ascontiguousarray(potential, dtype=float)
    if v.shape != r.shape or not np.all(np.isfinite(v)):
        raise SettingsError(
            f"potential must be {r.size} finite values on the grid, got shape {v.shape}"
        )
    target = n - l - 1
    veff = v + 0.5 * l * (l + 1) / r**2
    z_eff = max(float(np.max(-r * v)), 1.0)
    elo = -0.75 * z_eff**2 / n**2 - 1.0
    if alpha2 == 0.0:
        elo = max(elo, float(np.min(veff)))
    ehi = float(veff[-1])
    if energy_guess is not None and elo < energy_guess < ehi:
        e = float(energy_guess)
    else:
        e = max(elo + 0.5 * (ehi - elo) * 1e-3, -0.5 * z_eff**2 / n**2) if ehi > elo else elo
        e = min(e, 0.5 * (elo + ehi))
    found = False
    delta = math.inf
    nodes = -1
    it = 0
    for it in range(1, max_iterations + 1):  # noqa: B007
        nodes, delta, norm, m, i_inf, p, q = shoot(r, v, w, e, l, alpha2, h)
        tol_e = max(tol, 1e-14 * abs(e))
        if nodes > target:
            ehi = e
            e_new = 0.5 * (elo + ehi)
        elif nodes < target:
            elo = e
            e_new = 0.5 * (elo + ehi)
        else:
            if abs(delta) < tol_e:
                found = True
                break
            if delta > 0:
                elo = e
            else:
                ehi = e
            e_new = e + delta
            if not (elo < e_new < ehi):
                e_new = 0.5 * (elo + ehi)
        if ehi - elo < 4e-16 * max(abs(elo), abs(ehi), 1.0):
            if nodes == target and abs(delta) < 1e3 * tol_e:
                found = True
                break
            label = f"n={n}, l={l}"
            raise CalculationError(
                f"no bound state {label} ({target} nodes) below {float(veff[-1]):.6g} Ha on this grid "
                f"(r_max = {grid.r_max:.4g} bohr); the level is unbound or needs a larger grid"
            )
        e = e_new
    if not found:
        raise CalculationError(
            f"eigenvalue search for n={n}, l={l} did not converge in {max_iterations} passes "
            f"(last energy {e:.10g} Ha, correction {delta:.3g} Ha)"
        )
    scale = 1.0 / math.sqrt(norm)
    if p[m] < 0:
        scale = -scale
    u = p * scale
    mass = 1.0 + 0.5 * alpha2 * (e - v)
    du = (2.0 * mass * q + p / r) * scale
    u.setflags(write=False)
    du.setflags(write=False)
    return BoundState(n=int(n), l=int(l), energy=float(e), u=u, du=du, iterations=it)
