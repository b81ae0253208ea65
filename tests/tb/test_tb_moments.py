"""Second moment of the d band of fcc with nearest-neighbour d–d hopping.

Source: moments theorem (F. Cyrot-Lackmann, J. Phys. Chem. Solids 29, 1235 (1968), citation
from memory;
F. Ducastelle, Order and Phase Stability in Alloys (1991)): μ₂ of orbital iα is
Σ_{j≠i, β} |H_{iα,jβ}|². With 12 nearest neighbours and the bond-frame matrix diag(ddσ, ddπ,
ddπ, ddδ, ddδ) (rotation leaves the Frobenius norm of each block unchanged), the average over the
five d orbitals is (12/5)(ddσ² + 2ddπ² + 2ddδ²). In k-space μ₂ = ⟨(H(k)²)_ii⟩_k − ε_d², exact for
a complete Monkhorst–Pack mesh (Monkhorst & Pack, Phys. Rev. B 13, 5188 (1976)) fine enough that
no two bond vectors differ by a mesh period.
"""

import numpy as np
import pytest

from valband.tb import build_model

from .models import fcc_cu
from .toy_params import ToyElement, ToyParams, constant, integrals

DDS, DDP, DDD, EPS_D = -1.13, 0.61, -0.087, -2.4  # eV


def _monkhorst_pack(n):
    u = (2 * np.arange(1, n + 1) - n - 1) / (2 * n)
    return np.array(np.meshgrid(u, u, u, indexing="ij")).reshape(3, -1).T


@pytest.fixture
def d_model():
    params = ToyParams(
        elements={"Cu": ToyElement(("d",), {"d": EPS_D}, 10.0)},
        hoppings={("Cu", "Cu"): constant(integrals(dds=DDS, ddp=DDP, ddd=DDD))},
        cutoffs={("Cu", "Cu"): 3.0},  # between 2.55 Å (1st) and 3.61 Å (2nd shell)
    )
    return build_model(fcc_cu(), params)


@pytest.mark.parametrize("n", [3, 4, 5])
def test_second_moment_from_k_mesh(d_model, n):
    expected = 12 / 5 * (DDS**2 + 2 * DDP**2 + 2 * DDD**2)
    H = d_model.hamiltonian(_monkhorst_pack(n))
    H2 = np.einsum("kij,kji->ki", H, H).real  # (H(k)²)_ii
    mu2 = H2.mean(axis=0) - EPS_D**2
    assert mu2.mean() == pytest.approx(expected, rel=1e-12)
    # first moment: the k-average of H_ii(k) is the onsite level (no closed path of length 1)
    assert np.einsum("kii->ki", H).real.mean() == pytest.approx(EPS_D, abs=1e-12)


def test_second_moment_from_real_space(d_model):
    expected = 12 / 5 * (DDS**2 + 2 * DDP**2 + 2 * DDD**2)
    rs = d_model.real_space_hamiltonian()
    assert len(rs.first) == 12
    np.testing.assert_allclose(np.linalg.norm(rs.vectors, axis=1), 3.61 / np.sqrt(2), rtol=1e-12)
    mu2 = sum(np.sum(b**2, axis=1) for b in rs.hamiltonian)  # per orbital
    assert mu2.mean() == pytest.approx(expected, rel=1e-12)
