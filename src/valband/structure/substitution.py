"""Substitute whole atomic layers of a slab by another element ("subsurface alloys").

A near-surface alloy such as Pt–Ni–Pt(111) (one layer of a 3d metal under a Pt surface layer;
Kitchin, Nørskov, Barteau & Chen, J. Chem. Phys. 120, 10240 (2004)) is a Pt slab whose second
layer holds the other element, at Pt's geometry: the in-plane lattice and the interlayer
spacings of the host are kept (no relaxation), as in a pseudomorphic overlayer.

Layers are those of :class:`~valband.structure.SlabInfo` (0 = top surface layer). With
``symmetric=True`` the mirror layer ``n_layers − 1 − k`` is substituted as well, so a symmetric
slab stays symmetric (both surfaces alike, the k-mesh can use the slab's point group).
"""

from __future__ import annotations

from collections.abc import Iterable

import numpy as np

from valband.errors import StructureError
from valband.structure.record import Structure
from valband.structure.surfaces import SlabInfo

__all__ = ["substitute_layers"]


def substitute_layers(
    structure: Structure,
    info: SlabInfo,
    layers: Iterable[int],
    element: str,
    *,
    symmetric: bool = True,
) -> tuple[Structure, SlabInfo]:
    """Return the slab with every site of the given layers replaced by ``element``.

    Parameters
    ----------
    structure, info
        A slab and its layer record (:func:`valband.structure.slab`).
    layers
        Layer indices, 0 = top surface layer.
    element
        Chemical symbol of the substituting element.
    symmetric
        Substitute the mirror layers too (default; needs a symmetric slab).

    Returns
    -------
    (Structure, SlabInfo)
        Positions and cell unchanged; labels ``"Ni5@L1"`` carry the new element; the info
        gains the group ``"substituted"`` and ``details["substituted"] = {element, layers}``.

    Raises
    ------
    StructureError
        For an unknown element, a layer outside the slab, a layer list that would leave no host
        site, or ``symmetric=True`` on an asymmetric slab.
    """
    from ase.data import atomic_numbers

    if element not in atomic_numbers or element == "X":
        raise StructureError(f"substituting element {element!r}: not a chemical symbol")
    if len(info.layer) != structure.n_sites:
        raise StructureError(
            f"the slab info describes {len(info.layer)} sites but the structure has "
            f"{structure.n_sites}"
        )
    try:
        chosen = sorted({int(k) for k in layers})
    except (TypeError, ValueError):
        raise StructureError(f"layers {layers!r}: give layer indices (0 = top)") from None
    n = int(info.n_layers)
    bad = [k for k in chosen if not 0 <= k < n]
    if not chosen or bad:
        raise StructureError(
            f"layers {chosen}: the slab has layers 0 … {n - 1} (0 = top surface layer)"
        )
    if symmetric:
        if not info.symmetric:
            raise StructureError(
                "symmetric substitution needs a symmetric slab (both surfaces alike); "
                "pass symmetric=False for an overlayer slab"
            )
        chosen = sorted(set(chosen) | {n - 1 - k for k in chosen})
    if len(chosen) == n:
        raise StructureError(f"substituting every layer ({chosen}) leaves no host: build a slab "
                             f"of {element} instead")
    mask = np.isin(info.layer, chosen)
    symbols = tuple(element if m else s for s, m in zip(structure.symbols, mask, strict=True))
    labels = tuple(
        f"{s}{i}@L{k}" for i, (s, k) in enumerate(zip(symbols, info.layer, strict=True))
    )
    source = f"{structure.source}; layers {chosen} → {element}"
    st = Structure(cell=structure.cell, positions=structure.positions, symbols=symbols,
                   labels=labels, source=source)
    groups = dict(info.groups)
    groups["substituted"] = tuple(int(i) for i in np.flatnonzero(mask))
    details = dict(info.details)
    details["substituted"] = {"element": element, "layers": chosen}
    new = SlabInfo(
        facet=info.facet,
        n_layers=n,
        layer=info.layer.copy(),
        depth=info.depth.copy(),
        layer_z=info.layer_z.copy(),
        vacuum=info.vacuum,
        symmetric=bool(info.symmetric and symmetric),
        groups=groups,
        details=details,
    )
    return st, new
