"""The shipped first-principles set ``valband-tc-2026``: reproducibility, signs, limits, physics.

External checks (named beside each test):
* signs of the ten forward integrals: Harrison's tables (W. A. Harrison, Electronic Structure
  and the Properties of Solids, 1980), common practice in the Slater–Koster convention;
* ddσ : ddπ : ddδ against Andersen's canonical −6 : 4 : −1 (O. K. Andersen, canonical band
  theory) and Harrison's universal −16.2 : 8.75 : 0, from memory;
* reversal parity (−1)^(l+l′) and H_AB(d) = H_BA(−d)ᵀ: Slater & Koster, Phys. Rev. 94, 1498
  (1954);
* band physics of the elemental metals: common practice (noble d bands full, Cu d-band top
  1.5–2.5 eV below E_F, E_F inside the Pd and Pt d bands, d bands widen 3d → 4d → 5d);
* d-band centres: Ruban, Hammer, Stoltze, Skriver & Nørskov, J. Mol. Catal. A 115, 421 (1997),
  bulk values from memory, ±0.3 eV (the issue's accuracy target).
"""

from __future__ import annotations

import numpy as np
import pytest

from valband.params import load_parameter_set
from valband.params.model import BOND_INTEGRALS, REVERSED_PARTNER
from valband.structure import build_structure
from valband.tb import build_model
from valband.tb.slater_koster import sk_blocks
from valband.twocentre import bond_integrals
from valband.twocentre.generate import generation_atoms, settings_from_provenance
from valband.workflows import compute_dos, describe
from valband.workflows.dos import DOSSettings

from .shipped_checks import assert_pair_regenerates, assert_shipped_contents

NAME = "valband-tc-2026"
# nearest-neighbour distances (Å) of the elemental metals, from ASE's reference lattice
# constants (fcc a/√2)
NN = {"Cu": 2.556, "Pd": 2.751, "Pt": 2.775, "Au": 2.884, "Ni": 2.492, "Ag": 2.889}
FCC_A = {"Ni": 3.524, "Cu": 3.615, "Pd": 3.891, "Ag": 4.086, "Pt": 3.924, "Au": 4.078,
         "Ir": 3.839, "Rh": 3.803}


@pytest.fixture(scope="module")
def ps():
    return load_parameter_set(NAME)


def test_contents(ps):
    s = assert_shipped_contents(ps)
    # generated before the relativistic exchange correction existed: its record reads "off"
    assert s.relativistic_exchange == "off"


def test_regenerated_pair_reproduces_the_shipped_numbers(ps):
    # the shipped file is the output of the generator with the settings it records
    assert_pair_regenerates(ps, "Cu", "Pd")


@pytest.mark.parametrize("pair", [("Cu", "Cu"), ("Pd", "Pd"), ("Pt", "Pt"), ("Au", "Au"),
                                  ("Ni", "Ni"), ("Cu", "Pd"), ("Ag", "Au")])
def test_signs_at_typical_bond_lengths(ps, pair):
    # Harrison's tables (common practice): ssσ<0, spσ>0, sdσ<0, ppσ>0, ppπ<0, pdσ<0, pdπ>0,
    # ddσ<0, ddπ>0, ddδ<0 at the nearest-neighbour distance
    a, b = pair
    r = 0.5 * (NN[a] + NN[b])
    v = dict(zip(BOND_INTEGRALS, ps.hopping(a, b, [r])[0], strict=True))
    negative = ("sss", "sds", "ppp", "pds", "dds", "ddd")
    positive = ("sps", "pps", "pdp", "ddp")
    assert all(v[n] < 0 for n in negative), {n: v[n] for n in negative}
    assert all(v[n] > 0 for n in positive), {n: v[n] for n in positive}


@pytest.mark.parametrize("el", ["Cu", "Pd", "Pt", "Au"])
def test_dd_ratios(ps, el):
    # canonical −6 : 4 : −1 gives ddπ/ddσ = −0.67, ddδ/ddσ = 0.17; Harrison's universal values
    # −0.54 and 0 (from memory). Accepted: −0.8 … −0.3 and 0.02 … 0.25. The shipped set gives
    # about −0.37 and 0.04: its hard-confined d orbitals decay faster than canonical tails
    # (measured for Cu: d radius 2 r_cov gives −0.59 and 0.10).
    v = dict(zip(BOND_INTEGRALS, ps.hopping(el, el, [NN[el]])[0], strict=True))
    assert -0.8 < v["ddp"] / v["dds"] < -0.3
    assert 0.02 < v["ddd"] / v["dds"] < 0.25


def test_reversal_parity_and_hermiticity(ps):
    # Slater & Koster (1954): E_AB(d) = E_BA(−d)ᵀ; named reversed integrals are the partners
    r = np.array([2.4, 2.7, 3.3])
    d = np.array([0.3, -0.5, 0.81])
    d /= np.linalg.norm(d)
    for kind in ("hopping", "overlap"):
        ab = getattr(ps, kind)("Cu", "Pd", r)
        ba = getattr(ps, kind)("Pd", "Cu", r)
        for k, name in enumerate(BOND_INTEGRALS):
            partner = BOND_INTEGRALS.index(REVERSED_PARTNER[name])
            np.testing.assert_array_equal(ab[:, k], ba[:, partner])
        e_ab = sk_blocks(np.tile(d, (3, 1)), ab)
        e_ba = sk_blocks(np.tile(-d, (3, 1)), ba)
        np.testing.assert_allclose(e_ab, np.swapaxes(e_ba, 1, 2), atol=1e-13)
    # parity along the bond (d = z) for a like pair: ps = −sp, dp = −pd, ds = +sd
    e = sk_blocks(np.array([[0.0, 0.0, 1.0]]), ps.hopping("Cu", "Cu", [2.556]))[0]
    s, z, z2 = 0, 3, 8  # valband's orbital order: s; x, y, z; xy, yz, zx, x²−y², 3z²−r²
    assert e[z, s] == pytest.approx(-e[s, z]) and abs(e[s, z]) > 0.5
    assert e[z2, z] == pytest.approx(-e[z, z2]) and abs(e[z, z2]) > 0.5
    assert e[z2, s] == pytest.approx(e[s, z2]) and abs(e[s, z2]) > 0.3


