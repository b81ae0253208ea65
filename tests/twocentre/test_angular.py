"""Angular convention: full 3-D matrix elements against the Slater–Koster table.

For a bond along an arbitrary direction, every ⟨α on A|O|β on B⟩ (α, β among s, p_x, p_y,
p_z, d_xy, d_yz, d_zx, d_x²−y², d_3z²−r²) is integrated by brute force in 3-D — the
bond-frame (ρ, z) points swept over φ and rotated into the lab frame, with the orbitals
written as Cartesian real harmonics R(r)·(polynomial)/r^l (Slater & Koster, Phys. Rev. 94,
1498 (1954), Sec. II normalisation; e.g. d_xy = √(15/4π)·xy/r²). It must equal
valband.tb.slater_koster.sk_blocks(direction, bond-frame integrals) (SK Table I), for Cu–Cu,
Al→Cu and Cu→Al (so every one of the 14 integrals, reversed ones included, is exercised).
"""

from __future__ import annotations

import numpy as np
import pytest

from valband.atom.scf import BOHR_ANGSTROM, HARTREE_EV
from valband.tb.slater_koster import sk_blocks
from valband.twocentre import bond_frame_elements, bond_grid

SHELL_OF = ["s", "p", "p", "p", "d", "d", "d", "d", "d"]
C_S, C_P = 1 / np.sqrt(4 * np.pi), np.sqrt(3 / (4 * np.pi))
C_D, C_D2, C_D0 = np.sqrt(15 / (4 * np.pi)), np.sqrt(15 / (16 * np.pi)), np.sqrt(5 / (16 * np.pi))


def cartesian_harmonics(v):
    """Real harmonics of SK's nine orbitals at points v (3, n), valband's orbital order."""
    x, y, z = v
    r = np.sqrt(x * x + y * y + z * z)
    return np.array([
        np.full_like(r, C_S),
        C_P * x / r, C_P * y / r, C_P * z / r,
        C_D * x * y / r**2, C_D * y * z / r**2, C_D * z * x / r**2,
        C_D2 * (x * x - y * y) / r**2, C_D0 * (3 * z * z - r * r) / r**2,
    ]), r  # fmt: skip


def brute_force_blocks(site_a, site_b, direction, big_r, settings, n_phi=11):
    """3-D S and H (Hartree) blocks of the bond A (origin) → B (big_r·direction), bohr."""
    g = bond_grid(big_r, settings)
    rho = g.r_a * np.sqrt(np.maximum(1 - g.mu_a**2, 0))
    z = g.r_a * g.mu_a
    e3 = direction / np.linalg.norm(direction)
    e1 = np.cross(e3, [0.3, 0.9, 0.1])
    e1 /= np.linalg.norm(e1)
    e2 = np.cross(e3, e1)
    phi = 0.37 + 2 * np.pi * np.arange(n_phi) / n_phi
    pts = (rho[None, :, None] * (np.cos(phi)[None, None, :] * e1[:, None, None]
                                 + np.sin(phi)[None, None, :] * e2[:, None, None])
           + z[None, :, None] * e3[:, None, None]).reshape(3, -1)  # fmt: skip
    w = np.repeat(g.weights, n_phi) * (2 * np.pi / n_phi)
    ya, ra = cartesian_harmonics(pts)
    yb, rb = cartesian_harmonics(pts - big_r * e3[:, None])
    orb_a = {o.shell: o for o in site_a.orbitals}
    orb_b = {o.shell: o for o in site_b.orbitals}
    va, vb = site_a.potential(ra), site_b.potential(rb)
    s = np.zeros((9, 9))
    h = np.zeros((9, 9))
    for i in range(9):
        oa = orb_a.get(SHELL_OF[i])
        if oa is None:
            continue
        fa = oa.radial(ra) * ya[i]
        for j in range(9):
            ob = orb_b.get(SHELL_OF[j])
            if ob is None:
                continue
            f = fa * ob.radial(rb) * yb[j] * w
            s[i, j] = f.sum()
            pot = va + vb + oa.residual(ra) + ob.residual(rb)
            h[i, j] = 0.5 * (oa.energy + ob.energy) * s[i, j] + 0.5 * (f * pot).sum()
    return s, h


@pytest.mark.parametrize("pair", [("cu", "cu"), ("al", "cu"), ("cu", "al")])
def test_full_3d_matrix_elements_match_sk_table(pair, request, coarse):
    site_a = request.getfixturevalue(pair[0]).site()
    site_b = request.getfixturevalue(pair[1]).site()
    direction = np.array([0.31, -0.52, 0.795])
    direction /= np.linalg.norm(direction)
    big_r = 2.6 / BOHR_ANGSTROM
    el = bond_frame_elements(site_a, site_b, [big_r], coarse)
    s3, h3 = brute_force_blocks(site_a, site_b, direction, big_r, coarse)
    sk_s = sk_blocks(direction[None], el.overlap)[0]
    sk_h = sk_blocks(direction[None], el.hamiltonian * HARTREE_EV)[0]
    rows = [i for i in range(9) if SHELL_OF[i] in site_a.shells]
    cols = [j for j in range(9) if SHELL_OF[j] in site_b.shells]
    block = np.ix_(rows, cols)
    # the elements are O(0.1–1): a sign or normalisation slip shows up at that size
    assert np.max(np.abs(s3[block])) > 0.1
    np.testing.assert_allclose(sk_s[block], s3[block], atol=1e-9)
    np.testing.assert_allclose(sk_h[block], h3[block] * HARTREE_EV, atol=1e-8)
    # orbitals the sites lack give zero in the table
    assert np.all(sk_s[[i for i in range(9) if i not in rows]] == 0)
