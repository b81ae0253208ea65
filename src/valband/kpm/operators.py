"""The operator A = S⁻¹H applied to blocks of vectors, and its spectral bounds by Lanczos.

Overlap without factorisation
    A non-orthogonal set has the generalised problem H c = E S c, i.e. the ordinary spectrum
    of A = S⁻¹H. A is never formed: each product A·X is H·X followed by a block conjugate-
    gradient solve S·Z = H·X (Hestenes & Stiefel, J. Res. NBS 49, 409 (1952)), every column
    with its own step lengths and stopping test ‖r‖ ≤ tol·‖b‖. S is symmetric positive
    definite with unit diagonal and small off-diagonal overlaps, so CG converges in a few
    to a few tens of iterations and needs no Cholesky factor (whose fill-in grows badly for
    3D cells).

Spectral bounds
    Lanczos on A in the S inner product (A is self-adjoint there: ⟨x, Ay⟩_S = xᵀHy),
    without reorthogonalisation (ghosts only repeat converged extreme values), from a seeded
    random start. The extreme Ritz values lie inside the spectrum; the residual norm
    |β_m y_m| of each extreme Ritz pair (Parlett, The Symmetric Eigenvalue Problem, Sec. 13-2)
    is added outward, and :func:`~valband.kpm.chebyshev.scale_factors` then adds the KPM
    safety margin ε. The recursion checks afterwards that no vector grew (a sign of a
    spectrum outside the scaled interval).
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
import scipy.sparse as sp
from numpy.typing import NDArray

from valband.errors import CalculationError, SettingsError
from valband.kpm import _kernels as K

__all__ = ["Operator", "lanczos_bounds"]

_BACKENDS = ("numba", "scipy")


@dataclass
class Operator:
    """A = S⁻¹H (or H) acting on (n, m) blocks; counts products and CG iterations.

    Parameters
    ----------
    hamiltonian, overlap : CSR matrices (overlap None when orthogonal)
    backend : "numba" (compiled kernels) or "scipy" (reference, ``csr @ dense``)
    cg_tol : relative residual at which CG stops (per column)
    cg_maxiter : CG iterations before :class:`CalculationError`
    """

    hamiltonian: sp.csr_matrix
    overlap: sp.csr_matrix | None = None
    backend: str = "numba"
    cg_tol: float = 1e-10
    cg_maxiter: int = 500
    stats: dict = field(default_factory=lambda: {"h_products": 0, "cg_iterations": 0,
                                                 "cg_max_iterations": 0})

    def __post_init__(self) -> None:
        if self.backend not in _BACKENDS:
            raise SettingsError(f"KPM backend {self.backend!r}: accepted {', '.join(_BACKENDS)}")
        self._h = K._csr_parts(self.hamiltonian)
        self._s = None if self.overlap is None else K._csr_parts(self.overlap)

    @property
    def n(self) -> int:
        """Dimension."""
        return self.hamiltonian.shape[0]

    @property
    def orthogonal(self) -> bool:
        """True when S = 1."""
        return self.overlap is None

    # ----------------------------------------------------------------- products
    def h_times(self, x: NDArray[np.float64]) -> NDArray[np.float64]:
        """H·X."""
        self.stats["h_products"] += x.shape[1]
        if self.backend == "numba":
            return K.csr_matmat(self._h, x)
        return K.csr_matmat_reference(self.hamiltonian, x)

    def s_times(self, x: NDArray[np.float64]) -> NDArray[np.float64]:
        """S·X (X itself when orthogonal)."""
        if self.overlap is None:
            return x
        if self.backend == "numba":
            return K.csr_matmat(self._s, x)
        return K.csr_matmat_reference(self.overlap, x)

    def s_solve(self, b: NDArray[np.float64]) -> NDArray[np.float64]:
        """S⁻¹·B by block conjugate gradients (B itself when orthogonal)."""
        if self.overlap is None:
            return b
        x = np.zeros_like(b)
        r = b.copy()
        p = r.copy()
        rr = np.einsum("ij,ij->j", r, r)
        target = (self.cg_tol ** 2) * np.maximum(rr, 1e-300)
        active = rr > target
        it = 0
        while np.any(active):
            if it >= self.cg_maxiter:
                raise CalculationError(
                    f"conjugate gradients on the overlap matrix did not reach the relative "
                    f"residual {self.cg_tol:g} in {self.cg_maxiter} iterations: S is close to "
                    "singular (overlap integrals too large for this structure?)"
                )
            q = self.s_times(p)
            pq = np.einsum("ij,ij->j", p, q)
            if np.any(pq[active] <= 0):
                raise CalculationError(
                    "the overlap matrix S(Γ) is not positive definite: the overlap integrals "
                    "of the parameter set are too large for this structure (atoms too close?)"
                )
            alpha = np.where(active, rr / np.where(active, pq, 1.0), 0.0)
            x += alpha * p
            r -= alpha * q
            rr_new = np.einsum("ij,ij->j", r, r)
            beta = np.where(active, rr_new / np.where(active, rr, 1.0), 0.0)
            p = r + beta * p
            rr = np.where(active, rr_new, rr)
            active = active & (rr > target)
            it += 1
        self.stats["cg_iterations"] += it
        self.stats["cg_max_iterations"] = max(self.stats["cg_max_iterations"], it)
        return x

    def apply(self, x: NDArray[np.float64]) -> NDArray[np.float64]:
        """A·X = S⁻¹H·X."""
        return self.s_solve(self.h_times(x))

    def step(self, alpha: float, beta: float, x, prev) -> NDArray[np.float64]:
        """In place on ``prev``: 2(αA + β)x − prev (one Chebyshev step); returns it."""
        if self.overlap is None:
            self.stats["h_products"] += x.shape[1]
            if self.backend == "numba":
                return K.chebyshev_step(self._h, alpha, beta, x, prev)
            prev[...] = K.chebyshev_step_reference(self.hamiltonian, alpha, beta, x, prev)
            return prev
        ax = self.apply(x)
        prev *= -1.0
        prev += 2.0 * (alpha * ax + beta * x)
        return prev


def lanczos_bounds(op: Operator, steps: int = 40, seed: int = 0) -> dict:
    """Lowest and highest eigenvalue of A (eV) with outward residual padding.

    Parameters
    ----------
    op : Operator
    steps : Lanczos steps (fewer if the Krylov space is exhausted)
    seed : seed of the random start vector (recorded by the caller)

    Returns
    -------
    dict
        ``emin``, ``emax`` (padded by the residuals), ``ritz_min``, ``ritz_max``,
        ``residual_min``, ``residual_max`` (eV) and ``steps`` taken.
    """
    n = op.n
    rng = np.random.default_rng(seed)
    q = rng.standard_normal((n, 1))
    q /= np.sqrt(float(q[:, 0] @ op.s_times(q)[:, 0]))
    q_prev = np.zeros_like(q)
    alphas, betas = [], []
    beta = 0.0
    m = min(int(steps), n)
    for _ in range(m):
        hq = op.h_times(q)
        a = float(q[:, 0] @ hq[:, 0])
        w = op.s_solve(hq) - a * q - beta * q_prev
        sw = op.s_times(w)
        beta_new = float(np.sqrt(max(float(w[:, 0] @ sw[:, 0]), 0.0)))
        alphas.append(a)
        betas.append(beta_new)
        scale = max(abs(a), 1.0)
        if beta_new <= 1e-12 * scale:
            break
        q_prev, q, beta = q, w / beta_new, beta_new
    k = len(alphas)
    t = np.diag(alphas) + np.diag(betas[:-1], 1) + np.diag(betas[:-1], -1)
    theta, y = np.linalg.eigh(t)
    res = np.abs(betas[-1] * y[-1, :])
    return {
        "emin": float(theta[0] - res[0]),
        "emax": float(theta[-1] + res[-1]),
        "ritz_min": float(theta[0]),
        "ritz_max": float(theta[-1]),
        "residual_min": float(res[0]),
        "residual_max": float(res[-1]),
        "steps": k,
        "seed": int(seed),
    }
