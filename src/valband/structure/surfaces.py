"""Slabs and pseudomorphic overlayers in a 3-D periodic cell.

The tight-binding code needs a cell periodic in all three directions, so a slab is a stack of
atomic layers (in-plane lattice from ``ase.build.fcc111`` and friends) with a vacuum gap along
the third cell vector, which is along z (the surface normal): ``cell[2] = (0, 0, thickness +
vacuum)``, the bottom layer at z = vacuum/2 and the top layer at z = vacuum/2 + thickness.

Vacuum
    ``vacuum`` (Å) is the gap between the top layer and the periodic image of the bottom
    layer. Default :data:`DEFAULT_VACUUM` = 12 Å: more than twice the ~5 Å neighbour cutoffs of
    metal tight-binding models, so no hopping crosses the gap (common practice).

Layers
    ``SlabInfo.layer`` is 0 for the top surface layer (largest z) and ``n_layers − 1`` for the
    bottom one; ``SlabInfo.depth`` counts from the nearer surface (0 on both surfaces of the
    symmetric slabs of :func:`slab`; an overlayer slab is not symmetric, ``symmetric=False``).
    Site labels carry the layer too: ``"Pt3@L1"`` is site 3, in layer 1.

Facets and interlayer spacings (geometry of the ideal lattices; textbook)
    fcc(111) a/√3, fcc(100) a/2, fcc(110) a/(2√2), bcc(110) a/√2, bcc(100) a/2, hcp(0001) c/2.

Overlayers (:func:`overlayer`)
    k layers of A on an n-layer B slab, pseudomorphic: A takes B's in-plane lattice and
    continues B's stacking (fcc ABC…, hcp AB…). Spacings along the normal, from A's and B's
    bulk spacings d_A, d_B for the facet (at their own lattice constants):

    * default (``poisson=None``): A–A = d_A, A–B = (d_A + d_B)/2 (mean of the bulk spacings);
    * elastic (Poisson's ratio ν given): A is biaxially strained by ε∥ = a_B/a_A − 1, so
      A–A = d_A (1 + ε_⊥) with ε_⊥ = −2ν/(1 − ν)·ε∥ (isotropic film, σ_⊥ = 0; textbook), and
      A–B = (A–A + d_B)/2.

    No relaxation and no adsorbates.
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field

import numpy as np
from numpy.typing import NDArray

from valband.errors import StructureError
from valband.structure.alloys import reference_lattice_constant
from valband.structure.record import Structure
from valband.structure.strain import poisson_perpendicular_strain

__all__ = [
    "DEFAULT_VACUUM",
    "FACETS",
    "LAYER_TOL",
    "SlabInfo",
    "interlayer_spacing",
    "overlayer",
    "slab",
]

#: Default vacuum gap (Å) between a slab and its periodic image along the normal.
DEFAULT_VACUUM = 12.0
#: Sites whose heights differ by less than this (Å) are in one layer.
LAYER_TOL = 1e-3

#: Facet → (lattice, spacing factor d/a, or d/c for hcp). Geometry facts (textbook).
FACETS: dict[str, tuple[str, float]] = {
    "fcc111": ("fcc", 1.0 / math.sqrt(3.0)),
    "fcc100": ("fcc", 0.5),
    "fcc110": ("fcc", 1.0 / (2.0 * math.sqrt(2.0))),
    "bcc110": ("bcc", 1.0 / math.sqrt(2.0)),
    "bcc100": ("bcc", 0.5),
    "hcp0001": ("hcp", 0.5),
}


def _facet(facet: str) -> str:
    key = str(facet).lower().replace("(", "").replace(")", "")
    if key not in FACETS:
        raise StructureError(f"unknown facet {facet!r}; accepted: {', '.join(FACETS)}")
    return key


def interlayer_spacing(facet: str, a: float, c: float | None = None) -> float:
    """Return the spacing (Å) of adjacent atomic layers of an ideal crystal along the normal."""
    key = _facet(facet)
    lattice, factor = FACETS[key]
    if lattice == "hcp":
        if c is None:
            raise StructureError(f"{key}: the hcp spacing c/2 needs c (Å)")
        return factor * float(c)
    return factor * float(a)


@dataclass(frozen=True, eq=False)
class SlabInfo:
    """Layer bookkeeping of a slab returned next to its :class:`Structure`.

    Attributes
    ----------
    facet : str
        Surface, e.g. ``"fcc111"``.
    n_layers : int
        Atomic layers.
    layer : ndarray (n_sites,), int64
        Layer of each site, 0 = top surface layer (largest height).
    depth : ndarray (n_sites,), int64
        Layers from the nearer surface, ``min(layer, n_layers − 1 − layer)``.
    layer_z : ndarray (n_layers,), float64, Å
        Height of each layer along the surface normal, top first.
    vacuum : float, Å
        Gap between the top layer and the periodic image of the bottom layer.
    symmetric : bool
        Whether the two surfaces are alike (same element, same termination).
    groups : dict of str → tuple of int
        Site groups: ``"L0"``, ``"L1"``, … per layer, ``"surface"`` (depth 0), and for
        overlayers ``"overlayer"`` and ``"substrate"``.
    details : dict
        Numbers behind the build (lattice constants, spacings, strain of the overlayer).
    """

    facet: str
    n_layers: int
    layer: NDArray[np.int64]
    depth: NDArray[np.int64]
    layer_z: NDArray[np.float64]
    vacuum: float
    symmetric: bool
    groups: Mapping[str, tuple[int, ...]] = field(default_factory=dict)
    details: Mapping[str, object] = field(default_factory=dict)

    def __post_init__(self) -> None:
        for name in ("layer", "depth", "layer_z"):
            getattr(self, name).setflags(write=False)

    @property
    def spacings(self) -> NDArray[np.float64]:
        """Interlayer spacings (Å) from the top down, shape (n_layers − 1,)."""
        return -np.diff(self.layer_z)

    def with_structure(self, structure: Structure) -> SlabInfo:
        """Recompute heights and vacuum from a (e.g. strained) copy of the slab."""
        z, period = _heights(structure)
        layer_z = np.array([z[self.layer == k].mean() for k in range(self.n_layers)])
        vacuum = period - (layer_z[0] - layer_z[-1])
        return SlabInfo(
            facet=self.facet,
            n_layers=self.n_layers,
            layer=self.layer.copy(),
            depth=self.depth.copy(),
            layer_z=layer_z,
            vacuum=float(vacuum),
            symmetric=self.symmetric,
            groups=dict(self.groups),
            details=dict(self.details),
        )

    def to_dict(self) -> dict:
        """JSON-ready copy."""
        return {
            "facet": self.facet,
            "n_layers": self.n_layers,
            "layer": self.layer.tolist(),
            "depth": self.depth.tolist(),
            "layer_z": self.layer_z.tolist(),
            "spacings": self.spacings.tolist(),
            "vacuum": self.vacuum,
            "symmetric": self.symmetric,
            "groups": {k: list(v) for k, v in self.groups.items()},
            "details": dict(self.details),
        }


def _heights(structure: Structure) -> tuple[NDArray[np.float64], float]:
    """Site heights along the normal of the first two cell vectors, and the period along it."""
    n = np.cross(structure.cell[0], structure.cell[1])
    n /= np.linalg.norm(n)
    return structure.positions @ n, float(abs(structure.cell[2] @ n))


def _check_count(value, what: str, minimum: int = 1) -> int:
    if isinstance(value, bool) or not isinstance(value, int | np.integer) or value < minimum:
        raise StructureError(f"{what} must be an integer ≥ {minimum}, got {value!r}")
    return int(value)


def _check_size(size) -> tuple[int, int]:
    try:
        n1, n2 = (int(v) for v in size)
        ok = n1 >= 1 and n2 >= 1 and tuple(size) == (n1, n2)
    except (TypeError, ValueError):
        ok = False
    if not ok:
        raise StructureError(f"in-plane size {size!r}: accepted two positive integers (n1, n2)")
    return n1, n2


def _check_vacuum(vacuum) -> float:
    try:
        v = float(vacuum)
    except (TypeError, ValueError):
        v = float("nan")
    if not (math.isfinite(v) and 0 < v <= 200):
        raise StructureError(
            f"vacuum {vacuum!r} Å: accepted a gap in (0, 200] Å (default {DEFAULT_VACUUM} Å)"
        )
    return v


def _constants(element: str, lattice: str, a, c) -> tuple[float, float | None]:
    """Return (a, c) in Å: given values, else ASE's reference (hcp c keeps the reference c/a)."""
    if a is None or (lattice == "hcp" and c is None):
        ref_a, ref_c = reference_lattice_constant(element, lattice)
        if a is None:
            a = ref_a
        if lattice == "hcp" and c is None:
            c = ref_c / ref_a * float(a)
    a = float(a)
    c = float(c) if lattice == "hcp" else None
    for name, v in (("a", a), ("c", c)):
        if v is not None and not (math.isfinite(v) and 0 < v < 100):
            raise StructureError(
                f"{element} {lattice}: lattice constant {name}={v!r} Å is not in (0, 100)"
            )
    return a, c


