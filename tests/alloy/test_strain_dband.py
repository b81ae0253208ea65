"""Strain moves the d-band centre: compressive down, tensile up (Mavrikakis, Hammer, Nørskov,
Phys. Rev. Lett. 81, 2819 (1998)); the bond integrals follow their distance laws."""

from __future__ import annotations

import pytest

from valband.params import load_parameter_set
from valband.structure import apply_strain, build_structure, load_structure
from valband.tb import build_model
from valband.workflows import DOSSettings, compute_dos, describe


def _centre(structure, params) -> float:
    return describe(compute_dos(build_model(structure, params), DOSSettings(mesh=10)),
                    "d").cell.centre


@pytest.mark.parametrize("element", ["Pt", "Cu"])
def test_uniform_strain_moves_the_d_band_centre_with_the_published_sign(element):
    params = load_parameter_set("harrison-universal")
    bulk = build_structure(f"{element} fcc")
    c = {eps: _centre(apply_strain(bulk, eps), params) for eps in (-0.02, 0.0, 0.02)}
    assert c[-0.02] < c[0.0] < c[0.02]
    # slope of order 0.05–0.2 eV per 1 % (the paper's Ru(0001) and DFT trends; measured here
    # Pt 0.10, Cu 0.04 eV per %, reported in the closing note)
    slope = (c[0.02] - c[-0.02]) / 4.0
    assert 0.02 < slope < 0.3


def test_spec_strain_equals_apply_strain():
    params = load_parameter_set("harrison-universal")
    a = _centre(load_structure("Pt fcc strain=0.01"), params)
    b = _centre(apply_strain(build_structure("Pt fcc"), 0.01), params)
    assert a == pytest.approx(b, abs=1e-9)
