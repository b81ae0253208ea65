"""Simulated valence-band photoemission spectra: broadening, cross-section weighting, IMFP.

:func:`simulate_spectrum` turns a :class:`~valband.results.DOSResult` into a :class:`Spectrum`
(binding energy ascending, eV; intensity in Mb·states/eV per cell); :mod:`.broadening` holds
the Fermi–Dirac, lifetime and instrument kernels, :mod:`.imfp` the TPP-2M mean free paths and
depth weights, :mod:`.io` and :mod:`.plot` the files and the figure. Measured spectra are read
by :func:`read_spectrum` (two-column text/CSV, ISO 14976 VAMAS via :mod:`.vamas`); backgrounds
(Shirley, Tougaard, linear) are in :mod:`.background`, the Fermi-edge calibration in
:mod:`.calibrate`. The photoemission-calibrated d-band correction that ``simulate`` and
``compare`` apply by default is :mod:`.quasiparticle` (constants refitted by :mod:`.qp_fit`).
"""

from valband.spectra.background import linear_background, shirley_background, tougaard_background
from valband.spectra.broadening import (
    fermi_dirac,
    gaussian_broaden,
    lifetime_width,
    lorentzian_broaden,
)
from valband.spectra.calibrate import FermiEdgeFit, apply_shift, fit_fermi_edge
from valband.spectra.imfp import ELEMENTS, depth_weights, imfp_of, tpp2m_imfp
from valband.spectra.measured import MeasuredSpectrum, read_spectrum
from valband.spectra.quasiparticle import QPCorrection, apply_qp_correction, corrections_for
from valband.spectra.simulate import Spectrum, channel_weights, simulate_spectrum

__all__ = [
    "Spectrum", "simulate_spectrum", "channel_weights",
    "fermi_dirac", "gaussian_broaden", "lorentzian_broaden", "lifetime_width",
    "ELEMENTS", "depth_weights", "imfp_of", "tpp2m_imfp",
    "MeasuredSpectrum", "read_spectrum",
    "shirley_background", "tougaard_background", "linear_background",
    "FermiEdgeFit", "fit_fermi_edge", "apply_shift",
    "QPCorrection", "apply_qp_correction", "corrections_for",
]
