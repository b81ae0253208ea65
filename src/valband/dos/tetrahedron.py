"""Linear tetrahedron method on a k-mesh (Γ-centred or shifted), unfolded from irreducible points.

Reference: P. E. Blöchl, O. Jepsen, O. K. Andersen, Phys. Rev. B 49, 16223 (1994).

Mesh and index convention
    Full-mesh point (i0, i1, i2), 0 ≤ ia < ma, has index i0 + m0·(i1 + m1·i2) — the order
    of spglib's ``get_ir_reciprocal_mesh`` (its ``grid_address`` mod mesh gives the ia).
    ``ir_map[index]`` is the row of that point in the irreducible arrays. Every mesh cube
    (i0..i0+1, i1..i1+1, i2..i2+1), with periodic wrap-around, is split into six tetrahedra
    that share the cube's shortest main diagonal in Cartesian reciprocal space
    (:func:`cube_tetrahedra`).

DOS
    The plain linear tetrahedron DOS, evaluated at each grid energy (a point value, not a
    bin average). Projected DOS use the delta-function weight of each corner,
    d_r(E) = ∫_T δ(E − ε) λ_r (λ_r: barycentric coordinate of corner r), i.e. the energy
    derivative of Blöchl's integration weights; Σ_r d_r is the tetrahedron DOS, so channels
    whose projections sum to one per state sum to the total.

Tetrahedron classes
    Tetrahedra whose four corners map to the same irreducible points have identical
    energies and projections; they are grouped once per mesh (:func:`tetrahedron_classes`,
    one int64 key per tetrahedron, sorted) and each class is integrated once with its
    multiplicity (Blöchl et al. 1994, Sec. III). With symmetry this divides the work by up
    to the order of the point group. No (nfull, nb) array is built: the kernels read
    energies and projections of the irreducible points only; grouping needs 6·nfull keys
    (8 bytes each) once, and the kernels a few thread-private (1 + nch)·ne accumulators.

Blöchl's correction
    δw_r = Σ_T D_T(E)/40 · Σ_s (ε_s − ε_r) (Sec. IV of the reference) sums to zero over the
    four corners of every tetrahedron, so it leaves the integrated count N(E) unchanged
    (the electron number is conserved) and only improves integrals of k-dependent
    quantities, such as the band energy Σ_nk w_nk ε_nk: use :func:`tetrahedron_integrate`.
"""

from __future__ import annotations

import itertools
import math
import numbers

import numpy as np
from numpy.typing import NDArray

from valband.dos._tetra_kernels import (
    irreducible_tetrahedra,
    tetra_dos_numba,
    tetra_integrate_numba,
)
from valband.dos._validate import (
    check_channel_weights,
    check_degeneracy,
    check_eigenvalues,
    check_uniform_grid,
)
from valband.errors import SettingsError

__all__ = [
    "cube_tetrahedra",
    "tetrahedron_classes",
    "tetrahedron_dos",
    "tetrahedron_count",
    "tetrahedron_integrate",
]

#: Main diagonals of the unit cube, as (start corner, end corner).
_DIAGONALS = (
    ((0, 0, 0), (1, 1, 1)),
    ((1, 0, 0), (0, 1, 1)),
    ((0, 1, 0), (1, 0, 1)),
    ((0, 0, 1), (1, 1, 0)),
)
#: Relative tolerance below which two diagonal lengths count as equal (first one wins).
_TIE_RTOL = 1e-10


def _check_mesh(mesh) -> NDArray[np.int64]:
    try:
        vals = list(mesh)
    except TypeError:
        raise SettingsError(f"mesh must be three positive integers, got {mesh!r}") from None
    ok = len(vals) == 3 and all(
        isinstance(v, numbers.Integral) or (isinstance(v, float) and v.is_integer()) for v in vals
    )
    if ok:
        m = np.array([int(v) for v in vals], dtype=np.int64)
        ok = bool(np.all(m >= 1))
    if not ok:
        raise SettingsError(f"mesh must be three positive integers, got {mesh!r}")
    return m


def _check_reciprocal_cell(reciprocal_cell) -> NDArray[np.float64]:
    rc = np.asarray(reciprocal_cell, dtype=np.float64)
    if rc.shape != (3, 3):
        raise SettingsError(f"reciprocal_cell must have shape (3, 3) (rows, 1/Å), got {rc.shape}")
    if not np.all(np.isfinite(rc)):
        raise SettingsError("reciprocal_cell contains NaN or infinite values")
    vol = abs(np.linalg.det(rc))
    if not vol > 1e-12 * np.prod(np.linalg.norm(rc, axis=1)):
        raise SettingsError("reciprocal_cell is singular (its rows must be independent, 1/Å)")
    return rc


