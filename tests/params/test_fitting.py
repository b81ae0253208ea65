"""Fitting a parameter set to reference bands, and reading reference-band files.

External checks: the round trips are analytic (bands computed from a known set must be fitted
back to that set's parameters, common practice for testing a fit); scipy's least_squares
status codes (0 = max_nfev reached) are those documented by SciPy.
"""

from __future__ import annotations

import numpy as np
import pytest

from valband.errors import CalculationError, InputError, ParameterError, SettingsError
from valband.params import ParameterSet
from valband.params.fitting import (
    FitSettings,
    adjusted_parameter_dict,
    fit_parameter_set,
    integral_class,
    model_bands,
    subset_parameter_set,
)
from valband.params.harrison import build_harrison_dict
from valband.params.reference_bands import (
    FORMAT_LINE,
    ReferenceBands,
    parse_reference_text,
    read_reference_bands,
    write_reference_bands,
)
from valband.structure import build_structure
from valband.tb import build_model

A_CU = 3.615  # Å, fcc Cu
KPTS = np.random.default_rng(7).random((14, 3))  # seed 7: fixed pseudo-random k-points


@pytest.fixture(scope="module")
def harrison_cu():
    return ParameterSet.from_dict(build_harrison_dict(["Cu"]))


@pytest.fixture(scope="module")
def cu_fcc():
    return build_structure(f"Cu fcc {A_CU}")


def _truth(base, onsite, scale, exponent, structure, classes="class"):
    r_ref = {"Cu-Cu": float(np.min(np.linalg.norm(build_model(structure, base).bond_vectors,
                                                   axis=1)))}
    d = adjusted_parameter_dict(subset_parameter_set(base, ["Cu"]), onsite, scale, exponent, r_ref,
                                classes)
    return ParameterSet.from_dict(d)


def test_integral_classes():
    # Slater & Koster's integrals grouped by the unordered shell pair
    assert [integral_class(n) for n in ("sss", "pss", "sps", "dps", "pds", "ddd")] == [
        "ss", "sp", "sp", "pd", "pd", "dd"]  # fmt: skip


def test_unchanged_evaluator_reproduces_build_model(harrison_cu, cu_fcc):
    # with no change the fit's fast path must give exactly the bands of build_model
    from valband.params.fitting import _Evaluator

    ev = _Evaluator(cu_fcc, harrison_cu, FitSettings())
    a = model_bands(ev.model({}, {}, {}), KPTS)
    b = model_bands(build_model(cu_fcc, harrison_cu), KPTS)
    np.testing.assert_allclose(a, b, atol=1e-12)


def test_round_trip_orthogonal_all_kinds(harrison_cu, cu_fcc):
    # bands of a known set (onsite, scale and exponent changes) are fitted back to it
    onsite = {("Cu", "p"): -0.6, ("Cu", "d"): 0.4}
    scale = {"scale:Cu-Cu:dd": 1.15, "scale:Cu-Cu:sd": 0.9, "scale:Cu-Cu:ss": 1.05}
    exponent = {"exponent:Cu-Cu:dd": 0.7}
    truth = _truth(harrison_cu, onsite, scale, exponent, cu_fcc)
    e = model_bands(build_model(cu_fcc, truth), KPTS)
    ref = ReferenceBands(KPTS, e - 7.25, np.ones(9), np.ones(len(KPTS)), None, "synthetic")
    res = fit_parameter_set(harrison_cu, cu_fcc, ref,
                            FitSettings(free=("onsite", "scale", "exponent")))
    assert res.converged, res.message
    got = {(p.kind, p.target): p.value for p in res.parameters}
    assert got["onsite", "Cu:p"] == pytest.approx(-0.6, abs=1e-5)
    assert got["onsite", "Cu:d"] == pytest.approx(0.4, abs=1e-5)
    assert ("onsite", "Cu:s") not in got  # held fixed: a free shift absorbs it
    assert got["scale", "Cu-Cu:dd"] == pytest.approx(1.15, abs=1e-5)
    assert got["scale", "Cu-Cu:sd"] == pytest.approx(0.9, abs=1e-5)
    assert got["exponent", "Cu-Cu:dd"] == pytest.approx(0.7, abs=1e-4)
    assert res.shift == pytest.approx(7.25, abs=1e-5)
    assert res.rms < 1e-6 < res.rms_initial
    # the written set (power laws absorb the exponent exactly) reproduces the truth
    np.testing.assert_allclose(res.parameter_set.hopping("Cu", "Cu", [2.556, 3.615]),
                               truth.hopping("Cu", "Cu", [2.556, 3.615]), atol=1e-5)
    assert "band fit" in res.parameter_set.provenance


