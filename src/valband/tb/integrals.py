"""Order of the 14 two-centre bond integrals and their reversal a → b ⇄ b → a.

:data:`BOND_INTEGRALS` is defined once, in :mod:`valband.params.model`, and re-exported here.

A parameter set returns, for a directed element pair a → b, an array whose last axis runs over
:data:`BOND_INTEGRALS`. Each name is (orbital shell on the first atom)(shell on the second)
(σ/π/δ). With the bond along +z from a to b, the integral named ``αβm`` is the bond-frame
matrix element ⟨α_m on a | H | β_m on b⟩ when l_α ≤ l_β (Slater & Koster, Phys. Rev. 94, 1498
(1954)); for l_α > l_β (``pss``, ``dss``, ``dps``, ``dpp``) it is defined as the ``βαm`` integral
of the reversed pair b → a, so that ``pss(a, b) = sps(b, a)``. Homonuclear pairs therefore have
``pss = sps``, ``dss = sds``, ``dps = pds``, ``dpp = pdp``.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import NDArray

from valband.params.model import BOND_INTEGRALS  # the one definition of the column order

__all__ = ["BOND_INTEGRALS", "N_INTEGRALS", "REVERSED_INDEX", "reverse_direction"]

#: Number of bond integrals.
N_INTEGRALS = len(BOND_INTEGRALS)

#: ``integrals_ba = integrals_ab[..., REVERSED_INDEX]``: the column of a → b that holds each
#: integral of the reversed pair b → a (swap the two shell letters of each name).
REVERSED_INDEX: NDArray[np.int64] = np.array(
    [BOND_INTEGRALS.index(name[1] + name[0] + name[2]) for name in BOND_INTEGRALS], dtype=np.int64
)
REVERSED_INDEX.setflags(write=False)


def reverse_direction(integrals: NDArray[np.float64]) -> NDArray[np.float64]:
    """Integrals of the pair b → a from those of a → b (last axis in :data:`BOND_INTEGRALS`).

    Parameters
    ----------
    integrals : ndarray, shape (..., 14), eV
        Bond integrals of the directed pair a → b.

    Returns
    -------
    ndarray, shape (..., 14), eV
        The same bonds seen from b (``sps`` ↔ ``pss``, ``sds`` ↔ ``dss``, ``pds`` ↔ ``dps``,
        ``pdp`` ↔ ``dpp``; the others are unchanged).
    """
    return np.asarray(integrals)[..., REVERSED_INDEX]
