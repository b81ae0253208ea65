"""The main calculations as verbs: DOS, bands, d-band descriptors."""

from valband.workflows.bands import compute_bands
from valband.workflows.describe import DescriptorTable, describe
from valband.workflows.dos import DOSSettings, compute_dos

__all__ = ["DOSSettings", "compute_dos", "compute_bands", "describe", "DescriptorTable"]
