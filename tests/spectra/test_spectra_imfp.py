"""TPP-2M inelastic mean free paths and depth weights."""

from __future__ import annotations

import math

import numpy as np
import pytest

from valband.errors import InputError, SettingsError
from valband.spectra.imfp import depth_weights, imfp_of, tpp2m_imfp

# Published TPP-2M IMFPs of the elements (Tanuma, Powell & Penn, Surf. Interface Anal. 21, 165
# (1994), and the NIST Electron IMFP Database SRD 71 that tabulates TPP-2M), in Å, recalled
# from memory to about two significant figures — hence the 10 % tolerance.
PUBLISHED_FROM_MEMORY = {
    ("Cu", 1000.0): 15.0, ("Cu", 1486.6): 20.5,
    ("Ag", 1000.0): 14.5, ("Ag", 1486.6): 19.5,
    ("Au", 1000.0): 12.0, ("Au", 1486.6): 16.0,
}


@pytest.mark.parametrize("key", list(PUBLISHED_FROM_MEMORY))
def test_tpp2m_against_published(key):
    element, energy = key
    assert imfp_of(element, energy) == pytest.approx(PUBLISHED_FROM_MEMORY[key], rel=0.10)


def test_tpp2m_energy_scaling():
    # Common practice: above ~200 eV the IMFP of metals grows roughly as E^0.75–0.8
    # (Seah & Dench 1979 report ~E^0.5–0.75; TPP-2M gives ~E^0.78 at 1–2 keV).
    e = np.array([1000.0, 2000.0])
    lam = imfp_of("Cu", e)
    slope = math.log(lam[1] / lam[0]) / math.log(2.0)
    assert 0.65 < slope < 0.9


def test_tpp2m_direct_matches_table():
    assert tpp2m_imfp(1000.0, 8.96, 63.546, 11) == pytest.approx(imfp_of("Cu", 1000.0), rel=1e-14)


def test_depth_weights():
    # Beer–Lambert attenuation along the exit path z / cos θ (textbook).
    w = depth_weights([0.0, 10.0, 20.0], 20.0, 60.0)
    np.testing.assert_allclose(w, [1.0, math.exp(-1.0), math.exp(-2.0)], rtol=1e-12)


@pytest.mark.parametrize("call, exc, word", [
    (lambda: tpp2m_imfp(-5.0, 8.96, 63.5, 11), SettingsError, "kinetic energy"),
    (lambda: tpp2m_imfp(1000.0, 0.0, 63.5, 11), SettingsError, "density"),
    (lambda: tpp2m_imfp(1000.0, 8.96, 63.5, -1), SettingsError, "valence electrons"),
    (lambda: imfp_of("Zz", 1000.0), InputError, "Zz"),
    (lambda: depth_weights([1.0], 0.0), SettingsError, "mean free path"),
    (lambda: depth_weights([1.0], 10.0, 90.0), SettingsError, "emission angle"),
    (lambda: depth_weights([-1.0], 10.0), SettingsError, "depths"),
])
def test_bad_input(call, exc, word):
    with pytest.raises(exc, match=word):
        call()
