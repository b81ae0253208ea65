"""Small structures and models shared by the tight-binding tests (test helper)."""

from __future__ import annotations

import numpy as np

from valband.structure import Structure, build_structure

from .toy_params import SPD, ToyElement, ToyParams, exponential, like_pair, random_integrals


def fcc_cu() -> Structure:
    """Primitive fcc Cu, a = 3.61 Å (first neighbours 2.55 Å, second 3.61 Å)."""
    return build_structure("Cu fcc 3.61")


def two_element_cell() -> Structure:
    """A low-symmetry two-site cell (distorted B2 order of Cu and Zn)."""
    cell = np.array([[2.90, 0.10, 0.00], [0.05, 3.05, 0.12], [-0.08, 0.00, 3.20]])
    frac = np.array([[0.0, 0.0, 0.0], [0.48, 0.51, 0.53]])
    return Structure(cell=cell, positions=frac @ cell, symbols=("Cu", "Zn"), source="test cell")


def random_cell(rng: np.random.Generator, symbols: tuple[str, ...]) -> Structure:
    """A random triclinic cell with the given sites, no two atoms closer than 1.8 Å."""
    while True:
        cell = 3.3 * (np.eye(3) + 0.15 * rng.normal(size=(3, 3)))
        if abs(np.linalg.det(cell)) < 15:
            continue
        pos = rng.uniform(0, 1, (len(symbols), 3)) @ cell
        try:
            st = Structure(cell=cell, positions=pos, symbols=symbols)
        except Exception:
            continue
        from ase.neighborlist import primitive_neighbor_list

        d = primitive_neighbor_list("d", [True] * 3, st.cell, st.positions, 1.8)
        if len(d) == 0:
            return st


SHELLS_OF = {"Cu": SPD, "Zn": ("s", "d"), "Al": ("s", "p"), "Li": ("s",), "Ti": ("d",)}


def mixed_params(rng, symbols, cutoff=4.2, overlap=True) -> ToyParams:
    """Random reciprocal exponential laws for every pair of ``symbols`` (shells per SHELLS_OF)."""
    elements = {}
    for s in symbols:
        sh = SHELLS_OF[s]
        elements[s] = ToyElement(sh, {x: float(rng.uniform(-4, 4)) for x in sh}, 1.0)
    hop, ovl, cut = {}, {}, {}
    for i, a in enumerate(symbols):
        for b in symbols[i:]:
            v, sv, q = random_integrals(rng), random_integrals(rng, 0.05), rng.uniform(0.5, 2, 14)
            if a == b:
                v, sv, q = like_pair(v), like_pair(sv), like_pair(q)
            hop[a, b] = exponential(v, q, 2.6)
            ovl[a, b] = exponential(sv, q, 2.6)
            cut[a, b] = cutoff
    return ToyParams(elements, hop, cut, overlaps=ovl if overlap else None)
