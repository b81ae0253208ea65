"""Small array helpers shared by the result and record types."""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike, NDArray

__all__ = ["readonly"]


def readonly(a: ArrayLike, dtype=np.float64) -> NDArray:
    """A read-only copy of ``a`` as ``dtype`` (frozen results never share writable memory)."""
    out = np.array(a, dtype=dtype, copy=True)
    out.setflags(write=False)
    return out
