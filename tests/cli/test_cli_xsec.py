"""``valband xsec``, run in-process through ``main(argv)``."""

from __future__ import annotations

import json

import pytest

from valband.atom import tables as T
from valband.atom.photoionization import valence_cross_sections
from valband.cli.main import COMMANDS, main


@pytest.fixture(autouse=True)
def _private_cache(tmp_path, monkeypatch):
    monkeypatch.setenv("VALBAND_CACHE_DIR", str(tmp_path / "cache"))
    T.clear_memo()
    yield
    T.clear_memo()


def run(capsys, *argv):
    code = main(list(argv))
    out, err = capsys.readouterr()
    return code, out, err


def test_registered():
    assert COMMANDS["xsec"][0] == "valband.cli.cmd_xsec"


def test_table_lists_copper_valence_subshells(capsys):
    code, out, err = run(capsys, "xsec", "Cu", "--photon-energy", "Al-Ka")
    assert code == 0, err
    assert "1486.6 eV" in out and "shipped" in out
    rows = {line.split()[0]: line.split() for line in out.splitlines()[2:] if line.strip()}
    # Cu valence shells for a tight-binding basis: 3d, 4s and the empty 4p (common practice).
    assert {"3d", "4s", "4p"} <= set(rows)
    assert rows["3d"][1] == "10" and rows["4s"][1] == "1" and rows["4p"][1] == "0"
    # s subshell: β = 2 in the dipole, non-relativistic continuum (Cooper & Zare 1968).
    assert rows["4s"][-1] == "2.000"


def test_json_schema_and_values(capsys):
    code, out, _ = run(capsys, "xsec", "Cu", "--photon-energy", "1486.6", "--json")
    assert code == 0
    data = json.loads(out)
    assert data["schema"] == "valband.xsec" and data["schema_version"] == 1
    assert data["element"] == "Cu" and data["photon_energy_ev"] == 1486.6
    # the output states the functional of the atom behind the table
    assert "MacDonald & Vosko" in data["functional"] and data["relativity"] == "scalar"
    subs = {s["subshell"]: s for s in data["subshells"]}
    assert set(subs) == {"3d", "4s", "4p"}
    d = subs["3d"]
    assert d["sigma_mb"] == pytest.approx(10.0 * d["sigma_per_electron_mb"], rel=1e-12)
    # the table answer is within 2 % of the direct calculation (table design requirement)
    direct = {x.subshell: x for x in valence_cross_sections("Cu", 1486.6)}
    assert d["sigma_per_electron_mb"] == pytest.approx(direct["3d"].sigma_per_electron_mb, rel=0.02)


def test_direct_option_equals_direct_calculation(capsys):
    code, out, _ = run(capsys, "xsec", "Au", "--photon-energy", "he-ii", "--json", "--direct")
    assert code == 0
    data = json.loads(out)
    assert data["source"] == "direct calculation" and data["photon_energy_ev"] == 40.81
    assert "MacDonald & Vosko" in data["functional"]
    direct = {x.subshell: x for x in valence_cross_sections("Au", 40.81)}
    for s in data["subshells"]:
        assert s["sigma_per_electron_mb"] == direct[s["subshell"]].sigma_per_electron_mb


@pytest.mark.parametrize("name, ev", [
    # lab line energies, eV (common practice)
    ("mgka", 1253.6), ("HE-I", 21.22), ("Cr-Ka", 5414.7), ("GaKa", 9251.7), ("al-ka", 1486.6),
])
def test_source_names(capsys, name, ev):
    code, out, _ = run(capsys, "xsec", "Ag", "--photon-energy", name, "--json")
    assert code == 0
    assert json.loads(out)["photon_energy_ev"] == ev


@pytest.mark.parametrize("suffix, magic", [(".png", b"\x89PNG"), (".svg", b"<?xml")])
def test_plot_written(capsys, tmp_path, suffix, magic):
    path = tmp_path / f"cu{suffix}"
    code, out, err = run(capsys, "xsec", "Cu", "--photon-energy", "Mg-Ka", "--plot", str(path))
    assert code == 0, err
    assert path.read_bytes().startswith(magic)
    assert str(path) in out


@pytest.mark.parametrize("argv, match", [
    (["Xx", "--photon-energy", "100"], "unknown element"),
    (["Cu", "--photon-energy", "0"], "positive number"),
    (["Cu", "--photon-energy=-5"], "positive number"),
    (["Cu", "--photon-energy", "nan"], "positive number"),
    (["Cu", "--photon-energy", "Foo-Ka"], "Al-Ka"),
    (["Cu", "--photon-energy", "5"], "10–10000 eV"),
    (["Cu", "--photon-energy", "100", "--plot", "x.pdf"], ".png or .svg"),
])
def test_errors_exit_1_with_one_line(capsys, argv, match):
    code, out, err = run(capsys, "xsec", *argv)
    assert code == 1
    lines = err.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("valband xsec: error:")
    assert match in lines[0]
    assert "accepted" in lines[0] or "10–10000" in lines[0] or ".png" in lines[0]