def test_round_trip_nonorthogonal_twocentre(cu_fcc):
    # a non-orthogonal spline set (coarse two-centre tables of Cu): scale factors and onsite
    from valband.twocentre import QuadratureSettings, pair_table, parameter_set_dict

    t = pair_table("Cu", "Cu", np.linspace(1.6, 8.0, 24),
                   quadrature=QuadratureSettings(radial_step=0.15, n_angular=16))
    base = ParameterSet.from_dict(parameter_set_dict([t], hopping_tol=5e-3, overlap_tol=5e-4))
    truth = _truth(base, {("Cu", "d"): -0.25}, {"scale:Cu-Cu:pd": 0.85, "scale:Cu-Cu:dd": 1.1},
                   {}, cu_fcc)
    e = model_bands(build_model(cu_fcc, truth), KPTS)
    ref = ReferenceBands(KPTS, e, np.ones(9), np.ones(len(KPTS)), None, "synthetic")
    res = fit_parameter_set(base, cu_fcc, ref, FitSettings(shift="fixed"))
    got = {(p.kind, p.target): p.value for p in res.parameters}
    assert res.converged
    assert got["onsite", "Cu:d"] == pytest.approx(-0.25, abs=1e-5)
    assert got["onsite", "Cu:s"] == pytest.approx(0.0, abs=1e-5)
    assert got["scale", "Cu-Cu:pd"] == pytest.approx(0.85, abs=1e-5)
    assert got["scale", "Cu-Cu:dd"] == pytest.approx(1.1, abs=1e-5)
    assert res.rms < 1e-5


def test_per_integral_exponent_on_spline_laws(cu_fcc):
    # spline laws take a fitted exponent at their nodes; the fit (which scales the evaluated
    # integrals) and the written set (rescaled nodes) agree to the spline's interpolation error
    from valband.twocentre import QuadratureSettings, pair_table, parameter_set_dict

    t = pair_table("Cu", "Cu", np.linspace(1.6, 8.0, 40),
                   quadrature=QuadratureSettings(radial_step=0.15, n_angular=16))
    base = ParameterSet.from_dict(parameter_set_dict([t], hopping_tol=5e-3, overlap_tol=5e-4))
    truth = _truth(base, {}, {}, {"exponent:Cu-Cu:dds": 0.5}, cu_fcc, classes="integral")
    e = model_bands(build_model(cu_fcc, truth), KPTS)
    ref = ReferenceBands(KPTS, e, np.ones(9), np.ones(len(KPTS)), None, "synthetic")
    res = fit_parameter_set(base, cu_fcc, ref, FitSettings(free=("exponent",),
                                                           classes="integral", shift="fixed"))
    got = {p.target: p.value for p in res.parameters}
    assert set(got) == {f"Cu-Cu:{n}" for n in ("sss", "sps", "sds", "pps", "ppp", "pds", "pdp",
                                                "dds", "ddp", "ddd")}
    assert got["Cu-Cu:dds"] == pytest.approx(0.5, abs=0.02)
    assert all(abs(v) < 0.05 for k, v in got.items() if k not in ("Cu-Cu:dds", "Cu-Cu:ddd"))
    assert res.rms < 5e-3  # eV, residual of the written (rebuilt) set


