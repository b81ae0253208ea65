"""One s orbital with nearest-neighbour hopping on the cubic lattices: closed-form bands.

Source: the textbook tight-binding s band, Ashcroft & Mermin, Solid State Physics (1976),
ch. 10 (closed forms written from memory; each is a short exact sum of cosines over the
nearest-neighbour vectors, so the tolerance is round-off): with ssσ = t and onsite ε_s,
sc  ε = ε_s + 2t(cos k_x a + cos k_y a + cos k_z a)
bcc ε = ε_s + 8t cos(k_x a/2) cos(k_y a/2) cos(k_z a/2)
fcc ε = ε_s + 4t[cos(k_x a/2)cos(k_y a/2) + cos(k_y a/2)cos(k_z a/2) + cos(k_z a/2)cos(k_x a/2)]
"""

import numpy as np
import pytest

from valband.structure import build_structure
from valband.tb import build_model

from .toy_params import ToyElement, ToyParams, constant, integrals

A = 3.1  # Å
T = -0.83  # eV, ssσ
EPS_S = 0.37  # eV


def _closed_form(lattice, k):
    kx, ky, kz = (k * A).T
    if lattice == "sc":
        return EPS_S + 2 * T * (np.cos(kx) + np.cos(ky) + np.cos(kz))
    cx, cy, cz = np.cos(kx / 2), np.cos(ky / 2), np.cos(kz / 2)
    if lattice == "bcc":
        return EPS_S + 8 * T * cx * cy * cz
    return EPS_S + 4 * T * (cx * cy + cy * cz + cz * cx)


# cutoff between the first and second neighbour shells (in units of a):
# sc 1 | √2, bcc √3/2 | 1, fcc 1/√2 | 1
CUTOFF = {"sc": 1.2, "bcc": 0.93, "fcc": 0.85}
COORDINATION = {"sc": 6, "bcc": 8, "fcc": 12}


@pytest.mark.parametrize("lattice", ["sc", "bcc", "fcc"])
def test_nearest_neighbour_s_band(lattice, rng):
    st = build_structure(f"Cu {lattice} {A}")
    params = ToyParams(
        elements={"Cu": ToyElement(("s",), {"s": EPS_S}, 1.0)},
        hoppings={("Cu", "Cu"): constant(integrals(sss=T))},
        cutoffs={("Cu", "Cu"): CUTOFF[lattice] * A},
    )
    model = build_model(st, params)
    assert model.n_orbitals == 1
    assert 2 * model.n_bonds == COORDINATION[lattice]  # half of the bonds are stored
    kfrac = rng.uniform(-1, 1, (200, 3))
    H = model.hamiltonian(kfrac)
    kcart = kfrac @ st.reciprocal_cell
    np.testing.assert_allclose(H[:, 0, 0].real, _closed_form(lattice, kcart), atol=1e-12)
    np.testing.assert_allclose(H[:, 0, 0].imag, 0.0, atol=1e-12)
