"""Extended structure specs: every documented form builds; malformed specs name the bad token."""

from __future__ import annotations

import json

import numpy as np
import pytest

from valband.errors import StructureError
from valband.structure import build_structure
from valband.structure.alloys import random_alloy
from valband.structure.specs import build_from_spec, parse_spec


@pytest.mark.parametrize(
    ("spec", "kind", "counts"),
    [
        # The examples of the module docstring (our own invention).
        ("Cu3Pd L12", "ordered", {"Cu": 3, "Pd": 1}),
        ("CuPd3 L1_2", "ordered", {"Cu": 1, "Pd": 3}),
        ("CuPd B2 2.99", "ordered", {"Cu": 1, "Pd": 1}),
        ("CuAu L10 3.96 c/a=0.93", "ordered", {"Cu": 1, "Au": 1}),
        ("random Cu0.75Pd0.25 fcc 2x2x2 seed=7", "random", {"Cu": 6, "Pd": 2}),
        ("random Cu3Pd fcc 16 seed=7", "random", {"Cu": 12, "Pd": 4}),
        ("sqs Cu0.5Pd0.5 fcc 32 seed=1", "sqs", {"Cu": 16, "Pd": 16}),
        ("slab Pt fcc111 layers=5 vacuum=12", "slab", {"Pt": 5}),
        ("overlayer Pd/Cu fcc111 layers=5", "overlayer", {"Pd": 1, "Cu": 5}),
        ("overlayer Pd/Cu fcc111 layers=5 biaxial=-0.02", "overlayer", {"Pd": 1, "Cu": 5}),
        ("Cu fcc 3.61 strain=0.01", "bulk", {"Cu": 1}),
        ("Co hcp c=4.1", "bulk", {"Co": 2}),
    ],
)
def test_examples_build(spec, kind, counts):
    st, info = build_from_spec(spec)
    assert info["kind"] == kind
    assert {e: st.symbols.count(e) for e in counts} == counts
    assert info["n_sites"] == st.n_sites == sum(counts.values())
    json.dumps(info)  # the info dict is JSON-ready
    assert parse_spec(spec).kind == kind


def test_b2_lattice_constant_and_uniform_strain():
    # B2 with a = 2.99 Å: volume a³ (geometry); strain=0.01 multiplies it by 1.01³.
    st, info = build_from_spec("CuPd B2 2.99 strain=0.01")
    assert st.volume == pytest.approx((2.99 * 1.01) ** 3, rel=1e-12)
    np.testing.assert_allclose(info["strain"], 0.01 * np.eye(3))


def test_random_spec_is_the_api_call():
    st, info = build_from_spec("random Cu0.75Pd0.25 fcc 2x2x2 3.7 seed=7")
    ref = random_alloy(build_structure("Cu fcc 3.7"), {"Cu": 0.75, "Pd": 0.25}, 2, seed=7)
    assert st.symbols == ref.symbols
    np.testing.assert_allclose(st.positions, ref.positions)
    assert info["seed"] == 7 and info["counts"] == {"Cu": 6, "Pd": 2}


def test_sqs_spec_reports_correlations():
    # 50/50 binary: the random alloy's Π_s is (2x − 1)² = 0 (Zunger et al., PRL 65, 353 (1990)).
    _, info = build_from_spec("sqs Cu0.5Pd0.5 fcc 32 seed=1 shells=2 steps=5000")
    corr = info["sqs"]["correlations"]
    assert len(corr["spin"]) == 2 and corr["spin_random"] == 0.0
    assert abs(corr["spin"][0]) <= 0.1
    assert info["seed"] == 1


def test_slab_spec_layers_and_biaxial_relaxed():
    # fcc(111) spacing a/√3 (geometry); biaxial ε with Poisson ν along z: spacing ×
    # (1 − 2ν/(1 − ν)·ε) (isotropic linear elasticity, textbook).
    a, eps, nu = 3.92, -0.02, 0.38
    st, info = build_from_spec(f"slab Pt fcc111 {a} layers=4 vacuum=10 biaxial={eps} relax={nu}")
    assert sorted(info["layers"]) == [0, 1, 2, 3]
    z = st.positions[:, 2]
    assert z[info["layers"].index(0)] == pytest.approx(z.max())  # layer 0 = top
    spacing = a / np.sqrt(3) * (1 - 2 * nu / (1 - nu) * eps)
    np.testing.assert_allclose(info["slab"]["spacings"], spacing, rtol=1e-10)
    assert info["vacuum"] == pytest.approx(10.0 * (1 - 2 * nu / (1 - nu) * eps))
    assert sorted(info["groups"]["surface"]) == [
        i for i, k in enumerate(info["layers"]) if k in (0, 3)
    ]


def test_plain_bulk_spec_falls_back_to_build_structure():
    st, info = build_from_spec("Cu fcc 3.61")
    ref = build_structure("Cu fcc 3.61")
    np.testing.assert_allclose(st.cell, ref.cell)
    assert info["kind"] == "bulk" and info["strain"] is None and info["seed"] is None


@pytest.mark.parametrize(
    ("spec", "token"),
    [
        ("slab Pt fcc112 layers=5", "'fcc112'"),
        ("slab Pt fcc111", "layers=N is missing"),
        ("slab Pt fcc111 layers=five", "'five'"),
        ("slab Pt fcc111 layers=5 size=2x", "'2x'"),
        ("random Cu0.75Pd0.25 fcc 2x2x2", "seed=S is missing"),
        ("random Cu0.7Pd0.2 fcc 2x2x2 seed=1", "'Cu0.7Pd0.2'"),
        ("random Cu0.5Pd0.5 fcx 8 seed=1", "'fcx'"),
        ("random Cu0.5Pd0.5 fcc 2x2 seed=1", "'2x2'"),
        ("random Cu0.5Zz0.5 fcc 8 seed=1", "'Zz'"),
        ("sqs Cu0.5Pd0.5 fcc 32 seed=-1", "'-1'"),
        ("sqs Cu0.5Pd0.5 fcc 32 seed=1 temperature=3", "'temperature'"),
        ("Cu3Pd L12 abc", "'abc'"),
        ("CuPd L12", "'CuPd'"),
        ("Cu3Pd B2", "'Cu3Pd'"),
        ("Cu3Pd L12 c/a=0.9", "'c/a'"),
        ("overlayer Pd-Cu fcc111 layers=5", "'Pd-Cu'"),
        ("overlayer Pd/Cu fcc111 layers=5 nu=0.8", "Poisson"),
        ("Cu fcc 3.61 strain=x", "'x'"),
        ("Cu fcc 3.61 strain=-1", "≤ −1"),
        ("Cu fcc strain=0.1 biaxial=0.1", "either strain= or biaxial="),
        ("Cu fcc relax=0.3", "'relax' needs biaxial"),
        ("Cu fcc biaxial=0.01 axis=q", "axis 'q'"),
        ("Cu fcc wobble=3", "'wobble'"),
        ("Xx fcc", "'Xx'"),
        ("Cu", "need an element and a lattice"),
        ("slab Pt fcc111 layers=5 layers=3", "'layers' is given twice"),
        ("slab Pt fcc111 layers=5 3.9", "'3.9' follows the options"),
        ("", "empty"),
    ],
)
def test_malformed_specs_name_the_bad_part(spec, token):
    with pytest.raises(StructureError) as err:
        build_from_spec(spec)
    msg = str(err.value)
    assert token in msg
    # and say what is accepted
    assert "usage:" in msg or "accepted" in msg or "forms" in msg