def _stack(element: str, facet: str, n_layers: int, a: float, c, size) -> tuple:
    """In-plane cell (2, 3), positions (n, 3) of an ASE-built stack without vacuum."""
    import ase.build

    builder = getattr(ase.build, facet)
    kwargs = {"a": a}
    if FACETS[facet][0] == "hcp":
        kwargs["c"] = c
    atoms = builder(element, size=(size[0], size[1], n_layers), vacuum=None, **kwargs)
    return np.array(atoms.cell[:2]), atoms.get_positions()


def _assemble(
    inplane, positions, symbols, facet, vacuum, symmetric, source, extra_groups, details
) -> tuple[Structure, SlabInfo]:
    z = positions[:, 2]
    order = np.argsort(-z, kind="stable")
    zs = z[order]
    breaks = np.concatenate([[0], np.flatnonzero(np.diff(-zs) > LAYER_TOL) + 1])
    layer_sorted = np.zeros(len(z), dtype=np.int64)
    layer_sorted[breaks[1:]] = 1
    layer = np.empty(len(z), dtype=np.int64)
    layer[order] = np.cumsum(layer_sorted)
    n_layers = int(layer.max()) + 1
    top, bottom = float(z.max()), float(z.min())
    thickness = top - bottom
    pos = positions.copy()
    pos[:, 2] = z - bottom + vacuum / 2.0
    cell = np.vstack([inplane, [0.0, 0.0, thickness + vacuum]])
    labels = tuple(f"{s}{i}@L{k}" for i, (s, k) in enumerate(zip(symbols, layer, strict=True)))
    st = Structure(cell=cell, positions=pos, symbols=tuple(symbols), labels=labels, source=source)
    depth = np.minimum(layer, n_layers - 1 - layer)
    layer_z = np.array([pos[layer == k, 2].mean() for k in range(n_layers)])
    groups = {f"L{k}": tuple(int(i) for i in np.flatnonzero(layer == k)) for k in range(n_layers)}
    groups["surface"] = tuple(int(i) for i in np.flatnonzero(depth == 0))
    groups.update(extra_groups)
    info = SlabInfo(
        facet=facet,
        n_layers=n_layers,
        layer=layer,
        depth=depth,
        layer_z=layer_z,
        vacuum=float(st.cell[2, 2] - (layer_z[0] - layer_z[-1])),
        symmetric=symmetric,
        groups=groups,
        details=details,
    )
    return st, info


