"""The shipped harrison-universal set against Harrison's closed forms and reference data."""

from __future__ import annotations

import csv
import math

import numpy as np
import pytest
import scipy.constants as sc
from ase.build import bulk
from ase.data import atomic_numbers, chemical_symbols, reference_states
from ase.neighborlist import neighbor_list

from valband.conventions import HBAR2_OVER_M
from valband.params import BOND_INTEGRALS, Cutoff, load_parameter_set
from valband.params import harrison as gen

from .helpers import NIST_CSV

COL = {n: i for i, n in enumerate(BOND_INTEGRALS)}

# Harrison's universal prefactors η: s, p from the 1999 revision (Elementary Electronic
# Structure), d from Electronic Structure and the Properties of Solids (1980) — from memory.
ETA = {"sss": -1.32, "sps": 1.42, "pps": 2.22, "ppp": -0.63, "sds": -3.16, "pds": -2.95,
       "pdp": 1.36, "dds": -16.2, "ddp": 8.75, "ddd": 0.0}  # fmt: skip
# d radii r_d (Å), Harrison's Solid State Table (1980) — from memory.
R_D = {"Fe": 0.80, "Ni": 0.71, "Cu": 0.67, "Pd": 0.94, "Ag": 0.89, "Pt": 1.04, "Au": 1.01}


@pytest.fixture(scope="module")
def ps():
    return load_parameter_set("harrison-universal")


def test_hbar2_over_m_is_harrisons_constant():
    # Harrison quotes ħ²/m = 7.62 eV Å² (both books; from memory, to the digits printed)
    assert HBAR2_OVER_M == pytest.approx(7.62, abs=0.005)


def test_cu_dd_sigma_at_2_55_angstrom(ps):
    # closed form of Harrison's scheme: V_ddσ = η_ddσ ħ² r_d³ / (m d⁵)
    d = 2.55
    expected = -16.2 * HBAR2_OVER_M * 0.67**3 / d**5
    got = ps.hopping("Cu", "Cu", np.array([d]))[0, COL["dds"]]
    assert got == pytest.approx(expected, rel=1e-5)  # v0 is rounded to 1 µeV in the file
    assert got == pytest.approx(-0.3443, abs=2e-4)


def _closed_form(name, a, b, d):
    """Harrison's V for s,p–s,p (1/d²), s,p–d (r_d^{3/2}/d^{7/2}) and d–d (r_d³/d⁵)."""
    eta = ETA[{"pss": "sps", "dss": "sds", "dps": "pds", "dpp": "pdp"}.get(name, name)]
    la, lb = name[0], name[1]
    if la != "d" and lb != "d":
        return eta * HBAR2_OVER_M / d**2
    if la == "d" and lb == "d":
        return eta * HBAR2_OVER_M * (R_D[a] * R_D[b]) ** 1.5 / d**5
    rd = R_D[a] if la == "d" else R_D[b]  # r_d of the atom that carries the d shell
    return eta * HBAR2_OVER_M * rd**1.5 / d**3.5


def test_every_integral_follows_the_closed_form(ps):
    for (a, b), pair in ps.pairs.items():
        r0 = pair.hopping["sss"].r0
        d = np.array([0.9 * r0, r0, 1.2 * r0, 1.4 * r0])  # all inside the inner cutoff
        assert 1.4 * r0 < pair.cutoff.inner
        for x, y in ((a, b), (b, a)):
            h = ps.hopping(x, y, d)
            for name in BOND_INTEGRALS:
                sx, sy = ps.element(x).shells, ps.element(y).shells
                if name[0] in sx and name[1] in sy:
                    np.testing.assert_allclose(h[:, COL[name]], _closed_form(name, x, y, d),
                                               rtol=2e-5, atol=1e-6, err_msg=f"{x}-{y} {name}")
                else:
                    assert np.all(h[:, COL[name]] == 0)


def test_signs_of_the_universal_integrals(ps):
    # bonding ssσ, ppπ and ddσ are negative, spσ and ppσ positive in the Slater–Koster sign
    # convention (Harrison 1980, ch. 2; common practice)
    h = ps.hopping("Cu", "Cu", np.array([2.55]))[0]
    assert h[COL["sss"]] < 0 < h[COL["sps"]] and h[COL["pps"]] > 0 > h[COL["ppp"]]
    assert h[COL["dds"]] < 0 < h[COL["ddp"]] and h[COL["sds"]] < 0 and h[COL["pds"]] < 0


def test_regenerated_file_equals_the_shipped_one():
    shipped = gen.shipped_path().read_text(encoding="utf-8")
    assert gen.render_harrison_toml() == shipped


def test_command_line_writes_the_shipped_file(tmp_path):
    out = tmp_path / "h.toml"
    assert gen.main([str(out)]) == 0
    assert out.read_text(encoding="utf-8") == gen.shipped_path().read_text(encoding="utf-8")


def test_elements_shells_and_electron_counts(ps):
    # valence electrons of the neutral atoms (s + d (+ p)); common practice
    expected = {"Fe": 8, "Ni": 10, "Cu": 11, "Pd": 10, "Ag": 11, "Pt": 10, "Au": 11, "Al": 3}
    assert set(expected) <= set(ps.elements)
    for sym, n in expected.items():
        el = ps.element(sym)
        assert el.valence_electrons == n
        assert el.shells == (("s", "p") if sym == "Al" else ("s", "p", "d"))
    n_el = len(ps.elements)
    assert len(ps.pairs) == n_el * (n_el + 1) // 2  # every unordered pair, like ones included


def test_nearest_neighbour_distance_agrees_with_ase():
    # ASE builds the reference crystal; its shortest bond is the nearest-neighbour distance
    for sym in ("Fe", "Cu", "Al", "Au", "Co", "Ti", "Mg"):
        d = neighbor_list("d", bulk(sym), 4.0)
        assert gen.nearest_neighbour_distance(sym) == pytest.approx(d.min(), rel=1e-12)