def test_window_and_band_weights_select_energies(harrison_cu, cu_fcc):
    e = model_bands(build_model(cu_fcc, harrison_cu), KPTS)
    ref = ReferenceBands(KPTS, e, np.ones(9), np.ones(len(KPTS)), float(np.median(e)), "x")
    res = fit_parameter_set(harrison_cu, cu_fcc, ref, FitSettings(
        window=(-1.0, 1.0), band_weights=(0, 1, 1, 1, 1, 1, 1, 1, 1), max_evaluations=3))
    rel = e - np.median(e)
    want = (np.abs(rel) <= 1.0) & (np.arange(9)[None, :] > 0)
    np.testing.assert_array_equal(res.mask, want)
    assert all(b.reference_band > 0 for b in res.bands)


def test_fit_that_does_not_converge_is_reported(harrison_cu, cu_fcc):
    truth = _truth(harrison_cu, {("Cu", "d"): 0.5}, {"scale:Cu-Cu:dd": 1.2}, {}, cu_fcc)
    e = model_bands(build_model(cu_fcc, truth), KPTS)
    ref = ReferenceBands(KPTS, e, np.ones(9), np.ones(len(KPTS)), None, "synthetic")
    res = fit_parameter_set(harrison_cu, cu_fcc, ref, FitSettings(max_evaluations=2))
    # scipy's status 0: the evaluation budget ran out (SciPy documentation of least_squares)
    assert not res.converged and res.status == 0
    assert "maximum number of function evaluations" in res.message
    assert res.rms > 1e-3


def test_bad_fit_settings(harrison_cu, cu_fcc):
    ref = ReferenceBands(KPTS, np.zeros((len(KPTS), 3)), np.ones(3), np.ones(len(KPTS)), None, "x")
    with pytest.raises(SettingsError, match="accepted: a non-empty subset"):
        fit_parameter_set(harrison_cu, cu_fcc, ref, FitSettings(free=("radii",)))
    with pytest.raises(SettingsError, match="no bands to compare"):
        fit_parameter_set(harrison_cu, cu_fcc, ref, FitSettings(reference_skip=3))
    with pytest.raises(SettingsError, match="inside the energy window"):
        fit_parameter_set(harrison_cu, cu_fcc, ref, FitSettings(window=(50.0, 60.0)))
    with pytest.raises(ParameterError, match="has no element"):
        fit_parameter_set(harrison_cu, build_structure("Pd fcc 3.89"), ref)


def test_exponent_refused_for_exponential_laws(cu_fcc):
    d = subset_parameter_set(ParameterSet.from_dict(build_harrison_dict(["Cu"])), ["Cu"])
    law = d["pairs"]["Cu-Cu"]["hopping"]["sss"]
    d["pairs"]["Cu-Cu"]["hopping"]["sss"] = {"law": "exponential", "v0": law["v0"],
                                             "r0": law["r0"], "q": 3.0}
    ps = ParameterSet.from_dict(d)
    ref = ReferenceBands(KPTS, np.zeros((len(KPTS), 9)), np.ones(9), np.ones(len(KPTS)), None, "x")
    with pytest.raises(ParameterError, match="exponential laws"):
        fit_parameter_set(ps, cu_fcc, ref, FitSettings(free=("exponent",)))


# --------------------------------------------------------------------------- reference files
GOOD = f"""# invented example bands (not from any calculation)
{FORMAT_LINE}
%fermi-level 1.5
%band-weights 1 0.5 0
0.0 0.0 0.0   -3.0 1.0 2.0
0.5 0.0 0.5   -1.0 0.5 3.0   # trailing comment
"""


