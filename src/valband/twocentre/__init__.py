"""First-principles two-centre Slater–Koster integrals from confined LDA atoms.

Pipeline: :func:`confined_atom` (confined valence orbitals, neutral-atom potential, free-atom
onsite energies) → :func:`bond_integrals` (S and H of the 14 bond integrals on a bond-length
grid, Becke two-centre quadrature, potential superposition) → :func:`pair_table` (both steps
for an element pair) → :func:`parameter_set_dict` / :func:`write_parameter_set_toml`
(a non-orthogonal parameter set in format v1 with spline laws) → :func:`generate_parameter_set`
(elements and all their pairs, settings recorded for :func:`regenerate_pair`; the command
``valband params generate``). The shipped set ``valband-tc-2026`` is its output; the default
confinement radii and their evidence are in :mod:`valband.twocentre.confinement`.

Units: bohr and Hartree inside; Å and eV at the interface (distances, integrals, onsite
energies). Confinement radii r₀ are in bohr, as in the confinement literature.

References: Slater & Koster, Phys. Rev. 94, 1498 (1954); Porezag, Frauenheim, Köhler,
Seifert, Kaschner, Phys. Rev. B 51, 12947 (1995); Becke, J. Chem. Phys. 88, 2547 (1988).
"""

from .confinement import (
    DEFAULT_POWER,
    DENSITY_R0_FACTOR,
    SHELL_R0_FACTORS,
    ConfinedAtom,
    ConfinedOrbital,
    confined_atom,
    default_r0,
    valence_shells,
)
from .generate import GenerationSettings, generate_parameter_set, regenerate_pair
from .integrals import (
    BondFrameElements,
    BondIntegrals,
    RadialOrbital,
    TwoCentreSite,
    bond_frame_elements,
    bond_integrals,
)
from .quadrature import BondGrid, QuadratureSettings, bond_grid
from .tables import (
    PairTable,
    default_distances,
    pair_table,
    parameter_set_dict,
    write_parameter_set_toml,
)

__all__ = [
    "DEFAULT_POWER",
    "GenerationSettings",
    "generate_parameter_set",
    "regenerate_pair",
    "DENSITY_R0_FACTOR",
    "SHELL_R0_FACTORS",
    "BondFrameElements",
    "BondGrid",
    "BondIntegrals",
    "ConfinedAtom",
    "ConfinedOrbital",
    "PairTable",
    "QuadratureSettings",
    "RadialOrbital",
    "TwoCentreSite",
    "bond_frame_elements",
    "bond_grid",
    "bond_integrals",
    "confined_atom",
    "default_distances",
    "default_r0",
    "pair_table",
    "parameter_set_dict",
    "valence_shells",
    "write_parameter_set_toml",
]
