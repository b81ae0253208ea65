"""Slater–Koster two-centre matrix elements for s, p and d orbitals.

Every element of the 9×9 block ⟨α on atom A | H | β on atom B⟩ from the direction cosines
(l, m, n) of the bond A → B and the 14 bond integrals of :data:`valband.tb.integrals.BOND_INTEGRALS`
(Slater & Koster, Phys. Rev. 94, 1498 (1954), Table I). Rows index orbitals on the first atom,
columns orbitals on the second, both in the fixed order of :data:`valband.conventions.ORBITALS`:
s; px, py, pz; dxy, dyz, dzx, dx²−y², d3z²−r².

Table I lists the elements with l_α ≤ l_β. The others follow from parity (SK, section III):
E_{β on A, α on B}(l, m, n) = (−1)^{l_α+l_β} E_{α,β}(l, m, n) evaluated with the integrals of
the reversed pair, e.g. E_{x,s} = −l·V_pss and E_{3z²−r², z} = −(n[n² − (l²+m²)/2]·V_dps +
√3 n(l²+m²)·V_dpp).

:func:`sk_blocks` runs a numba kernel; :func:`sk_blocks_reference` is the plain-numpy
transcription of the same table used to check it.
"""

from __future__ import annotations

import numba
import numpy as np
from numpy.typing import ArrayLike, NDArray

from valband.errors import InputError
from valband.tb.integrals import N_INTEGRALS

__all__ = ["sk_blocks", "sk_blocks_reference", "N_ORBITALS_SPD"]

#: Size of a full s, p, d site block.
N_ORBITALS_SPD = 9

_SQ3 = float(np.sqrt(3.0))


# --------------------------------------------------------------------------- numba kernel
@numba.njit(cache=True)
def _fill_upper(l, m, n, sss, sps, sds, pps, ppp, pds, pdp, dds, ddp, ddd, E):  # noqa: E741
    """Fill the l_α ≤ l_β blocks (ss, sp, sd, pp, pd, dd) of a 9×9 block ``E`` (SK Table I)."""
    s3 = _SQ3
    ll, mm, nn = l * l, m * m, n * n
    lm, mn, nl = l * m, m * n, n * l
    lmn = l * m * n
    a = nn - 0.5 * (ll + mm)  # n² − (l² + m²)/2
    b = ll - mm  # l² − m²
    # s–s, s–p
    E[0, 0] = sss
    E[0, 1] = l * sps
    E[0, 2] = m * sps
    E[0, 3] = n * sps
    # s–d
    E[0, 4] = s3 * lm * sds
    E[0, 5] = s3 * mn * sds
    E[0, 6] = s3 * nl * sds
    E[0, 7] = 0.5 * s3 * b * sds
    E[0, 8] = a * sds
    # p–p
    E[1, 1] = ll * pps + (1.0 - ll) * ppp
    E[2, 2] = mm * pps + (1.0 - mm) * ppp
    E[3, 3] = nn * pps + (1.0 - nn) * ppp
    E[1, 2] = lm * (pps - ppp)
    E[1, 3] = nl * (pps - ppp)
    E[2, 3] = mn * (pps - ppp)
    E[2, 1] = E[1, 2]
    E[3, 1] = E[1, 3]
    E[3, 2] = E[2, 3]
    # p–d
    E[1, 4] = s3 * ll * m * pds + m * (1.0 - 2.0 * ll) * pdp
    E[1, 5] = s3 * lmn * pds - 2.0 * lmn * pdp
    E[1, 6] = s3 * ll * n * pds + n * (1.0 - 2.0 * ll) * pdp
    E[1, 7] = 0.5 * s3 * l * b * pds + l * (1.0 - b) * pdp
    E[1, 8] = l * a * pds - s3 * l * nn * pdp
    E[2, 4] = s3 * mm * l * pds + l * (1.0 - 2.0 * mm) * pdp
    E[2, 5] = s3 * mm * n * pds + n * (1.0 - 2.0 * mm) * pdp
    E[2, 6] = s3 * lmn * pds - 2.0 * lmn * pdp
    E[2, 7] = 0.5 * s3 * m * b * pds - m * (1.0 + b) * pdp
    E[2, 8] = m * a * pds - s3 * m * nn * pdp
    E[3, 4] = s3 * lmn * pds - 2.0 * lmn * pdp
    E[3, 5] = s3 * nn * m * pds + m * (1.0 - 2.0 * nn) * pdp
    E[3, 6] = s3 * nn * l * pds + l * (1.0 - 2.0 * nn) * pdp
    E[3, 7] = 0.5 * s3 * n * b * pds - n * b * pdp
    E[3, 8] = n * a * pds + s3 * n * (ll + mm) * pdp
    # d–d
    E[4, 4] = 3.0 * ll * mm * dds + (ll + mm - 4.0 * ll * mm) * ddp + (nn + ll * mm) * ddd
    E[5, 5] = 3.0 * mm * nn * dds + (mm + nn - 4.0 * mm * nn) * ddp + (ll + mm * nn) * ddd
    E[6, 6] = 3.0 * nn * ll * dds + (nn + ll - 4.0 * nn * ll) * ddp + (mm + nn * ll) * ddd
    E[4, 5] = 3.0 * l * mm * n * dds + nl * (1.0 - 4.0 * mm) * ddp + nl * (mm - 1.0) * ddd
    E[4, 6] = 3.0 * ll * mn * dds + mn * (1.0 - 4.0 * ll) * ddp + mn * (ll - 1.0) * ddd
    E[5, 6] = 3.0 * lm * nn * dds + lm * (1.0 - 4.0 * nn) * ddp + lm * (nn - 1.0) * ddd
    E[4, 7] = 1.5 * lm * b * dds - 2.0 * lm * b * ddp + 0.5 * lm * b * ddd
    E[5, 7] = 1.5 * mn * b * dds - mn * (1.0 + 2.0 * b) * ddp + mn * (1.0 + 0.5 * b) * ddd
    E[6, 7] = 1.5 * nl * b * dds + nl * (1.0 - 2.0 * b) * ddp - nl * (1.0 - 0.5 * b) * ddd
    E[4, 8] = s3 * lm * a * dds - 2.0 * s3 * lm * nn * ddp + 0.5 * s3 * lm * (1.0 + nn) * ddd
    E[5, 8] = s3 * mn * a * dds + s3 * mn * (ll + mm - nn) * ddp - 0.5 * s3 * mn * (ll + mm) * ddd
    E[6, 8] = s3 * nl * a * dds + s3 * nl * (ll + mm - nn) * ddp - 0.5 * s3 * nl * (ll + mm) * ddd
    E[7, 7] = 0.75 * b * b * dds + (ll + mm - b * b) * ddp + (nn + 0.25 * b * b) * ddd
    E[7, 8] = 0.5 * s3 * b * a * dds + s3 * nn * (mm - ll) * ddp + 0.25 * s3 * (1.0 + nn) * b * ddd
    E[8, 8] = a * a * dds + 3.0 * nn * (ll + mm) * ddp + 0.75 * (ll + mm) * (ll + mm) * ddd
    for i in range(4, 9):
        for j in range(i + 1, 9):
            E[j, i] = E[i, j]


