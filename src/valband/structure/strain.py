"""Homogeneous strain of a periodic cell.

A strain tensor ε (symmetric 3×3, Cartesian) maps every vector r to (1 + ε) r; the cell rows
and the Cartesian positions are both mapped, so fractional coordinates stay fixed (no internal
relaxation). Three ways to give it:

uniform
    a scalar ε: every length × (1 + ε), the volume × (1 + ε)³.
biaxial
    ε in the plane perpendicular to a unit axis n: ε_ij = ε (δ_ij − n_i n_j) + ε_⊥ n_i n_j,
    with ε_⊥ = 0 (no relaxation) or, given Poisson's ratio ν, the isotropic linear-elastic
    biaxial-stress value ε_⊥ = −2ν/(1 − ν)·ε (Hooke's law with σ_⊥ = 0; textbook). For a
    cubic crystal the exact ratio depends on the orientation through C11, C12, C44; the
    isotropic form is an estimate.
tensor
    any symmetric 3×3 ε with all principal strains > −1.

Every component must also stay within ±:data:`MAX_STRAIN` = 0.5, which catches a percentage
typed as a fraction (``1`` for 1 %). Non-finite values and ε ≤ −1 are rejected.
"""

from __future__ import annotations

import math

import numpy as np
from numpy.typing import ArrayLike, NDArray

from valband.errors import StructureError
from valband.structure.record import Structure

__all__ = [
    "AXES",
    "apply_strain",
    "biaxial_strain_tensor",
    "poisson_perpendicular_strain",
    "strain_tensor",
]

#: Named axes accepted by :func:`biaxial_strain_tensor`.
AXES = {"x": (1.0, 0.0, 0.0), "y": (0.0, 1.0, 0.0), "z": (0.0, 0.0, 1.0)}

#: Largest |ε| component accepted (anything beyond is a typo, not a strain).
MAX_STRAIN = 0.5


def _check_scalar(eps, what: str) -> float:
    try:
        e = float(eps)
    except (TypeError, ValueError):
        raise StructureError(f"{what} {eps!r} is not a number (a strain, e.g. 0.01)") from None
    if not math.isfinite(e):
        raise StructureError(f"{what} {eps!r} is not finite; accepted: −1 < ε ≤ {MAX_STRAIN}")
    if e <= -1.0:
        raise StructureError(
            f"{what} {e:g} ≤ −1 would collapse the cell; accepted: −1 < ε ≤ {MAX_STRAIN}"
        )
    if abs(e) > MAX_STRAIN:
        raise StructureError(
            f"{what} {e:g} is beyond ±{MAX_STRAIN} (a strain is a fraction: 0.01 is 1 %)"
        )
    return e


def poisson_perpendicular_strain(eps_in_plane: float, poisson: float) -> float:
    """Return ε_⊥ = −2ν/(1 − ν)·ε∥ (isotropic film under biaxial stress, σ_⊥ = 0; textbook).

    Accepted ν: −1 < ν ≤ 0.5 (stability of an isotropic solid).
    """
    try:
        nu = float(poisson)
    except (TypeError, ValueError):
        raise StructureError(f"Poisson's ratio {poisson!r} is not a number") from None
    if not (math.isfinite(nu) and -1.0 < nu <= 0.5):
        raise StructureError(
            f"Poisson's ratio {poisson!r} is outside the accepted range −1 < ν ≤ 0.5 "
            "(metals: about 0.3–0.45)"
        )
    return -2.0 * nu / (1.0 - nu) * float(eps_in_plane)


def _unit_axis(axis) -> NDArray[np.float64]:
    if isinstance(axis, str):
        if axis.lower() not in AXES:
            raise StructureError(f"strain axis {axis!r}: accepted x, y, z or a 3-vector")
        return np.array(AXES[axis.lower()])
    try:
        n = np.asarray(axis, dtype=float)
    except (TypeError, ValueError):
        n = np.zeros(0)
    if n.shape != (3,) or not np.all(np.isfinite(n)) or np.linalg.norm(n) < 1e-12:
        raise StructureError(f"strain axis {axis!r}: accepted x, y, z or a nonzero 3-vector")
    return n / np.linalg.norm(n)


