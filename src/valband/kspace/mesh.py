"""Monkhorst–Pack and Γ-centred k-point meshes reduced to the irreducible wedge.

A mesh of ``m = (m0, m1, m2)`` points has full-mesh points ``k = (a + s/2) / m`` in fractional
reciprocal coordinates, with integer address ``a`` and shift ``s ∈ {0, 1}`` per axis. The full-mesh
index of address ``a`` (taken mod m) is ``a0 + m0·(a1 + m1·a2)`` — spglib's order, which the
tetrahedron code relies on. Monkhorst & Pack, Phys. Rev. B 13, 5188 (1976): their mesh is Γ-centred
for odd m and shifted by half a step for even m.
"""

from __future__ import annotations

import warnings
from dataclasses import dataclass
from typing import Literal

import numpy as np
from numpy.typing import NDArray

from valband.errors import SettingsError, SymmetryWarning
from valband.kspace.symmetry import ir_reciprocal_mesh
from valband.structure import Structure

__all__ = ["KMesh", "make_mesh", "parse_mesh", "MeshKind"]

MeshKind = Literal["monkhorst-pack", "gamma"]

#: Largest number of full-mesh points accepted (a 400³ mesh); beyond this something is wrong.
MAX_MESH_POINTS = 400**3


@dataclass(frozen=True, eq=False)
class KMesh:
    """A k-point mesh and its irreducible set.

    Attributes
    ----------
    mesh : tuple of 3 int
        Points along each reciprocal lattice vector.
    shift : tuple of 3 int
        Half-step shift per axis (0 or 1).
    kind : str
        ``"monkhorst-pack"`` or ``"gamma"``.
    kpoints : ndarray, shape (n_ir, 3), float64
        Irreducible k-points, fractional reciprocal coordinates.
    weights : ndarray, shape (n_ir,), float64
        Their weights, summing to 1.
    ir_map : ndarray, shape (n_full,), int64
        For every full-mesh point, the row of its representative in ``kpoints``.
    symmetry : bool
        Whether the wedge was reduced with the crystal's symmetry (time reversal included).
    """

    mesh: tuple[int, int, int]
    shift: tuple[int, int, int]
    kind: str
    kpoints: NDArray[np.float64]
    weights: NDArray[np.float64]
    ir_map: NDArray[np.int64]
    symmetry: bool

    def __post_init__(self) -> None:
        for name in ("kpoints", "weights", "ir_map"):
            getattr(self, name).setflags(write=False)

    @property
    def n_full(self) -> int:
        """Number of points in the full mesh."""
        return int(np.prod(self.mesh))

    @property
    def n_irreducible(self) -> int:
        """Number of irreducible points."""
        return len(self.kpoints)

    def full_kpoints(self) -> NDArray[np.float64]:
        """All full-mesh points, fractional, in full-mesh index order, shape (n_full, 3)."""
        m = np.array(self.mesh)
        idx = np.arange(self.n_full)
        addr = np.stack([idx % m[0], (idx // m[0]) % m[1], idx // (m[0] * m[1])], axis=1)
        return _wrap((addr + 0.5 * np.array(self.shift)) / m)

    def to_dict(self) -> dict:
        """Settings for provenance (not the points themselves)."""
        return {
            "mesh": list(self.mesh),
            "kind": self.kind,
            "shift": list(self.shift),
            "symmetry": self.symmetry,
            "n_irreducible": self.n_irreducible,
            "n_full": self.n_full,
        }


def _wrap(k: NDArray) -> NDArray:
    """Fractional coordinates folded into (−½, ½]."""
    return k - np.ceil(k - 0.5)


def parse_mesh(value: str | int | tuple[int, ...] | list[int]) -> tuple[int, int, int]:
    """``"24"``, ``"24x24x24"``, ``"24,24,12"``, 24 or (24, 24, 12) → (m0, m1, m2)."""
    if isinstance(value, str):
        parts = value.replace("x", " ").replace(",", " ").replace("×", " ").split()
        try:
            nums = [int(p) for p in parts]
        except ValueError:
            raise SettingsError(
                f"k-mesh {value!r}: expected one or three positive integers such as 24 or 24x24x12"
            ) from None
    elif isinstance(value, (int, np.integer)):
        nums = [int(value)]
    else:
        nums = [int(v) for v in value]
    if len(nums) == 1:
        nums = nums * 3
    if len(nums) != 3 or any(n < 1 for n in nums):
        raise SettingsError(
            f"k-mesh {value!r}: expected one or three positive integers (points per reciprocal "
            "lattice vector), e.g. 24 or 24x24x12; zero or negative counts are not a mesh"
        )
    if int(np.prod(nums)) > MAX_MESH_POINTS:
        raise SettingsError(f"k-mesh {value!r}: {np.prod(nums)} points is more than {MAX_MESH_POINTS}")
    return (nums[0], nums[1], nums[2])


def make_mesh(
    structure: Structure,
    mesh: str | int | tuple[int, ...],
    kind: MeshKind = "monkhorst-pack",
    symmetry: bool = True,
    time_reversal: bool = True,
) -> KMesh:
    """Build a mesh and reduce it to the irreducible wedge with spglib.

    Parameters
    ----------
    structure
        The crystal whose symmetry reduces the mesh.
    mesh
        Points per reciprocal lattice vector (see :func:`parse_mesh`).
    kind
        ``"monkhorst-pack"`` (shifted by half a step along even axes) or ``"gamma"`` (Γ-centred).
    symmetry
        Reduce with the space group (and time reversal); ``False`` keeps every point.
    time_reversal
        Use k ≡ −k (valid without magnetism or spin–orbit in a magnetic field).
    """
    m = parse_mesh(mesh)
    if kind == "monkhorst-pack":
        shift = tuple((n + 1) % 2 for n in m)
    elif kind == "gamma":
        shift = (0, 0, 0)
    else:
        raise SettingsError(f"mesh kind {kind!r}: accepted 'monkhorst-pack' or 'gamma'")
    n_full = int(np.prod(m))
    mapping = None
    if symmetry:
        try:
            mapping, grid = ir_reciprocal_mesh(structure, m, shift, time_reversal)
        except Exception as exc:  # spglib failure: fall back to the full mesh
            warnings.warn(
                f"symmetry reduction failed ({exc}); using the full mesh", SymmetryWarning, stacklevel=2
            )
    if mapping is None:
        mapping = np.arange(n_full, dtype=np.int64)
        symmetry = False
    reps, ir_map, counts = np.unique(mapping, return_inverse=True, return_counts=True)
    mv = np.array(m)
    addr = np.stack([reps % mv[0], (reps // mv[0]) % mv[1], reps // (mv[0] * mv[1])], axis=1)
    kpts = _wrap((addr + 0.5 * np.array(shift)) / mv)
    return KMesh(
        mesh=m,
        shift=shift,  # type: ignore[arg-type]
        kind=kind,
        kpoints=kpts.astype(np.float64),
        weights=(counts / n_full).astype(np.float64),
        ir_map=ir_map.astype(np.int64).reshape(-1),
        symmetry=symmetry,
    )
