"""``valband params generate | show | fit``, run in-process through ``main(argv)``.

External checks: the generated set must pass the format-v1 validator and reproduce the
library's tables; the fit must recover the parameters that made its (invented, synthetic)
reference bands, a round trip (common practice for testing a fit).
"""

from __future__ import annotations

import json

import numpy as np
import pytest

from valband.cli.main import main
from valband.params import ParameterSet, load_parameter_set, write_parameter_set
from valband.params.fitting import adjusted_parameter_dict, model_bands, subset_parameter_set
from valband.params.harrison import build_harrison_dict
from valband.params.reference_bands import write_reference_bands
from valband.structure import build_structure
from valband.tb import build_model


def run(capsys, *argv):
    code = main(list(argv))
    out, err = capsys.readouterr()
    return code, out, err


@pytest.fixture(scope="module")
def al_set(tmp_path_factory):
    """``valband params generate Al`` with a short distance grid (the file and its output)."""
    path = tmp_path_factory.mktemp("gen") / "al.toml"
    code = main(["params", "generate", "Al", "--out", str(path), "--distances", "20",
                 "--name", "al-test", "--quiet"])
    assert code == 0
    return path


def test_generate_writes_a_valid_set(al_set):
    ps = load_parameter_set(al_set)
    assert ps.name == "al-test" and not ps.orthogonal
    assert set(ps.elements) == {"Al"} and ps.element("Al").shells == ("s", "p")
    # onsite = free-atom scalar-relativistic LDA eigenvalues (Al 3s ≈ −7.83 eV, 3p ≈ −2.78 eV
    # non-relativistic in NIST SRD 141; the scalar-relativistic shift is < 0.02 eV for Al)
    assert ps.element("Al").onsite["s"] == pytest.approx(-7.83, abs=0.05)
    assert ps.element("Al").onsite["p"] == pytest.approx(-2.78, abs=0.05)
    for word in ("confinement", "quadrature", "valband_version", "functional", "generation",
                 "valband params generate"):
        assert word in ps.provenance


def test_rule_option_sets_the_factors(tmp_path, capsys):
    # --rule reaches the atoms: r0 = factor x covalent radius (ase.data.covalent_radii, Al
    # 1.21 Å) in the recorded confinement, and the output states the rule used
    path = tmp_path / "al-rule.toml"
    code = main(["params", "generate", "Al", "--out", str(path), "--distances", "12",
                 "--rule", "s=1.45,p=1.8,density=1.55", "--quiet"])
    out, _ = capsys.readouterr()
    assert code == 0 and "s 1.45, p 1.8, d 1.68, density 1.55" in out
    ps = load_parameter_set(path)
    from valband.twocentre.generate import settings_from_provenance

    s = settings_from_provenance(ps.provenance)
    assert s.r0_factors == {"s": 1.45, "p": 1.8, "d": 1.68} and s.density_factor == 1.55
    from valband.twocentre.generate import PROVENANCE_PREFIX

    record = json.loads(ps.provenance[len(PROVENANCE_PREFIX):].split(" | ", 1)[0])
    rcov = 1.21 / 0.529177210903  # bohr (CODATA 2018 Bohr radius 0.529177210903 Å)
    al = record["confinement"]["Al"]
    assert al["r0_density_bohr"] == pytest.approx(1.55 * rcov, rel=1e-9)
    assert al["r0_orbitals_bohr"]["s"] == pytest.approx(1.45 * rcov, rel=1e-9)
    assert "--rule" in record["command"]


def test_show_text_and_json(capsys, al_set):
    code, out, _ = run(capsys, "params", "show", str(al_set))
    assert code == 0
    for word in ("al-test", "non-orthogonal", "Al", "onsite", "cutoff", "provenance",
                 "confinement: power 2.0"):
        assert word in out
    code, out, _ = run(capsys, "params", "show", str(al_set), "--json")
    s = json.loads(out)
    assert s["schema"] == "valband.params" and s["elements"]["Al"]["shells"] == ["s", "p"]
    pair = s["pairs"]["Al-Al"]
    assert pair["laws"] == ["spline"] and pair["tabulated_to_A"] >= pair["cutoff_A"]
    assert s["provenance"]["generation"]["n_distances"] == 20


