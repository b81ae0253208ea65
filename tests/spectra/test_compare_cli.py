"""``valband compare`` in-process: files, summary schema, calibration, plot axis, errors."""

from __future__ import annotations

import csv
import json
from pathlib import Path

import numpy as np
import pytest

from valband.cli.main import main

# the invented files are made from the harrison-universal Cu DOS of the fixture
_DOS = ["--mesh", "8", "--step", "0.02", "--emin", "-12", "--emax", "5", "--params",
        "harrison-universal"]


def _write_measurement(cu_dos, path: Path, shift: float = 0.2, seed: int = 3) -> None:
    """An invented Cu valence-band measurement (model + constant + Poisson), BE column first."""
    from valband.spectra import simulate_spectrum

    spec = simulate_spectrum(cu_dos, "Al-Ka", gaussian_fwhm=0.4, keep_area=False)
    be = np.linspace(-1.5, 9.0, 900)
    mean = 2e4 * np.interp(be - shift, spec.binding_energy, spec.intensity) / spec.intensity.max()
    y = np.random.default_rng(seed).poisson(mean + 25.0)
    lines = ["# invented test spectrum (not a measurement)", "binding energy / eV, counts"]
    lines += [f"{a:.5f},{b}" for a, b in zip(be, y, strict=True)]
    path.write_text("\n".join(lines) + "\n")


def test_compare_writes_fit_files(cu_dos, capsys):
    _write_measurement(cu_dos, Path("cu.csv"))
    rc = main(["compare", "cu.csv", "Cu fcc", "--photon-energy", "Al-Ka", "--background",
               "constant", "--out", "cmp", "--json", *_DOS])
    assert rc == 0
    summary = json.loads(capsys.readouterr().out)
    assert summary["schema"] == "valband.summary" and summary["command"] == "compare"
    fit = summary["fit"]
    assert fit["kind"] == "valband.spectrum_fit"
    # the invented file was made with this very DOS path at a 0.2 eV offset (mesh differs a
    # little from the fixture's, so the tolerance is looser than the library test's)
    assert fit["parameters"]["shift"]["value"] == pytest.approx(0.2, abs=0.03)
    assert fit["parameters"]["shift"]["free"] is True
    assert summary["measured"]["source"].endswith("cu.csv")
    assert summary["measured"]["unit"] == "counts" and summary["calibration"] is None
    assert json.loads(Path("cmp/summary.json").read_text())["fit"]["n_points"] == fit["n_points"]
    lines = [ln for ln in Path("cmp/fit.csv").read_text().splitlines() if not ln.startswith("#")]
    rows = list(csv.reader(lines))
    assert rows[0][:6] == ["binding_energy_eV", "measured", "model", "background", "residual",
                           "sigma"]
    assert rows[0][6:] == ["Cu:s", "Cu:p", "Cu:d"]
    data = np.array(rows[1:], dtype=float)
    assert np.all(np.diff(data[:, 0]) > 0)
    np.testing.assert_allclose(data[:, 1] - data[:, 2], data[:, 4], rtol=1e-5, atol=1e-3)
    assert Path("cmp/compare.png").stat().st_size > 5000


def test_compare_calibrates_the_edge_and_fixes_the_shift(cu_dos, capsys):
    _write_measurement(cu_dos, Path("cu.csv"), shift=0.3)
    rc = main(["compare", "cu.csv", "Cu fcc", "--photon-energy", "1486.6", "--calibrate-edge",
               "--edge-window", "-1.2", "1.0", "--quiet", "--out", "cal", *_DOS])
    assert rc == 0
    s = json.loads(Path("cal/summary.json").read_text())
    cal = s["calibration"]
    assert cal["applied_shift_eV"] == pytest.approx(-cal["fermi_level_eV"])
    assert cal["fermi_level_eV"] == pytest.approx(0.3, abs=0.1)  # d states near E_F bias it
    assert s["fit"]["parameters"]["shift"]["free"] is False
    assert s["fit"]["parameters"]["shift"]["value"] == 0.0


def test_compare_plot_binding_energy_decreases_to_the_right(cu_dos):
    # The trade's convention (common practice): binding energy decreases to the right.
    from valband.report.plots import new_figure
    from valband.spectra import MeasuredSpectrum, simulate_spectrum
    from valband.spectra.fit import fit_spectrum
    from valband.spectra.plot import plot_fit

    spec = simulate_spectrum(cu_dos, "Al-Ka", keep_area=False)
    be = np.linspace(-1, 8, 300)
    meas = MeasuredSpectrum(be, 1e4 * np.interp(be, spec.binding_energy, spec.intensity) + 5,
                            unit="arb.", photon_energy=1486.6)
    fig, _ = new_figure()
    fig.clear()
    ax, axr = plot_fit(fig, fit_spectrum(meas, cu_dos, background="constant"))
    lo, hi = axr.get_xlim()
    assert lo > hi and lo == pytest.approx(be[-1]) and hi == pytest.approx(be[0])
    assert ax.get_xlim() == axr.get_xlim()


@pytest.mark.parametrize("argv, word", [
    (["compare", "missing.csv", "Cu fcc", "--photon-energy", "Al-Ka"], "missing.csv"),
    (["compare", "cu.csv", "Cu fcc"], "no photon energy"),
])
def test_compare_errors_exit_1_one_line(cu_dos, capsys, argv, word):
    _write_measurement(cu_dos, Path("cu.csv"))
    assert main([*argv, *_DOS, "--quiet"]) == 1
    err = capsys.readouterr().err.strip()
    assert word in err and len(err.splitlines()) == 1


def test_compare_rejects_unknown_free_parameter(capsys):
    with pytest.raises(SystemExit):
        main(["compare", "x.csv", "Cu fcc", "--free", "shift,width"])
    assert "width" in capsys.readouterr().err


def test_cli_constants_match_library():
    from valband.cli import cmd_compare as c
    from valband.spectra import fit as f

    assert c.BACKGROUNDS == f.BACKGROUNDS
    assert c.DEFAULT_FREE == f.DEFAULT_FREE
    assert c.FREE_NAMES == f._FREE_NAMES
