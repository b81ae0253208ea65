"""Spin–orbit coupling and collinear (Stoner) magnetism on top of the tight-binding models.

Public API
    :func:`spin_model` — a TBModel in the doubled spin basis with ξ L·S (and exchange) terms;
    :func:`spin_dos` (:func:`soc_dos`, :func:`magnetic_dos`) → :class:`SpinDOSResult`;
    :func:`spin_bands`, :func:`spin_describe`; tables :data:`STONER_TABLE`.

Conventions: spin-major doubled basis, moment along z, exchange ∓ΔE/2 on d orbitals with
ΔE = I·m_d, one electron per state (see :mod:`valband.spin.model`).
"""

from valband.spin.angular import j_projectors, l_dot_s, orbital_angular_momentum
from valband.spin.model import SpinBlockModel, SpinModel, spin_model
from valband.spin.result import MagneticReport, SpinDOSResult
from valband.spin.soc import SpinOrbitConstant, spin_orbit_constants
from valband.spin.stoner import STONER_TABLE, StonerParameter, stoner_parameters
from valband.spin.workflows import (
    magnetic_dos,
    soc_dos,
    spin_bands,
    spin_describe,
    spin_dos,
)

__all__ = [
    "orbital_angular_momentum", "l_dot_s", "j_projectors",
    "SpinModel", "SpinBlockModel", "spin_model",
    "SpinDOSResult", "MagneticReport",
    "SpinOrbitConstant", "spin_orbit_constants",
    "STONER_TABLE", "StonerParameter", "stoner_parameters",
    "spin_dos", "soc_dos", "magnetic_dos", "spin_bands", "spin_describe",
]
