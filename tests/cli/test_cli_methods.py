"""The method options of dos/describe/simulate/compare: VCA, CPA, neutrality, spin (CLI level).

The physics of each method is tested in tests/alloy and tests/spin; here: the options reach
the right code, the summary records the method, and bad combinations fail in one line.
"""

from __future__ import annotations

import json

import pytest

from valband.cli.main import main

RANDOM = "random Cu0.75Pd0.25 fcc 2x2x2 seed=7"
#: CPA and the electron counts below need the orthogonal Harrison set
HARRISON = ["--params", "harrison-universal"]


def _summary(capsys, *argv):
    assert main([*argv, "--json"]) == 0
    return json.loads(capsys.readouterr().out)


def test_cpa_and_vca_from_a_random_spec(capsys):
    cpa = _summary(capsys, "dos", RANDOM, "--alloy-method", "cpa", "--mesh", "8", "--gamma",
                   "--width", "0.1", "--step", "0.02", "--out", "cpa", *HARRISON)
    assert cpa["method"]["method"] == "coherent potential approximation"
    assert cpa["method"]["composition"] == {"Cu": 0.75, "Pd": 0.25}
    els = {d for d in cpa["descriptors"][0]["elements"]}
    assert els == {"Cu", "Pd"}            # component-resolved descriptors
    vca = _summary(capsys, "describe", RANDOM, "--alloy-method", "vca", "--mesh", "8",
                   *HARRISON)
    assert vca["method"]["method"] == "virtual crystal approximation"
    # one virtual site: 0.75·11 + 0.25·10 valence electrons (harrison-universal counts)
    assert vca["n_electrons"] == pytest.approx(0.75 * 11 + 0.25 * 10)


def test_layer_neutrality_of_a_slab(capsys):
    s = _summary(capsys, "describe", "slab Cu fcc111 layers=5", "--neutral", "layer",
                 "--mesh", "6x6x1")
    rep = s["method"]["report"]
    assert s["method"]["method"] == "local charge neutrality per layer"
    assert rep["mode"] == "layer" and rep["iterations"] >= 1
    # converged: every layer within the default tolerance of 1e-3 electrons
    assert max(abs(r) for r in rep["residuals_per_site"].values()) < 1e-3


def test_spin_orbit_is_recorded(capsys):
    s = _summary(capsys, "describe", "Pt fcc", "--soc", "--mesh", "6")
    assert "spin-orbit" in s["method"]["method"]
    assert s["method"]["spin"]["spin_orbit"]


@pytest.mark.parametrize("argv, word", [
    (["describe", "Cu fcc", "--alloy-method", "cpa", "--mesh", "4"], "random alloy spec"),
    (["describe", "Cu fcc", "--order", "afm", "--mesh", "4"], "need --magnetic"),
    (["describe", "random Cu0.5Pd0.5 fcc 1x1x2 seed=1", "--alloy-method", "vca", "--neutral",
      "site", "--mesh", "4"], "cannot be combined"),
    (["describe", "Fe bcc", "--magnetic", "--stoner", "Fe:0.9", "--mesh", "4"], "EL=VALUE"),
    (["describe", "Cu fcc", "--neutral", "layer", "--mesh", "4"], "needs a slab"),
])
def test_bad_method_options_exit_1_one_line(capsys, argv, word):
    assert main([*argv, "--quiet"]) == 1
    err = capsys.readouterr().err.strip()
    assert word in err and len(err.splitlines()) == 1


def test_bands_with_spin_orbit(capsys):
    # the basis doubles (orbital ⊗ spin): 2 × 9 bands for one s p d site
    s = _summary(capsys, "bands", "Au fcc", "--soc", "--mesh", "6", "--npoints", "30",
                 "--out", "au")
    assert s["method"]["method"] == "spin + spin-orbit"
    assert {c["shell"] for c in s["method"]["spin_orbit"]} == {"p", "d"}
    from pathlib import Path

    text = Path("au/bands.csv").read_text(encoding="utf-8").splitlines()
    rows = [ln for ln in text if not ln.startswith("#")]
    bands = {int(r.split(",")[4]) for r in rows[1:]}
    assert len(bands) == 18


def test_slab_descriptors_by_layer_surface_first(capsys):
    # the surface layer's d band is narrower than the central layer's (lower coordination:
    # second-moment argument, common practice)
    s = _summary(capsys, "describe", "slab Pt fcc111 layers=5", "--mesh", "6x6x1")
    groups = s["layers"]["groups"]
    names = [g["group"] for g in groups]
    assert names[0] == "surface" and "centre" in names
    assert s["layers"]["window_eV"] == s["descriptors"][0]["window_eV"]
    by = {g["group"]: g for g in groups}
    assert by["surface"]["width"] < by["centre"]["width"]
