"""Substituted layers of a slab (Pt–M–Pt(111) subsurface alloys)."""

from __future__ import annotations

import numpy as np
import pytest

from valband.errors import StructureError
from valband.structure import overlayer, slab
from valband.structure.substitution import substitute_layers


def test_second_layer_and_its_mirror_take_the_element_geometry_unchanged():
    st, info = slab("Pt", "fcc111", layers=5, size=(2, 1))
    new, ni = substitute_layers(st, info, [1], "Ni")
    # layers 1 and 3 (the mirror of 1 in a 5-layer slab) hold Ni, the others Pt
    for i, s in enumerate(new.symbols):
        assert s == ("Ni" if info.layer[i] in (1, 3) else "Pt")
    assert np.array_equal(new.positions, st.positions)
    assert np.array_equal(new.cell, st.cell)
    want = tuple(i for i in range(st.n_sites) if info.layer[i] in (1, 3))
    assert ni.groups["substituted"] == want
    assert ni.details["substituted"] == {"element": "Ni", "layers": [1, 3]}
    i = int(np.flatnonzero(info.layer == 1)[0])
    assert new.labels[i] == f"Ni{i}@L1"
    assert ni.groups["surface"] == info.groups["surface"]


def test_one_sided_substitution_and_errors():
    st, info = slab("Pt", "fcc111", layers=4)
    new, ni = substitute_layers(st, info, [1], "Co", symmetric=False)
    assert [new.symbols[i] for i in np.argsort(info.layer)] == ["Pt", "Co", "Pt", "Pt"]
    assert not ni.symmetric
    with pytest.raises(StructureError, match="layers 0 … 3"):
        substitute_layers(st, info, [4], "Ni")
    with pytest.raises(StructureError, match="leaves no host"):
        substitute_layers(st, info, [0, 1], "Ni")
    with pytest.raises(StructureError, match="not a chemical symbol"):
        substitute_layers(st, info, [1], "Qq")
    ov, oi = overlayer("Pd", "Au", "fcc111", layers=3)
    with pytest.raises(StructureError, match="symmetric slab"):
        substitute_layers(ov, oi, [2], "Ni")
