"""Configuration averages: seeds, normalisation, spread, the real Γ-point solver."""

from __future__ import annotations

import numpy as np
import pytest

from valband.alloy import average_dos, configuration_average
from valband.alloy.averaging import _RealAtGamma
from valband.structure import random_alloy
from valband.structure.alloys import derive_seeds
from valband.tb import build_model
from valband.workflows import DOSSettings, compute_dos

S = DOSSettings(mesh=2, width=0.15, step=0.02)


def test_seeds_recorded_and_reproducible(harrison, fcc):
    a = configuration_average(fcc, {"Cu": 0.75, "Pd": 0.25}, harrison, 2, n_configs=3, seed=42,
                              settings=S)
    b = configuration_average(fcc, {"Cu": 0.75, "Pd": 0.25}, harrison, 2, n_configs=3, seed=42,
                              settings=S)
    assert list(a.seeds) == derive_seeds(42, 3)
    assert a.rows == b.rows
    assert a.to_dict()["master_seed"] == 42
    # each row is the direct calculation of the configuration its seed rebuilds
    st = random_alloy(fcc, {"Cu": 0.75, "Pd": 0.25}, 2, seed=a.seeds[1])
    ef = compute_dos(build_model(st, harrison), S).fermi_level
    assert a.rows[1]["fermi_level_eV"] == pytest.approx(ef, abs=1e-12)
    assert a.rows[1]["counts"] == {"Cu": 6, "Pd": 2}


def test_mean_is_per_site_and_spread_is_sample_std(harrison, fcc):
    avg = configuration_average(fcc, {"Cu": 0.5, "Pd": 0.5}, harrison, 2, n_configs=3, seed=1,
                                settings=S)
    mean = avg.mean
    # per lattice site: 18 states, 10.5 electrons below E_F (Gaussian count, within 0.01)
    assert np.trapezoid(mean.total, mean.energies) == pytest.approx(18.0, abs=1e-3)
    below = mean.energies <= 0
    assert np.trapezoid(mean.total[below], mean.energies[below]) == pytest.approx(10.5, abs=0.05)
    assert np.abs(mean.channels.sum(axis=0) - mean.total).max() < 1e-10
    vals = [r["descriptors"]["elements"]["Pd"]["centre"] for r in avg.rows]
    st = avg.statistics["elements"]["Pd"]["centre"]
    assert st["mean"] == pytest.approx(np.mean(vals)) and st["std"] == pytest.approx(
        np.std(vals, ddof=1))
    assert st["std"] > 0  # different configurations differ


def test_real_gamma_solver_equals_complex(harrison, fcc):
    st = random_alloy(fcc, {"Cu": 0.5, "Pd": 0.5}, 2, seed=3)
    model = build_model(st, harrison)
    s = DOSSettings(mesh=1, width=0.2)
    a = compute_dos(model, s)
    b = compute_dos(_RealAtGamma(model), s)
    assert a.fermi_level == pytest.approx(b.fermi_level, abs=1e-10)
    assert np.abs(a.channels - b.channels).max() < 1e-9


def test_average_dos_needs_results():
    from valband.errors import InputError

    with pytest.raises(InputError, match="no DOS results"):
        average_dos([])
