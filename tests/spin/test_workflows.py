"""The spin workflows with the rest of valband: DOS, bands, descriptors, spectra, JSON, errors."""

from __future__ import annotations

import json
from dataclasses import dataclass, field

import numpy as np
import pytest

from valband.errors import ParameterError, SettingsError
from valband.spectra import simulate_spectrum
from valband.spin import (
    SpinModel,
    magnetic_dos,
    soc_dos,
    spin_bands,
    spin_describe,
    spin_dos,
    spin_model,
)
from valband.spin.soc import atom_spin_orbit
from valband.structure import build_structure
from valband.tb import build_model
from valband.workflows import DOSSettings, compute_dos

FAST = DOSSettings(mesh=8, width=0.1, step=0.01)


@pytest.mark.parametrize("method", ["gaussian", "tetrahedron"])
def test_plain_run_equals_compute_dos(harrison, method):
    # No spin–orbit coupling, no magnetism: one electron per state over both spin copies is the
    # spin-degenerate DOS of compute_dos exactly (same mesh, kernels and Fermi level).
    model = build_model(build_structure("Cu fcc 3.61"), harrison)
    s = DOSSettings(mesh=8, method=method, width=0.1, step=0.01)
    ref = compute_dos(model, s)
    r = spin_dos(model, s)
    assert r.fermi_level == pytest.approx(ref.fermi_level, abs=1e-7)
    np.testing.assert_allclose(r.total.total, ref.total, atol=1e-8)
    np.testing.assert_allclose(r.total.channels, ref.channels, atol=1e-8)
    assert r.total.channel_labels == ref.channel_labels


def test_tetrahedron_stoner_occupations_are_consistent(harrison):
    # Blöchl's integration weights give the occupations; they must sum to N exactly and agree
    # with the integral of each spin's linear-tetrahedron DOS below E_F up to Blöchl's
    # correction of k-dependent weights (Blöchl et al., PRB 49, 16223 (1994): O(1/mesh²),
    # about 0.01 electrons on 10³ here).
    model = build_model(build_structure("Fe bcc"), harrison)
    r = magnetic_dos(model, DOSSettings(mesh=10, method="tetrahedron", step=0.002))
    assert r.up.n_electrons + r.down.n_electrons == pytest.approx(8.0, abs=1e-8)
    for d in (r.up, r.down):
        assert float(np.interp(0.0, d.energies, d.integrated())) == pytest.approx(
            d.n_electrons, abs=0.03)


def test_results_feed_describe_spectra_and_json(harrison):
    model = build_model(build_structure("Ni fcc"), harrison)
    r = magnetic_dos(model, FAST, soc=True, params=harrison)
    # magnetism with spin–orbit coupling runs on the full mesh
    assert not r.total.settings["mesh"]["symmetry"]
    table = spin_describe(r)
    assert set(table) == {"both", "up", "down", "j"}
    assert set(table["j"]["Ni"]) == {"d5/2", "d3/2"}
    spec = simulate_spectrum(r.total, "Al-Ka")
    spec_j = simulate_spectrum(r.j_resolved, "Al-Ka")
    # the j components carry the shell's cross section, so they add up to the same spectrum
    np.testing.assert_allclose(spec_j.intensity, spec.intensity, rtol=1e-9, atol=1e-12)
    spec_up, spec_dn = simulate_spectrum(r.up, "Al-Ka"), simulate_spectrum(r.down, "Al-Ka")
    np.testing.assert_allclose(spec_up.intensity + spec_dn.intensity, spec.intensity,
                               rtol=1e-9, atol=1e-12)
    text = json.dumps(r.to_dict())
    back = json.loads(text)
    assert back["magnetism"]["converged"] and back["spin_orbit"][0]["source"]
    assert json.dumps(r.summary())
    prov = r.total.provenance["spin"]
    assert prov["spin_orbit"] and prov["stoner"]["Ni"]["value_ev"] == 1.0


