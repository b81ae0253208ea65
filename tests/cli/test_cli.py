"""The ``valband`` command, run in-process through ``main(argv)``."""

from __future__ import annotations

import csv
import json
import subprocess
import sys

import pytest

from valband.cli.main import COMMANDS, main
from valband.defaults import DEFAULT_PARAMETER_SET


def run(capsys, *argv):
    code = main(list(argv))
    out, err = capsys.readouterr()
    return code, out, err


def test_help_lists_every_command(capsys):
    with pytest.raises(SystemExit) as exc:
        main(["--help"])
    assert exc.value.code == 0
    out = capsys.readouterr().out
    for name in COMMANDS:
        assert name in out


def test_help_does_not_import_numerics():
    # Start-up stays fast: the parser must not import numba, spglib or the kernels.
    code = ("import sys; from valband.cli.main import build_parser; build_parser();"
            "print(sorted(m for m in ('numba', 'spglib', 'matplotlib', 'scipy') if m in sys.modules))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "[]"


def test_dos_writes_files_and_json(capsys, tmp_path):
    code, out, err = run(capsys, "dos", "Cu fcc", "--mesh", "6", "--out", str(tmp_path / "o"), "--json",
                         "--quiet")
    assert code == 0
    summary = json.loads(out)
    assert summary["schema"] == "valband.summary" and summary["schema_version"] == 1
    assert summary["n_electrons"] == 11
    assert summary["settings"]["mesh"]["mesh"] == [6, 6, 6]
    assert summary["provenance"]["parameter_set"]["name"] == DEFAULT_PARAMETER_SET
    d = summary["descriptors"][0]
    assert d["shell"] == "d" and "Cu" in d["elements"]
    for f in ("dos.csv", "pdos_sites.csv", "dos.png", "summary.json"):
        assert (tmp_path / "o" / f).stat().st_size > 0
    on_disk = json.loads((tmp_path / "o" / "summary.json").read_text())
    assert on_disk["fermi_level_eV"] == summary["fermi_level_eV"]
    with open(tmp_path / "o" / "dos.csv") as fh:
        rows = [r for r in csv.reader(fh) if not r[0].startswith("#")]
    assert rows[0][:3] == ["energy_eV", "total", "integrated_total"]
    assert "Cu:d" in rows[0]


def test_describe_prints_a_table(capsys):
    code, out, _ = run(capsys, "describe", "Pd fcc", "--mesh", "6", "--window", "-8", "3")
    assert code == 0
    assert "d-band descriptors" in out and "Pd" in out
    assert "-8.00 to 3.00" in out


def test_bands_writes_csv_with_character(capsys, tmp_path):
    code, _, _ = run(capsys, "bands", "Cu fcc", "--npoints", "40", "--mesh", "6", "--path", "GXL",
                     "--out", str(tmp_path / "b"), "--format", "svg", "--quiet")
    assert code == 0
    text = (tmp_path / "b" / "bands.csv").read_text()
    header = [ln for ln in text.splitlines() if not ln.startswith("#")][0]
    assert "weight_Cu:d" in header
    assert (tmp_path / "b" / "bands.svg").exists()


def test_demo_runs_and_ranks(capsys, tmp_path):
    code, out, _ = run(capsys, "demo", "--out", str(tmp_path / "demo"), "--mesh", "6", "--json")
    assert code == 0
    summary = json.loads(out)
    names = [r["name"] for r in summary["screening"]]
    assert sorted(names) == sorted(["Cu", "Cu3Pd", "CuPd", "Pd", "Ag"])
    centres = [r["d_band_centre_eV"] for r in summary["screening"]]
    assert centres == sorted(centres, reverse=True)
    assert "Invented" in summary["note"]
    assert (tmp_path / "demo" / "screening.csv").exists()
    assert (tmp_path / "demo" / "Cu3Pd" / "dos.csv").exists()


@pytest.mark.parametrize(
    ("argv", "message"),
    [
        (["dos", "nothing-here.cif"], "neither an existing structure file"),
        (["dos", "Mo bcc 3.15", "--mesh", "4"], "Mo"),
        (["dos", "Cu fcc", "--mesh", "0"], "k-mesh"),
        (["dos", "Cu fcc", "--mesh", "4", "--width", "-0.1"], "width"),
        (["dos", "Cu fcc", "--mesh", "4", "--electrons", "40"], "electron"),
        (["dos", "Cu fcc", "--params", "no-such-set"], "no-such-set"),
        (["bands", "Cu fcc", "--character", "Cu:f"], "character"),
        (["bands", "Cu fcc", "--character", "Pd:d"], "Pd is not in Cu"),
    ],
)
def test_errors_are_one_line_and_exit_nonzero(capsys, argv, message):
    code, out, err = run(capsys, *argv, "--quiet")
    assert code == 1
    assert message in err
    assert "Traceback" not in err
    assert err.count("\n") == 1


def test_an_all_zero_measured_spectrum_is_named(capsys, tmp_path):
    zero = tmp_path / "zero.csv"
    zero.write_text("BE,I\n" + "".join(f"{-1 + 0.05 * i:.2f},0\n" for i in range(200)))
    code, _, err = run(capsys, "compare", str(zero), "Cu fcc", "--photon-energy", "Al-Ka",
                       "--mesh", "6", "--out", str(tmp_path / "c"), "--quiet")
    assert code == 1 and "no positive intensity" in err and "Traceback" not in err


def test_malformed_structure_file(capsys, tmp_path):
    bad = tmp_path / "bad.cif"
    bad.write_text("data_x\n_cell_length_a nonsense\n")
    code, _, err = run(capsys, "dos", str(bad), "--quiet")
    assert code == 1 and "bad.cif" in err


def test_debug_shows_traceback(capsys):
    from valband.errors import SettingsError

    with pytest.raises(SettingsError):
        main(["--debug", "dos", "Cu fcc", "--mesh", "0", "--quiet"])


def test_failed_run_leaves_existing_files_intact(capsys, tmp_path):
    out = tmp_path / "o"
    assert run(capsys, "dos", "Cu fcc", "--mesh", "4", "--out", str(out), "--quiet")[0] == 0
    before = (out / "summary.json").read_text()
    assert run(capsys, "dos", "Cu fcc", "--mesh", "4", "--electrons", "99", "--out", str(out),
               "--quiet")[0] == 1
    assert (out / "summary.json").read_text() == before
    assert not list(out.glob(".*.part"))


def test_output_files_have_ordinary_permissions(capsys, tmp_path):
    # Files are written to a temporary name and renamed; they must still get the usual
    # permissions (0666 less the umask), not mkstemp's private 0600 (common practice).
    import os

    assert run(capsys, "dos", "Cu fcc", "--mesh", "4", "--out", str(tmp_path / "p"), "--quiet")[0] == 0
    mask = os.umask(0)
    os.umask(mask)
    assert (tmp_path / "p" / "summary.json").stat().st_mode & 0o777 == 0o666 & ~mask
