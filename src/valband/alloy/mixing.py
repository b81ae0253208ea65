"""Mixing schemes for self-consistent loops: linear and Anderson.

Both drive a fixed point x = x + f(x) with f a (preconditioned) residual that vanishes at the
solution.

linear
    x ← x + β f.
anderson
    Anderson's method (D. G. Anderson, J. ACM 12, 547 (1965); in the "type II" form reviewed
    by V. Eyert, J. Comput. Phys. 124, 271 (1996), equivalent to Broyden's second method with
    a limited history): with the last m differences ΔX, ΔF of iterates and residuals,
    γ = argmin ‖f − ΔF γ‖ (least squares), x̄ = x − ΔX γ, f̄ = f − ΔF γ, and x ← x̄ + β f̄.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import NDArray

from valband.errors import SettingsError

__all__ = ["MIXERS", "Mixer", "make_mixer"]

#: Accepted mixing schemes.
MIXERS = ("linear", "anderson")


class Mixer:
    """Linear (``history=0``) or Anderson mixing with step β and ``history`` past steps."""

    def __init__(self, beta: float, history: int = 0) -> None:
        self.beta = float(beta)
        self.history = int(history)
        self._x: NDArray | None = None
        self._f: NDArray | None = None
        self._dx: list[NDArray] = []
        self._df: list[NDArray] = []

    def step(self, x: NDArray[np.float64], f: NDArray[np.float64]) -> NDArray[np.float64]:
        """Next iterate from the current iterate ``x`` and its residual ``f``."""
        x = np.asarray(x, dtype=float).copy()
        f = np.asarray(f, dtype=float).copy()
        if self.history > 0 and self._x is not None:
            self._dx.append(x - self._x)
            self._df.append(f - self._f)
            del self._dx[: -self.history], self._df[: -self.history]
        self._x, self._f = x, f
        if self.history > 0 and self._df:
            dfm = np.stack(self._df, axis=1)
            dxm = np.stack(self._dx, axis=1)
            scale = max(float(np.abs(dfm).max()), 1e-300)
            gamma = np.linalg.lstsq(dfm / scale, f / scale, rcond=1e-10)[0]
            x = x - dxm @ gamma
            f = f - dfm @ gamma
        return x + self.beta * f


def make_mixer(kind: str, beta: float, history: int) -> Mixer:
    """Return a :class:`Mixer` for ``kind`` in :data:`MIXERS`; SettingsError otherwise."""
    if kind not in MIXERS:
        raise SettingsError(f"mixing {kind!r}: accepted {', '.join(MIXERS)}")
    if not (np.isfinite(beta) and 0 < beta <= 2):
        raise SettingsError(f"mixing step β = {beta!r}: accepted 0 < β ≤ 2")
    if kind == "anderson" and int(history) < 1:
        raise SettingsError(f"Anderson history {history!r}: must be ≥ 1")
    return Mixer(beta, int(history) if kind == "anderson" else 0)
