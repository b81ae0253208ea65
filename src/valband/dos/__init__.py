"""Numerical densities of states: smearing, linear tetrahedra, Fermi level, band descriptors.

Pure functions on arrays (energies in eV, DOS in states / eV / cell with both spins unless
``degeneracy`` says otherwise). The k-mesh, the solver and the result objects live
elsewhere; this package only integrates what they hand over.
"""

from valband.dos.descriptors import BandDescriptors, band_descriptors
from valband.dos.fermi import find_fermi_level
from valband.dos.hilbert import hilbert_transform, hilbert_upper_edge
from valband.dos.smearing import SMEARING_KINDS, smearing_count, smearing_dos
from valband.dos.tetrahedron import (
    cube_tetrahedra,
    tetrahedron_classes,
    tetrahedron_count,
    tetrahedron_dos,
    tetrahedron_integrate,
)

__all__ = [
    "SMEARING_KINDS",
    "smearing_dos",
    "smearing_count",
    "cube_tetrahedra",
    "tetrahedron_classes",
    "tetrahedron_dos",
    "tetrahedron_count",
    "tetrahedron_integrate",
    "find_fermi_level",
    "BandDescriptors",
    "band_descriptors",
    "hilbert_transform",
    "hilbert_upper_edge",
]