def test_show_harrison_digest(capsys):
    code, out, _ = run(capsys, "params", "show", "harrison-universal")
    assert code == 0 and "pairs (36)" in out and "--pairs lists all" in out
    code, out, _ = run(capsys, "params", "show", "harrison-universal", "--pairs")
    assert out.count(" power, ") == 36


@pytest.mark.parametrize(
    ("argv", "message"),
    [
        (["Ce"], "open 4f/5f shell"),
        (["Xx"], "element"),
        (["Al", "--r0", "Al=0.5"], "too small"),
        (["Al", "--r0", "Al"], "accepted: EL=BOHR or EL:SHELL=BOHR"),
        (["Al", "--r0", "Al:f=4"], "accepted: EL=BOHR or EL:SHELL=BOHR"),
        (["Al", "--r0", "Cu=4"], "not among the elements"),
        (["Al", "--distances", "3"], "n_distances"),
        (["Al", "--distances", "5:2:10"], "accepted: N"),
        (["Al", "--out", "set.txt"], "ending in .toml"),
        (["Al", "--rule", "d=x"], "accepted: comma-separated s=F"),
        (["Al", "--rule", "f=1.2"], "accepted: comma-separated s=F"),
        (["Al", "--rule", "s=1,s=2"], "each at most once"),
    ],
)
def test_generate_bad_input(capsys, argv, message):
    code, _, err = run(capsys, "params", "generate", *argv, "--quiet")
    assert code == 1
    assert message in err and "valband params: error:" in err
    assert len(err.strip().splitlines()) == 1


def test_show_unknown_set(capsys):
    code, _, err = run(capsys, "params", "show", "no-such-set")
    assert code == 1 and "accepted" in err


# --------------------------------------------------------------------------- fit
@pytest.fixture()
def fit_case(tmp_path):
    """A Harrison Cu set, and invented reference bands made from a changed copy of it."""
    base = ParameterSet.from_dict(build_harrison_dict(["Cu"]))
    base_path = write_parameter_set(base, tmp_path / "cu.toml")
    st = build_structure("Cu fcc 3.615")
    truth = ParameterSet.from_dict(adjusted_parameter_dict(
        subset_parameter_set(base, ["Cu"]), {("Cu", "d"): 0.35}, {"scale:Cu-Cu:dd": 0.9}, {},
        {}))
    kpts = np.random.default_rng(11).random((10, 3))  # seed 11
    e = model_bands(build_model(st, truth), kpts) + 4.0
    ref = write_reference_bands(tmp_path / "ref.txt", kpts, e, fermi_level=0.0,
                                comment="invented reference bands (a changed Harrison Cu set)")
    return base_path, ref


def test_fit_recovers_and_writes_everything(capsys, tmp_path, fit_case):
    base_path, ref = fit_case
    out_dir = tmp_path / "fit"
    code, out, err = run(capsys, "params", "fit", str(base_path), str(ref), "--structure",
                         "Cu fcc 3.615", "--out", str(out_dir), "--name", "cu-refined")
    assert code == 0, err
    assert "fit converged" in out and "per band" in out
    for name in ("cu-refined.toml", "fit_report.json", "fit_bands.csv", "fit_residuals.png"):
        assert (out_dir / name).stat().st_size > 0, name
    report = json.loads((out_dir / "fit_report.json").read_text())
    got = {(p["kind"], p["target"]): p["value"] for p in report["parameters"]}
    assert got["onsite", "Cu:d"] == pytest.approx(0.35, abs=1e-4)
    assert got["scale", "Cu-Cu:dd"] == pytest.approx(0.9, abs=1e-4)
    assert report["shift_eV"] == pytest.approx(-4.0, abs=1e-4)
    assert report["rms_eV"] < 1e-5 and len(report["bands"]) == 9
    refined = load_parameter_set(out_dir / "cu-refined.toml")
    assert refined.name == "cu-refined" and "band fit" in refined.provenance


