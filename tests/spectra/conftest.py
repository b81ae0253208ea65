"""Shared fixtures of the spectra tests: a real Cu DOS on a small mesh (built once)."""

from __future__ import annotations

import pytest


@pytest.fixture(scope="session")
def cu_dos():
    """Cu fcc, harrison-universal, 10³ mesh, Gaussian 0.1 eV, step 0.02 eV."""
    from valband.params import load_parameter_set
    from valband.structure import build_structure
    from valband.tb import build_model
    from valband.workflows import DOSSettings, compute_dos

    model = build_model(build_structure("Cu fcc"), load_parameter_set("harrison-universal"))
    return compute_dos(model, DOSSettings(mesh=10, step=0.02))
