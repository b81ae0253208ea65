"""Signs and sizes of the Cu–Cu integrals at the fcc nearest-neighbour distance 2.55 Å.

Facts of the trade (common practice, Slater–Koster convention, Harrison's universal signs):
ssσ < 0, spσ > 0, ppσ > 0, ppπ < 0, ddσ < 0, ddπ > 0 and |ddσ| > |ddπ| > |ddδ|; overlaps
have the opposite sign to the hoppings in the s and d channels (H ≈ K·S·ε̄ with ε̄ < 0).
Size: ddσ of Cu ≈ −0.4 to −0.5 eV at 2.55 Å, from memory of published Cu tight-binding fits
(Papaconstantopoulos' handbook); our non-orthogonal H also carries ε·S, so the check allows a
factor of 2.
"""

from __future__ import annotations

import pytest

from valband.twocentre import bond_integrals


@pytest.fixture(scope="module")
def v(cu, coarse):
    return bond_integrals(cu.site(), cu.site(), [2.55], quadrature=coarse).at(0)


def test_signs(v):
    h = {k: hs[0] for k, hs in v.items()}
    assert h["sss"] < 0
    assert h["sps"] > 0
    assert h["pps"] > 0
    assert h["ppp"] < 0
    assert h["dds"] < 0
    assert h["ddp"] > 0
    assert abs(h["dds"]) > abs(h["ddp"]) > abs(h["ddd"])


def test_overlaps_opposite_to_hoppings(v):
    for name in ("sss", "sps", "sds", "dds", "ddp"):
        hop, ovl = v[name]
        assert hop * ovl < 0, name


def test_ddsigma_size(v):
    # ≈ −0.45 eV from memory of published Cu fits; factor-of-2 tolerance
    assert -0.9 < v["dds"][0] < -0.225
