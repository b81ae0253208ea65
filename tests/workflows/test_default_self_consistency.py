"""Charge self-consistency and spin–orbit coupling by default (valband.workflows.methods).

External facts checked (common practice, no single source):
* a pure crystal whose sites are all symmetry-equivalent is charge neutral site by site, so the
  default leaves it untouched (exactly the plain DOS);
* the interior of a metal slab is bulk-like: with local charge neutrality the central layer's
  d-band centre equals the bulk one (Desjonquères & Spanjaard, Concepts in Surface Physics,
  ch. 5: a few layers screen a surface in a transition metal);
* a neutrality loop that has not converged must not be reported as a result.
"""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest

from valband.alloy import NeutralitySettings
from valband.cli.main import main
from valband.errors import CalculationError, SettingsError
from valband.params import load_parameter_set
from valband.structure import load_structure_with_info
from valband.tb import build_model
from valband.workflows import DOSSettings, compute_dos, describe
from valband.workflows.methods import (
    FINAL_MESH_TOLERANCE,
    dos_by_method,
    neutrality_choice,
    spin_orbit_choice,
)

SET = "valband-tc-2026"


@pytest.fixture(scope="module")
def ps():
    return load_parameter_set(SET)


def _model(spec, ps):
    st, info = load_structure_with_info(spec)
    return build_model(st, ps), info


@pytest.mark.parametrize("spec, mode", [
    ("Cu fcc", None), ("Co hcp", None), ("Fe bcc", None),       # one element, equivalent sites
    ("Cu3Pd L12", "site"), ("CuPd B2", "site"),                  # compounds
    ("random Cu0.5Pd0.5 fcc 2x1x1 seed=3", "site"),            # alloy supercell
    ("slab Cu fcc111 layers=3", "site"),                         # surface: inequivalent layers
])
def test_automatic_rule(spec, mode):
    st, _ = load_structure_with_info(spec)
    got, reason = neutrality_choice(st, "auto")
    assert got == mode and reason


def test_explicit_choices_and_exceptions():
    st, _ = load_structure_with_info("Cu3Pd L12")
    assert neutrality_choice(st, "off")[0] is None
    assert neutrality_choice(st, "element")[0] == "element"
    assert neutrality_choice(st, "auto", alloy="cpa")[0] is None
    assert neutrality_choice(st, "auto", charged=True)[0] is None
    with pytest.raises(SettingsError, match="accepted auto, off"):
        neutrality_choice(st, "sometimes")


def test_spin_orbit_rule():
    au, _ = load_structure_with_info("Au fcc")
    cu, _ = load_structure_with_info("Cu fcc")
    assert spin_orbit_choice(au, None, "spectra")[0] is True      # 5d: doublet resolved
    assert spin_orbit_choice(cu, None, "spectra")[0] is False
    assert spin_orbit_choice(au, None, "dos")[0] is False
    assert spin_orbit_choice(cu, True, "dos")[0] is True
    assert spin_orbit_choice(au, False, "spectra")[0] is False


def test_pure_bulk_is_untouched(ps):
    model, info = _model("Cu fcc", ps)
    s = DOSSettings(mesh=8)
    dos, record = dos_by_method(model, info, s, params=ps)
    plain = compute_dos(model, s)
    assert record["neutrality"]["mode"] is None
    np.testing.assert_array_equal(dos.total, plain.total)
    assert dos.fermi_level == plain.fermi_level


def test_central_layer_of_a_pure_slab_equals_bulk(ps):
    bulk_model, info = _model("Cu fcc", ps)
    bulk = describe(compute_dos(bulk_model, DOSSettings(mesh=12)), "d").elements["Cu"].centre
    model, info = _model("slab Cu fcc111 layers=5 vacuum=10", ps)
    centre = int(np.argmax(info["depth"]))
    s = DOSSettings(mesh=(12, 12, 1))
    dos, record = dos_by_method(model, info, s, params=ps)
    sc = describe(dos, "d").sites[centre].centre
    plain = describe(compute_dos(model, s), "d").sites[centre].centre
    assert record["neutrality"]["mode"] == "site"
    assert abs(sc - bulk) < 0.05                 # measured 0.017 eV (5 layers), 0.010 (7)
    assert abs(plain - bulk) > 0.15              # the plain model is 0.3 eV off: it matters
    assert record["neutrality"]["final_mesh_max_residual_per_site"] <= FINAL_MESH_TOLERANCE


def test_unconverged_loop_is_an_error(ps):
    model, info = _model("Cu3Pd L12", ps)
    with pytest.raises(CalculationError, match=r"did not converge in 1 iteration.*electrons per"):
        dos_by_method(model, info, DOSSettings(mesh=4), params=ps,
                      neutrality=NeutralitySettings(max_iter=1))


def test_neutrality_with_spin_orbit(ps):
    model, info = _model("Cu3Pd L12", ps)
    dos, record = dos_by_method(model, info, DOSSettings(mesh=4), params=ps, soc=True)
    assert record["neutrality"]["mode"] == "site" and record["spin_orbit"]["on"]
    assert "shifted model" in record["neutrality"]["note"]
    assert dos.n_electrons == pytest.approx(model.n_electrons)


def test_cli_records_and_prints_the_choice(capsys):
    assert main(["describe", "Cu3Pd L12", "--mesh", "6", "--out", "sc"]) == 0
    err = capsys.readouterr().err
    assert "charge self-consistency: local neutrality per site" in err
    s = json.loads(Path("sc/summary.json").read_text())
    assert s["method"]["neutrality"]["mode"] == "site"
    assert s["method"]["neutrality"]["converged"] is True
    assert s["method"]["spin_orbit"]["on"] is False
    assert main(["describe", "Cu3Pd L12", "--mesh", "6", "--neutral", "off", "--json"]) == 0
    s = json.loads(capsys.readouterr().out)
    assert s["method"]["neutrality"]["mode"] is None
    assert s["method"]["method"] == "k-mesh"


def test_site_counts_of_a_finished_dos_add_up_to_the_electron_count(ps):
    # ∫ DOS up to E_F is the electron count (definition of E_F); the site split is Mulliken's
    from valband.alloy import site_charges_and_dos

    model, info = _model("Cu3Pd L12", ps)
    dos = compute_dos(model, DOSSettings(mesh=8))
    q, d = site_charges_and_dos(dos)
    assert q.sum() == pytest.approx(model.n_electrons, abs=2e-3)
    assert d.sum() == pytest.approx(dos.value_at_fermi(), rel=1e-3)


def test_record_of_the_dos_mesh_check(ps):
    model, info = _model("slab Cu fcc111 layers=5 vacuum=10", ps)
    _, record = dos_by_method(model, info, DOSSettings(mesh=(12, 12, 1)), params=ps)
    neu = record["neutrality"]
    # the coarse loop's shifts were checked on the DOS mesh, and improved there if needed
    assert "coarse_residual_on_dos_mesh" in neu or neu["loop_mesh"] == [6, 6, 1]
    assert neu["final_mesh_max_residual_per_site"] <= FINAL_MESH_TOLERANCE