def test_fit_that_does_not_converge_exits_with_a_message(capsys, tmp_path, fit_case):
    base_path, ref = fit_case
    out_dir = tmp_path / "fit"
    code, out, err = run(capsys, "params", "fit", str(base_path), str(ref), "--structure",
                         "Cu fcc 3.615", "--out", str(out_dir), "--max-evaluations", "1")
    assert code == 1
    assert "did not converge" in err and "--max-evaluations" in err
    assert "DID NOT CONVERGE" in out
    assert (out_dir / "fit_report.json").exists()  # the partial result is kept and reported
    assert json.loads((out_dir / "fit_report.json").read_text())["converged"] is False


def test_fit_bad_reference(capsys, tmp_path, fit_case):
    base_path, ref = fit_case
    lines = ref.read_text().splitlines()
    lines[-1] = " ".join(lines[-1].split()[:-1])  # the last k-point loses a band
    ref.write_text("\n".join(lines) + "\n")
    code, _, err = run(capsys, "params", "fit", str(base_path), str(ref), "--structure",
                       "Cu fcc 3.615", "--out", str(tmp_path / "f"))
    assert code == 1 and "8 band energies" in err and "missing band" in err


# --------------------------------------------------------------------------- orthogonal
def test_orthogonal_writes_a_valid_counterpart(capsys, tmp_path):
    # a small, quick run (two sp elements, coarse mesh): the file must pass the format-v1
    # validator, be orthogonal, carry the command and the band errors, and the JSON report
    # must give the same figures as the provenance
    out = tmp_path / "o.toml"
    code, text, _ = run(capsys, "params", "orthogonal", "valband-tc-2026", "--elements",
                        "Al,Ga", "--mesh", "3", "--max-evaluations", "6", "--out", str(out),
                        "--json", "--quiet")
    assert code == 0
    report = json.loads(text)
    ps = load_parameter_set(out)
    assert ps.orthogonal and set(ps.elements) == {"Al", "Ga"} and len(ps.pairs) == 3
    prov = json.loads(ps.provenance)
    assert prov["command"].startswith("valband params orthogonal valband-tc-2026 --out")
    assert prov["source_set"]["name"] == "valband-tc-2026"
    for el in ("Al", "Ga"):
        assert prov["band_rms_eV"][el]["window_fit"] == pytest.approx(
            report["quality"][el]["rms_window_fit"], abs=1e-4)
    assert "Al-Ga" in report["pairs"]


@pytest.mark.parametrize(
    "argv,message",
    [
        (["valband-tc-2026", "--out", "o.txt"], "ending in .toml"),
        (["valband-tc-2026", "--out", "o.toml", "--elements", "Al,Xx"], "has no element 'Xx'"),
        (["valband-tc-2026", "--out", "o.toml", "--mesh", "1"], "accepted: an integer 2-40"),
        (["valband-tc-2026", "--out", "o.toml", "--pair-threshold", "-1"], "pair_threshold"),
    ],
)
def test_orthogonal_bad_input(capsys, argv, message):
    code, _, err = run(capsys, "params", "orthogonal", *argv, "--quiet")
    assert code == 1
    assert message in err and "valband params: error:" in err


def test_show_names_the_counterpart_and_its_fit(capsys):
    code, out, _ = run(capsys, "params", "show", "valband-tc-2026")
    assert code == 0 and "orthogonal counterpart: valband-tc-2026-orth" in out
    code, out, _ = run(capsys, "params", "show", "valband-tc-2026-orth")
    assert code == 0 and "fitted to the bands of valband-tc-2026" in out
    assert "refitted to compounds" in out
