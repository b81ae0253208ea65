"""Angular-momentum matrices in valband's real orbitals, L·S and the j projectors."""

from __future__ import annotations

import numpy as np
import pytest

from valband.errors import SettingsError
from valband.spin.angular import (
    PAULI,
    j_projectors,
    j_values,
    l_dot_s,
    orbital_angular_momentum,
)

# The real orbitals of Slater & Koster (Phys. Rev. 94, 1498 (1954)) as functions of (x, y, z),
# written independently of the quadratic-form derivation in valband.spin.angular.
_S3 = np.sqrt(3.0)
ORBITAL_FUNCTIONS = {
    1: [lambda x, y, z: x, lambda x, y, z: y, lambda x, y, z: z],
    2: [lambda x, y, z: _S3 * x * y, lambda x, y, z: _S3 * y * z, lambda x, y, z: _S3 * z * x,
        lambda x, y, z: _S3 / 2 * (x * x - y * y),
        lambda x, y, z: (3 * z * z - (x * x + y * y + z * z)) / 2],
}


def _numerical_l(l, rng):  # noqa: E741
    """L_k = −i (r × ∇)_k applied by central differences to each real orbital, then expanded
    back on the orbitals by least squares at random points (an independent route)."""
    funcs = ORBITAL_FUNCTIONS[l]
    pts = rng.normal(size=(60, 3))
    h = 1e-4
    basis = np.array([[f(*p) for f in funcs] for p in pts])  # (points, orbitals)
    out = np.empty((3, len(funcs), len(funcs)), dtype=complex)
    for n, f in enumerate(funcs):
        grad = np.empty((len(pts), 3))
        for a in range(3):
            e = np.zeros(3)
            e[a] = h
            grad[:, a] = [(f(*(p + e)) - f(*(p - e))) / (2 * h) for p in pts]
        rxg = np.cross(pts, grad)  # (r × ∇f)
        for k in range(3):
            coef, *_ = np.linalg.lstsq(basis, -1j * rxg[:, k], rcond=None)
            out[k, :, n] = coef
    return out


@pytest.mark.parametrize("l", [1, 2])
def test_matches_numerical_rotation_generator(l, rng):  # noqa: E741
    # Two independent routes to ⟨m|L_k|n⟩: the commutator formula on quadratic forms and finite
    # differences of −i r × ∇ on the orbital functions (analytic: L = −i r × ∇ in units of ħ).
    np.testing.assert_allclose(orbital_angular_momentum(l), _numerical_l(l, rng), atol=1e-6)


@pytest.mark.parametrize("l", [1, 2])
def test_commutators_and_casimir(l):  # noqa: E741
    # Textbook angular-momentum algebra: [L_x, L_y] = i L_z (cyclic), L² = l(l+1), L_z has the
    # eigenvalues −l … l, every L_k is Hermitian and — in real orbitals — purely imaginary.
    L = orbital_angular_momentum(l)
    for a, b, c in ((0, 1, 2), (1, 2, 0), (2, 0, 1)):
        np.testing.assert_allclose(L[a] @ L[b] - L[b] @ L[a], 1j * L[c], atol=1e-13)
    np.testing.assert_allclose(sum(L[k] @ L[k] for k in range(3)), l * (l + 1) * np.eye(2 * l + 1),
                               atol=1e-13)
    np.testing.assert_allclose(np.linalg.eigvalsh(L[2]), np.arange(-l, l + 1), atol=1e-13)
    for k in range(3):
        np.testing.assert_allclose(L[k], L[k].conj().T, atol=0)
        assert np.abs(L[k].real).max() == 0.0


def test_p_matrix_is_levi_civita():
    # ⟨p_a|L_k|p_b⟩ = −i ε_kab (textbook, e.g. L_z p_x = i p_y).
    Lz = orbital_angular_momentum(1)[2]
    assert Lz[1, 0] == pytest.approx(1j) and Lz[0, 1] == pytest.approx(-1j)


@pytest.mark.parametrize("l", [1, 2])
def test_spin_orbit_levels_and_projectors(l):  # noqa: E741
    # Textbook: L·S = [j(j+1) − l(l+1) − 3/4]/2, i.e. l/2 on 2l+2 states (j = l+½) and
    # −(l+1)/2 on 2l states (j = l−½); P_j are orthogonal projectors with J² = j(j+1) on them.
    ev = np.linalg.eigvalsh(l_dot_s(l))
    np.testing.assert_allclose(ev[: 2 * l], -(l + 1) / 2, atol=1e-13)
    np.testing.assert_allclose(ev[2 * l:], l / 2, atol=1e-13)
    L = orbital_angular_momentum(l)
    n = 2 * l + 1
    J = [np.kron(np.eye(2), L[k]) + np.kron(PAULI[k] / 2, np.eye(n)) for k in range(3)]
    J2 = sum(Jk @ Jk for Jk in J)
    projs = j_projectors(l)
    assert tuple(projs) == j_values(l)
    np.testing.assert_allclose(sum(projs.values()), np.eye(2 * n), atol=1e-13)
    for j, P in projs.items():
        np.testing.assert_allclose(P @ P, P, atol=1e-13)
        assert np.trace(P).real == pytest.approx(2 * j + 1)
        np.testing.assert_allclose(J2 @ P, float(j * (j + 1)) * P, atol=1e-12)


def test_s_shell_and_bad_l():
    assert np.all(orbital_angular_momentum(0) == 0)
    assert tuple(j_projectors(0)) == j_values(0)
    with pytest.raises(SettingsError, match="accepted 0"):
        orbital_angular_momentum(3)
