"""Point-group action on orbitals and sites, for k-sums over the wedge and symmetric groups.

For a one-site Bravais lattice and a point-group rotation Q, the two-centre blocks obey
h(Q d) = M(Q) h(d) M(Q)ᵀ, with M defined by φ_a(Q r) = Σ_c M_ac φ_c(r) for the real
orbitals φ (s: M = 1; p in the order x, y, z: M = Q; d: the 5×5 representation on the real
harmonics √3xy, √3yz, √3zx, (√3/2)(x² − y²), (3z² − r²)/2, found here by least squares on
random points, exact to rounding). Hence H(Qk) = M H(k) Mᵀ and, for a site-local coherent
potential with M Σ Mᵀ = Σ, the local Green function summed over the full mesh equals

    G_loc = (1/|P|) Σ_Q M(Q) [Σ_{k ∈ wedge} w_k G(k)] M(Q)ᵀ,

because the rotations of the wedge with their multiplicities tile the mesh (the wedge weights
are the star sizes). Time reversal gives G(−k) = G(k)ᵀ; Bravais lattices contain the
inversion, so it adds nothing new.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import NDArray

from valband.conventions import SHELL_ORBITALS

__all__ = ["cartesian_rotations", "orbital_rotation", "site_permutations", "site_symmetriser"]

_SQ3 = np.sqrt(3.0)


def _d_functions(r: NDArray[np.float64]) -> NDArray[np.float64]:
    """Evaluate the five real d harmonics (common normalisation) at unit vectors r, shape (5, n)."""
    x, y, z = r.T
    return np.stack(
        [_SQ3 * x * y, _SQ3 * y * z, _SQ3 * z * x, 0.5 * _SQ3 * (x * x - y * y),
         0.5 * (3.0 * z * z - 1.0)]
    )  # fmt: skip


def orbital_rotation(q: NDArray[np.float64], shells: tuple[str, ...]) -> NDArray[np.float64]:
    """Block-diagonal M(Q) for a site with ``shells`` (orbital order of the conventions)."""
    rng = np.random.default_rng(20240601)  # fixed points: the fit is exact, the seed irrelevant
    pts = rng.normal(size=(40, 3))
    pts /= np.linalg.norm(pts, axis=1)[:, None]
    blocks = []
    for sh in shells:
        if sh == "s":
            blocks.append(np.ones((1, 1)))
        elif sh == "p":
            blocks.append(np.asarray(q, dtype=float))
        else:
            f = _d_functions(pts)
            fq = _d_functions(pts @ np.asarray(q, dtype=float).T)  # φ(Q r)
            blocks.append(np.linalg.lstsq(f.T, fq.T, rcond=None)[0].T)
    n = sum(len(SHELL_ORBITALS[sh]) for sh in shells)
    out = np.zeros((n, n))
    i = 0
    for b in blocks:
        out[i : i + len(b), i : i + len(b)] = b
        i += len(b)
    return out


def cartesian_rotations(structure, kmesh=None) -> NDArray[np.float64] | None:
    """Cartesian point-group rotations of the structure, shape (n_ops, 3, 3); None if unknown.

    From spglib's dataset through :mod:`valband.kspace.symmetry` (fractional W → Q = Aᵀ W A⁻ᵀ
    with the cell rows A). With ``kmesh``, only the rotations that map the mesh onto itself
    (k_frac → W⁻ᵀ k_frac; a shifted mesh of an fcc cell, say, keeps only a subgroup) — the
    group whose stars the wedge weights count.
    """
    from valband.kspace.symmetry import space_group_operations

    ops = space_group_operations(structure)
    if ops is None:
        return None
    a = structure.cell
    rots = np.asarray(ops[0], dtype=float)
    if kmesh is not None:
        full = kmesh.full_kpoints()
        m = np.array(kmesh.mesh, dtype=float)
        shift = 0.5 * np.array(kmesh.shift, dtype=float)
        keep = []
        for w in rots:
            img = full @ np.linalg.inv(w)  # rows: (W⁻ᵀ k)ᵀ = kᵀ W⁻¹
            addr = img * m - shift
            keep.append(np.allclose(addr, np.round(addr), atol=1e-6))
        rots = rots[np.array(keep)]
    q = np.einsum("ji,njk,kl->nil", a, rots, np.linalg.inv(a).T)
    # unique rotations (pure translations of a supercell repeat the same Q)
    keys = {tuple(np.round(mat, 6).ravel()): mat for mat in q}
    return np.array(list(keys.values()))


def site_symmetriser(structure, shells: tuple[str, ...], kmesh=None):
    """Return a function (…, n, n) → (…, n, n) averaging over M(Q)·G·M(Q)ᵀ and the transpose.

    For a one-site cell, over the rotations that keep ``kmesh``; None when the point group is
    unknown.
    """
    q = cartesian_rotations(structure, kmesh)
    if q is None or not len(q):
        return None
    mats = np.array([orbital_rotation(m, shells) for m in q])  # (n_ops, n, n)

    def symmetrise(g: NDArray[np.complex128]) -> NDArray[np.complex128]:
        out = np.einsum("oab,...bc,odc->...ad", mats, g, mats, optimize=True) / len(mats)
        return 0.5 * (out + np.swapaxes(out, -1, -2))

    return symmetrise


def site_permutations(structure) -> NDArray[np.int64] | None:
    """Site permutation of every space-group operation, shape (n_ops, n_sites); None if unknown.

    Operation {W|t} maps fractional position p to W p + t; the image is matched to a site
    modulo lattice vectors (tolerance 1e-3 in fractional units, well below any site spacing).
    """
    from valband.kspace.symmetry import space_group_operations

    ops = space_group_operations(structure)
    if ops is None:
        return None
    frac = structure.scaled_positions
    out = []
    for w, t in zip(*ops, strict=True):
        img = frac @ w.T + t
        d = img[:, None, :] - frac[None, :, :]
        d -= np.round(d)
        dist = np.abs(d).max(axis=2)
        j = np.argmin(dist, axis=1)
        if np.any(dist[np.arange(len(j)), j] > 1e-3):
            return None
        out.append(j)
    return np.array(out, dtype=np.int64)
