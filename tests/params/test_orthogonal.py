"""The orthogonal counterpart of valband-tc-2026: fit, held-out bands, compounds, CPA, KPM, lookup.

The reference of every physics check here is the *source* set valband-tc-2026 (the bands the
orthogonal set approximates), computed independently of the fit, on crystals and compounds that
were not fitted (held-out strains ±2 %, B2/L1₀/L1₂ compounds, random supercells); the sign of
the Pd d-band shift in Cu–Pd is also checked against the published one. Tolerances are stated
beside each check with the value measured when the set was made.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from valband.errors import ParameterError
from valband.params import (
    ParameterSet,
    dumps,
    load_parameter_set,
    orthogonal_counterpart,
    write_parameter_set,
)
from valband.params.fitting import model_bands
from valband.params.orthogonal import (
    OrthogonalFitSettings,
    combine_pair,
    compound_checks,
    crystal_targets,
    element_crystals,
    fit_element,
    reference_radius,
)
from valband.structure import b2, build_structure, l10, l12, load_structure
from valband.tb import build_model
from valband.workflows import DOSSettings, compute_dos, describe

WINDOW = (-15.0, 5.0)  # eV, the descriptor window of the d-band centres (DEVELOPERS.md)


@pytest.fixture(scope="module")
def source():
    return load_parameter_set("valband-tc-2026")


@pytest.fixture(scope="module")
def orth():
    return load_parameter_set("valband-tc-2026-orth")


# ------------------------------------------------------------------------------ the shipped set
def test_shipped_set_is_complete_and_orthogonal(source, orth):
    assert orth.orthogonal
    assert set(orth.elements) == set(source.elements) and len(orth.elements) == 17
    assert len(orth.pairs) == 17 * 18 // 2  # every unordered pair, like ones included
    for el, rec in source.elements.items():
        assert orth.element(el).shells == rec.shells
        assert orth.element(el).valence_electrons == rec.valence_electrons
    assert '"command": "valband params orthogonal valband-tc-2026' in orth.provenance
    assert "band_rms_eV" in orth.provenance


def test_unlike_pairs_follow_the_documented_rule(orth, source):
    # the shipped unlike pairs are exactly combine_pair of the shipped like pairs (regression of
    # the rule's implementation against the file)
    from valband.params.orthogonal import ElementFit

    def fit_of(el):
        p = orth.pair(el, el)
        return ElementFit(el, reference_radius(el), dict(orth.element(el).onsite),
                          {k: {"law": "power", "v0": v.v0, "r0": v.r0, "n": v.n}
                           for k, v in p.hopping.items()}, 0, {}, {}, 0, 0, 0, 0, 0, 0.0)

    import json

    refitted = json.loads(orth.provenance)["unlike_pairs"]["refitted"]
    shells = {el: orth.element(el).shells for el in orth.elements}
    keys = [p.key for p in orth.pairs.values() if p.first != p.second and p.key not in refitted]
    assert len(keys) >= 60  # most pairs keep the rule
    for a, b in (k.split("-") for k in keys[::7]):
        fits = {a: fit_of(a), b: fit_of(b)}
        want = combine_pair(a, b, fits, shells)
        got = orth.pair(a, b)
        assert (got.first, got.second) == (a, b)
        for name, law in want["hopping"].items():
            assert got.hopping[name].v0 == pytest.approx(law["v0"], rel=1e-9)
            assert got.hopping[name].n == pytest.approx(law["n"], rel=1e-9)


def test_refitted_pairs_improve_the_held_out_compound(source, orth):
    # a pair refitted to B2/L1_2 compounds must also describe the held-out L1_0 compound of the
    # source set better than the rule did (figures recomputed here, not read from the file)
    import json

    from valband.params.orthogonal import PairFit, fit_pair

    refitted = json.loads(orth.provenance)["unlike_pairs"]["refitted"]
    assert refitted, "no pair was refitted"
    key = "Al-Ni" if "Al-Ni" in refitted else sorted(refitted)[0]
    a, b = key.split("-")
    data = orth.to_dict()
    _, checked = fit_pair(source, data, a, b, threshold=None)  # the shipped pair, no refit
    assert isinstance(checked, PairFit) and not checked.fitted
    assert checked.rms_rule == pytest.approx(refitted[key]["fit"], abs=2e-3)
    assert checked.rms_rule_check == pytest.approx(refitted[key]["held_out_fit"], abs=2e-3)
    assert refitted[key]["held_out_fit"] < refitted[key]["held_out_rule"]


def test_geometric_mean_rule_at_the_bond_length(orth):
    # the rule itself: V_AB(r) = -sqrt(V_AA(r) V_BB(r)) for like-signed integrals (module
    # docstring), at distances inside the taper's flat part; Cu-Pd keeps the rule
    import json

    assert "Cu-Pd" not in json.loads(orth.provenance)["unlike_pairs"]["refitted"]
    r = np.array([2.55, 2.65, 2.75, 3.6])
    for name in ("sss", "dds", "ddp", "pds"):
        i = ["sss", "sps", "pss", "sds", "dss", "pps", "ppp", "pds", "pdp", "dps", "dpp", "dds",
             "ddp", "ddd"].index(name)
        va = orth.hopping("Cu", "Cu", r)[:, i]
        vb = orth.hopping("Pd", "Pd", r)[:, i]
        vab = orth.hopping("Cu", "Pd", r)[:, i]
        if np.all(va * vb > 0):
            assert np.allclose(vab, np.sign(va) * np.sqrt(va * vb), rtol=1e-9)


def test_fit_of_one_element_reproduces_the_shipped_values(source, orth):
    # regenerating Al with the shipped settings gives the shipped Al values (the fit is
    # deterministic; Al is the fastest element to fit)
    fit = fit_element(source, "Al", OrthogonalFitSettings())
    for sh, v in fit.onsite.items():
        assert orth.element("Al").onsite[sh] == pytest.approx(v, abs=1e-6)
    for name, law in fit.laws.items():
        assert orth.pair("Al", "Al").hopping[name].v0 == pytest.approx(law["v0"], rel=1e-6)


# ------------------------------------------------------------------------------ bands
# Held-out strained crystals (±2 % lattice constant; fitted were 0 and ±4 %): RMS of the band
# error over E_F − 10 … E_F + 3 eV of the source crystal. Measured when the set was made (eV):
# Cu 0.17, Pd 0.17, Ni 0.18, Pt 0.21, Fe 0.19, Ag 0.14 (the d bands alone, E_F − 3.5 … −1 eV
# in Cu: 0.07-0.08). Bound: 0.25 eV for these d metals, the accuracy this fit form reaches
# (two neighbour shells, power laws); the sp metals (Al 0.45, Ga, In, Sn 0.32-0.34) are worse
# and are bounded separately.
@pytest.mark.parametrize("el,bound", [("Cu", 0.25), ("Pd", 0.25), ("Fe", 0.25), ("Pt", 0.25),
                                      ("Al", 0.55)])
def test_held_out_strained_bands(source, orth, el, bound):
    s = OrthogonalFitSettings()
    num = den = 0.0
    for strain in (-0.02, 0.02):
        for target in crystal_targets(source, element_crystals(el, strain), s):
            e = model_bands(build_model(target.structure, orth), target.kpoints)
            rel = target.energies - target.fermi_level
            m = (rel >= -10.0) & (rel <= 3.0)
            wk = np.broadcast_to(target.kweights[:, None], rel.shape)
            num += float(np.sum(wk[m] * (e - target.energies)[m] ** 2) / np.sum(wk[m]))
            den += 1
    assert math.sqrt(num / den) < bound


# Elemental d-band centres, orthogonal vs source (first moment of the d pDOS over the descriptor
# window). Measured: Cu −0.16, Ni −0.05, Pd −0.01, Pt +0.01, Ag −0.16, Au −0.33, Fe −0.10 eV.
# Bounds: each within 0.35 eV, mean |Δ| within 0.15 eV.
def test_elemental_d_band_centres_close_to_the_source(source, orth):
    specs = ["Cu fcc 3.61", "Ni fcc 3.52", "Pd fcc 3.89", "Pt fcc 3.92", "Ag fcc 4.09",
             "Au fcc 4.08", "Fe bcc 2.87"]
    diffs = []
    for spec in specs:
        st = build_structure(spec)
        el = st.symbols[0]
        c = [describe(compute_dos(build_model(st, p), DOSSettings(mesh=12, width=0.1,
                                                                   emin=-16.0)),
                      "d", WINDOW).elements[el].centre for p in (source, orth)]
        diffs.append(c[1] - c[0])
    assert max(abs(d) for d in diffs) < 0.35, diffs
    assert np.mean(np.abs(diffs)) < 0.15, diffs


# Held-out compounds (never fitted: Cu-Pd and Cu-Au keep the combination rule, and no compound
# entered the like-pair fits). Measured (12³ mesh): d-band centres within 0.17 eV (Cu3Au worst:
# Cu −0.17, Au −0.13 eV); band energy of formation (compound minus the elements at their
# reference lattice constants, per atom; a band-structure check, not a total energy) B2 CuPd
# +0.23, L1_0 CuPd −0.01, Cu3Pd −0.01, Cu3Au −0.28 eV. Refitted pairs (not held out here): B2
# NiAl Ni centre −0.10 eV, formation band energy −0.32 eV (the rule alone: −0.26 eV, −1.4 eV
# band energy per atom). Bounds: centres 0.25 eV, formation band energies 0.35 eV.
def test_held_out_compounds(source, orth):
    structures = [b2("Cu", "Pd"), l10("Cu", "Pd"), l12("Cu", "Au")]
    elements = {el: build_structure(spec) for el, spec in
                (("Cu", "Cu fcc 3.61"), ("Pd", "Pd fcc 3.89"), ("Au", "Au fcc 4.08"))}
    rows = compound_checks(source, orth, structures + list(elements.values()), mesh=10)
    pure = {r["structure"].split(":")[1].split()[0]: r for r in rows[len(structures):]}
    for st, row in zip(structures, rows, strict=False):
        for el in set(st.symbols):
            d = row["orthogonal"]["d_centre"][el] - row["source"]["d_centre"][el]
            assert abs(d) < 0.25, (st.source, el, d)
        form = {}
        for tag in ("source", "orthogonal"):
            ref = sum(pure[el][tag]["band_energy_per_atom"] for el in st.symbols) / st.n_sites
            form[tag] = row[tag]["band_energy_per_atom"] - ref
        assert abs(form["orthogonal"] - form["source"]) < 0.35, (st.source, form)


# ------------------------------------------------------------------------------ CPA and KPM
def test_cpa_cupd_gives_the_pd_d_band_shift_of_the_source_supercells(source, orth):
    # Published: the Pd d band moves away from E_F (to larger binding energy) when Pd is
    # alloyed with Cu (XPS of Cu–Pd alloys; d-band centre shifts of Ruban, Hammer, Stoltze,
    # Skriver & Nørskov, J. Mol. Catal. A 115, 421 (1997), from memory). Required: the source
    # set's random 16-site Cu0.5Pd0.5 cell shows that sign, CPA with the orthogonal set the
    # same sign, and the orthogonal set reproduces the source's shift in the same cell within
    # 0.1 eV. Measured when the set was made (Pd d-band centre in the alloy minus pure Pd, eV):
    # source cell −0.95 (seed 1, 3³ mesh; −1.13 on 4³), orthogonal set in the same cell −0.93,
    # CPA −1.35 (single-site CPA with VCA hopping, Lorentzian η = 0.1 eV: its magnitude is not
    # asserted), source L1_0 CuPd −1.02.
    from valband.alloy import cpa_solve

    a = 0.5 * (3.61 + 3.89)  # Vegard, Å (ASE reference lattice constants)
    lor = DOSSettings(mesh=12, mesh_kind="gamma", method="lorentzian", width=0.1, step=0.05)

    def clipped(r):  # the descriptor window inside the CPA grid (which spans the band)
        return max(WINDOW[0], float(r.energies[0])), min(WINDOW[1], float(r.energies[-1]))

    res = cpa_solve(build_structure(f"Cu fcc {a}"), {"Cu": 0.5, "Pd": 0.5}, orth, lor)
    cpa_pd = res.component_descriptors("d", clipped(res))["Pd"].centre
    pure = cpa_solve(build_structure("Pd fcc 3.89"), {"Pd": 1.0}, orth, lor)
    cpa_shift = cpa_pd - pure.component_descriptors("d", clipped(pure))["Pd"].centre
    st = load_structure(f"random Cu0.5Pd0.5 fcc 2x2x4 {a} seed=1")
    cell = {}
    for tag, p in (("source", source), ("orthogonal", orth)):
        ref = describe(compute_dos(build_model(build_structure("Pd fcc 3.89"), p),
                                   DOSSettings(mesh=12, width=0.1, emin=-16.0)),
                       "d", WINDOW).elements["Pd"].centre
        dos = compute_dos(build_model(st, p), DOSSettings(mesh=3, width=0.1, emin=-16.0))
        cell[tag] = describe(dos, "d", WINDOW).elements["Pd"].centre - ref
    assert cell["source"] < 0 and cpa_shift < 0, (cell, cpa_shift)
    assert abs(cell["orthogonal"] - cell["source"]) < 0.1, cell


def test_kpm_with_the_orthogonal_set_matches_dense_diagonalisation(orth):
    # Γ-only KPM (exact trace) against numpy eigvalsh of the same 8-site cell, both smoothed
    # by the same Gaussian (the method of tests/kpm/test_convergence.py)
    from valband.kpm import KPMSettings, build_sparse, compute_kpm_dos

    st = load_structure("random Cu0.5Pd0.5 fcc 2x2x2 seed=3")
    h = build_model(st, orth).hamiltonian(np.zeros((1, 3)))[0].real
    levels = np.linalg.eigvalsh(h)
    dos = compute_kpm_dos(build_sparse(st, orth), KPMSettings(n_moments=768, trace="exact",
                                                               step=0.02))
    e = dos.energies + dos.fermi_level
    width = 0.3
    z = (e[:, None] - levels[None, :]) / width
    ref = 2.0 * np.exp(-0.5 * z * z).sum(axis=1) / (width * math.sqrt(2 * math.pi))
    k = np.arange(-int(6 * width / 0.02), int(6 * width / 0.02) + 1) * 0.02
    g = np.exp(-0.5 * (k / width) ** 2)
    got = np.convolve(dos.total, g / g.sum(), mode="same")
    inner = slice(100, -100)
    assert np.max(np.abs(got - ref)[inner]) / ref.max() < 0.02


# ------------------------------------------------------------------------------ lookup
def test_source_names_its_counterpart(source, orth):
    assert source.orthogonal_counterpart == "valband-tc-2026-orth"
    got = orthogonal_counterpart(source)
    assert got.name == "valband-tc-2026-orth" and got.orthogonal
    assert orthogonal_counterpart("valband-tc-2026").name == got.name
    assert orthogonal_counterpart(orth) is orth  # an orthogonal set is its own counterpart


def _tiny(orthogonal: bool, el: str = "Ag", **top) -> dict:
    d = {"schema_version": 1, "name": "tiny", "version": "1", "description": "test",
         "orthogonal": orthogonal, "provenance": "hand-written test set", **top,
         "elements": {el: {"shells": ["s"], "valence_electrons": {"value": 1, "source": "5s1"},
                             "onsite": {"s": {"value": -4.3, "source": "example"}}}},
         "pairs": {f"{el}-{el}": {"source": "example", "cutoff": {"inner": 4.2, "outer": 4.6,
                                                            "taper": "cosine"},
                             "hopping": {"sss": {"law": "power", "v0": -1.0, "r0": 2.9,
                                                 "n": 2.0}}}}}
    if not orthogonal:
        d["pairs"][f"{el}-{el}"]["overlap"] = {"sss": {"law": "power", "v0": 0.05, "r0": 2.9,
                                                  "n": 3.0}}
    return d


def test_counterpart_key_validation_and_round_trip(tmp_path):
    with pytest.raises(ParameterError, match=r"orthogonal_counterpart.*only in sets with"):
        ParameterSet.from_dict(_tiny(True, orthogonal_counterpart="x-orth"))
    with pytest.raises(ParameterError, match=r"orthogonal_counterpart: expected a string"):
        ParameterSet.from_dict(_tiny(False, orthogonal_counterpart=3))
    with pytest.raises(ParameterError, match=r"orthogonal_counterpart"):
        ParameterSet.from_dict(_tiny(False, orthogonal_counterpart=" x.toml"))
    ps = ParameterSet.from_dict(_tiny(False, orthogonal_counterpart="tiny-orth.toml"))
    assert ps.to_dict()["orthogonal_counterpart"] == "tiny-orth.toml"
    # written back by the writer, read back equal
    write_parameter_set(ps, tmp_path / "tiny.toml")
    assert load_parameter_set(tmp_path / "tiny.toml") == ps
    # a relative path is taken from the set's folder
    (tmp_path / "tiny-orth.toml").write_text(dumps(_tiny(True)), encoding="utf-8")
    got = orthogonal_counterpart(tmp_path / "tiny.toml")
    assert got.orthogonal and got.name == "tiny"


def test_counterpart_errors_say_what_to_do(tmp_path):
    ps = ParameterSet.from_dict(_tiny(False))
    with pytest.raises(ParameterError, match=r"names no orthogonal counterpart.*valband params "
                                             r"orthogonal.*orthogonal_counterpart"):
        orthogonal_counterpart(ps)
    (tmp_path / "nonorth.toml").write_text(dumps(_tiny(False)), encoding="utf-8")
    bad = ParameterSet.from_dict(_tiny(False, orthogonal_counterpart="nonorth.toml"),
                                 origin=str(tmp_path / "here.toml"))
    with pytest.raises(ParameterError, match=r"is not orthogonal"):
        orthogonal_counterpart(bad)
    (tmp_path / "other-orth.toml").write_text(dumps(_tiny(True, el="Cu")), encoding="utf-8")
    missing = ParameterSet.from_dict(_tiny(False, orthogonal_counterpart="other-orth.toml"),
                                     origin=str(tmp_path / "here.toml"))
    with pytest.raises(ParameterError, match=r"lacks Ag"):
        orthogonal_counterpart(missing)
    gone = ParameterSet.from_dict(_tiny(False, orthogonal_counterpart="absent.toml"),
                                  origin=str(tmp_path / "here.toml"))
    with pytest.raises(ParameterError, match=r"cannot be loaded"):
        orthogonal_counterpart(gone)


def test_cautions_of_the_shipped_sets_are_printed_and_recorded(capsys, tmp_path):
    # every set that carries a caution has it printed and written into summary.json
    import json

    from valband.cli.main import main

    for name in ("harrison-universal", "valband-tc-2026-orth", "example-nonorthogonal"):
        assert load_parameter_set(name).caution
    assert main(["dos", "Cu fcc", "--params", "harrison-universal", "--mesh", "4",
                 "--out", str(tmp_path / "h")]) == 0
    assert "caution (harrison-universal): band shapes and workflow only" in capsys.readouterr().err
    s = json.loads((tmp_path / "h" / "summary.json").read_text())
    assert s["provenance"]["parameter_set"]["caution"].startswith("band shapes")
