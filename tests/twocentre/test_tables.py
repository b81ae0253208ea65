"""Tables → parameter set (format v1) → tight-binding model of fcc Cu.

Band checks (fcc Cu, a = 3.61 Å, non-orthogonal spd model from our integrals):
* the d manifold (states with d Mulliken weight > 0.5 at Γ, X, L) spans "of order 3–4 eV"
  (common practice: Cu's d band runs from about 5 eV to about 2 eV below E_F); accepted
  2.5–4.5 eV for "of order";
* the d band is full: its top lies below E_F, about 1.5–2 eV below (common practice), accepted
  −3 … −0.5 eV;
* d-band centre ≈ −2.67 eV (Hammer & Nørskov, Adv. Catal. 45, 71 (2000), Table; from memory),
  accepted ±0.7 eV;
* bottom of the sp band Γ1 ≈ −9 eV below E_F (common practice, LDA and photoemission
  8.6–9.4 eV), accepted ±1.5 eV.
"""

from __future__ import annotations

import numpy as np
import pytest
import scipy.linalg

from valband.errors import SettingsError
from valband.params import ParameterSet, load_parameter_set
from valband.params.model import BOND_INTEGRALS
from valband.structure import build_structure
from valband.tb import build_model
from valband.twocentre import pair_table, parameter_set_dict, write_parameter_set_toml
from valband.workflows import compute_dos, describe
from valband.workflows.dos import DOSSettings


@pytest.fixture(scope="module")
def tables(cu, al, coarse):
    return [
        pair_table(cu, cu, np.linspace(1.5, 8.5, 30), quadrature=coarse),
        pair_table(al, cu, np.linspace(1.5, 9.0, 30), quadrature=coarse),
    ]


@pytest.fixture(scope="module")
def written(tables, tmp_path_factory):
    path = tmp_path_factory.mktemp("set") / "twocentre-test.toml"
    write_parameter_set_toml(path, tables, name="twocentre-test")
    return path


def test_table_shapes_and_onsite(tables, cu):
    t = tables[0]
    assert t.hopping.shape == t.overlap.shape == (30, 14)
    assert t.present.all()
    assert t.onsite["Cu"] == cu.onsite_ev()
    un = tables[1]
    assert [n for n, p in zip(BOND_INTEGRALS, un.present, strict=True) if p] == [
        "sss", "sps", "pss", "sds", "pps", "ppp", "pds", "pdp"]  # fmt: skip
    assert np.all(un.hopping[:, ~un.present] == 0)


def test_written_set_loads_and_reproduces_the_table(written, tables):
    ps = load_parameter_set(written)
    assert not ps.orthogonal
    assert set(ps.pairs) == {("Cu", "Cu"), ("Al", "Cu")}
    assert sorted(ps.pair("Cu", "Cu").hopping) == sorted(
        ["sss", "sps", "sds", "pps", "ppp", "pds", "pdp", "dds", "ddp", "ddd"])  # fmt: skip
    assert "pss" in ps.pair("Al", "Cu").hopping
    t = tables[0]
    inside = t.distances < ps.pair("Cu", "Cu").cutoff.inner
    np.testing.assert_allclose(ps.hopping("Cu", "Cu", t.distances[inside]),
                               t.hopping[inside], atol=1e-8)  # fmt: skip
    np.testing.assert_allclose(ps.overlap("Cu", "Cu", t.distances[inside]),
                               t.overlap[inside], atol=1e-8)  # fmt: skip
    # the spline between nodes: compare with integrals computed there (interpolation error)
    mid = 0.5 * (t.distances[3:8] + t.distances[4:9])
    direct = pair_table(t.atoms["Cu"], t.atoms["Cu"], mid,
                        quadrature=None).hopping  # fmt: skip
    np.testing.assert_allclose(ps.hopping("Cu", "Cu", mid), direct, atol=2e-3)  # eV
    # reversed direction through the loader
    np.testing.assert_allclose(
        ps.hopping("Cu", "Al", [2.6])[0, BOND_INTEGRALS.index("pss")],
        ps.hopping("Al", "Cu", [2.6])[0, BOND_INTEGRALS.index("sps")],
    )


def test_provenance(written):
    ps = load_parameter_set(written)
    text = ps.provenance
    for word in (
        "potential superposition",
        "VWN",
        "r0_orbitals_bohr",
        "power",
        "scalar",
        "valband_version",
        "n_angular",
    ):
        assert word in text, word
    assert "free-atom" in ps.element("Cu").provenance["onsite.d"]


def _levels(model, kpts):
    h, s = model.hamiltonian_and_overlap(np.asarray(kpts, dtype=float))
    out = []
    for hk, sk in zip(h, s, strict=True):
        e, c = scipy.linalg.eigh(hk, sk)
        d_weight = np.real(np.conj(c) * (sk @ c))[4:9].sum(axis=0)  # Mulliken, d orbitals
        out.append((e, d_weight))
    return out


def test_cu_fcc_band_structure_is_sane(written):
    ps = load_parameter_set(written)
    model = build_model(build_structure("Cu fcc 3.61"), ps)
    assert model.n_electrons == 11
    dos = compute_dos(model, DOSSettings(mesh=12, width=0.15))
    ef = dos.fermi_level
    gamma, x, ell = _levels(model, [[0, 0, 0], [0.5, 0, 0.5], [0.5, 0.5, 0.5]])
    d_levels = np.concatenate([e[w > 0.5] for e, w in (gamma, x, ell)]) - ef
    width = d_levels.max() - d_levels.min()
    assert 2.5 < width < 4.5, width
    assert -3.0 < d_levels.max() < -0.5
    centre = describe(dos, "d", (-10.0, 3.0)).elements["Cu"].centre
    assert centre == pytest.approx(-2.67, abs=0.7)
    assert gamma[0][0] - ef == pytest.approx(-9.0, abs=1.5)


def test_cutoff_needs_a_long_enough_table(cu, coarse):
    short = pair_table(cu, cu, np.linspace(1.5, 4.0, 8), quadrature=coarse)
    with pytest.raises(SettingsError, match="accepted: a distance grid reaching further"):
        parameter_set_dict([short])
    # an explicit cutoff inside the table is accepted and validates
    d = parameter_set_dict([short], cutoffs={"Cu-Cu": (3.4, 3.9)})
    ps = ParameterSet.from_dict(d)
    assert ps.cutoff("Cu", "Cu") == 3.9