def test_bands_of_spin_runs(harrison):
    model = build_model(build_structure("Fe bcc"), harrison)
    r = magnetic_dos(model, FAST)
    bands = spin_bands(r, "GHN", npoints=30)
    assert set(bands) == {"up", "down"}
    # Γ of bcc: the d states (t2g, eg) do not mix with s or p, so each minority d level lies
    # exactly ΔE above its majority partner (orthogonal basis, onsite shift; analytic).
    pure = [np.sort(b.energies[0][b.character_of(shell="d")[0] > 1 - 1e-9]) for b in
            (bands["up"], bands["down"])]
    assert len(pure[0]) == 5
    np.testing.assert_allclose(pure[1] - pure[0], r.magnetism.splitting_eV[0], atol=1e-9)
    soc = spin_bands(soc_dos(model, FAST, soc={"Fe": 0.06}), "GHN", npoints=30)
    assert set(soc) == {"both"} and soc["both"].energies.shape[1] == 2 * model.n_orbitals


# ---------------------------------------------------------------------------- spin–orbit input
def test_parameter_set_without_constants_uses_the_atom_engine(harrison):
    model = build_model(build_structure("Pt fcc"), harrison)
    r = soc_dos(model, FAST, params=harrison)
    src = {c["shell"]: c["source"] for c in r.spin_orbit}
    assert "valband.atom" in src["d"] and "'harrison-universal' has no spin–orbit" in src["d"]
    assert r.total.provenance["spin"]["spin_orbit"][0]["xi_ev"] > 0


@dataclass
class _Element:
    shells: tuple
    onsite: dict
    valence_electrons: float
    spin_orbit: dict = field(default_factory=dict)
    provenance: dict = field(default_factory=dict)


@dataclass
class _WithConstants:
    """A stand-in parameter set whose element record carries spin–orbit constants."""

    inner: object
    name: str = "with-soc"
    version: str = "1"

    def element(self, symbol):
        e = self.inner.element(symbol)
        return _Element(e.shells, e.onsite, e.valence_electrons, {"d": 0.65},
                        {"spin_orbit.d": "test value"})


def test_constants_from_the_parameter_set_take_precedence(harrison):
    model = build_model(build_structure("Pt fcc"), harrison)
    sm = spin_model(model, soc=True, params=_WithConstants(harrison))
    d = sm.spin_orbit["Pt", "d"]
    assert d.xi_ev == 0.65 and "with-soc" in d.source and "test value" in d.source
    assert "valband.atom" in sm.spin_orbit["Pt", "p"].source  # the set has no p value


def test_bad_spin_orbit_input(harrison):
    model = build_model(build_structure("Pt fcc"), harrison)
    with pytest.raises(SettingsError, match="'Au', which is not in the structure"):
        spin_model(model, soc={"Au": 0.6})
    with pytest.raises(SettingsError, match="finite number ≥ 0 eV"):
        spin_model(model, soc={"Pt": -0.1})
    with pytest.raises(SettingsError, match="accepted shells of Pt"):
        spin_model(model, soc={"Pt": {"s": 0.1}})
    with pytest.raises(SettingsError, match="accepted True, False"):
        spin_model(model, soc="yes")
    with pytest.raises(ParameterError, match="'Xx'.*atom engine"):
        atom_spin_orbit("Xx")
    with pytest.raises(SettingsError, match="resolve 'm'"):
        soc_dos(model, DOSSettings(mesh=4, resolve="m"))
    with pytest.raises(SettingsError, match="plain TBModel"):
        soc_dos(spin_model(model, soc=False))


def test_symmetry_cell_of_spin_models(harrison):
    # What may reduce the mesh (valband.spin.kmesh): the crystal without magnetism, the magnetic
    # pattern without spin–orbit coupling, nothing with both (time reversal broken).
    from valband.spin.kmesh import ColouredCell

    base = build_model(build_structure("Fe bcc"), harrison)
    soc = spin_model(base, soc=True).spin_orbit
    assert SpinModel(base, soc).symmetry_cell is base.structure
    assert isinstance(SpinModel(base, {}, np.array([1.5])).symmetry_cell, ColouredCell)
    assert SpinModel(base, soc, np.array([1.5])).symmetry_cell is None
    assert SpinModel(base).spin_degeneracy == 1 and SpinModel(base).n_orbitals == 18
