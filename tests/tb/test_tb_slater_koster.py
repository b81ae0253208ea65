"""The Slater–Koster table against hand-written closed forms and a numerical rotation.

Source: J. C. Slater and G. F. Koster, Phys. Rev. 94, 1498 (1954), Table I, specialised by
hand below to bonds along x, y, z and (1,1,1)/√3. The elements with the higher-l orbital on
the first atom use the parity rule of the same paper (section III):
E_{β on A, α on B} = (−1)^{l_α+l_β} × (table entry for α, β with the reversed integrals).
Second, independent route: the bond-frame matrix (diagonal in m) rotated with real-harmonic
rotation matrices fitted numerically (tests/tb/rotation_route.py).
"""

import numpy as np
import pytest

from valband.errors import InputError
from valband.tb import BOND_INTEGRALS, sk_blocks

from .rotation_route import rotated_block
from .toy_params import random_integrals

O = {"s": 0, "x": 1, "y": 2, "z": 3, "xy": 4, "yz": 5, "zx": 6, "x2": 7, "z2": 8}
L_OF = {"s": 0, "x": 1, "y": 1, "z": 1, "xy": 2, "yz": 2, "zx": 2, "x2": 2, "z2": 2}
S3 = np.sqrt(3.0)


# Table I for l_α ≤ l_β, by hand. ``V`` has keys ss, sp, sd, pps, ppp, pds, pdp, dds, ddp, ddd.
# Same-shell entries are listed once (the block is symmetric); absent entries are zero.
def along_x(V):  # (l, m, n) = (1, 0, 0)
    return {
        ("s", "s"): V["ss"], ("s", "x"): V["sp"],
        ("s", "x2"): S3 / 2 * V["sd"], ("s", "z2"): -0.5 * V["sd"],
        ("x", "x"): V["pps"], ("y", "y"): V["ppp"], ("z", "z"): V["ppp"],
        ("x", "x2"): S3 / 2 * V["pds"], ("x", "z2"): -0.5 * V["pds"],
        ("y", "xy"): V["pdp"], ("z", "zx"): V["pdp"],
        ("xy", "xy"): V["ddp"], ("yz", "yz"): V["ddd"], ("zx", "zx"): V["ddp"],
        ("x2", "x2"): 0.75 * V["dds"] + 0.25 * V["ddd"],
        ("z2", "z2"): 0.25 * V["dds"] + 0.75 * V["ddd"],
        ("x2", "z2"): -S3 / 4 * V["dds"] + S3 / 4 * V["ddd"],
    }  # fmt: skip


def along_y(V):  # (0, 1, 0)
    return {
        ("s", "s"): V["ss"], ("s", "y"): V["sp"],
        ("s", "x2"): -S3 / 2 * V["sd"], ("s", "z2"): -0.5 * V["sd"],
        ("y", "y"): V["pps"], ("x", "x"): V["ppp"], ("z", "z"): V["ppp"],
        ("y", "x2"): -S3 / 2 * V["pds"], ("y", "z2"): -0.5 * V["pds"],
        ("x", "xy"): V["pdp"], ("z", "yz"): V["pdp"],
        ("xy", "xy"): V["ddp"], ("yz", "yz"): V["ddp"], ("zx", "zx"): V["ddd"],
        ("x2", "x2"): 0.75 * V["dds"] + 0.25 * V["ddd"],
        ("z2", "z2"): 0.25 * V["dds"] + 0.75 * V["ddd"],
        ("x2", "z2"): S3 / 4 * V["dds"] - S3 / 4 * V["ddd"],
    }  # fmt: skip


def along_z(V):  # (0, 0, 1): the bond frame itself
    return {
        ("s", "s"): V["ss"], ("s", "z"): V["sp"], ("s", "z2"): V["sd"],
        ("z", "z"): V["pps"], ("x", "x"): V["ppp"], ("y", "y"): V["ppp"],
        ("z", "z2"): V["pds"], ("x", "zx"): V["pdp"], ("y", "yz"): V["pdp"],
        ("xy", "xy"): V["ddd"], ("yz", "yz"): V["ddp"], ("zx", "zx"): V["ddp"],
        ("x2", "x2"): V["ddd"], ("z2", "z2"): V["dds"],
    }  # fmt: skip


