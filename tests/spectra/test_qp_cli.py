"""The d-band correction at the command line and its refit script."""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest

from valband.cli.main import main
from valband.defaults import DEFAULT_PARAMETER_SET

_FAST = ["--mesh", "6", "--step", "0.02"]


def test_simulate_prints_and_records_the_correction(capsys):
    assert main(["simulate", "Cu fcc", "--photon-energy", "Al-Ka", "--out", "on", *_FAST]) == 0
    out = capsys.readouterr().out
    assert "d bands corrected to photoemission: Cu Δ=" in out
    assert "lifetime HWHM 0.01 eV + 0.01/eV" in out
    s = json.loads(Path("on/summary.json").read_text())
    rec = s["d_band_correction"]
    assert rec["enabled"] and rec["parameter_set"] == DEFAULT_PARAMETER_SET and "Cu" in rec["applied"]
    assert s["spectrum"]["d_band_correction"] == rec
    assert "qp_correction" not in s["settings"]      # the DOS block stays first-principles
    assert main(["simulate", "Cu fcc", "--photon-energy", "Al-Ka", "--out", "off",
                 "--no-qp-correction", *_FAST]) == 0
    assert "d bands not corrected" in capsys.readouterr().out
    off = json.loads(Path("off/summary.json").read_text())["d_band_correction"]
    assert off["enabled"] is False and off["applied"] == {}
    a, b = (np.array([ln.split(",") for ln in Path(f"{d}/spectrum.csv").read_text().splitlines()
                      if not ln.startswith("#")][1:], dtype=float) for d in ("on", "off"))
    # Cu d band deeper with the correction (Δ < 0): the spectrum's maximum moves to higher BE
    assert a[np.argmax(a[:, 1]), 0] > b[np.argmax(b[:, 1]), 0] + 0.1


def test_simulate_says_when_an_element_has_no_correction(capsys):
    assert main(["simulate", "Pd fcc", "--photon-energy", "Al-Ka", "--out", "pd", *_FAST]) == 0
    assert "no fitted correction for Pd" in capsys.readouterr().out


def test_compare_after_calibration_fits_the_d_offset(capsys):
    # invented measurement: the corrected valband-tc-2026 Cu model with its d band a further
    # 0.3 eV deeper (same DOS settings as the compare run below)
    from valband.params import load_parameter_set
    from valband.spectra import simulate_spectrum
    from valband.spectra.quasiparticle import corrections_for
    from valband.structure import build_structure
    from valband.tb import build_model
    from valband.workflows import DOSSettings, compute_dos

    dos = compute_dos(build_model(build_structure("Cu fcc"), load_parameter_set("valband-tc-2026")),
                      DOSSettings(mesh=10, step=0.02))
    c = corrections_for("valband-tc-2026")["Cu"]
    spec = simulate_spectrum(dos, "Al-Ka", gaussian_fwhm=0.4, keep_area=False,
                             d_correction={"Cu": (c.delta_ev - 0.3, c.scale)})
    be = np.linspace(-1.5, 9.0, 900)
    mean = 2e4 * np.interp(be, spec.binding_energy, spec.intensity) / spec.intensity.max()
    y = np.random.default_rng(9).poisson(mean + 25.0)
    Path("cu.csv").write_text("# invented test spectrum (not a measurement)\n"
                              + "".join(f"{a:.5f},{b}\n" for a, b in zip(be, y, strict=True)))
    rc = main(["compare", "cu.csv", "Cu fcc", "--photon-energy", "Al-Ka", "--calibrate-edge",
               "--background", "constant", "--out", "cmp", "--mesh", "10", "--step", "0.02"])
    assert rc == 0
    out = capsys.readouterr().out
    assert "d_offset" in out and "d bands corrected to photoemission: Cu" in out
    par = json.loads(Path("cmp/summary.json").read_text())["fit"]["parameters"]
    assert par["shift"]["free"] is False and par["d_offset"]["free"] is True
    assert par["d_offset"]["value"] == pytest.approx(0.3, abs=0.05)
    assert par["d_offset"]["error"] > 0 and par["lifetime_a"]["free"] is True


def test_refit_reproduces_the_shipped_constants(tmp_path):
    # the shipped data file is what `python -m valband.spectra.qp_fit --write` makes
    from valband.spectra.qp_fit import main as refit
    from valband.spectra.quasiparticle import load_corrections

    out = tmp_path / "qp.json"
    assert refit(["--params", "valband-tc-2026", "--out", str(out)]) == 0
    new = load_corrections(out)["sets"]["valband-tc-2026"]["elements"]
    old = load_corrections()["sets"]["valband-tc-2026"]["elements"]
    assert set(new) == set(old)
    for el in old:
        assert new[el]["delta_eV"] == pytest.approx(old[el]["delta_eV"], abs=2e-3)
        assert new[el]["scale"] == pytest.approx(old[el]["scale"], abs=2e-3)
