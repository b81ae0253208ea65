"""Radial solver on the bare Coulomb potential V = −Z/r.

sources: textbook closed forms — Schrödinger ε_n = −Z²/(2n²) (any l); Dirac
E_{nκ} = c²{[1 + (Zα/(n − |κ| + √(κ² − Z²α²)))²]^{-1/2} − 1} (e.g. Bethe & Salpeter, Quantum
Mechanics of One- and Two-Electron Atoms, §14). What is compared for the scalar-relativistic
solver: for l = 0 the Koelling–Harmon equation without spin–orbit is the Dirac equation for
κ = −1 (the dropped term is ∝ κ + 1), so s levels equal Dirac s₁/₂ exactly; for l > 0 it keeps
only the j-averaged (2j+1-weighted) relativistic shift, exact to first order in (Zα)², so the
shift agrees with the weighted Dirac average up to a fraction O((Zα)²).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from valband.atom.grid import make_grid
from valband.atom.radial import ALPHA, shoot_reference, solve_bound_state
from valband.errors import CalculationError, SettingsError

C = 1.0 / ALPHA


def dirac(z: float, n: int, kappa: int) -> float:
    za = z * ALPHA
    k = abs(kappa)
    return C * C * (1.0 / math.sqrt(1.0 + (za / (n - k + math.sqrt(k * k - za * za))) ** 2) - 1.0)


@pytest.mark.parametrize("z", [1, 10])
def test_atom_hydrogenic_schroedinger_levels(z):
    grid = make_grid(z, r_max=200.0 if z == 1 else 60.0)
    v = -z / grid.r
    for n in range(1, 5):
        for l in range(n):  # noqa: E741
            st = solve_bound_state(grid, v, n, l)
            assert st.energy == pytest.approx(-z * z / (2.0 * n * n), abs=1e-9), (n, l)
            assert grid.integrate(st.u**2) == pytest.approx(1.0, abs=1e-12)
            # n − l − 1 nodes (common practice: node counting selects the state)
            core = st.u[np.abs(st.u) > 1e-8 * np.max(np.abs(st.u))]
            assert np.count_nonzero(core[:-1] * core[1:] < 0) == n - l - 1


def test_atom_hydrogenic_heavy_relative_accuracy():
    z = 79
    grid = make_grid(z)
    for n, l in [(1, 0), (2, 1), (3, 2), (4, 3), (4, 0)]:  # noqa: E741
        st = solve_bound_state(grid, -z / grid.r, n, l)
        assert st.energy == pytest.approx(-z * z / (2.0 * n * n), rel=1e-10)


def test_atom_hydrogenic_1s_wavefunction_closed_form():
    # textbook: u_1s = 2 Z^{3/2} r e^{−Zr}, outer lobe positive
    z = 3
    grid = make_grid(z)
    st = solve_bound_state(grid, -z / grid.r, 1, 0)
    exact = 2.0 * z**1.5 * grid.r * np.exp(-z * grid.r)
    assert np.max(np.abs(st.u - exact)) < 1e-8
    assert np.max(np.abs(st.du - 2.0 * z**1.5 * (1 - z * grid.r) * np.exp(-z * grid.r))) < 1e-6


@pytest.mark.parametrize("n", [2, 3, 4])
def test_atom_outermost_lobe_positive(n):
    # convention of this package (METHODS.md: fix the outer lobe positive)
    z = 6
    grid = make_grid(z)
    for l in range(n):  # noqa: E741
        st = solve_bound_state(grid, -z / grid.r, n, l, relativity="scalar")
        i = np.argmax(np.abs(st.u) * (grid.r > 0.5 * n * n / z))
        big = np.abs(st.u) > 1e-6 * np.max(np.abs(st.u))
        last = np.nonzero(big)[0][-1]
        assert st.u[last] > 0 and st.u[i] > 0


@pytest.mark.parametrize("z", [1, 50, 79, 92])
def test_atom_scalar_relativistic_s_levels_equal_dirac(z):
    grid = make_grid(z)
    v = -z / grid.r
    for n in (1, 2, 3):
        st = solve_bound_state(grid, v, n, 0, relativity="scalar")
        assert st.energy == pytest.approx(dirac(z, n, -1), rel=1e-10, abs=1e-10), n


@pytest.mark.parametrize("z", [10, 30, 50])
def test_atom_scalar_relativistic_p_shift_is_j_average(z):
    grid = make_grid(z)
    v = -z / grid.r
    n = 2
    avg = (2 * dirac(z, n, 1) + 4 * dirac(z, n, -2)) / 6.0
    shift_dirac = avg + z * z / (2.0 * n * n)
    st = solve_bound_state(grid, v, n, 1, relativity="scalar")
    shift_sr = st.energy + z * z / (2.0 * n * n)
    assert shift_sr < 0 and shift_dirac < 0
    # first-order agreement: relative difference of the shifts bounded by (Zα)²
    assert abs(shift_sr - shift_dirac) / abs(shift_dirac) < (z * ALPHA) ** 2


def test_atom_reference_kernel_gives_same_eigenvalue():
    # the plain reference of the shooting kernel drives the same search to the same level
    z = 8
    grid = make_grid(z, h=0.01)
    a = solve_bound_state(grid, -z / grid.r, 3, 1, relativity="scalar")
    b = solve_bound_state(grid, -z / grid.r, 3, 1, relativity="scalar", kernel=shoot_reference)
    assert a.energy == pytest.approx(b.energy, abs=1e-11)


def test_atom_solver_rejects_bad_quantum_numbers_and_unbound_levels():
    grid = make_grid(1)
    with pytest.raises(SettingsError, match="l < n"):
        solve_bound_state(grid, -1 / grid.r, 2, 2)
    with pytest.raises(SettingsError, match="relativity"):
        solve_bound_state(grid, -1 / grid.r, 1, 0, relativity="dirac")
    # a purely repulsive potential has no bound state
    with pytest.raises(CalculationError, match="no bound state"):
        solve_bound_state(grid, np.exp(-grid.r), 1, 0)
