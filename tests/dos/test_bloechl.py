"""Blöchl's correction to the linear tetrahedron method.

source: Blöchl, Jepsen, Andersen, Phys. Rev. B 49, 16223 (1994), Sec. IV — the correction
δw_j = Σ_T D_T(ε_F)/40 Σ_i (ε_i − ε_j) sums to zero over each tetrahedron's corners (so the
electron number is conserved) and removes most of the error of the band energy at fixed
electron number, which for the linear method falls like h² (textbook error of linear
interpolation).
"""

from __future__ import annotations

import numpy as np
import pytest

from tests.dos.models import free_electron, mesh_fractions, reciprocal
from valband.dos import find_fermi_level, tetrahedron_count, tetrahedron_integrate

K_F = 1.5  # Fermi sphere well inside the first zone of the a = 1 Å simple-cubic lattice
N_EXACT = (4 * np.pi / 3) * K_F**3 / (2 * np.pi) ** 3  # states per spin per cell
E_BAND_EXACT = (4 * np.pi / 5) * K_F**5 / (2 * np.pi) ** 3  # ∫ k² over the sphere / V_BZ


def _problem(n):
    mesh = (n, n, n)
    rc = reciprocal(np.eye(3))
    eig = free_electron(mesh_fractions(mesh), rc)[:, None]
    return mesh, rc, np.arange(len(eig)), eig


@pytest.mark.parametrize("energy", [0.7, 2.25, 5.0])
def test_correction_conserves_the_electron_count(energy):
    mesh, rc, ir_map, eig = _problem(10)
    lin = tetrahedron_count(mesh, rc, ir_map, eig, energy, bloechl=False)
    cor = tetrahedron_count(mesh, rc, ir_map, eig, energy, bloechl=True)
    assert cor == pytest.approx(lin, abs=1e-13)


def test_corrected_band_energy_converges_faster():
    errors = {}
    for n in (8, 16, 32):
        mesh, rc, ir_map, eig = _problem(n)
        e_f = find_fermi_level(
            lambda e: tetrahedron_count(mesh, rc, ir_map, eig, e, degeneracy=1.0),
            N_EXACT, 0.0, float(eig.max()), 1.0, tol=1e-12,
        )
        errors[n] = [
            abs(tetrahedron_integrate(mesh, rc, ir_map, eig, e_f, eig, 1.0, b) - E_BAND_EXACT)
            for b in (False, True)
        ]
    lin = np.array([errors[n][0] for n in (8, 16, 32)])
    cor = np.array([errors[n][1] for n in (8, 16, 32)])
    assert np.all(np.diff(lin) < 0) and np.all(np.diff(cor) < 0)
    assert lin[1] / lin[2] == pytest.approx(4.0, rel=0.15)  # linear method: error ∝ h²
    assert np.all(cor < lin / 20)  # much smaller with the correction ...
    assert cor[2] / lin[2] < cor[0] / lin[0]  # ... and falling faster with the mesh
