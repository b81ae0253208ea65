"""Band-shape measures (valband.twocentre.shape): level labels, dd shape, target file.

External checks: dimensions of the fcc irreducible representations (Bouckaert, Smoluchowski &
Wigner, Phys. Rev. 50, 58 (1936)): Γ25′ 3, Γ12 2, X5 2, L3 2, the others 1; a pure power law
V ∝ R⁻ⁿ has −d ln|V|/d ln R = n exactly (calculus); bad quantities are refused with the
accepted forms named.
"""

from __future__ import annotations

import numpy as np
import pytest
import scipy.linalg

from valband.errors import InputError
from valband.params import load_parameter_set
from valband.structure import build_structure
from valband.tb import build_model
from valband.twocentre.shape import FCC_POINTS, dd_shape, fcc_levels, load_targets, target_value


@pytest.fixture(scope="module")
def cu():
    m = build_model(build_structure("Cu fcc 3.615"), load_parameter_set("valband-tc2-2026"))
    return m


def _multiplicity(model, point, energy):
    h, s = model.hamiltonian_and_overlap(np.asarray([FCC_POINTS[point]]))
    e = scipy.linalg.eigh(h[0], s[0], eigvals_only=True)
    return int(np.sum(np.abs(e - energy) < 1e-4))


def test_labels_have_the_dimensions_of_their_representations(cu):
    ef = 0.0  # labels and multiplicities do not depend on the zero
    lv = fcc_levels(cu, ef)
    dims = {"G1": ("G", 1), "G25p": ("G", 3), "G12": ("G", 2), "X1": ("X", 1), "X3": ("X", 1),
            "X5": ("X", 2), "X4p": ("X", 1), "L1": ("L", 1), "L3": ("L", 2), "L2p": ("L", 1)}
    for label, (point, dim) in dims.items():
        assert np.isfinite(lv[label]), label
        assert _multiplicity(cu, point, lv[label]) == dim, label
    # order inside the Cu d band (common practice for the noble metals): X1 < X3 < X5 < E_F < X4′
    assert lv["G1"] < lv["X1"] < lv["X3"] < lv["X5"] < lv["X4p"]
    assert lv["G25p"] < lv["G12"]


def test_dd_exponent_of_a_power_law():
    class PowerLaw:  # V_dd(R) = c R^-5 for every dd integral
        def hopping(self, a, b, r):
            from valband.params.model import BOND_INTEGRALS

            r = np.asarray(r, dtype=float)
            v = np.zeros((len(r), len(BOND_INTEGRALS)))
            for name, c in (("dds", -6.0), ("ddp", 4.0), ("ddd", -1.0)):
                v[:, BOND_INTEGRALS.index(name)] = c * r**-5.0
            return v

    dd = dd_shape(PowerLaw(), "X", 2.5)
    assert dd["exponent"] == pytest.approx(5.0, abs=1e-12)
    assert dd["pi_sigma"] == pytest.approx(-2 / 3) and dd["delta_sigma"] == pytest.approx(1 / 6)
    assert dd["dds"] == pytest.approx(-6.0 * 2.5**-5)


def test_target_quantities_and_errors():
    lv = {"X5": -1.4, "X1": -5.1}
    assert target_value("level:X5", lv, None) == -1.4
    assert target_value("spacing:X5-X1", lv, None) == pytest.approx(3.7)
    assert target_value("centre", None, None, -2.6) == -2.6
    assert target_value("dd:exponent", None, {"exponent": 5.0}) == 5.0
    with pytest.raises(InputError, match="accepted"):
        target_value("width", lv, None)
    quantities = {t["quantity"].partition(":")[0] for t in load_targets()["target"]}
    assert quantities <= {"level", "spacing", "centre", "dd"}