def test_parse_good_file(tmp_path):
    p = tmp_path / "ref.txt"
    p.write_text(GOOD)
    ref = read_reference_bands(p)
    assert ref.n_kpoints == 2 and ref.n_bands == 3
    np.testing.assert_array_equal(ref.band_weights, [1, 0.5, 0])
    assert ref.fermi_level == 1.5
    np.testing.assert_array_equal(ref.energies[1], [-1.0, 0.5, 3.0])


def test_kpoint_weight_column():
    text = f"{FORMAT_LINE}\n%kpoint-weights\n0 0 0 2.0 -1 1\n0.5 0.5 0.5 0.5 -2 2\n"
    ref = parse_reference_text(text)
    np.testing.assert_array_equal(ref.kpoint_weights, [2.0, 0.5])
    assert ref.n_bands == 2


@pytest.mark.parametrize(
    ("text", "message"),
    [
        (f"{FORMAT_LINE}\n0 0 0 -1 1 2\n0.5 0 0.5 -1 1\n", "2 band energies, but line 2 has 3"),
        (f"{FORMAT_LINE}\n0 0 0 -1 nan 2\n", "finite numbers"),
        ("0 0 0 -1 1 2\n", "not a valband reference-band file"),
        (f"{FORMAT_LINE}\n%units Ry\n0 0 0 1\n", "unknown directive"),
        (f"{FORMAT_LINE}\n0 0 0 1\n%fermi-level 0\n", "after the first data row"),
        (f"{FORMAT_LINE}\n%band-weights 1 1\n0 0 0 1 2 3\n", "one weight per band"),
        (f"{FORMAT_LINE}\n0 0 0\n", "at least one band energy"),
        (f"{FORMAT_LINE}\n", "no data rows"),
        ("%format valband-reference-bands 2\n0 0 0 1\n", "accepted: '%format"),
    ],
)
def test_bad_reference_files(text, message):
    with pytest.raises(InputError, match=message):
        parse_reference_text(text)


def test_missing_file_and_bad_json(tmp_path):
    with pytest.raises(InputError, match="cannot read reference bands"):
        read_reference_bands(tmp_path / "nope.txt")
    bad = tmp_path / "b.json"
    bad.write_text('{"not": "ase"')
    with pytest.raises(InputError, match="invalid JSON"):
        read_reference_bands(bad)


def test_write_and_ase_json_round_trip(tmp_path, harrison_cu, cu_fcc):
    # bands written in our format and as ASE BandStructure JSON read back identically
    from ase.spectrum.band_structure import BandStructure

    model = build_model(cu_fcc, harrison_cu)
    path = cu_fcc.to_atoms().cell.bandpath("GXL", npoints=12)
    e = model_bands(model, path.kpts)
    txt = write_reference_bands(tmp_path / "r.txt", path.kpts, e, fermi_level=0.5,
                                comment="invented: bands of the Harrison set")
    a = read_reference_bands(txt)
    BandStructure(path, e[None], reference=0.5).write(tmp_path / "r.json")
    b = read_reference_bands(tmp_path / "r.json")
    for ref in (a, b):
        np.testing.assert_allclose(ref.energies, e, atol=1e-6)
        np.testing.assert_allclose(ref.kpoints, path.kpts, atol=1e-8)
        assert ref.fermi_level == pytest.approx(0.5)


def test_model_bands_refuses_a_bad_overlap(cu_fcc):
    d = subset_parameter_set(ParameterSet.from_dict(build_harrison_dict(["Cu"])), ["Cu"])
    d["orthogonal"] = False
    for name, law in d["pairs"]["Cu-Cu"]["hopping"].items():
        d["pairs"]["Cu-Cu"].setdefault("overlap", {})[name] = dict(law, v0=-0.9 if name == "sss"
                                                                   else 0.0)
    ps = ParameterSet.from_dict(d)
    with pytest.raises(CalculationError, match="not positive definite"):
        model_bands(build_model(cu_fcc, ps), np.zeros((1, 3)))
