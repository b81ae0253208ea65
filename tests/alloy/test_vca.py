"""Virtual crystal: limits, the averaging scheme, electrons, sublattices, scans, bad input."""

from __future__ import annotations

import numpy as np
import pytest

from valband.alloy import VirtualCrystalParameters, binary_compositions, vca_model, vca_scan
from valband.errors import InputError, ParameterError, StructureError
from valband.structure import build_structure, l12
from valband.tb import build_model
from valband.workflows import DOSSettings, compute_dos


@pytest.mark.parametrize(("comp", "pure"), [({"Cu": 1.0, "Pd": 0.0}, "Cu"),
                                            ({"Cu": 0.0, "Pd": 1.0}, "Pd")])
def test_end_points_are_the_pure_metals(harrison, comp, pure):
    # x = 0, 1: the virtual crystal is the pure metal (exact by construction of the averages)
    st = build_structure("Cu fcc 3.7")
    k = np.random.default_rng(3).uniform(-0.5, 0.5, (6, 3))
    h = vca_model(st, comp, harrison).hamiltonian(k)
    ref = build_model(build_structure(f"{pure} fcc 3.7"), harrison).hamiltonian(k)
    assert np.abs(h - ref).max() == 0.0


def test_averaging_scheme_and_electrons(harrison):
    # the stated scheme: onsite linear in x; bonds Σ_ab x_a x_b V_{a→b} (x_A², 2x_Ax_B with
    # both directions averaged, x_B²); electrons Σ x_a N_a (harrison: Cu 11, Pd 10)
    x = 0.3
    vp = VirtualCrystalParameters(harrison, {"Cu": {"Cu": 1 - x, "Pd": x}})
    r = np.array([2.6, 3.7, 4.1])
    want = ((1 - x) ** 2 * harrison.hopping("Cu", "Cu", r) + x**2 * harrison.hopping("Pd", "Pd", r)
            + x * (1 - x) * (harrison.hopping("Cu", "Pd", r) + harrison.hopping("Pd", "Cu", r)))
    assert np.allclose(vp.hopping("Cu", "Cu", r), want, rtol=0, atol=1e-14)
    rec = vp.element("Cu")
    assert rec.onsite["d"] == pytest.approx((1 - x) * -5.504102 + x * -4.3, abs=1e-12)
    model = vca_model(build_structure("Cu fcc 3.7"), {"Cu": 1 - x, "Pd": x}, harrison)
    assert model.n_electrons == pytest.approx(11 * (1 - x) + 10 * x, abs=1e-12)
    assert {o.element for o in model.orbitals} == {"Cu0.7Pd0.3"}
    # the cutoff of the virtual pair is the largest of its component pairs
    assert vp.cutoff("Cu", "Cu") == max(harrison.cutoff(a, b) for a in ("Cu", "Pd")
                                        for b in ("Cu", "Pd"))


def test_vca_is_the_configuration_averaged_hamiltonian(harrison):
    # ⟨H⟩ over independent random occupations: ⟨ε_i⟩ = Σ x ε, ⟨h_ij⟩ = Σ x_a x_b h_ab for i ≠ j
    # (independence of distinct sites). Exact enumeration of a two-site cell whose bonds all
    # join the two different sites (B2 geometry, a = 2.6 Å: 8 A–B bonds at 2.25 Å; the 6
    # A–A bonds at 2.6 Å to periodic images are between copies of the same site, so those
    # are excluded by comparing only the inter-site block)
    from itertools import product

    from valband.structure import Structure

    x = 0.4
    cell = build_structure("CuPd bcc 2.6")
    k = np.array([[0.13, 0.27, 0.31]])
    avg, onsite = 0.0, 0.0
    for a, b in product(("Cu", "Pd"), repeat=2):
        p = (1 - x if a == "Cu" else x) * (1 - x if b == "Cu" else x)
        st = Structure(cell=cell.cell, positions=cell.positions, symbols=(a, b))
        model = build_model(st, harrison)
        avg = avg + p * model.hamiltonian(k)[0]
        onsite = onsite + p * model.onsite
    vca = vca_model(cell, {"Cu": 1 - x, "Pd": x}, harrison)
    h = vca.hamiltonian(k)[0]
    assert np.abs(h[:9, 9:] - avg[:9, 9:]).max() < 1e-12
    assert np.abs(vca.onsite - onsite).max() < 1e-12


def test_sublattice_vca(harrison):
    # VCA on the Au sublattice of L1₂ Cu₃Au: Cu sites stay Cu, Cu–virtual bonds average
    # Σ_a x_a V_{Cu→a}
    st = l12("Cu", "Au", 3.75)
    m = vca_model(st, {"Au": 0.5, "Pd": 0.5}, harrison, sublattice="Au")
    labels = {o.element for o in m.orbitals}
    assert labels == {"Cu", "Au0.5Pd0.5"}
    vp = VirtualCrystalParameters(harrison, {"Au": {"Au": 0.5, "Pd": 0.5}})
    r = np.array([2.65])
    want = 0.5 * (harrison.hopping("Cu", "Au", r) + harrison.hopping("Cu", "Pd", r))
    assert np.allclose(vp.hopping("Cu", "Au", r), want, atol=1e-14)
    assert m.n_electrons == pytest.approx(3 * 11 + 0.5 * 11 + 0.5 * 10)
    with pytest.raises(StructureError, match="sublattice"):
        vca_model(st, {"Au": 0.5, "Pd": 0.5}, harrison, sublattice="Ni")


def test_scan_matches_direct_runs(harrison):
    # the scan is the direct calculation repeated; electrons linear in x; Vegard lattice
    s = DOSSettings(mesh=8, width=0.2, step=0.05)
    comps = binary_compositions("Cu", "Pd", [0.0, 0.5, 1.0])
    scan = vca_scan("fcc", comps, harrison, s)
    assert np.allclose(scan.n_electrons, [11.0, 10.5, 10.0])
    # Vegard: a(Cu0.5Pd0.5) is the mean of ASE's Cu (3.61) and Pd (3.89) constants (from
    # ASE's reference data); the primitive fcc vector is a/√2
    assert scan.lattice_constants[1] * np.sqrt(2) == pytest.approx(0.5 * (3.61 + 3.89), abs=1e-6)
    st = build_structure("Cu fcc 3.75")
    fixed = vca_scan(st, comps[1:2], harrison, s, window="full")
    direct = compute_dos(vca_model(st, comps[1], harrison), s)
    assert fixed.fermi_levels[0] == pytest.approx(direct.fermi_level, abs=1e-12)
    assert fixed.to_dict()["rows"][0]["n_states"] == pytest.approx(10.0, abs=1e-3)


def test_bad_input(harrison):
    st = build_structure("Cu fcc 3.61")
    with pytest.raises(StructureError, match="sum to"):
        vca_model(st, {"Cu": 0.6, "Pd": 0.6}, harrison)
    with pytest.raises(ParameterError, match="different valence shells"):
        vca_model(st, {"Cu": 0.5, "Al": 0.5}, harrison)
    with pytest.raises(InputError, match="0 ≤ x ≤ 1"):
        binary_compositions("Cu", "Pd", [1.2])
    with pytest.raises(ParameterError, match="no element"):
        vca_model(st, {"Cu": 0.5, "Zr": 0.5}, harrison)
