"""Bond-frame angular factors and the 14 Slater–Koster integrals as bond-frame matrix elements.

Real harmonics in the bond frame (B on the +z axis of A) factor as Y = Θ_lm(cos θ)·Φ_m(φ)
with Φ_0 = 1/√(2π) and Φ_m = cos(mφ)/√π, both normalised on [0, 2π), and

    Θ_00 = 1/√2,                       s
    Θ_10 = √(3/2)·cos θ,               p_z
    Θ_11 = (√3/2)·sin θ,               p_x  (= √(3/4π) x/r with Φ_1)
    Θ_20 = √(5/8)·(3cos²θ − 1),        d_3z²−r²
    Θ_21 = (√15/2)·sin θ cos θ,        d_zx (= √(15/4π) zx/r²)
    Θ_22 = (√15/4)·sin²θ,              d_x²−y² (= √(15/16π)(x² − y²)/r²)

normalised as ∫Θ² d(cos θ) = 1 and signed (no Condon–Shortley phase) so that each product
is exactly the real orbital of Slater & Koster, Phys. Rev. 94, 1498 (1954), in valband's
orbital order. The sin mφ partners (p_y, d_yz, d_xy) give the same integrals.

With the φ integral done, ⟨α_m on A|O|β_m on B⟩ = ∫∫ R_α Θ_{l_α m}(θ_A) O R_β Θ_{l_β m}(θ_B)
ρ dρ dz (see :mod:`valband.twocentre.quadrature`). Slater & Koster's table at the direction
(0, 0, 1) gives every integral named αβm with l_α ≤ l_β as that matrix element (E_{s,z} =
V_sps, E_{x,zx} = V_pdπ, E_{3z²−r²,3z²−r²} = V_ddσ, …) and, by parity, the reversed ones
(l_α > l_β: pss, dss, dps, dpp) as (−1)^{l_α+l_β} times it (E_{z,s} = −V_pss,
E_{3z²−r²,z} = −V_dps, E_{zx,x} = −V_dpp, E_{3z²−r²,s} = +V_dss).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from valband.params.model import BOND_INTEGRALS

__all__ = ["SHELL_L", "BondFrameIntegral", "BOND_FRAME", "theta_lm"]

#: Angular momentum of each shell letter.
SHELL_L: dict[str, int] = {"s": 0, "p": 1, "d": 2}
_M_OF = {"s": 0, "p": 1, "d": 2}  # σ, π, δ written s, p, d


def theta_lm(l: int, m: int, mu: NDArray[np.float64]) -> NDArray[np.float64]:  # noqa: E741
    """Θ_lm(cos θ) of the module docstring for 0 ≤ m ≤ l ≤ 2 (``mu`` = cos θ, any shape)."""
    mu = np.asarray(mu, dtype=float)
    sin = np.sqrt(np.maximum(1.0 - mu * mu, 0.0))
    if (l, m) == (0, 0):
        return np.full(mu.shape, 1.0 / math.sqrt(2.0))
    if (l, m) == (1, 0):
        return math.sqrt(1.5) * mu
    if (l, m) == (1, 1):
        return 0.5 * math.sqrt(3.0) * sin
    if (l, m) == (2, 0):
        return math.sqrt(5.0 / 8.0) * (3.0 * mu * mu - 1.0)
    if (l, m) == (2, 1):
        return 0.5 * math.sqrt(15.0) * sin * mu
    if (l, m) == (2, 2):
        return 0.25 * math.sqrt(15.0) * sin * sin
    raise ValueError(f"theta_lm needs 0 <= m <= l <= 2, got l={l}, m={m}")


@dataclass(frozen=True)
class BondFrameIntegral:
    """One of the 14 integrals as a bond-frame matrix element.

    Attributes
    ----------
    name : str
        Integral name (``"sps"`` …), column ``index`` of :data:`BOND_INTEGRALS`.
    shell_a, shell_b : str
        Shell on the first atom (A) and on the second (B).
    l_a, l_b, m : int
        Angular momenta and |m| (0 σ, 1 π, 2 δ).
    sign : int
        V_name = sign·⟨α_m on A|O|β_m on B⟩ with B on +z: (−1)^{l_a+l_b} when l_a > l_b, else 1.
    """

    name: str
    index: int
    shell_a: str
    shell_b: str
    l_a: int
    l_b: int
    m: int
    sign: int


def _table() -> tuple[BondFrameIntegral, ...]:
    out = []
    for k, name in enumerate(BOND_INTEGRALS):
        la, lb, m = SHELL_L[name[0]], SHELL_L[name[1]], _M_OF[name[2]]
        sign = (-1) ** (la + lb) if la > lb else 1
        out.append(BondFrameIntegral(name, k, name[0], name[1], la, lb, m, sign))
    return tuple(out)


#: The 14 integrals in :data:`BOND_INTEGRALS` order.
BOND_FRAME: tuple[BondFrameIntegral, ...] = _table()
