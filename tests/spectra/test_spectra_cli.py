"""``valband simulate`` in-process: files, JSON schema, axis order, one-line errors."""

from __future__ import annotations

import csv
import json
import math
from pathlib import Path

import numpy as np
import pytest

from valband.cli.main import main

_FAST = ["--mesh", "6", "--step", "0.02", "--quiet"]


def _rows(path: Path):
    lines = [ln for ln in path.read_text().splitlines() if not ln.startswith("#")]
    return list(csv.reader(lines))


def test_simulate_writes_files(capsys):
    rc = main(["simulate", "Cu fcc", "--photon-energy", "Al-Ka", "--out", "sp", "--json",
               "--resolution", "0.4", "--lifetime", "0.03", "0.05", "--angle", "90",
               "--temperature", "200", *_FAST[:-1]])
    assert rc == 0
    summary = json.loads(capsys.readouterr().out)
    assert summary["schema"] == "valband.summary" and summary["schema_version"] == 1
    assert summary["command"] == "simulate"
    sp = summary["spectrum"]
    assert sp["photon_energy_eV"] == 1486.6 and sp["photon_source"] == "Al-Ka"
    assert sp["temperature_K"] == 200 and sp["gaussian_fwhm_eV"] == 0.4
    assert sp["lifetime"]["gamma0_eV"] == 0.03 and sp["lifetime"]["a_per_eV"] == 0.05
    assert sp["geometry"] == {"theta_deg": 90.0, "polarization": "unpolarized"}
    assert {x["shell"] for x in sp["cross_sections"]} == {"s", "p", "d"}
    on_disk = json.loads(Path("sp/summary.json").read_text())
    assert on_disk["spectrum"]["components"] == ["Cu0:s", "Cu0:p", "Cu0:d"]
    rows = _rows(Path("sp/spectrum.csv"))
    assert rows[0] == ["binding_energy_eV", "total", "Cu0:s", "Cu0:p", "Cu0:d"]
    data = np.array(rows[1:], dtype=float)
    assert np.all(np.diff(data[:, 0]) > 0)  # binding energy monotonic
    np.testing.assert_allclose(data[:, 2:].sum(axis=1), data[:, 1], rtol=1e-6, atol=1e-12)
    assert Path("sp/spectrum.png").stat().st_size > 1000


def test_simulate_svg_and_number(capsys):
    assert main(["simulate", "Ag fcc", "--photon-energy", "1000", "--format", "svg",
                 "--out", "ag", *_FAST]) == 0
    assert Path("ag/spectrum.svg").read_text().lstrip().startswith("<?xml")
    assert json.loads(Path("ag/summary.json").read_text())["spectrum"]["photon_source"] is None


def test_plot_binding_energy_decreases_to_the_right(cu_dos):
    # The trade's convention (common practice): binding energy decreases to the right.
    from valband.report.plots import new_figure
    from valband.spectra import simulate_spectrum
    from valband.spectra.plot import plot_spectrum

    fig, ax = new_figure()
    plot_spectrum(ax, simulate_spectrum(cu_dos, "Al-Ka"))
    left, right = ax.get_xlim()
    assert left > right


@pytest.mark.parametrize("argv, word", [
    (["--photon-energy", "Xx-Ka"], "photon energy"),
    (["--photon-energy", "Al-Ka", "--resolution", "-1"], "FWHM"),
    (["--photon-energy", "Al-Ka", "--temperature", "-3"], "temperature"),
    (["--photon-energy", "Al-Ka", "--lifetime", "-0.1", "0"], "Γ0"),
    (["--photon-energy", "Al-Ka", "--angle", "nan"], "angle"),
])
def test_errors_exit_1_one_line(capsys, argv, word):
    rc = main(["simulate", "Cu fcc", *argv, "--out", "bad", *_FAST])
    err = capsys.readouterr().err.strip()
    assert rc == 1
    assert len(err.splitlines()) == 1 and word in err and err.startswith("valband simulate: error:")


def test_cli_defaults_match_library():
    # The CLI repeats the defaults (to keep `valband --help` free of numba imports).
    from valband.cli import cmd_simulate as c
    from valband.spectra import broadening as b
    from valband.spectra import simulate as s

    assert (c.DEFAULT_GAMMA0_EV, c.DEFAULT_A_PER_EV) == (b.DEFAULT_GAMMA0_EV, b.DEFAULT_A_PER_EV)
    assert c.DEFAULT_GAUSSIAN_FWHM_EV == s.DEFAULT_GAUSSIAN_FWHM_EV
    assert math.isclose(c.MAGIC_ANGLE_DEG, s.MAGIC_ANGLE_DEG, rel_tol=1e-15)
