"""Layer- and group-resolved descriptors of slabs."""

from __future__ import annotations

import numpy as np
import pytest

from valband.alloy import layer_descriptors, resolve_groups
from valband.errors import InputError, StructureError
from valband.structure import overlayer, slab
from valband.tb import build_model
from valband.workflows import DOSSettings, compute_dos

SIGMA = 0.1


def _second_moment_d(model, site: int) -> float:
    """(1/5) Σ_{α∈d} Σ_{bonds j, β} |H_{iα, jβ}|²: the d-projected second moment about the
    onsite level (moments theorem, exact; METHODS.md)."""
    rs = model.real_space_hamiltonian()
    sl = model.site_slices[site]
    d = [i - sl.start for i in range(sl.start, sl.stop) if model.orbitals[i].shell == "d"]
    total = sum(float(np.sum(h[d, :] ** 2)) for f, h in zip(rs.first, rs.hamiltonian,
                                                           strict=True) if f == site)
    return total / len(d)


def test_surface_d_band_narrower_and_widths_follow_moments(harrison):
    # the surface layer's d band is narrower than the centre's (fewer neighbours; second-moment
    # argument, common practice). Quantitatively: width² = μ2 (real-space sum) + σ² for a
    # Gaussian smearing of σ over the whole grid (moments theorem; exact on this mesh)
    st, info = slab("Cu", "fcc111", layers=5)
    model = build_model(st, harrison)
    dos = compute_dos(model, DOSSettings(mesh=(8, 8, 1), width=SIGMA, step=0.02))
    tab = layer_descriptors(dos, info, required=("surface", "centre"))
    assert list(tab.groups)[0] == "surface"
    assert tab.surface.width < tab["centre"].width
    for name in ("surface", "centre"):
        site = tab.sites[name][0]
        want = np.sqrt(_second_moment_d(model, site) + SIGMA**2)
        assert tab[name].width == pytest.approx(want, rel=2e-3), name
    assert tab.to_dict()["groups"][0]["group"] == "surface"


def test_overlayer_groups_and_order(harrison):
    st, info = overlayer("Pd", "Cu", "fcc111", layers=4)
    dos = compute_dos(build_model(st, harrison), DOSSettings(mesh=(6, 6, 1), width=0.15))
    tab = layer_descriptors(dos, info)
    assert list(tab.groups)[:3] == ["surface", "overlayer", "substrate"]
    assert tab.sites["overlayer"] == tab.sites["L0"]
    # the Pd overlayer's d band lies above the Cu substrate's (harrison onsite d: Pd −4.3 eV,
    # Cu −5.5 eV; first moment = onsite level − E_F)
    assert tab["overlayer"].centre > tab["substrate"].centre


def test_groups_from_mapping_and_layers_and_bad_input(harrison):
    st, info = slab("Cu", "fcc111", layers=2)
    dos = compute_dos(build_model(st, harrison), DOSSettings(mesh=(4, 4, 1), width=0.2))
    with pytest.raises(StructureError, match="has 2 layers"):
        layer_descriptors(dos, info, required=("centre",))
    g = resolve_groups([0, 1], 2)
    assert g == {"L0": (0,), "L1": (1,)}
    tab = layer_descriptors(dos, {"top": [1], "both": [0, 1]})
    assert set(tab.groups) == {"top", "both"}
    with pytest.raises(InputError, match="unknown site 5"):
        layer_descriptors(dos, {"x": [5]})
    with pytest.raises(InputError, match="one per site"):
        layer_descriptors(dos, [0, 1, 2])
    with pytest.raises(InputError, match="no site groups"):
        layer_descriptors(dos, None)


def test_spec_info_dict_is_accepted(harrison):
    # the CLI path: a slab spec's info dict carries the SlabInfo as a dict
    from valband.structure import build_from_spec

    st, info = build_from_spec("slab Cu fcc111 layers=3")
    dos = compute_dos(build_model(st, harrison), DOSSettings(mesh=(4, 4, 1), width=0.2))
    tab = layer_descriptors(dos, info, required=("surface", "centre"))
    assert tab.sites["centre"] == tuple(i for i, k in enumerate(info["layers"]) if k == 1)
