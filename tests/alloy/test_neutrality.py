"""Local charge neutrality: bulk, Cu(111), overlayers, alloys, Mulliken, failure, bad input."""

from __future__ import annotations

import numpy as np
import pytest

from valband.alloy import (
    NeutralitySettings,
    layer_descriptors,
    neutral_dos,
    shifted_model,
    solve_neutrality,
)
from valband.errors import CalculationError, InputError, SettingsError
from valband.params import load_parameter_set
from valband.structure import build_structure, l12, overlayer, random_alloy, slab
from valband.tb import build_model
from valband.workflows import DOSSettings, compute_dos

SLAB = DOSSettings(mesh=(8, 8, 1), width=0.1, step=0.02)


@pytest.fixture(scope="module")
def cu111(harrison):
    st, info = slab("Cu", "fcc111", layers=5)
    return build_model(st, harrison), info


def test_bulk_metal_is_already_neutral(harrison):
    # every site of an elemental bulk metal is equivalent: no charge transfer, zero shifts in
    # the first iteration (common practice)
    model = build_model(build_structure("Cu fcc 3.61"), harrison)
    rep = solve_neutrality(model, DOSSettings(mesh=8), params=harrison)
    assert rep.iterations == 1
    assert np.all(rep.site_shifts == 0.0)
    assert rep.max_residual < 1e-8


def test_cu111_slab_converges_and_raises_the_surface_d_band(harrison, cu111):
    model, info = cu111
    dos, rep = neutral_dos(model, SLAB, "layer", info, params=harrison)
    tol = NeutralitySettings().tol
    assert all(abs(r) <= tol for r in rep.residuals.values())
    assert rep.iterations <= 15
    # total electron count conserved (the Fermi level fixes it; Mulliken counts add up)
    assert rep.site_electrons.sum() == pytest.approx(model.n_electrons, abs=1e-6)
    # the symmetric slab keeps its mirror symmetry: top and bottom layers alike
    assert rep.group_shifts["L0"] == pytest.approx(rep.group_shifts["L4"], abs=1e-9)
    # without the shifts the surface layer of a late transition metal gains electrons (its d
    # band narrows at a fixed centre); neutrality raises its levels and so its d-band centre
    # towards E_F (Hammer & Nørskov, Adv. Catal. 45, 71 (2000); common practice): check the
    # sign. Measured with harrison-universal: +0.36 e → shift +0.09 eV, ε_d +0.10 eV.
    assert rep.initial_residuals["L0"] > 0.05
    assert rep.group_shifts["L0"] > 0.0
    before = layer_descriptors(compute_dos(model, SLAB), info)
    after = layer_descriptors(dos, info)
    # unshifted: the first moment is the onsite level, the same in every layer (moments
    # theorem), so the surface and centre d-band centres coincide
    assert before.difference("surface", "centre") == pytest.approx(0.0, abs=2e-3)
    assert after.surface.centre - before.surface.centre > 0.05
    assert after.difference("surface", "centre") > 0.05
    assert dos.settings["neutrality"]["mode"] == "layer"


def test_wedge_full_mesh_site_and_layer_modes_agree(harrison, cu111):
    # exactness of the wedge (site counts averaged over symmetry orbits) and of the grouping:
    # in a 1×1 slab every layer is one site
    model, info = cu111
    a = solve_neutrality(model, SLAB, "layer", info, params=harrison)
    b = solve_neutrality(model, DOSSettings(mesh=(8, 8, 1), width=0.1, symmetry=False), "site",
                         params=harrison)
    assert a.settings["k_sum"] == "irreducible wedge" and b.settings["k_sum"] == "full mesh"
    assert np.abs(a.site_shifts - b.site_shifts).max() < 5e-3
    c = solve_neutrality(model, SLAB, "layer", info, params=harrison,
                         neutrality=NeutralitySettings(mixing="linear", beta=0.7, tol=1e-5))
    d = solve_neutrality(model, SLAB, "layer", info, params=harrison,
                         neutrality=NeutralitySettings(tol=1e-5))
    assert np.abs(c.site_shifts - d.site_shifts).max() < 1e-4
    assert c.iterations > d.iterations  # Anderson needs fewer iterations than linear mixing


def test_no_convergence_names_the_worst_group(harrison, cu111):
    model, info = cu111
    with pytest.raises(CalculationError, match=r"did not converge in 1 iteration.*'L[04]'"):
        solve_neutrality(model, SLAB, "layer", info, params=harrison,
                         neutrality=NeutralitySettings(max_iter=1))