def _check_ir_map(ir_map, nfull: int, nir: int) -> NDArray[np.int64]:
    im = np.asarray(ir_map)
    if im.shape != (nfull,):
        raise SettingsError(
            f"ir_map must have shape (nfull,) = ({nfull},) = prod(mesh), got {im.shape}"
        )
    if not np.issubdtype(im.dtype, np.integer):
        raise SettingsError(f"ir_map must hold integers (row indices), got dtype {im.dtype}")
    if im.size and (im.min() < 0 or im.max() >= nir):
        raise SettingsError(
            f"ir_map entries must lie in [0, {nir}) (rows of eig_ir), "
            f"got [{im.min()}, {im.max()}]"
        )
    return np.ascontiguousarray(im, dtype=np.int64)


def cube_tetrahedra(mesh, reciprocal_cell) -> NDArray[np.int64]:
    """Corner offsets of the six tetrahedra of one mesh cube.

    The cube is cut along the shortest of its four main diagonals, measured in Cartesian
    reciprocal space with edges b_a/m_a (Blöchl et al. 1994, Sec. III); ties (within a
    relative 1e-10) go to the first of (000–111), (100–011), (010–101), (001–110).

    Parameters
    ----------
    mesh : three positive ints
    reciprocal_cell : array (3, 3), 1/Å
        Reciprocal lattice vectors as rows, including 2π.

    Returns
    -------
    ndarray (6, 4, 3), int
        For each tetrahedron, its four corners as offsets in {0, 1}³ from the cube origin;
        every tetrahedron contains both ends of the chosen diagonal.
    """
    m = _check_mesh(mesh)
    rc = _check_reciprocal_cell(reciprocal_cell)
    edges = rc / m[:, None]
    lengths = [
        float(np.linalg.norm((np.array(b) - np.array(a)) @ edges)) for a, b in _DIAGONALS
    ]
    shortest = min(lengths)
    k = next(i for i, L in enumerate(lengths) if L <= shortest * (1.0 + _TIE_RTOL))
    start = np.array(_DIAGONALS[k][0])
    end = np.array(_DIAGONALS[k][1])
    step = end - start
    tets = np.empty((6, 4, 3), dtype=np.int64)
    for t, (p, q, _) in enumerate(itertools.permutations(range(3))):
        v1 = start.copy()
        v1[p] += step[p]
        v2 = v1.copy()
        v2[q] += step[q]
        tets[t] = [start, v1, v2, end]
    return tets


def tetrahedron_classes(mesh, reciprocal_cell, ir_map, n_irreducible: int):
    """Group the mesh's tetrahedra by their irreducible corners (do once, reuse).

    Returns ``(rows, mult)``: int64 (n_classes, 4) corner rows and float64 (n_classes,)
    multiplicities, to pass as ``classes=`` to the other functions of this module.
    """
    m = _check_mesh(mesh)
    im = _check_ir_map(ir_map, int(np.prod(m)), int(n_irreducible))
    return irreducible_tetrahedra(m, cube_tetrahedra(m, reciprocal_cell), im, int(n_irreducible))


def _prepare(mesh, reciprocal_cell, ir_map, eig_ir):
    m = _check_mesh(mesh)
    tets = cube_tetrahedra(m, reciprocal_cell)
    eig = np.ascontiguousarray(check_eigenvalues(eig_ir, name="eig_ir"))
    im = _check_ir_map(ir_map, int(np.prod(m)), eig.shape[0])
    return m, tets, im, eig


