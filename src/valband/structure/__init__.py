"""Crystal structures: reading, building, validating, neighbour tables.

Knows nothing about orbitals. See :mod:`valband.conventions` for units and axes.
"""

from valband.structure.build import build_structure, parse_build_spec
from valband.structure.io import load_structure, read_structure
from valband.structure.neighbours import NeighbourTable, find_neighbours
from valband.structure.record import MIN_DISTANCE, Structure

__all__ = [
    "Structure",
    "MIN_DISTANCE",
    "NeighbourTable",
    "find_neighbours",
    "build_structure",
    "parse_build_spec",
    "read_structure",
    "load_structure",
]
