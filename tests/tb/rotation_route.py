"""A second, independent route to the Slater–Koster blocks (test helper).

In the bond frame (second atom on +z) the two-centre matrix is diagonal in m: σ (m = 0),
π (|m| = 1), δ (|m| = 2) (Slater & Koster, Phys. Rev. 94, 1498 (1954), section III). For a
bond along d̂ we rotate the frame with a rotation R taking ẑ to d̂ and express the fixed real
harmonics through the rotated ones, f(r) = C · f(Rᵀ r), with C found by least squares on random
points on the unit sphere (no closed-form rotation matrices involved). Then
E(d̂) = C · E_bond · Cᵀ, shell block by shell block.
"""

from __future__ import annotations

import numpy as np

from valband.tb.integrals import BOND_INTEGRALS

_SHELL_SLICES = (slice(0, 1), slice(1, 4), slice(4, 9))


def real_harmonics(points: np.ndarray) -> np.ndarray:
    """The nine real harmonics on unit vectors ``points`` (n, 3), common normalisation.

    Order s; x, y, z; xy, yz, zx, x²−y², 3z²−r² with prefactors 1, 1, √3, √3, √3, √3/2, 1/2
    (the angular parts of Slater & Koster's orbitals, each normalised to the same value).
    """
    x, y, z = points.T
    s3 = np.sqrt(3.0)
    return np.stack(
        [np.ones_like(x), x, y, z, s3 * x * y, s3 * y * z, s3 * z * x,
         s3 / 2 * (x**2 - y**2), (3 * z**2 - 1) / 2],
        axis=1,
    )  # fmt: skip


def bond_frame_block(integrals: np.ndarray) -> np.ndarray:
    """The 9×9 block for a bond along +z, diagonal in m.

    Elements with the lower-l orbital on the first atom are the integrals themselves; the
    others carry (−1)^{l_α+l_β} with the reversed integral (``pss`` etc.), by inversion
    through the origin of the second atom (SK section III).
    """
    V = dict(zip(BOND_INTEGRALS, np.asarray(integrals, float)))
    E = np.zeros((9, 9))
    s, px, py, pz, dxy, dyz, dzx, dx2, dz2 = range(9)
    E[s, s] = V["sss"]
    E[s, pz], E[pz, s] = V["sps"], -V["pss"]
    E[s, dz2], E[dz2, s] = V["sds"], V["dss"]
    E[pz, pz] = V["pps"]
    E[px, px] = E[py, py] = V["ppp"]
    E[pz, dz2], E[dz2, pz] = V["pds"], -V["dps"]
    E[px, dzx], E[dzx, px] = V["pdp"], -V["dpp"]
    E[py, dyz], E[dyz, py] = V["pdp"], -V["dpp"]
    E[dz2, dz2] = V["dds"]
    E[dzx, dzx] = E[dyz, dyz] = V["ddp"]
    E[dxy, dxy] = E[dx2, dx2] = V["ddd"]
    return E


def rotation_taking_z_to(direction: np.ndarray, twist: float) -> np.ndarray:
    """A proper rotation R with R ẑ = direction, with an extra twist (rad) about ẑ first."""
    d = np.asarray(direction, float) / np.linalg.norm(direction)
    helper = np.array([1.0, 0.0, 0.0]) if abs(d[0]) < 0.9 else np.array([0.0, 1.0, 0.0])
    e1 = helper - d * (helper @ d)
    e1 /= np.linalg.norm(e1)
    e2 = np.cross(d, e1)
    R = np.column_stack([e1, e2, d])
    c, s = np.cos(twist), np.sin(twist)
    Rz = np.array([[c, -s, 0.0], [s, c, 0.0], [0.0, 0.0, 1.0]])
    return R @ Rz


def harmonic_rotation(R: np.ndarray, rng: np.random.Generator, n_points: int = 200) -> np.ndarray:
    """Block-diagonal C (9×9) with f(r) = C f(Rᵀ r), by least squares on random sphere points."""
    pts = rng.normal(size=(n_points, 3))
    pts /= np.linalg.norm(pts, axis=1)[:, None]
    F = real_harmonics(pts)
    G = real_harmonics(pts @ R)  # row vectors: (Rᵀ r)ᵀ = rᵀ R
    C = np.zeros((9, 9))
    for sl in _SHELL_SLICES:
        Ct, *_ = np.linalg.lstsq(G[:, sl], F[:, sl], rcond=None)
        C[sl, sl] = Ct.T
    return C


def rotated_block(
    direction: np.ndarray, integrals: np.ndarray, rng: np.random.Generator
) -> np.ndarray:
    """The 9×9 Slater–Koster block for a bond along ``direction`` by numerical rotation."""
    R = rotation_taking_z_to(direction, twist=rng.uniform(0, 2 * np.pi))
    C = harmonic_rotation(R, rng)
    return C @ bond_frame_block(integrals) @ C.T
