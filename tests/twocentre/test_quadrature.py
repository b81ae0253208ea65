"""The two-centre quadrature on integrands with known integrals.

Sources (analytic results):
* Gaussian product theorem: ∫ e^{−a r_A²} e^{−b r_B²} d³r = (π/(a+b))^{3/2} e^{−ab R²/(a+b)}
  (S. F. Boys, Proc. R. Soc. A 200, 542 (1950)).
* Overlap of two hydrogen 1s orbitals (Z = 1, R in bohr): S(R) = e^{−R}(1 + R + R²/3)
  (the H2+ LCAO integrals, e.g. P. Atkins & R. Friedman, Molecular Quantum Mechanics,
  ch. 8; J. C. Slater, Quantum Theory of Molecules and Solids, vol. 1, appendix).
"""

from __future__ import annotations

import numpy as np
import pytest

from valband.twocentre.quadrature import QuadratureSettings, becke_cell, bond_grid


def _gaussian_error(settings: QuadratureSettings, big_r: float) -> float:
    a, b = 1.3, 0.7
    g = bond_grid(big_r, settings)
    got = 2 * np.pi * g.integrate(np.exp(-a * g.r_a**2 - b * g.r_b**2))
    exact = (np.pi / (a + b)) ** 1.5 * np.exp(-a * b * big_r**2 / (a + b))
    return abs(got - exact) / exact


def test_error_falls_as_points_grow():
    # Gaussian product theorem (Boys 1950): exact value known at every R
    ladder = [QuadratureSettings(radial_step=h, n_angular=n)
              for h, n in [(0.25, 12), (0.15, 20), (0.1, 28), (0.06, 48)]]  # fmt: skip
    errors = [max(_gaussian_error(s, r) for r in (0.7, 2.0, 4.5)) for s in ladder]
    assert all(e2 < 0.2 * e1 for e1, e2 in zip(errors, errors[1:], strict=False)), errors
    assert errors[-1] < 1e-6  # the default-like grid reaches the required 1e-6 relative


@pytest.mark.parametrize("big_r", [0.3, 1.0, 2.0, 4.0, 7.0])
def test_hydrogen_1s_overlap(big_r):
    # S(R) = e^{-R}(1 + R + R²/3), textbook H2+ result (Atkins & Friedman; Slater)
    g = bond_grid(big_r)
    r1s_a, r1s_b = 2 * np.exp(-g.r_a), 2 * np.exp(-g.r_b)  # R_1s = 2 e^{-r}, Θ_00² = 1/2
    s = g.integrate(r1s_a * r1s_b * 0.5)
    assert s == pytest.approx(np.exp(-big_r) * (1 + big_r + big_r**2 / 3), abs=1e-6)


def test_partition_of_unity():
    # Becke's cells sum to one everywhere (Becke, J. Chem. Phys. 88, 2547 (1988), eq. 9):
    # the integral of a function that lives on one centre is the same through both cells
    nu = np.linspace(-1, 1, 101)
    np.testing.assert_allclose(becke_cell(nu) + becke_cell(-nu), 1.0, atol=1e-15)
    g = bond_grid(3.0)
    one_centre = 2 * np.pi * g.integrate(np.exp(-2 * g.r_a))  # ∫ e^{-2r} d³r = π
    assert one_centre == pytest.approx(np.pi, rel=1e-8)
