"""The d-band offset of the fit and the free lifetime: recovery from synthetic spectra.

Synthetic "measurements" come from :func:`simulate_spectrum` (its own broadening path) with
the Cu d channel moved by a known amount through an explicit d-band correction (Δ, s = 1),
then Poisson noise (fixed seeds). Recovering a known parameter from such data is the usual
check of a fit (common practice); the DOS is harrison-universal Cu, which has no fitted
correction, so the fit's default correction leaves it alone.
"""

from __future__ import annotations

import numpy as np
import pytest

from valband.spectra import MeasuredSpectrum, simulate_spectrum
from valband.spectra.compare import default_free
from valband.spectra.fit import DEFAULT_FREE, fit_spectrum

HV = 1486.6


def _measured(dos, seed, d_move, shift=0.0, lifetime=(0.01, 0.01)):
    spec = simulate_spectrum(dos, HV, gaussian_fwhm=0.35, keep_area=False, lorentz=lifetime,
                             d_correction={"Cu": (-d_move, 1.0)})
    be = np.linspace(-1.5, 8.5, 1200)
    clean = np.interp(be - shift, spec.binding_energy, spec.intensity)
    mean = 2.0e4 * clean / clean.max() + 50.0
    y = np.random.default_rng(seed).poisson(mean).astype(float)
    return MeasuredSpectrum(be, y, unit="counts", photon_energy=HV)


@pytest.mark.parametrize(("seed", "d_move"), [(5, 0.25), (6, -0.4)])
def test_d_offset_recovered_against_a_fixed_edge(cu_dos, seed, d_move):
    fit = fit_spectrum(_measured(cu_dos, seed, d_move), cu_dos, background="constant",
                       free=default_free(True))
    assert fit.value("shift") == 0.0 and not fit.parameters["shift"].free
    assert fit.value("d_offset") == pytest.approx(d_move, abs=0.01)
    err = fit.error("d_offset")
    assert err is not None and 0 < err < 0.01
    assert fit.settings["d_band_correction"]["not_corrected"] == ["Cu"]


def test_d_offset_and_shift_are_told_apart_by_the_fermi_edge(cu_dos):
    # the edge (s, p weight at E_F) fixes the shift, the d band its own offset
    fit = fit_spectrum(_measured(cu_dos, 7, 0.3, shift=0.12), cu_dos, background="constant",
                       free=("shift", "d_offset", "scale", "gaussian_fwhm", "background"))
    assert fit.value("shift") == pytest.approx(0.12, abs=0.02)
    assert fit.value("d_offset") == pytest.approx(0.3, abs=0.02)


def test_compare_defaults_free_the_lifetime_and_after_calibration_the_d_offset():
    assert "lifetime_a" in DEFAULT_FREE and "gamma0" in DEFAULT_FREE
    assert "d_offset" not in DEFAULT_FREE              # without a calibrated edge
    cal = default_free(True)
    assert "d_offset" in cal and "shift" not in cal


def test_free_lifetime_is_recovered_within_its_bounds(cu_dos):
    # a broader d-hole law than the default (a = 0.03 /eV) is found from the data
    meas = _measured(cu_dos, 8, 0.0, lifetime=(0.01, 0.03))
    fit = fit_spectrum(meas, cu_dos, background="constant",
                       free=("scale", "gaussian_fwhm", "lifetime_a", "background"))
    assert fit.value("lifetime_a") == pytest.approx(0.03, rel=0.1)
    p = fit.parameters["lifetime_a"]
    assert (p.lower, p.upper) == (0.0, 0.1)


def test_lifetime_default_reproduces_the_cu_d_hole_widths():
    # Regression guard, not validation: the default law was fitted to these two recalled
    # widths (Cu d holes, FWHM ~0.1 eV at -2 eV and ~0.5 eV at -5 eV; Knapp, Himpsel &
    # Eastman, PRB 19, 4952 (1979), from memory, factor 2).
    from valband.spectra.broadening import lifetime_width

    fwhm = 2 * lifetime_width(np.array([-2.0, -5.0]))
    assert 0.05 <= fwhm[0] <= 0.2 and 0.25 <= fwhm[1] <= 1.0
