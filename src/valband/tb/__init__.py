"""Slater–Koster tight binding: two-centre blocks, the model of a cell, Bloch matrices.

:func:`build_model` makes a :class:`TBModel` from a structure and a parameter set;
:meth:`TBModel.hamiltonian` / :meth:`TBModel.overlap` give H(k), S(k) for chunks of k-points.
:data:`BOND_INTEGRALS` is the column order of every bond-integral array in valband.
"""

from valband.tb.integrals import BOND_INTEGRALS, reverse_direction
from valband.tb.model import RealSpaceBlocks, TBModel, build_model
from valband.tb.slater_koster import sk_blocks

__all__ = [
    "BOND_INTEGRALS",
    "reverse_direction",
    "TBModel",
    "RealSpaceBlocks",
    "build_model",
    "sk_blocks",
]
