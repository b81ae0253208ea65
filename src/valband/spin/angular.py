"""Orbital and spin angular momentum in valband's real orbital basis; L·S and j projectors.

Real orbitals (order of :data:`valband.conventions.SHELL_ORBITALS`, the functions of Slater &
Koster, Phys. Rev. 94, 1498 (1954)): p ∝ x, y, z; d ∝ √3·xy, √3·yz, √3·zx, (√3/2)(x² − y²),
(3z² − r²)/2 (all over r², equal norms on the sphere).

Derivation used here (no table typed in by hand). With L = −i r × ∇ (units of ħ),
L_k = −i ε_kab x_a ∂_b:

* l = 1, f = v·x:      L_k f = w·x with w_a = −i ε_kab v_b, so ⟨p_a|L_k|p_b⟩ = −i ε_kab;
* l = 2, f = xᵀQx (Q symmetric, traceless): L_k f = xᵀQ′x with Q′ = −i [E_k, Q],
  (E_k)_ab = ε_kab.

For harmonic (traceless) quadratic forms the sphere inner product is proportional to the
Frobenius product tr(AB), so with the orthonormal forms Q_xy = (e_x e_yᵀ + e_y e_xᵀ)/√2, …,
Q_{x²−y²} = diag(1, −1, 0)/√2, Q_{z²} = diag(−1, −1, 2)/√6 (positive multiples of the five
real d functions) the matrix is ⟨m|L_k|n⟩ = tr(Q_m · (−i [E_k, Q_n])).

Spin: S = σ/2 (Pauli matrices, basis ↑, ↓). The doubled basis of valband is **spin-major**:
index σ·n + i (all orbitals spin-up, then all spin-down), so a shell's block in that order is
kron(spin, orbital) and L·S = ½ Σ_k kron(σ_k, L_k).

L·S has eigenvalue l/2 on j = l + ½ (2l + 2 states) and −(l + 1)/2 on j = l − ½ (2l states),
so a level splits by (l + ½)·ξ under ξ L·S (textbook; Condon & Shortley 1935). The projectors
are P_{l+½} = (2 L·S + l + 1)/(2l + 1) and P_{l−½} = 1 − P_{l+½}.
"""

from __future__ import annotations

import functools
from fractions import Fraction

import numpy as np
from numpy.typing import NDArray

from valband.errors import SettingsError

__all__ = [
    "PAULI",
    "orbital_angular_momentum",
    "spin_operators",
    "l_dot_s",
    "j_values",
    "j_label",
    "j_projectors",
]

#: Pauli matrices σ_x, σ_y, σ_z in the basis (↑, ↓), shape (3, 2, 2).
PAULI: NDArray[np.complex128] = np.array(
    [[[0, 1], [1, 0]], [[0, -1j], [1j, 0]], [[1, 0], [0, -1]]], dtype=np.complex128
)
PAULI.setflags(write=False)


def _levi_civita() -> NDArray[np.float64]:
    eps = np.zeros((3, 3, 3))
    for (a, b, c), s in {(0, 1, 2): 1, (1, 2, 0): 1, (2, 0, 1): 1,
                         (0, 2, 1): -1, (2, 1, 0): -1, (1, 0, 2): -1}.items():
        eps[a, b, c] = s
    return eps


def _d_forms() -> NDArray[np.float64]:
    """Orthonormal quadratic forms of d_xy, d_yz, d_zx, d_x²−y², d_3z²−r² (Frobenius)."""
    def sym(a: int, b: int) -> NDArray[np.float64]:
        q = np.zeros((3, 3))
        q[a, b] = q[b, a] = 1.0 / np.sqrt(2.0)
        return q

    return np.stack([
        sym(0, 1), sym(1, 2), sym(2, 0),
        np.diag([1.0, -1.0, 0.0]) / np.sqrt(2.0),
        np.diag([-1.0, -1.0, 2.0]) / np.sqrt(6.0),
    ])


@functools.lru_cache(maxsize=None)
def _orbital_l(l: int) -> NDArray[np.complex128]:  # noqa: E741
    eps = _levi_civita()
    if l == 0:
        out = np.zeros((3, 1, 1), dtype=np.complex128)
    elif l == 1:
        out = -1j * eps.astype(np.complex128)  # (L_k)_ab = −i ε_kab
    elif l == 2:
        q = _d_forms()
        out = np.empty((3, 5, 5), dtype=np.complex128)
        for k in range(3):
            e = eps[k]
            for n in range(5):
                moved = -1j * (e @ q[n] - q[n] @ e)
                out[k, :, n] = np.einsum("mab,ba->m", q, moved)
    else:
        raise SettingsError(f"angular momentum l = {l}: accepted 0 (s), 1 (p), 2 (d)")
    out.setflags(write=False)
    return out


def orbital_angular_momentum(l: int) -> NDArray[np.complex128]:  # noqa: E741
    """(L_x, L_y, L_z) in the real orbitals of shell l (units of ħ), shape (3, 2l+1, 2l+1).

    Purely imaginary and Hermitian (real orbitals are their own time reverse).
    """
    return _orbital_l(int(l))


def spin_operators() -> NDArray[np.complex128]:
    """(S_x, S_y, S_z) = σ/2 in the basis (↑, ↓), shape (3, 2, 2), units of ħ."""
    return 0.5 * PAULI


@functools.lru_cache(maxsize=None)
def _l_dot_s(l: int) -> NDArray[np.complex128]:  # noqa: E741
    lm = orbital_angular_momentum(l)
    out = 0.5 * sum(np.kron(PAULI[k], lm[k]) for k in range(3))
    out = np.asarray(out, dtype=np.complex128)
    out.setflags(write=False)
    return out


def l_dot_s(l: int) -> NDArray[np.complex128]:  # noqa: E741
    """L·S of shell l in the spin-major doubled basis, shape (2(2l+1), 2(2l+1)) (ħ²)."""
    return _l_dot_s(int(l))


def j_values(l: int) -> tuple[Fraction, ...]:  # noqa: E741
    """Return the j of shell l, highest first: (l + ½, l − ½), or (½,) for s."""
    half = Fraction(1, 2)
    return (half,) if l == 0 else (l + half, l - half)


def j_label(shell: str, j: Fraction) -> str:
    """Channel label such as ``"d5/2"`` (shell letter, then j as a fraction)."""
    return f"{shell}{j.numerator}/{j.denominator}"


def j_projectors(l: int) -> dict[Fraction, NDArray[np.complex128]]:  # noqa: E741
    """Projectors onto j = l ± ½ in the spin-major doubled basis of shell l."""
    n = 2 * (2 * l + 1)
    if l == 0:
        return {Fraction(1, 2): np.eye(n, dtype=np.complex128)}
    upper = (2.0 * l_dot_s(l) + (l + 1) * np.eye(n)) / (2 * l + 1)
    hi, lo = j_values(l)
    return {hi: upper, lo: np.eye(n) - upper}
