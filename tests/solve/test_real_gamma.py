"""A Γ-point chunk of a cell without inversion centres is diagonalised in real arithmetic."""

from __future__ import annotations

import numpy as np

from valband.params import load_parameter_set
from valband.solve import diagonalise
from valband.solve.eigen import _exactly_real, real_gauge
from valband.structure import build_structure, random_alloy
from valband.tb import build_model


def test_gamma_of_an_hcp_alloy_is_real_and_matches_lapack():
    # hcp sites are not inversion centres of their bonds (DEVELOPERS.md, real gauge)
    st = random_alloy(build_structure("Cu hcp 2.6"), {"Cu": 0.5, "Pd": 0.5}, supercell=2,
                      seed=3)
    model = build_model(st, load_parameter_set("harrison-universal"))
    assert real_gauge(model) is None          # no inversion centres: no real gauge
    h, _ = model.hamiltonian_and_overlap(np.zeros((1, 3)))
    assert _exactly_real(h)                   # H(Γ) is real: every Bloch phase is 1
    e, _ = diagonalise(model, np.zeros((1, 3)))
    # reference: LAPACK on the complex matrix as built
    np.testing.assert_allclose(e[0], np.linalg.eigvalsh(h[0]), atol=1e-10)
