"""The DOS pipeline end to end: sum rules, symmetry, supercells, moments, bad input."""

from __future__ import annotations

import numpy as np
import pytest

from valband.errors import ParameterError, SettingsError
from valband.params import load_parameter_set
from valband.structure import build_structure
from valband.tb import build_model
from valband.workflows import DOSSettings, compute_dos, describe

from .conftest import d_only_fcc_set


def _integral(dos, y):
    return float(np.trapezoid(y, dos.energies))


@pytest.mark.parametrize("method", ["gaussian", "tetrahedron"])
def test_sum_rules(cu_model, method):
    # Sum rules (exact): the DOS integrates to the number of spin-orbitals per cell (2 × 9), the
    # partial DOS add up to the total, and N(E_F) equals the electron count.
    dos = compute_dos(cu_model, DOSSettings(mesh=12, method=method, step=0.005))
    assert _integral(dos, dos.total) == pytest.approx(18.0, rel=2e-3)
    np.testing.assert_allclose(dos.channels.sum(axis=0), dos.total, rtol=1e-9, atol=1e-9)
    n_below = float(np.interp(0.0, dos.energies, dos.integrated()))
    assert n_below == pytest.approx(cu_model.n_electrons, abs=0.03)


def test_lorentzian_sum_rule_up_to_tails(cu_model):
    # A Lorentzian of HWHM γ leaves ~ (2/π)·γ/L of its weight outside a window L away (closed form).
    dos = compute_dos(cu_model, DOSSettings(mesh=8, method="lorentzian", width=0.05, step=0.01))
    span = dos.energies[-1] - dos.energies[0]
    assert _integral(dos, dos.total) == pytest.approx(18.0, rel=4 * 0.05 / span + 1e-3)


def test_moments_theorem_nearest_neighbour_d(tmp_path):
    # Moments theorem (Cyrot-Lackmann 1967; Ducastelle): for fcc with nearest-neighbour d–d
    # hopping only, μ₂ of the local d DOS = (12/5)(ddσ² + 2ddπ² + 2ddδ²). A Gaussian of width σ
    # adds exactly σ² to the second moment.
    dds, ddp, ddd = -0.6, 0.35, -0.07
    model = build_model(build_structure("Cu fcc 3.61"), d_only_fcc_set(dds, ddp, ddd))
    sigma = 0.05
    dos = compute_dos(model, DOSSettings(mesh=10, method="gaussian", width=sigma, step=0.002,
                                         emin=-8, emax=8))
    d = describe(dos, "d").elements["Cu"]
    mu2_expected = 12 / 5 * (dds**2 + 2 * ddp**2 + 2 * ddd**2)
    # centre: the onsite energy (0) sits at d.centre + E_F on the absolute scale
    assert d.centre + dos.fermi_level == pytest.approx(0.0, abs=1e-6)
    assert d.width**2 - sigma**2 == pytest.approx(mu2_expected, rel=1e-4)


def test_supercell_dos_per_atom_equals_primitive(harrison):
    # A 2×2×2 supercell on an 8³ mesh samples exactly the k-points of the primitive 16³ mesh
    # (Monkhorst–Pack points fold onto each other), so the DOS per atom must agree.
    prim = build_model(build_structure("Cu fcc 3.61"), harrison)
    sup = build_model(build_structure("Cu fcc 3.61").repeat((2, 2, 2)), harrison)
    s = dict(method="gaussian", width=0.1, step=0.01, emin=-12.0, emax=6.0)
    d1 = compute_dos(prim, DOSSettings(mesh=16, **s))
    d8 = compute_dos(sup, DOSSettings(mesh=8, **s))
    assert d8.fermi_level == pytest.approx(d1.fermi_level, abs=1e-7)
    np.testing.assert_allclose(d8.total / 8, d1.total, atol=1e-6)
    np.testing.assert_allclose(d8.select(shell="d") / 8, d1.select(shell="d"), atol=1e-6)


def test_symmetry_reduced_projections_equal_full_mesh(cu3pd_model):
    # The three Cu sites of L1₂ Cu3Pd are equivalent; the wedge + orbit average must reproduce
    # the full-mesh per-site partial DOS (exactness of the orbit average, see workflows/dos.py).
    s = dict(mesh=6, method="gaussian", width=0.15, step=0.02, emin=-10.0, emax=5.0)
    sym = compute_dos(cu3pd_model, DOSSettings(**s))
    full = compute_dos(cu3pd_model, DOSSettings(symmetry=False, **s))
    assert sym.settings["mesh"]["n_irreducible"] < full.settings["mesh"]["n_irreducible"]
    assert sym.fermi_level == pytest.approx(full.fermi_level, abs=1e-8)
    np.testing.assert_allclose(sym.channels, full.channels, atol=1e-8)
    cu_sites = sym.sites_of("Cu")
    np.testing.assert_allclose(sym.select(site=cu_sites[0], shell="d"),
                               sym.select(site=cu_sites[2], shell="d"), atol=1e-10)


