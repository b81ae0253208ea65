"""Inelastic backgrounds of simulated spectra (model peak known, so no iteration)."""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest

from valband.errors import SettingsError
from valband.spectra import Spectrum, simulate_spectrum
from valband.spectra.background import TOUGAARD_C, shirley_shape, tougaard_shape


def test_shirley_shape_is_the_running_area():
    # a Gaussian peak: the shape rises from 0 to the peak's area (exact integral), and is half
    # of it at the peak centre (symmetry)
    h = 0.01
    be = np.arange(-2.0, 10.0 + h / 2, h)
    peak = np.exp(-0.5 * ((be - 3.0) / 0.3) ** 2)
    area = 0.3 * np.sqrt(2 * np.pi)
    s = shirley_shape(h, peak)
    assert s[0] == 0.0
    assert s[-1] == pytest.approx(area, rel=1e-9)
    assert np.interp(3.0, be, s) == pytest.approx(area / 2, rel=1e-6)
    assert np.all(np.diff(s) >= 0)


def test_tougaard_shape_of_a_narrow_peak_is_the_universal_cross_section():
    # a peak of unit area much narrower than √C: the background T eV above it is
    # T/(C + T²)² (Tougaard, Surf. Interface Anal. 11, 453 (1988), universal cross-section)
    h = 0.01
    be = np.arange(0.0, 120.0, h)
    peak = np.zeros_like(be)
    peak[100] = 1.0 / h                 # unit area at BE = 1 eV
    t = np.array([5.0, 20.0, 40.0, 80.0])
    got = np.interp(1.0 + t, be, tougaard_shape(h, peak))
    np.testing.assert_allclose(got, t / (TOUGAARD_C + t**2) ** 2, rtol=2e-3)
    # nothing below the peak: losses only raise the binding energy
    assert np.abs(tougaard_shape(h, peak)[:100]).max() < 1e-12


def test_simulate_with_inelastic_background(cu_dos):
    bare = simulate_spectrum(cu_dos, "Al-Ka")
    sh = simulate_spectrum(cu_dos, "Al-Ka", inelastic=("shirley", 0.05))
    np.testing.assert_allclose(sh.components, bare.components)
    np.testing.assert_allclose(sh.intensity, sh.components.sum(axis=0) + sh.background)
    h = sh.binding_energy[1] - sh.binding_energy[0]
    assert sh.background[-1] == pytest.approx(0.05 * bare.intensity.sum() * h, rel=2e-3)
    assert sh.settings["inelastic_background"] == {"kind": "shirley", "k": 0.05, "unit": "1/eV"}
    tg = simulate_spectrum(cu_dos, "Al-Ka", inelastic=("tougaard", 2866.0))
    assert tg.settings["inelastic_background"]["C_eV2"] == TOUGAARD_C
    assert tg.background.max() > 0 and bare.background is None
    back = Spectrum.from_dict(json.loads(json.dumps(tg.to_dict())))
    np.testing.assert_allclose(back.background, tg.background)


@pytest.mark.parametrize("inelastic, match", [
    (("linear", 1.0), "accepted shirley, tougaard"),
    (("shirley", -1.0), "≥ 0"),
    (("tougaard",), "expected \\(kind, amplitude\\)"),
])
def test_inelastic_bad_input(cu_dos, inelastic, match):
    with pytest.raises(SettingsError, match=match):
        simulate_spectrum(cu_dos, "Al-Ka", inelastic=inelastic)


def test_cli_inelastic_column(capsys):
    from valband.cli.main import main

    assert main(["simulate", "Cu fcc", "--photon-energy", "Al-Ka", "--inelastic", "shirley",
                 "0.02", "--mesh", "6", "--step", "0.02", "--quiet", "--out", "sp"]) == 0
    lines = [ln for ln in Path("sp/spectrum.csv").read_text().splitlines()
             if not ln.startswith("#")]
    assert lines[0].split(",")[-1] == "inelastic_background"
    data = np.array([ln.split(",") for ln in lines[1:]], dtype=float)
    np.testing.assert_allclose(data[:, 2:].sum(axis=1), data[:, 1], rtol=1e-6, atol=1e-12)
    assert main(["simulate", "Cu fcc", "--photon-energy", "Al-Ka", "--inelastic", "shirley",
                 "lots", "--mesh", "6", "--quiet"]) == 1
    assert "must be a number" in capsys.readouterr().err