@numba.njit(cache=True)
def _sk_blocks_kernel(directions, integrals):
    nb = directions.shape[0]
    out = np.zeros((nb, 9, 9))
    rev = np.zeros((9, 9))
    for ib in range(nb):
        l = directions[ib, 0]  # noqa: E741
        m = directions[ib, 1]
        n = directions[ib, 2]
        V = integrals[ib]
        E = out[ib]
        # forward integrals: sss sps sds pps ppp pds pdp dds ddp ddd
        _fill_upper(l, m, n, V[0], V[1], V[3], V[5], V[6], V[7], V[8], V[11], V[12], V[13], E)
        # reversed integrals in the same table: pss dss dps dpp replace sps sds pds pdp
        _fill_upper(l, m, n, V[0], V[2], V[4], V[5], V[6], V[9], V[10], V[11], V[12], V[13], rev)
        # parity (−1)^(l_α+l_β): p–s and d–p blocks change sign, d–s does not
        for i in range(1, 4):
            E[i, 0] = -rev[0, i]
        for i in range(4, 9):
            E[i, 0] = rev[0, i]
        for i in range(4, 9):
            for j in range(1, 4):
                E[i, j] = -rev[j, i]
    return out


def _check_inputs(directions: ArrayLike, integrals: ArrayLike) -> tuple[NDArray, NDArray]:
    d = np.ascontiguousarray(directions, dtype=np.float64)
    v = np.ascontiguousarray(integrals, dtype=np.float64)
    if d.ndim != 2 or d.shape[1] != 3:
        raise InputError(f"bond directions must have shape (n_bonds, 3), got {d.shape}")
    if v.shape != (d.shape[0], N_INTEGRALS):
        raise InputError(
            f"bond integrals must have shape (n_bonds, {N_INTEGRALS}) = ({d.shape[0]}, "
            f"{N_INTEGRALS}) to match the directions, got {v.shape}"
        )
    if not (np.all(np.isfinite(d)) and np.all(np.isfinite(v))):
        raise InputError("bond directions and integrals must be finite numbers")
    norms = np.linalg.norm(d, axis=1)
    if d.shape[0] and np.max(np.abs(norms - 1.0)) > 1e-8:
        k = int(np.argmax(np.abs(norms - 1.0)))
        raise InputError(
            f"bond directions must be unit vectors; direction {k} has length {norms[k]:.12g}"
        )
    return d, v