def test_orbital_resolved_channels_sum_to_shells(cu3pd_model):
    s = dict(mesh=4, width=0.2, step=0.02, emin=-10.0, emax=5.0)
    by_l = compute_dos(cu3pd_model, DOSSettings(symmetry=False, **s))
    by_m = compute_dos(cu3pd_model, DOSSettings(resolve="m", **s))
    assert len(by_m.channel_labels) == cu3pd_model.n_orbitals
    for el in ("Cu", "Pd"):
        np.testing.assert_allclose(by_m.select(element=el, shell="d"),
                                   by_l.select(element=el, shell="d"), atol=1e-9)
    # cubic site symmetry: the three t2g orbitals of Pd (at a cubic site) have equal DOS
    pd = by_m.sites_of("Pd")[0]
    np.testing.assert_allclose(by_m.select(site=pd, orbital="dxy"),
                               by_m.select(site=pd, orbital="dzx"), atol=1e-9)


def test_tetrahedron_and_gaussian_agree_on_a_dense_mesh(cu_model):
    # Two independent integration methods converge to the same band-structure moments.
    g = describe(compute_dos(cu_model, DOSSettings(mesh=24, width=0.05)), "d").elements["Cu"]
    t = describe(compute_dos(cu_model, DOSSettings(mesh=24, method="tetrahedron")), "d").elements["Cu"]
    assert g.centre == pytest.approx(t.centre, abs=0.02)
    assert g.width == pytest.approx(np.sqrt(t.width**2 + 0.05**2), abs=0.02)


def test_nonorthogonal_set_runs_and_conserves_states():
    # Mulliken weights sum to one per state (Mulliken 1955), so the sum rule holds with S ≠ 1.
    model = build_model(build_structure("Cu fcc 3.61"), load_parameter_set("example-nonorthogonal"))
    assert not model.orthogonal
    dos = compute_dos(model, DOSSettings(mesh=8, width=0.1))
    assert float(np.trapezoid(dos.total, dos.energies)) == pytest.approx(2 * model.n_orbitals, rel=2e-3)
    np.testing.assert_allclose(dos.channels.sum(axis=0), dos.total, atol=1e-8)


def test_result_round_trip(cu_model):
    from valband.results import DOSResult

    dos = compute_dos(cu_model, DOSSettings(mesh=4))
    again = DOSResult.from_dict(dos.to_dict())
    np.testing.assert_array_equal(again.channels, dos.channels)
    assert again.channel_labels == dos.channel_labels
    assert again.settings == dos.settings


def test_settings_and_provenance_recorded(cu_model):
    dos = compute_dos(cu_model, DOSSettings(mesh=5, method="tetrahedron"))
    assert dos.settings["mesh"]["mesh"] == [5, 5, 5]
    assert dos.settings["method"] == "tetrahedron"
    assert dos.provenance["parameter_set"]["name"] == "harrison-universal"
    assert dos.provenance["structure"]["space_group"] == "Fm-3m (225)"


# ----------------------------------------------------------------------------- bad input
@pytest.mark.parametrize("n", [-1.0, 19.0, float("nan")])
def test_impossible_electron_count(cu_model, n):
    with pytest.raises(SettingsError, match="electron"):
        compute_dos(cu_model, DOSSettings(mesh=4, n_electrons=n))


@pytest.mark.parametrize("width", [0.0, -0.1, float("nan")])
def test_bad_smearing_width(cu_model, width):
    with pytest.raises(SettingsError, match="width"):
        compute_dos(cu_model, DOSSettings(mesh=4, width=width))


def test_zero_mesh(cu_model):
    with pytest.raises(SettingsError, match="k-mesh"):
        compute_dos(cu_model, DOSSettings(mesh=0))


def test_element_without_parameters(harrison):
    with pytest.raises(ParameterError, match="Zn"):
        build_model(build_structure("Zn fcc 3.9"), harrison)


def test_descriptor_window_recorded(cu_model):
    dos = compute_dos(cu_model, DOSSettings(mesh=6))
    table = describe(dos, "d", window=(-8.0, 2.0))
    assert table.elements["Cu"].window == (-8.0, 2.0)
    assert table.to_dict()["window_eV"] == [-8.0, 2.0]