def test_pt_skin_on_ni_and_equiatomic_random_alloy(harrison):
    # issue 6: a Pt–Ni(111) slab (a Pt overlayer on Ni, the Pt-skin geometry) and an equiatomic
    # random alloy; every group's count within the tolerance
    st, info = overlayer("Pt", "Ni", "fcc111", layers=4)
    rep = solve_neutrality(build_model(st, harrison), DOSSettings(mesh=(6, 6, 1)), "layer", info,
                           params=harrison)
    assert rep.max_residual <= rep.settings["tol"]
    alloy = random_alloy(build_structure("Cu fcc 3.75"), {"Cu": 0.5, "Pd": 0.5}, 2, seed=11)
    rep = solve_neutrality(build_model(alloy, harrison), DOSSettings(mesh=3), "site",
                           params=harrison)
    assert rep.max_residual <= rep.settings["tol"]
    assert np.abs(rep.site_electrons - [11 if s == "Cu" else 10 for s in alloy.symbols]).max() \
        <= rep.settings["tol"]


def test_element_mode_ordered_alloy(harrison):
    rep = solve_neutrality(build_model(l12("Cu", "Pd", 3.7), harrison), DOSSettings(mesh=6),
                           "element", params=harrison)
    assert set(rep.groups) == {"Cu", "Pd"}
    assert rep.electrons["Cu"] == pytest.approx(33.0, abs=3 * rep.settings["tol"])
    assert rep.electrons["Pd"] == pytest.approx(10.0, abs=rep.settings["tol"])
    # the groups cover the cell: the free constant is fixed by Σ n_g V_g = 0
    assert 3 * rep.group_shifts["Cu"] + rep.group_shifts["Pd"] == pytest.approx(0.0, abs=1e-9)


def test_non_orthogonal_shift_is_rigid_and_mulliken_converges():
    # H_ij + ½(V_i + V_j) S_ij: a uniform V shifts every eigenvalue by exactly V
    ps = load_parameter_set("example-nonorthogonal")
    el = sorted(ps.elements)[0]
    model = build_model(build_structure(f"{el} fcc"), ps)
    k = np.array([[0.1, 0.2, 0.3], [0.0, 0.0, 0.0]])
    from valband.solve import diagonalise

    e0, _ = diagonalise(model, k)
    e1, _ = diagonalise(shifted_model(model, [0.7]), k)
    assert np.allclose(e1 - e0, 0.7, atol=1e-10)
    st, info = slab(el, "fcc111", layers=3)
    rep = solve_neutrality(build_model(st, ps), DOSSettings(mesh=(6, 6, 1)), "layer", info,
                           params=ps)
    assert rep.max_residual <= rep.settings["tol"]
    assert rep.settings["shift_form"].startswith("H_ij + (V_i + V_j)/2 S_ij")


def test_bad_input(harrison, cu111):
    model, info = cu111
    with pytest.raises(SettingsError, match="accepted site, element, layer"):
        solve_neutrality(model, SLAB, "shell", params=harrison)
    with pytest.raises(SettingsError, match="needs the layers"):
        solve_neutrality(model, SLAB, "layer", params=harrison)
    with pytest.raises(InputError, match="share site"):
        solve_neutrality(model, SLAB, "layer", {"a": [0, 1], "b": [1, 2]}, params=harrison)
    with pytest.raises(InputError, match="unknown site 9"):
        solve_neutrality(model, SLAB, "layer", {"a": [9]}, params=harrison)
    with pytest.raises(SettingsError, match="mixing"):
        solve_neutrality(model, SLAB, neutrality=NeutralitySettings(mixing="pulay"))
    two = build_model(l12("Cu", "Pd", 3.7), harrison)
    with pytest.raises(InputError, match="valence electrons per site"):
        solve_neutrality(two, DOSSettings(mesh=4))


def test_tetrahedron_settings_use_gaussian_occupations(harrison):
    st, info = slab("Cu", "fcc111", layers=3)
    s = DOSSettings(mesh=(6, 6, 1), method="tetrahedron", step=0.02)
    dos, rep = neutral_dos(build_model(st, harrison), s, "layer", info, params=harrison)
    assert rep.settings["occupations"] == "gaussian width 0.1 eV"
    assert rep.max_residual <= rep.settings["tol"]
    assert dos.settings["method"] == "tetrahedron"
