"""Stochastic trace: seeds, sum rules, the 1/√R error law, and use by describe/spectra."""

from __future__ import annotations

import numpy as np
import pytest

from valband.errors import SettingsError
from valband.kpm import KPMSettings, build_sparse, compute_kpm_dos, describe_kpm
from valband.kpm.moments import random_phase_columns


@pytest.fixture(scope="module")
def alloy64(alloy8, harrison):
    """64 sites, 576 orbitals (the 8-site cell repeated 2×2×2)."""
    return build_sparse(alloy8.repeat((2, 2, 2)), harrison)


def test_seed_reproduces_and_is_recorded(alloy64):
    s = KPMSettings(resolution=0.3, trace="stochastic", n_vectors=3, seed=123)
    a, b = compute_kpm_dos(alloy64, s), compute_kpm_dos(alloy64, s)
    np.testing.assert_array_equal(a.channels, b.channels)
    assert a.settings["seed"] == 123 and a.settings["trace"] == "stochastic"
    c = compute_kpm_dos(alloy64, KPMSettings(resolution=0.3, trace="stochastic", n_vectors=3,
                                             seed=124))
    assert np.max(np.abs(c.total - a.total)) > 1e-3 * a.total.max()


def test_vectors_do_not_depend_on_block_size():
    whole = random_phase_columns(50, 7, 0, 4)
    parts = np.hstack([random_phase_columns(50, 7, 0, 1), random_phase_columns(50, 7, 1, 3)])
    np.testing.assert_array_equal(whole, parts)
    # random phases: |r_i| = 1 exactly (cos² + sin²)
    np.testing.assert_allclose(whole[:, 0::2] ** 2 + whole[:, 1::2] ** 2, 1.0, rtol=1e-15)


def test_stochastic_sum_rule_and_error_law(alloy64):
    n = alloy64.n_orbitals
    exact = compute_kpm_dos(alloy64, KPMSettings(n_moments=300, trace="exact", step=0.02))
    errs = {}
    for r in (2, 32):
        st = compute_kpm_dos(alloy64, KPMSettings(n_moments=300, trace="stochastic",
                                                  n_vectors=r, seed=5, step=0.02))
        # random-phase vectors keep μ_0 = Tr 1 exactly, so ∫ DOS = 2 n_orb whatever the noise
        assert np.trapezoid(st.total, st.energies) == pytest.approx(2 * n, rel=2e-3)
        lo = max(st.energies[0] + st.fermi_level, exact.energies[0] + exact.fermi_level)
        hi = min(st.energies[-1] + st.fermi_level, exact.energies[-1] + exact.fermi_level)
        e = np.arange(lo, hi, 0.02)  # a common absolute-energy grid
        got = np.interp(e, st.energies + st.fermi_level, st.total)
        ref = np.interp(e, exact.energies + exact.fermi_level, exact.total)
        errs[r] = np.sqrt(np.mean((got - ref) ** 2)) / ref.max()
        assert st.settings["stochastic_error_peak_rel"] is not None
    # error ∝ 1/√R (WWAF Sec. II.D): 16× the vectors, ~4× smaller; allow a factor 2 of noise
    assert errs[32] < errs[2] / 2, errs


def test_rules_choose_moments_and_vectors(alloy64):
    dos = compute_kpm_dos(alloy64, KPMSettings(resolution=0.2, accuracy=0.2))
    s = dos.settings
    assert s["jackson_sigma_centre_eV"] <= 0.2
    a = s["scale_a_eV"]
    assert s["n_moments"] == pytest.approx(np.pi * a / 0.2, rel=0.02)
    assert s["trace"] in ("exact", "stochastic")
    if s["trace"] == "stochastic":
        d_c = 16 * 5  # Pd d channel: 16 Pd sites × 5 orbitals
        assert s["n_vectors"] == int(np.ceil(a / (np.sqrt(np.pi) * 0.2 * d_c * 0.2**2)))


def test_spectrum_and_descriptors_take_a_kpm_dos(alloy64):
    from valband.spectra.simulate import simulate_spectrum

    dos = compute_kpm_dos(alloy64, KPMSettings(resolution=0.15, n_vectors=4,
                                               trace="stochastic", seed=2))
    table = describe_kpm(dos, "d", window=(-10.0, 5.0))
    assert set(table.elements) == {"Cu", "Pd"}
    assert -6.0 < table.cell.centre < 0.0  # an occupied d band, below E_F
    spec = simulate_spectrum(dos, 1486.6)
    assert spec.components.shape[0] == len(dos.channel_labels)
    assert np.all(np.isfinite(spec.intensity)) and spec.intensity.max() > 0


def test_bad_settings_are_named(alloy64):
    with pytest.raises(SettingsError, match="trace"):
        compute_kpm_dos(alloy64, KPMSettings(trace="fast"))
    with pytest.raises(SettingsError, match="resolve"):
        compute_kpm_dos(alloy64, KPMSettings(resolve="orbital"))
    with pytest.raises(SettingsError, match="group"):
        compute_kpm_dos(alloy64, KPMSettings(), groups=[[0, 1], [1, 2]])