def test_overlap_limits_and_decay(ps):
    # R → 0: ⟨φ|φ⟩ = 1 for the same orbital, 0 between different l (normalised orbitals,
    # orthogonal harmonics); beyond the cutoff every integral is exactly 0, and the taper
    # brings value and slope to 0 smoothly (quintic, valband/params/README.md)
    s = settings_from_provenance(ps.provenance)
    pd = generation_atoms(["Pd"], s)["Pd"]
    b = bond_integrals(pd.site(), pd.site(), [1e-3])
    for name in ("sss", "pps", "ppp", "dds", "ddp", "ddd"):
        assert b.overlap[0, BOND_INTEGRALS.index(name)] == pytest.approx(1.0, abs=1e-3)
    for name in ("sps", "sds", "pds", "pdp"):
        assert abs(b.overlap[0, BOND_INTEGRALS.index(name)]) < 1e-3
    pair = ps.pair("Pd", "Pd")
    outer = pair.cutoff.outer
    assert np.all(ps.overlap("Pd", "Pd", [outer, outer + 1.0]) == 0.0)
    near = np.array([outer - 2e-3, outer - 1e-3])
    h = ps.hopping("Pd", "Pd", near)
    assert np.max(np.abs(h)) < 1e-6
    assert np.max(np.abs(np.diff(h, axis=0))) / 1e-3 < 1e-3  # eV/Å
    # |S_ssσ| falls monotonically from the nearest neighbour to the cutoff
    r = np.linspace(NN["Pd"], outer - 1e-6, 200)
    sss = np.abs(ps.overlap("Pd", "Pd", r)[:, 0])
    assert np.all(np.diff(sss) < 0)


def _levels(model, kpts):
    import scipy.linalg

    h, s = model.hamiltonian_and_overlap(np.asarray(kpts, dtype=float))
    sel = model.select(shell="d")
    out = []
    for hk, sk in zip(h, s, strict=True):
        e, c = scipy.linalg.eigh(hk, sk)
        w = np.real(np.conj(c) * (sk @ c))[sel].sum(axis=0)
        out.append((e, w))
    return out


@pytest.fixture(scope="module")
def fcc(ps):
    """element → (model, DOS) of the fcc metal (mesh 12, Gaussian 0.1 eV, grid from −15 eV)."""
    cache = {}

    def get(el):
        if el not in cache:
            m = build_model(build_structure(f"{el} fcc {FCC_A[el]}"), ps)
            cache[el] = m, compute_dos(m, DOSSettings(mesh=12, width=0.1, emin=-15.0))
        return cache[el]

    return get


def _d_levels(model, ef):
    lv = _levels(model, [[0, 0, 0], [0.5, 0, 0.5], [0.5, 0.5, 0.5]])  # Γ, X, L
    return np.concatenate([e[w > 0.5] for e, w in lv]) - ef


@pytest.mark.parametrize("el", ["Cu", "Ag", "Au"])
def test_noble_metal_d_bands_are_full(fcc, el):
    # common practice: the noble-metal d bands lie wholly below E_F; Cu's top 1.5–2.5 eV below
    model, dos = fcc(el)
    d = _d_levels(model, dos.fermi_level)
    assert d.max() < -1.0
    if el == "Cu":
        assert -2.5 <= d.max() <= -1.5, d.max()
    assert describe(dos, "d", (-15.0, 5.0)).elements[el].filling > 0.95


@pytest.mark.parametrize("el", ["Pd", "Pt"])
def test_fermi_level_inside_the_d_band(fcc, el):
    # common practice: Pd and Pt have d holes, E_F cuts the top of the d band (X5, L3 above E_F)
    model, dos = fcc(el)
    d = _d_levels(model, dos.fermi_level)
    assert d.min() < -3.0 and d.max() > 0.05


def test_d_band_width_grows_down_a_column(fcc):
    # common practice: 3d < 4d < 5d bandwidth in one column (Ni < Pd < Pt); width = square root
    # of the second moment of the d pDOS over [E_F − 15, E_F + 5] eV
    w = [describe(fcc(el)[1], "d", (-15.0, 5.0)).elements[el].width for el in ("Ni", "Pd", "Pt")]
    assert w[0] < w[1] < w[2], w


@pytest.mark.parametrize(("el", "ruban"), [("Cu", -2.67), ("Pd", -1.83), ("Pt", -2.25),
                                           ("Ag", -4.30), ("Ir", -2.11)])
def test_d_band_centres_against_ruban(fcc, el, ruban):
    # Ruban et al. 1997 (from memory), ±0.3 eV; centre = first moment of the d pDOS over
    # [E_F − 15, E_F + 5] eV. Cu, Pd, Pt were in the fit of the confinement defaults; Ag and
    # Ir were not.
    centre = describe(fcc(el)[1], "d", (-15.0, 5.0)).elements[el].centre
    assert centre == pytest.approx(ruban, abs=0.3)