def slab(
    element: str,
    facet: str,
    layers: int,
    *,
    a: float | None = None,
    c: float | None = None,
    vacuum: float = DEFAULT_VACUUM,
    size: Sequence[int] = (1, 1),
) -> tuple[Structure, SlabInfo]:
    """Build an unrelaxed slab of one element.

    Parameters
    ----------
    element
        Chemical symbol.
    facet
        One of :data:`FACETS` (``"fcc111"``, ``"fcc100"``, ``"fcc110"``, ``"bcc110"``,
        ``"bcc100"``, ``"hcp0001"``).
    layers
        Number of atomic layers (≥ 1).
    a, c
        Bulk lattice constants in Å (``c`` for hcp); default ASE's reference values
        (:func:`valband.structure.alloys.reference_lattice_constant`).
    vacuum
        Gap in Å (default :data:`DEFAULT_VACUUM`).
    size
        In-plane repetitions of the primitive surface cell (1 site per layer at (1, 1)).

    Returns
    -------
    (Structure, SlabInfo)
    """
    key = _facet(facet)
    layers = _check_count(layers, "number of layers")
    vac = _check_vacuum(vacuum)
    size = _check_size(size)
    lattice = FACETS[key][0]
    a, c = _constants(element, lattice, a, c)
    inplane, pos = _stack(element, key, layers, a, c, size)
    d = interlayer_spacing(key, a, c)
    src = f"slab {element} {key} layers={layers} a={a:.6g}" + (f" c={c:.6g}" if c else "")
    src += f" vacuum={vac:g} size={size[0]}x{size[1]}"
    details = {"element": element, "a": a, "c": c, "spacing": d}
    return _assemble(inplane, pos, [element] * len(pos), key, vac, True, src, {}, details)


