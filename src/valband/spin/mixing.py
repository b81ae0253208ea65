"""Anderson mixing of the site moments in the Stoner self-consistency.

Anderson, J. ACM 12, 547 (1965), in the form of Eyert, J. Comput. Phys. 124, 271 (1996):
with residuals f = g(x) − x and the last differences ΔX, ΔF,
γ = argmin ‖f − ΔF γ‖ and x_new = x + β f − (ΔX + β ΔF) γ. One moment per magnetic site, so
the least-squares problem is tiny. Each step is capped at ``max_step`` μB per site so that a
poor early secant cannot jump across m = 0 (where the non-magnetic solution always lies).
"""

from __future__ import annotations

import numpy as np
from numpy.typing import NDArray

__all__ = ["AndersonMixer"]


class AndersonMixer:
    """Mixer state: call with (x, f) to get the next input x (arrays of the same shape)."""

    def __init__(self, beta: float, history: int, max_step: float = 0.5) -> None:
        self.beta = float(beta)
        self.history = int(history)
        self.max_step = float(max_step)
        self._x: list[NDArray] = []
        self._f: list[NDArray] = []

    def __call__(self, x: NDArray, f: NDArray) -> NDArray:
        """Next input from the current input ``x`` and its residual ``f = g(x) − x``."""
        x = np.asarray(x, dtype=np.float64)
        f = np.asarray(f, dtype=np.float64)
        self._x.append(x.copy())
        self._f.append(f.copy())
        self._x = self._x[-(self.history + 1):]
        self._f = self._f[-(self.history + 1):]
        new = x + self.beta * f
        if len(self._x) > 1 and self.history > 0:
            dx = np.stack([b - a for a, b in zip(self._x[:-1], self._x[1:], strict=True)], axis=1)
            df = np.stack([b - a for a, b in zip(self._f[:-1], self._f[1:], strict=True)], axis=1)
            if np.linalg.norm(df) > 1e-14:
                gamma = np.linalg.lstsq(df, f, rcond=1e-10)[0]
                new = x + self.beta * f - (dx + self.beta * df) @ gamma
        step = new - x
        big = float(np.max(np.abs(step), initial=0.0))
        if big > self.max_step:
            new = x + step * (self.max_step / big)
        return new
