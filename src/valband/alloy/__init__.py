"""Alloys and surfaces: virtual crystal, coherent potential, charge neutrality, averages.

* :mod:`~valband.alloy.vca` — virtual crystal models and composition scans;
* :mod:`~valband.alloy.cpa` — single-site coherent potential approximation;
* :mod:`~valband.alloy.neutrality` — self-consistent onsite shifts for local charge neutrality;
* :mod:`~valband.alloy.averaging` — configuration averages of random supercells with spreads;
* :mod:`~valband.alloy.layers` — layer- and group-resolved descriptors of slabs.
"""

from valband.alloy.averaging import ConfigurationAverage, average_dos, configuration_average
from valband.alloy.cpa import CPAResult, CPAScan, CPASettings, cpa_dos, cpa_scan, cpa_solve
from valband.alloy.layers import GroupDescriptorTable, layer_descriptors, resolve_groups
from valband.alloy.neutrality import (
    NeutralityReport,
    NeutralitySettings,
    corrected_shifts,
    neutral_dos,
    shifted_model,
    site_charge_residuals,
    site_charges_and_dos,
    solve_neutrality,
)
from valband.alloy.vca import (
    VCAScan,
    VirtualCrystalParameters,
    binary_compositions,
    vca_model,
    vca_scan,
    vegard_parent,
)

__all__ = [
    "CPAResult",
    "CPAScan",
    "CPASettings",
    "ConfigurationAverage",
    "GroupDescriptorTable",
    "NeutralityReport",
    "NeutralitySettings",
    "VCAScan",
    "VirtualCrystalParameters",
    "average_dos",
    "binary_compositions",
    "configuration_average",
    "cpa_dos",
    "cpa_scan",
    "cpa_solve",
    "layer_descriptors",
    "neutral_dos",
    "resolve_groups",
    "shifted_model",
    "site_charge_residuals",
    "site_charges_and_dos",
    "corrected_shifts",
    "solve_neutrality",
    "vca_model",
    "vca_scan",
    "vegard_parent",
]