def along_111(V):  # l = m = n = 1/√3
    c = 1 / S3
    A = V["pds"] / 3 + V["pdp"] / (3 * S3)  # p_i with a d orbital containing i
    B = V["pds"] / 3 - 2 * V["pdp"] / (3 * S3)  # p_i with the d orbital not containing i
    dd_diag = V["dds"] / 3 + 2 * V["ddp"] / 9 + 4 * V["ddd"] / 9
    dd_off = V["dds"] / 3 - V["ddp"] / 9 - 2 * V["ddd"] / 9
    return {
        ("s", "s"): V["ss"],
        ("s", "x"): c * V["sp"], ("s", "y"): c * V["sp"], ("s", "z"): c * V["sp"],
        ("s", "xy"): c * V["sd"], ("s", "yz"): c * V["sd"], ("s", "zx"): c * V["sd"],
        ("x", "x"): V["pps"] / 3 + 2 * V["ppp"] / 3,
        ("y", "y"): V["pps"] / 3 + 2 * V["ppp"] / 3,
        ("z", "z"): V["pps"] / 3 + 2 * V["ppp"] / 3,
        ("x", "y"): (V["pps"] - V["ppp"]) / 3,
        ("x", "z"): (V["pps"] - V["ppp"]) / 3,
        ("y", "z"): (V["pps"] - V["ppp"]) / 3,
        ("x", "xy"): A, ("x", "zx"): A, ("y", "xy"): A,
        ("y", "yz"): A, ("z", "yz"): A, ("z", "zx"): A,
        ("x", "yz"): B, ("y", "zx"): B, ("z", "xy"): B,
        ("x", "x2"): c * V["pdp"], ("y", "x2"): -c * V["pdp"],
        ("x", "z2"): -V["pdp"] / 3, ("y", "z2"): -V["pdp"] / 3, ("z", "z2"): 2 * V["pdp"] / 3,
        ("xy", "xy"): dd_diag, ("yz", "yz"): dd_diag, ("zx", "zx"): dd_diag,
        ("xy", "yz"): dd_off, ("xy", "zx"): dd_off, ("yz", "zx"): dd_off,
        ("yz", "x2"): (V["ddd"] - V["ddp"]) / 3, ("zx", "x2"): (V["ddp"] - V["ddd"]) / 3,
        ("xy", "z2"): 2 * S3 / 9 * (V["ddd"] - V["ddp"]),
        ("yz", "z2"): S3 / 9 * (V["ddp"] - V["ddd"]), ("zx", "z2"): S3 / 9 * (V["ddp"] - V["ddd"]),
        ("x2", "x2"): 2 * V["ddp"] / 3 + V["ddd"] / 3,
        ("z2", "z2"): 2 * V["ddp"] / 3 + V["ddd"] / 3,
    }  # fmt: skip


def expected_block(table, v):
    """9×9 block from a hand-written table: forward entries + parity-reversed entries."""
    V = dict(zip(BOND_INTEGRALS, v))
    common = {k: V[k] for k in ("pps", "ppp", "dds", "ddp", "ddd")}
    fwd = table(dict(common, ss=V["sss"], sp=V["sps"], sd=V["sds"], pds=V["pds"], pdp=V["pdp"]))
    rev = table(dict(common, ss=V["sss"], sp=V["pss"], sd=V["dss"], pds=V["dps"], pdp=V["dpp"]))
    E = np.zeros((9, 9))
    for (a, b), val in fwd.items():
        assert L_OF[a] <= L_OF[b]
        E[O[a], O[b]] = val
        if L_OF[a] == L_OF[b]:
            E[O[b], O[a]] = val
    for (a, b), val in rev.items():
        if L_OF[a] < L_OF[b]:
            E[O[b], O[a]] = (-1) ** (L_OF[a] + L_OF[b]) * val
    return E


DIRECTIONS = {
    "x": (np.array([1.0, 0, 0]), along_x),
    "y": (np.array([0, 1.0, 0]), along_y),
    "z": (np.array([0, 0, 1.0]), along_z),
    "111": (np.ones(3) / S3, along_111),
}


@pytest.mark.parametrize("name", list(DIRECTIONS))
def test_table_along_special_directions(name, rng):
    direction, table = DIRECTIONS[name]
    for _ in range(3):
        v = random_integrals(rng)
        got = sk_blocks(direction[None], v[None])[0]
        np.testing.assert_allclose(got, expected_block(table, v), atol=1e-13)


def test_examples_of_the_parity_rule(rng):
    # Slater & Koster section III: E_{x,s}(l,m,n) = −l·V_pss;
    # E_{3z²−r², s} = [n² − (l²+m²)/2]·V_dss
    v = random_integrals(rng)
    d = rng.normal(size=3)
    d /= np.linalg.norm(d)
    l, m, n = d
    E = sk_blocks(d[None], v[None])[0]
    V = dict(zip(BOND_INTEGRALS, v))
    assert E[O["x"], O["s"]] == pytest.approx(-l * V["pss"], abs=1e-14)
    assert E[O["z2"], O["s"]] == pytest.approx((n**2 - (l**2 + m**2) / 2) * V["dss"], abs=1e-14)


def test_random_directions_match_numerical_rotation(rng):
    # two independent routes (Table I vs rotated bond frame) must agree for any direction
    d = rng.normal(size=(40, 3))
    d /= np.linalg.norm(d, axis=1)[:, None]
    v = np.array([random_integrals(rng) for _ in d])
    got = sk_blocks(d, v)
    for b in range(len(d)):
        np.testing.assert_allclose(got[b], rotated_block(d[b], v[b], rng), atol=1e-12)


def test_rotation_route_along_z_is_the_bond_frame(rng):
    # sanity of the second route itself: along z no rotation is needed (C = 1 up to round-off)
    v = random_integrals(rng)
    np.testing.assert_allclose(
        rotated_block(np.array([0, 0, 1.0]), v, rng), expected_block(along_z, v), atol=1e-12
    )


def test_bad_shapes_and_non_unit_directions():
    with pytest.raises(InputError, match="shape"):
        sk_blocks(np.zeros((2, 2)), np.zeros((2, 14)))
    with pytest.raises(InputError, match="shape"):
        sk_blocks(np.eye(3), np.zeros((3, 10)))
    with pytest.raises(InputError, match="unit vectors"):
        sk_blocks(np.array([[1.0, 1.0, 0.0]]), np.zeros((1, 14)))