def tetrahedron_dos(
    mesh,
    reciprocal_cell,
    ir_map,
    eig_ir,
    energies,
    channel_weights_ir=None,
    degeneracy: float = 2.0,
    classes=None,
) -> tuple[NDArray[np.float64], NDArray[np.float64] | None]:
    """Linear tetrahedron DOS on a uniform energy grid.

    Parameters
    ----------
    mesh : three positive ints
        Γ-centred mesh m0 × m1 × m2.
    reciprocal_cell : array (3, 3), 1/Å
        Reciprocal lattice vectors as rows (including 2π); sets the cube diagonal.
    ir_map : int array (m0·m1·m2,)
        Row in ``eig_ir`` of every full-mesh point, index i0 + m0·(i1 + m1·i2).
    eig_ir : array (nir, nb), eV
    energies : array (ne,), eV
        Uniform, strictly ascending grid.
    channel_weights_ir : array (nir, nb, nch) or None
        Projections of every irreducible state (rotations of projections between
        symmetry-equivalent points are the caller's business: the projection of the
        representative is used for all its images, which is exact for channel sets
        closed under the point group, e.g. per site and l).
    degeneracy : float
        States per band and k-point (2 for spin-degenerate bands).
    classes : (rows, mult) from :func:`tetrahedron_classes`, or None to build them here.

    Returns
    -------
    total : ndarray (ne,), states / eV / cell
    channels : ndarray (nch, ne) or None, states / eV / cell
    """
    m, tets, im, eig = _prepare(mesh, reciprocal_cell, ir_map, eig_ir)
    grid, _ = check_uniform_grid(energies)
    proj = check_channel_weights(channel_weights_ir, eig.shape[0], eig.shape[1],
                                 name="channel_weights_ir")
    deg = check_degeneracy(degeneracy)
    total, channels = tetra_dos_numba(m, tets, im, eig, grid, proj, classes)
    total *= deg
    if channels is not None:
        channels *= deg
    return total, channels


def tetrahedron_integrate(
    mesh,
    reciprocal_cell,
    ir_map,
    eig_ir,
    energy,
    values_ir=None,
    degeneracy: float = 2.0,
    bloechl: bool = True,
    classes=None,
) -> float:
    """Σ_nk w_nk(E) F_nk: a k-dependent quantity integrated over the states below E.

    With ``values_ir`` = None (F = 1) this is the electron count N(E); with F = ε it is the
    band energy. The weights are Blöchl's linear-tetrahedron integration weights, plus his
    curvature correction δw_r = D_T(E)/40 Σ_s (ε_s − ε_r) when ``bloechl`` is true
    (Blöchl et al., Phys. Rev. B 49, 16223 (1994), Sec. IV and Appendix B).

    Parameters
    ----------
    mesh, reciprocal_cell, ir_map, eig_ir
        As in :func:`tetrahedron_dos`.
    energy : float, eV
        Upper limit (the Fermi level for occupied-state integrals); ±inf accepted.
    values_ir : array (nir, nb) or None
        F at every irreducible state (any unit); None means 1.
    degeneracy : float
    bloechl : bool
    classes : (rows, mult) from :func:`tetrahedron_classes`, or None.

    Returns
    -------
    float
        degeneracy × Σ w F per cell (unit of F; electrons when F = 1).
    """
    m, tets, im, eig = _prepare(mesh, reciprocal_cell, ir_map, eig_ir)
    deg = check_degeneracy(degeneracy)
    e = _check_energy(energy)
    if values_ir is None:
        vals = np.ones_like(eig)
    else:
        vals = np.asarray(values_ir, dtype=np.float64)
        if vals.shape != eig.shape:
            raise SettingsError(
                f"values_ir must have the shape of eig_ir {eig.shape}, got {vals.shape}"
            )
        if not np.all(np.isfinite(vals)):
            raise SettingsError("values_ir contains NaN or infinite values")
        vals = np.ascontiguousarray(vals)
    if math.isinf(e):
        if e < 0:
            return 0.0
        e = float(eig.max()) + 1.0  # every weight is exactly 1/4 above the top corner
    return deg * tetra_integrate_numba(m, tets, im, eig, vals, e, bool(bloechl), classes)


def tetrahedron_count(
    mesh,
    reciprocal_cell,
    ir_map,
    eig_ir,
    energy,
    degeneracy: float = 2.0,
    bloechl: bool = True,
    classes=None,
) -> float:
    """Integrated DOS N(E), electrons per cell below ``energy`` (eV).

    The sum of Blöchl-corrected weights (``bloechl=True``) or of the plain linear weights.
    The two agree to rounding, because Blöchl's correction sums to zero over the corners of
    each tetrahedron (it conserves the electron number; see the module notes). N(E) is
    continuous and non-decreasing in E.

    Parameters
    ----------
    mesh, reciprocal_cell, ir_map, eig_ir, degeneracy
        As in :func:`tetrahedron_dos`.
    energy : float, eV
    bloechl : bool

    Returns
    -------
    float
    """
    return tetrahedron_integrate(
        mesh, reciprocal_cell, ir_map, eig_ir, energy, None, degeneracy, bloechl, classes
    )


def _check_energy(energy) -> float:
    try:
        e = float(energy)
    except (TypeError, ValueError):
        raise SettingsError(f"energy must be a number in eV, got {energy!r}") from None
    if math.isnan(e):
        raise SettingsError("energy must not be NaN")
    return e