def _reference_structures():
    out = []
    for z, ref in enumerate(reference_states):
        if not ref or ref.get("symmetry") not in ("fcc", "bcc", "hcp"):
            continue
        # hcp only near the ideal c/a = 1.633 (Zn, Cd and the chain elements are excluded)
        if ref["symmetry"] == "hcp" and not 1.56 <= ref["c/a"] <= 1.65:
            continue
        out.append(chemical_symbols[z])
    return out


@pytest.mark.parametrize("sym", _reference_structures())
def test_cutoff_rule_keeps_two_shells_and_drops_the_third(sym):
    # neighbour counts of the first two shells: fcc 12 + 6, bcc 8 + 6, hcp 12 + 6 (textbook)
    kind = reference_states[atomic_numbers[sym]]["symmetry"]
    dnn = gen.nearest_neighbour_distance(sym)
    c = Cutoff(inner=gen.CUTOFF_INNER_FACTOR * dnn, outer=gen.CUTOFF_OUTER_FACTOR * dnn,
               taper="quintic")  # fmt: skip
    atoms = bulk(sym)
    i, d = neighbor_list("id", atoms, 2.0 * dnn)
    f = c.factor(d)
    assert np.all((f == 1.0) | (f == 0.0)), "a neighbour falls inside the taper window"
    kept = np.bincount(i[f == 1.0], minlength=len(atoms))
    assert np.all(kept == {"fcc": 18, "bcc": 14, "hcp": 18}[kind])


def test_cutoffs_of_the_shipped_like_pairs_keep_two_shells(ps):
    for sym in ps.elements:
        atoms = bulk(sym)
        i, d = neighbor_list("id", atoms, 2.0 * ps.cutoff(sym, sym))
        h = ps.hopping(sym, sym, d)[:, COL["sss"]]
        kind = reference_states[atomic_numbers[sym]]["symmetry"]
        assert np.count_nonzero(h) == {"fcc": 18, "bcc": 14}[kind] * len(atoms)


def test_nist_values_copied_from_the_reference_csv():
    # NIST SRD 141 (Kotochigova, Levine, Shirley, Stiles, Clark, PRA 55, 191 (1997)), LDA;
    # tests/data/nist_srd141_lda.csv (a missing file fails the test)
    table = {}
    with open(NIST_CSV, newline="") as fh:
        for row in csv.DictReader(fh):
            table[(row["element"], row["quantity"])] = float(row["value_hartree"])
    for (sym, orb), ha in gen.NIST_LDA_HARTREE.items():
        assert table[(sym, f"eps_{orb}")] == pytest.approx(ha, abs=5e-7)


def test_onsite_energies_and_their_provenance(ps):
    hartree = sc.physical_constants["Hartree energy in eV"][0]  # CODATA via SciPy
    for (sym, orb), ha in gen.NIST_LDA_HARTREE.items():
        shell = orb[-1]
        assert ps.element(sym).onsite[shell] == pytest.approx(ha * hartree, abs=1e-6)
        assert "NIST SRD 141" in ps.element(sym).provenance[f"onsite.{shell}"]
    for sym, el in ps.elements.items():
        for shell in el.shells:
            src = el.provenance[f"onsite.{shell}"]
            assert "NIST SRD 141 LDA" in src or "from memory" in src, (sym, shell, src)
    # non-relativistic LDA orders the noble-metal levels d below s (NIST SRD 141 Cu, Ag)
    for sym in ("Cu", "Ag"):
        assert ps.element(sym).onsite["d"] < ps.element(sym).onsite["s"]


def test_pair_provenance_says_from_memory(ps):
    assert "from memory" in ps.provenance
    for pair in ps.pairs.values():
        assert "from memory" in pair.source


def test_reference_distance_of_unlike_pairs_is_the_mean(ps):
    pair = ps.pair("Cu", "Au")
    r0 = pair.hopping["sss"].r0
    # ASE reference lattice constants, fcc: d_nn = a / √2
    expected = 0.5 * (3.61 + 4.08) / math.sqrt(2.0)
    assert r0 == pytest.approx(expected, abs=1e-6)
    assert pair.cutoff.inner == pytest.approx(1.45 * r0, abs=1e-4)
    assert pair.cutoff.outer == pytest.approx(1.60 * r0, abs=1e-4)


def test_nonorthogonal_example_overlap_matrix_stays_positive_definite():
    # S(k) = 1 + Σ_R S_R e^{ik·R}; each S_R is a rotation of the bond-frame block (Slater &
    # Koster 1954), so ‖S_R‖₂ ≤ ‖S_R‖_F = Frobenius norm of the bond-frame integrals. If
    # Σ_R ‖S_R‖_F < 1 then every eigenvalue of S(k) exceeds 0 for all k (Weyl's inequality).
    ex = load_parameter_set("example-nonorthogonal")
    assert not ex.orthogonal and "illustrative" in ex.description.lower()
    _, d = neighbor_list("id", bulk("Cu", "fcc", a=3.61), ex.cutoff("Cu", "Cu"))
    s = ex.overlap("Cu", "Cu", d)
    sigma = ["sss", "sps", "pss", "sds", "dss", "pps", "pds", "dps", "dds"]
    pi = ["ppp", "pdp", "dpp", "ddp"]
    frob = np.sqrt((s[:, [COL[n] for n in sigma]] ** 2).sum(1)
                   + 2 * (s[:, [COL[n] for n in pi]] ** 2).sum(1) + 2 * s[:, COL["ddd"]] ** 2)
    assert len(d) == 18
    assert frob.sum() < 1.0
