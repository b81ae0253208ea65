"""Distance laws of two-centre integrals and the smooth pair cutoff.

Four forms of an integral V(r) (r in Å, V in eV for hoppings, dimensionless for overlaps):

``power``        V(r) = v0 · (r0 / r)^n
``exponential``  V(r) = v0 · exp(−q · (r / r0 − 1))
``spline``       cubic spline (``scipy.interpolate.CubicSpline``, not-a-knot ends) through
                 tabulated nodes (r_i, v_i)
``shells``       one value per neighbour shell; a distance matches a shell when it lies within
                 ``tolerance`` Å of the shell distance

The taper f(r) of :class:`Cutoff` multiplies every law: f = 1 for r ≤ inner, f = 0 for
r ≥ outer, and in between, with x = (r − inner)/(outer − inner),

``quintic``  f = 1 − 10x³ + 15x⁴ − 6x⁵   (value, first and second derivative continuous)
``cosine``   f = ½ (1 + cos πx)           (value and first derivative continuous)

Validation of user files lives in :mod:`valband.params.schema`; the classes here assume valid
numbers and only evaluate.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any, ClassVar

import numpy as np
from numpy.typing import NDArray

from valband.errors import ParameterError

__all__ = [
    "TAPERS",
    "Cutoff",
    "DistanceLaw",
    "PowerLaw",
    "ExponentialLaw",
    "SplineLaw",
    "ShellTable",
]

#: Names of the taper functions a cutoff may use.
TAPERS: tuple[str, ...] = ("quintic", "cosine")


@dataclass(frozen=True)
class Cutoff:
    """Smooth cutoff of one element pair.

    Attributes
    ----------
    inner : float
        Å; the taper is exactly 1 at and below this distance.
    outer : float
        Å; the taper and every integral are exactly 0 at and beyond this distance.
    taper : str
        ``"quintic"`` or ``"cosine"`` (see the module docstring).
    """

    inner: float
    outer: float
    taper: str

    def _x(self, r: NDArray[np.float64]) -> NDArray[np.float64]:
        return np.clip((r - self.inner) / (self.outer - self.inner), 0.0, 1.0)

    def factor(self, r: NDArray[np.float64]) -> NDArray[np.float64]:
        """Taper f(r), 1 inside ``inner``, exactly 0 at and beyond ``outer``."""
        r = np.asarray(r, dtype=np.float64)
        x = self._x(r)
        if self.taper == "quintic":
            f = 1.0 - x**3 * (10.0 - 15.0 * x + 6.0 * x**2)
        else:
            f = 0.5 * (1.0 + np.cos(np.pi * x))
        return np.where(r >= self.outer, 0.0, np.where(r <= self.inner, 1.0, f))

    def derivative(self, r: NDArray[np.float64]) -> NDArray[np.float64]:
        """df/dr in 1/Å (0 outside the taper window)."""
        r = np.asarray(r, dtype=np.float64)
        x = self._x(r)
        width = self.outer - self.inner
        if self.taper == "quintic":
            g = -30.0 * x**2 * (1.0 - x) ** 2
        else:
            g = -0.5 * np.pi * np.sin(np.pi * x)
        inside = (r > self.inner) & (r < self.outer)
        return np.where(inside, g / width, 0.0)

    def to_dict(self) -> dict[str, Any]:
        """The ``cutoff`` table of the file format."""
        return {"inner": self.inner, "outer": self.outer, "taper": self.taper}


@dataclass(frozen=True, kw_only=True)
class DistanceLaw:
    """Base of the distance laws: ``law(r)`` evaluates V at distances r (Å), vectorised.

    ``where`` is the field path used in error messages; ``source`` the optional per-integral
    provenance (``None`` when the pair's provenance applies).
    """

    kind: ClassVar[str] = ""
    where: str = field(default="", compare=False, repr=False)
    source: str | None = None

    def __call__(self, r: NDArray[np.float64]) -> NDArray[np.float64]:  # pragma: no cover
        raise NotImplementedError

    def _params(self) -> dict[str, Any]:  # pragma: no cover
        raise NotImplementedError

    def to_dict(self) -> dict[str, Any]:
        """The integral's table in the file format."""
        d: dict[str, Any] = {"law": self.kind, **self._params()}
        if self.source is not None:
            d["source"] = self.source
        return d

    def describe(self) -> str:
        """One-line human-readable description (for summaries)."""
        return self.kind + ": " + ", ".join(f"{k}={v}" for k, v in self._params().items())


@dataclass(frozen=True, kw_only=True)
class PowerLaw(DistanceLaw):
    """V(r) = v0 · (r0/r)^n; v0 in eV (or dimensionless), r0 in Å, n ≥ 0."""

    kind: ClassVar[str] = "power"
    v0: float
    r0: float
    n: float

    def __call__(self, r: NDArray[np.float64]) -> NDArray[np.float64]:
        return self.v0 * (self.r0 / np.asarray(r, dtype=np.float64)) ** self.n

    def _params(self) -> dict[str, Any]:
        return {"v0": self.v0, "r0": self.r0, "n": self.n}


@dataclass(frozen=True, kw_only=True)
class ExponentialLaw(DistanceLaw):
    """V(r) = v0 · exp(−q (r/r0 − 1)); v0 in eV (or dimensionless), r0 in Å, q ≥ 0."""

    kind: ClassVar[str] = "exponential"
    v0: float
    r0: float
    q: float

    def __call__(self, r: NDArray[np.float64]) -> NDArray[np.float64]:
        return self.v0 * np.exp(-self.q * (np.asarray(r, dtype=np.float64) / self.r0 - 1.0))

    def _params(self) -> dict[str, Any]:
        return {"v0": self.v0, "r0": self.r0, "q": self.q}


@dataclass(frozen=True, kw_only=True)
class SplineLaw(DistanceLaw):
    """Cubic spline (not-a-knot) through nodes ``r`` (Å, strictly increasing) and values ``v``.

    Distances below the first node are refused (no extrapolation towards short bonds); the
    validator makes the last node reach the pair's outer cutoff.
    """

    kind: ClassVar[str] = "spline"
    r: tuple[float, ...]
    v: tuple[float, ...]
    _spline: object = field(init=False, repr=False, compare=False)  # scipy CubicSpline

    def __post_init__(self) -> None:
        object.__setattr__(self, "_spline", None)  # built on first use (a set holds thousands)

    def _curve(self):
        if self._spline is None:
            from scipy.interpolate import CubicSpline  # imported here: heavy

            object.__setattr__(self, "_spline", CubicSpline(np.array(self.r), np.array(self.v),
                                                            bc_type="not-a-knot"))
        return self._spline

    def __call__(self, r: NDArray[np.float64]) -> NDArray[np.float64]:
        r = np.asarray(r, dtype=np.float64)
        if r.size and float(r.min()) < self.r[0]:
            raise ParameterError(
                f"{self.where}: distance {float(r.min()):.6g} Å lies below the first node "
                f"{self.r[0]:.6g} Å of the tabulated curve; accepted: distances from "
                f"{self.r[0]:.6g} Å up to the cutoff (extend the table to shorter bonds)"
            )
        return np.asarray(self._curve()(r), dtype=np.float64)

    def _params(self) -> dict[str, Any]:
        return {"r": list(self.r), "v": list(self.v)}


@dataclass(frozen=True, kw_only=True)
class ShellTable(DistanceLaw):
    """One value per neighbour shell: ``shells`` = ((distance Å, value), ...), ``tolerance`` Å.

    A distance below the cutoff that matches no shell within the tolerance is refused.
    """

    kind: ClassVar[str] = "shells"
    tolerance: float
    shells: tuple[tuple[float, float], ...]

    def __call__(self, r: NDArray[np.float64]) -> NDArray[np.float64]:
        r = np.asarray(r, dtype=np.float64)
        dist = np.array([s[0] for s in self.shells])
        vals = np.array([s[1] for s in self.shells])
        if r.size == 0:
            return np.zeros(0)
        gap = np.abs(r[:, None] - dist[None, :])
        nearest = np.argmin(gap, axis=1)
        ok = gap[np.arange(len(r)), nearest] <= self.tolerance + 1e-9  # Å, rounding slack
        if not np.all(ok):
            bad = float(r[~ok][0])
            raise ParameterError(
                f"{self.where}: distance {bad:.6g} Å matches no neighbour shell; accepted: "
                f"distances within {self.tolerance:g} Å of "
                + ", ".join(f"{d:g}" for d in dist)
                + " Å (or at/beyond the cutoff)"
            )
        return vals[nearest]

    def _params(self) -> dict[str, Any]:
        return {"tolerance": self.tolerance, "shells": [list(s) for s in self.shells]}
