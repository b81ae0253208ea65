"""Crystal structures: reading, building, validating, neighbour tables.

Knows nothing about orbitals. See :mod:`valband.conventions` for units and axes.
"""

from valband.structure.alloys import (
    b2,
    compact_supercell_matrix,
    l10,
    l12,
    random_alloy,
    random_configurations,
)
from valband.structure.build import build_structure, parse_build_spec
from valband.structure.io import load_structure, load_structure_with_info, read_structure
from valband.structure.neighbours import NeighbourTable, find_neighbours
from valband.structure.record import MIN_DISTANCE, Structure
from valband.structure.specs import build_from_spec
from valband.structure.sqs import SQSResult, pair_correlations, sqs
from valband.structure.strain import apply_strain
from valband.structure.surfaces import SlabInfo, overlayer, slab

__all__ = [
    "Structure",
    "MIN_DISTANCE",
    "NeighbourTable",
    "find_neighbours",
    "build_structure",
    "parse_build_spec",
    "read_structure",
    "load_structure",
    "load_structure_with_info",
    "build_from_spec",
    "random_alloy",
    "random_configurations",
    "l12",
    "l10",
    "b2",
    "compact_supercell_matrix",
    "sqs",
    "SQSResult",
    "pair_correlations",
    "apply_strain",
    "slab",
    "overlayer",
    "SlabInfo",
]