def biaxial_strain_tensor(
    eps: float, axis="z", poisson: float | None = None
) -> NDArray[np.float64]:
    """Biaxial strain ε in the plane ⟂ ``axis``; ε_⊥ = 0, or Poisson-relaxed if ν is given."""
    e = _check_scalar(eps, "biaxial strain")
    n = _unit_axis(axis)
    perp = 0.0 if poisson is None else poisson_perpendicular_strain(e, poisson)
    _check_scalar(perp, "perpendicular (Poisson) strain")
    nn = np.outer(n, n)
    return e * (np.eye(3) - nn) + perp * nn


def strain_tensor(strain: float | ArrayLike) -> NDArray[np.float64]:
    """Validate a scalar (uniform) or symmetric 3×3 strain; return the 3×3 tensor."""
    arr = np.asarray(strain)
    if arr.ndim == 0:
        return np.eye(3) * _check_scalar(strain, "uniform strain")
    try:
        eps = np.asarray(strain, dtype=float)
    except (TypeError, ValueError):
        eps = np.zeros(0)
    if eps.shape != (3, 3):
        raise StructureError(
            f"strain {strain!r}: accepted a number (uniform) or a symmetric 3×3 tensor"
        )
    if not np.all(np.isfinite(eps)):
        raise StructureError("strain tensor contains NaN or infinite values")
    if not np.allclose(eps, eps.T, rtol=0, atol=1e-12):
        raise StructureError(
            "strain tensor is not symmetric (ε_ij ≠ ε_ji); a rotation is not a strain — give "
            "the symmetric part"
        )
    principal = np.linalg.eigvalsh(eps)
    if principal.min() <= -1.0:
        raise StructureError(
            f"strain tensor has a principal strain {principal.min():g} ≤ −1, which would "
            "collapse the cell; accepted: all principal strains > −1"
        )
    if np.abs(eps).max() > MAX_STRAIN:
        raise StructureError(
            f"strain tensor component {np.abs(eps).max():g} is beyond ±{MAX_STRAIN} "
            "(a strain is a fraction: 0.01 is 1 %)"
        )
    return eps


def _describe(eps: NDArray[np.float64]) -> str:
    if np.allclose(eps, eps[0, 0] * np.eye(3), rtol=0, atol=1e-15):
        return f"uniform {eps[0, 0]:.6g}"
    return "tensor " + str(np.round(eps, 8).tolist()).replace(" ", "")


def apply_strain(
    structure: Structure,
    strain: float | ArrayLike,
    *,
    axis=None,
    poisson: float | None = None,
) -> Structure:
    """Strain a cell homogeneously (fractional coordinates fixed).

    Parameters
    ----------
    structure
        The cell to strain.
    strain
        A scalar ε (uniform, or biaxial when ``axis`` is given) or a symmetric 3×3 tensor.
    axis
        With a scalar: strain only the plane perpendicular to this axis ("x", "y", "z" or a
        Cartesian 3-vector), i.e. biaxial strain.
    poisson
        With ``axis``: relax along the axis by ε_⊥ = −2ν/(1 − ν)·ε (Poisson's ratio ν).

    Returns
    -------
    Structure
        Same symbols and labels; ``source`` gains ``" strained(<kind> ...)"``.
    """
    scalar = np.asarray(strain).ndim == 0
    if axis is not None or poisson is not None:
        if not scalar:
            raise StructureError(
                "axis/poisson go with a scalar biaxial strain, not with a 3×3 tensor"
            )
        if axis is None:
            raise StructureError(
                "Poisson relaxation needs the axis of the biaxial strain (axis='z', ...)"
            )
        eps = biaxial_strain_tensor(strain, axis, poisson)
        n = _unit_axis(axis)
        kind = f"biaxial {float(strain):.6g} normal {np.round(n, 6).tolist()}"
        if poisson is not None:
            kind += f" poisson {float(poisson):.6g} perpendicular {eps @ n @ n:.6g}"
    else:
        eps = strain_tensor(strain)
        kind = _describe(eps)
    deform = np.eye(3) + eps  # r' = (1 + ε) r; rows: r' = r (1 + ε)ᵀ
    return Structure(
        cell=structure.cell @ deform.T,
        positions=structure.positions @ deform.T,
        symbols=structure.symbols,
        labels=structure.labels,
        source=f"{structure.source} strained({kind})",
    )