def sk_blocks(directions: ArrayLike, integrals: ArrayLike) -> NDArray[np.float64]:
    """Slater–Koster 9×9 blocks for many bonds (numba kernel).

    Parameters
    ----------
    directions : array_like, shape (n_bonds, 3)
        Unit vectors (l, m, n) from the first atom to the second.
    integrals : array_like, shape (n_bonds, 14), eV
        Bond integrals of each directed bond, columns in the order of
        :data:`~valband.tb.integrals.BOND_INTEGRALS`.

    Returns
    -------
    ndarray, shape (n_bonds, 9, 9), eV
        ``out[b, α, β]`` = ⟨α on first atom | H | β on second atom⟩, orbitals in the order of
        :data:`valband.conventions.ORBITALS`.

    References
    ----------
    J. C. Slater and G. F. Koster, Phys. Rev. 94, 1498 (1954), Table I.
    """
    d, v = _check_inputs(directions, integrals)
    return _sk_blocks_kernel(d, v)


# --------------------------------------------------------------------------- numpy reference
def _upper_reference(l, m, n, V: dict) -> NDArray[np.float64]:  # noqa: E741
    """SK Table I, l_α ≤ l_β blocks, vectorised over bonds; ``V`` maps name → (nb,) array."""
    s3 = _SQ3
    nb = l.shape[0]
    E = np.zeros((nb, 9, 9))
    c = np.stack([l, m, n], axis=1)  # (nb, 3)
    ll, mm, nn = l**2, m**2, n**2
    a = nn - (ll + mm) / 2
    b = ll - mm
    E[:, 0, 0] = V["ss"]
    E[:, 0, 1:4] = c * V["sp"][:, None]
    E[:, 0, 4:9] = np.stack(
        [s3 * l * m, s3 * m * n, s3 * n * l, s3 / 2 * b, a], axis=1
    ) * V["sd"][:, None]
    # p–p: E_ij = c_i c_j ppσ + (δ_ij − c_i c_j) ppπ
    cc = c[:, :, None] * c[:, None, :]
    E[:, 1:4, 1:4] = cc * V["pps"][:, None, None] + (np.eye(3) - cc) * V["ppp"][:, None, None]
    pds, pdp = V["pds"], V["pdp"]
    lmn = l * m * n
    pd = np.empty((nb, 3, 5))
    pd[:, 0, 0] = s3 * l**2 * m * pds + m * (1 - 2 * l**2) * pdp
    pd[:, 0, 1] = s3 * lmn * pds - 2 * lmn * pdp
    pd[:, 0, 2] = s3 * l**2 * n * pds + n * (1 - 2 * l**2) * pdp
    pd[:, 0, 3] = s3 / 2 * l * (l**2 - m**2) * pds + l * (1 - l**2 + m**2) * pdp
    pd[:, 0, 4] = l * (n**2 - (l**2 + m**2) / 2) * pds - s3 * l * n**2 * pdp
    pd[:, 1, 0] = s3 * m**2 * l * pds + l * (1 - 2 * m**2) * pdp
    pd[:, 1, 1] = s3 * m**2 * n * pds + n * (1 - 2 * m**2) * pdp
    pd[:, 1, 2] = s3 * lmn * pds - 2 * lmn * pdp
    pd[:, 1, 3] = s3 / 2 * m * (l**2 - m**2) * pds - m * (1 + l**2 - m**2) * pdp
    pd[:, 1, 4] = m * (n**2 - (l**2 + m**2) / 2) * pds - s3 * m * n**2 * pdp
    pd[:, 2, 0] = s3 * lmn * pds - 2 * lmn * pdp
    pd[:, 2, 1] = s3 * n**2 * m * pds + m * (1 - 2 * n**2) * pdp
    pd[:, 2, 2] = s3 * n**2 * l * pds + l * (1 - 2 * n**2) * pdp
    pd[:, 2, 3] = s3 / 2 * n * (l**2 - m**2) * pds - n * (l**2 - m**2) * pdp
    pd[:, 2, 4] = n * (n**2 - (l**2 + m**2) / 2) * pds + s3 * n * (l**2 + m**2) * pdp
    E[:, 1:4, 4:9] = pd
    ds, dp, dd = V["dds"], V["ddp"], V["ddd"]
    D = np.empty((nb, 5, 5))
    D[:, 0, 0] = 3 * ll * mm * ds + (ll + mm - 4 * ll * mm) * dp + (nn + ll * mm) * dd
    D[:, 1, 1] = 3 * mm * nn * ds + (mm + nn - 4 * mm * nn) * dp + (ll + mm * nn) * dd
    D[:, 2, 2] = 3 * nn * ll * ds + (nn + ll - 4 * nn * ll) * dp + (mm + nn * ll) * dd
    D[:, 0, 1] = 3 * l * m**2 * n * ds + l * n * (1 - 4 * m**2) * dp + l * n * (m**2 - 1) * dd
    D[:, 0, 2] = 3 * l**2 * m * n * ds + m * n * (1 - 4 * l**2) * dp + m * n * (l**2 - 1) * dd
    D[:, 1, 2] = 3 * l * m * n**2 * ds + l * m * (1 - 4 * n**2) * dp + l * m * (n**2 - 1) * dd
    D[:, 0, 3] = 1.5 * l * m * b * ds + 2 * l * m * (m**2 - l**2) * dp + 0.5 * l * m * b * dd
    D[:, 1, 3] = 1.5 * m * n * b * ds - m * n * (1 + 2 * b) * dp + m * n * (1 + b / 2) * dd
    D[:, 2, 3] = 1.5 * n * l * b * ds + n * l * (1 - 2 * b) * dp - n * l * (1 - b / 2) * dd
    D[:, 0, 4] = s3 * l * m * a * ds - 2 * s3 * l * m * n**2 * dp + s3 / 2 * l * m * (1 + n**2) * dd
    D[:, 1, 4] = s3 * m * n * (a * ds + (ll + mm - nn) * dp - (ll + mm) / 2 * dd)
    D[:, 2, 4] = s3 * l * n * (a * ds + (ll + mm - nn) * dp - (ll + mm) / 2 * dd)
    D[:, 3, 3] = 0.75 * b**2 * ds + (l**2 + m**2 - b**2) * dp + (n**2 + b**2 / 4) * dd
    D[:, 3, 4] = s3 / 2 * b * a * ds + s3 * n**2 * (m**2 - l**2) * dp + s3 / 4 * (1 + n**2) * b * dd
    D[:, 4, 4] = a**2 * ds + 3 * n**2 * (l**2 + m**2) * dp + 0.75 * (l**2 + m**2) ** 2 * dd
    iu = np.triu_indices(5, 1)
    D[:, iu[1], iu[0]] = D[:, iu[0], iu[1]]
    E[:, 4:9, 4:9] = D
    return E


