"""valband: valence-band spectra and d-band descriptors from Slater–Koster tight binding.

Conventions (units, energy zero, orbital order, array axes) are collected in
:mod:`valband.conventions`; read that page before any other.
"""

from importlib.metadata import PackageNotFoundError, version

try:
    __version__ = version("valband")
except PackageNotFoundError:  # running from a source tree without installation
    __version__ = "0.0.0+unknown"

__all__ = ["__version__"]
