"""Two-centre integrals of exact hydrogen 1s orbitals (Z = 1, no confinement, bohr, Hartree).

Source: the LCAO integrals of H2+ with φ = e^{−r}/√π (e.g. P. Atkins & R. Friedman,
Molecular Quantum Mechanics, ch. 8; J. C. Slater, Quantum Theory of Molecules and Solids,
vol. 1; also Szabo & Ostlund's H2+ discussion):
    S(R)        = e^{−R}(1 + R + R²/3)
    ⟨A|−1/r_B|A⟩ = −1/R + e^{−2R}(1 + 1/R)   (Coulomb type)
    ⟨A|−1/r_A|B⟩ = −e^{−R}(1 + R)            (exchange / resonance type)
and so, with T − 1/r_A − 1/r_B and ε_1s = −1/2, H_AB = −S/2 − e^{−R}(1 + R).
"""

from __future__ import annotations

import numpy as np
import pytest

from valband.twocentre import RadialOrbital, TwoCentreSite, bond_frame_elements, bond_grid

R_VALUES = np.array([0.5, 1.0, 2.0, 3.5, 6.0])  # bohr


def _r1s(r):
    return 2.0 * np.exp(-np.asarray(r))


def _coulomb(r):
    return -1.0 / np.asarray(r)


@pytest.fixture(scope="module")
def elements():
    h = TwoCentreSite("H", (RadialOrbital("s", _r1s, -0.5),), _coulomb)
    return bond_frame_elements(h, h, R_VALUES)


def test_overlap(elements):
    exact = np.exp(-R_VALUES) * (1 + R_VALUES + R_VALUES**2 / 3)
    np.testing.assert_allclose(elements.overlap[:, 0], exact, atol=1e-6)


def test_exchange_type_potential_integral(elements):
    # ⟨1s_A|−1/r_A|1s_B⟩ = −e^{−R}(1 + R)
    np.testing.assert_allclose(elements.potential_a[:, 0], -np.exp(-R_VALUES) * (1 + R_VALUES),
                               atol=1e-6)  # fmt: skip
    np.testing.assert_allclose(elements.potential_b[:, 0], elements.potential_a[:, 0], atol=1e-9)


@pytest.mark.parametrize("big_r", list(R_VALUES))
def test_coulomb_type_integral(big_r):
    # ⟨1s_A|−1/r_B|1s_A⟩ = −1/R + e^{−2R}(1 + 1/R), one orbital density in the other's field
    g = bond_grid(big_r)
    got = g.integrate(_r1s(g.r_a) ** 2 * 0.5 * _coulomb(g.r_b))
    assert got == pytest.approx(-1 / big_r + np.exp(-2 * big_r) * (1 + 1 / big_r), abs=1e-6)


def test_hamiltonian_both_routes(elements):
    # H_AB = ε S + ⟨A|−1/r_A|B⟩ = −S/2 − e^{−R}(1 + R) through either atom's eigen-equation
    s = np.exp(-R_VALUES) * (1 + R_VALUES + R_VALUES**2 / 3)
    exact = -0.5 * s - np.exp(-R_VALUES) * (1 + R_VALUES)
    for h in (elements.hamiltonian, elements.hamiltonian_a, elements.hamiltonian_b):
        np.testing.assert_allclose(h[:, 0], exact, atol=1e-6)


def test_tabulated_orbital_path():
    # the same integrals with R_1s and −1/r sampled on the atom engine's log grid and
    # interpolated (LogGridFunction), the path every confined atom takes
    from valband.atom.grid import make_grid
    from valband.twocentre.radial import LogGridFunction

    r = make_grid(1.0, r_max=40.0).r
    orb = RadialOrbital("s", LogGridFunction(r, _r1s(r), power=0), -0.5)
    h = TwoCentreSite("H", (orb,), LogGridFunction(r, _coulomb(r), power=-1))
    el = bond_frame_elements(h, h, R_VALUES)
    s = np.exp(-R_VALUES) * (1 + R_VALUES + R_VALUES**2 / 3)
    np.testing.assert_allclose(el.overlap[:, 0], s, atol=1e-6)
    np.testing.assert_allclose(el.potential_a[:, 0], -np.exp(-R_VALUES) * (1 + R_VALUES), atol=1e-6)