def sk_blocks_reference(directions: ArrayLike, integrals: ArrayLike) -> NDArray[np.float64]:
    """Plain-numpy version of :func:`sk_blocks` (same arguments and result); for tests."""
    d, v = _check_inputs(directions, integrals)
    l, m, n = d[:, 0], d[:, 1], d[:, 2]  # noqa: E741
    col = {
        "sss": 0, "sps": 1, "pss": 2, "sds": 3, "dss": 4, "pps": 5, "ppp": 6,
        "pds": 7, "pdp": 8, "dps": 9, "dpp": 10, "dds": 11, "ddp": 12, "ddd": 13,
    }  # fmt: skip
    common = {k: v[:, col[k]] for k in ("pps", "ppp", "dds", "ddp", "ddd")}
    common["ss"] = v[:, col["sss"]]
    def pick(sp, sd, pds, pdp):
        names = dict(sp=sp, sd=sd, pds=pds, pdp=pdp)
        return dict(common, **{key: v[:, col[name]] for key, name in names.items()})

    fwd = _upper_reference(l, m, n, pick("sps", "sds", "pds", "pdp"))
    rev = _upper_reference(l, m, n, pick("pss", "dss", "dps", "dpp"))
    out = fwd.copy()
    parity = np.array([0, 1, 1, 1, 2, 2, 2, 2, 2])  # angular momentum of each orbital
    sign = (-1.0) ** (parity[:, None] + parity[None, :])
    lower = parity[:, None] > parity[None, :]  # rows of higher l than columns
    out[:, lower] = (sign * np.swapaxes(rev, 1, 2))[:, lower]
    return out