def overlayer(
    over: str,
    substrate: str,
    facet: str,
    layers: int,
    *,
    over_layers: int = 1,
    a: float | None = None,
    c: float | None = None,
    a_over: float | None = None,
    c_over: float | None = None,
    poisson: float | None = None,
    vacuum: float = DEFAULT_VACUUM,
    size: Sequence[int] = (1, 1),
) -> tuple[Structure, SlabInfo]:
    """Build ``over_layers`` pseudomorphic layers of ``over`` on a ``layers``-layer slab.

    Parameters
    ----------
    over, substrate
        Chemical symbols of the overlayer A and the substrate B.
    facet, layers, vacuum, size
        As for :func:`slab` (``layers`` counts substrate layers only).
    over_layers
        Layers of A (default 1, a monolayer).
    a, c
        Substrate bulk lattice constants (Å); they fix the in-plane lattice of the whole slab.
    a_over, c_over
        A's own bulk lattice constants (Å), used for its spacings; default ASE's reference.
    poisson
        Poisson's ratio ν of A: switches the spacings from the mean of the bulk spacings to
        the elastic estimate (module docstring).

    Returns
    -------
    (Structure, SlabInfo)
        Layer 0 is the top A layer; ``groups`` has ``"overlayer"`` and ``"substrate"``;
        ``details`` holds the spacings and the in-plane strain of A.
    """
    key = _facet(facet)
    layers = _check_count(layers, "number of substrate layers")
    k = _check_count(over_layers, "number of overlayer layers")
    vac = _check_vacuum(vacuum)
    size = _check_size(size)
    if over == substrate:
        raise StructureError(f"overlayer {over}/{substrate}: use slab() for one element")
    lattice = FACETS[key][0]
    a, c = _constants(substrate, lattice, a, c)
    a_a, c_a = _constants(over, lattice, a_over, c_over)
    d_b = interlayer_spacing(key, a, c)
    d_a = interlayer_spacing(key, a_a, c_a)
    eps = a / a_a - 1.0
    if poisson is None:
        d_aa, d_ab, model = d_a, 0.5 * (d_a + d_b), "mean of bulk spacings"
    else:
        perp = poisson_perpendicular_strain(eps, poisson)
        d_aa = d_a * (1.0 + perp)
        d_ab, model = 0.5 * (d_aa + d_b), f"elastic, poisson={float(poisson):g}"
    inplane, pos = _stack(substrate, key, layers + k, a, c, size)
    z = pos[:, 2]
    levels = np.unique(np.round(z / LAYER_TOL).astype(np.int64))  # ascending
    level = np.searchsorted(levels, np.round(z / LAYER_TOL).astype(np.int64))
    top_b = layers - 1  # index (from the bottom) of the top substrate layer
    is_over = level > top_b
    z_top_b = z[level == top_b].mean()
    # A layer m (1 = the one on B): z = z_top_B + d_AB + (m − 1)·d_AA
    pos[is_over, 2] = z_top_b + d_ab + (level[is_over] - top_b - 1) * d_aa
    symbols = [over if o else substrate for o in is_over]
    src = (
        f"overlayer {over}/{substrate} {key} layers={layers} ml={k} a={a:.6g}"
        + (f" c={c:.6g}" if c else "")
        + f" spacing({model}) vacuum={vac:g} size={size[0]}x{size[1]}"
    )
    groups = {
        "overlayer": tuple(int(i) for i in np.flatnonzero(is_over)),
        "substrate": tuple(int(i) for i in np.flatnonzero(~is_over)),
    }
    details = {
        "overlayer": over,
        "substrate": substrate,
        "a_substrate": a,
        "c_substrate": c,
        "a_overlayer_bulk": a_a,
        "c_overlayer_bulk": c_a,
        "in_plane_strain_overlayer": eps,
        "spacing_substrate": d_b,
        "spacing_overlayer_bulk": d_a,
        "spacing_overlayer": d_aa,
        "spacing_overlayer_substrate": d_ab,
        "spacing_model": model,
    }
    return _assemble(inplane, pos, symbols, key, vac, False, src, groups, details)
