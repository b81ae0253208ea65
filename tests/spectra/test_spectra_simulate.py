"""Simulated spectra on a real Cu DOS: cross-section weighting, components, Fermi cut, I/O."""

from __future__ import annotations

import numpy as np
import pytest

from valband.atom.tables import cross_sections
from valband.errors import InputError, SettingsError
from valband.results.channels import Channel
from valband.results.dos import DOSResult
from valband.spectra import Spectrum, simulate_spectrum
from valband.spectra.imfp import depth_weights


def _raw(dos, source, **kw):
    """The unbroadened spectrum (no lifetime, no instrument)."""
    return simulate_spectrum(dos, source, gaussian_fwhm=0.0, lorentz=(0.0, 0.0), **kw)


def test_xps_follows_d_pdos(cu_dos):
    # Common practice: at XPS energies the d cross sections dominate the valence band of a
    # noble metal, so the cross-section weighted DOS looks like the d partial DOS.
    spec = _raw(cu_dos, "Al-Ka")
    occupied = spec.binding_energy > 0.05
    d_occ = (cu_dos.select(shell="d") * (cu_dos.energies < 0))[::-1]
    r = np.corrcoef(spec.intensity[occupied], d_occ[occupied])[0, 1]
    assert r > 0.95
    # the broadened spectrum keeps following it too
    broad = simulate_spectrum(cu_dos, "Al-Ka")
    assert np.corrcoef(broad.intensity[occupied], d_occ[occupied])[0, 1] > 0.9


def test_haxpes_raises_s_over_d(cu_dos):
    # s/d cross-section ratio grows with photon energy (Cu: σ_4s/σ_3d per electron from the
    # tables; HAXPES common practice: s and p states gain weight at high hν).
    def ratio(source):
        spec = _raw(cu_dos, source)
        return spec.select(shell="s").sum() / spec.select(shell="d").sum()

    def xs_ratio(hv):
        xs = {x.l: x.sigma_per_electron_mb for x in cross_sections("Cu", hv)}
        return xs[0] / xs[2]

    assert ratio("Ga-Ka") > ratio("Al-Ka")
    assert xs_ratio(9251.7) > xs_ratio(1486.6)  # consistent with the cross sections
    # and the component ratio is exactly the σ ratio times the occupied pDOS ratio
    e = cu_dos.energies  # T = 0: step occupation, ½ at E_F (textbook)
    f = np.where(e < 0, 1.0, np.where(e > 0, 0.0, 0.5))
    spec = _raw(cu_dos, "Ga-Ka", temperature=0.0)
    pd = (cu_dos.select(shell="s") * f).sum() / (cu_dos.select(shell="d") * f).sum()
    got = spec.select(shell="s").sum() / spec.select(shell="d").sum()
    assert got == pytest.approx(xs_ratio(9251.7) * pd, rel=1e-6)


def test_components_sum_to_total(cu_dos):
    spec = simulate_spectrum(cu_dos, 1486.6, temperature=100.0, geometry=(30.0, "linear"))
    np.testing.assert_allclose(spec.components.sum(axis=0), spec.intensity, rtol=1e-13, atol=1e-18)
    assert spec.component_names == ("Cu0:s", "Cu0:p", "Cu0:d")
    assert spec.settings["photon_source"] == "Al-Ka"


def test_zero_temperature_empty_above_fermi(cu_dos):
    # T → 0: f is a step, so no intensity at BE < 0 before broadening (textbook).
    spec = _raw(cu_dos, "Al-Ka", temperature=0.0)
    assert np.all(spec.intensity[spec.binding_energy < 0] == 0.0)
    assert spec.intensity[spec.binding_energy > 0.5].max() > 0


def test_binding_energy_axis(cu_dos):
    spec = simulate_spectrum(cu_dos, "Al-Ka")
    # BE = E_F − E (conventions.py), ascending
    assert np.all(np.diff(spec.binding_energy) > 0)
    np.testing.assert_allclose(spec.binding_energy, -cu_dos.energies[::-1])


def test_weights_are_sigma_times_pdos(cu_dos):
    # Definition of the model at the magic angle (angular factor 1, Cooper & Zare 1968):
    # I_c = σ_c · D_c · f with σ per electron from the cross-section tables.
    spec = _raw(cu_dos, "Al-Ka", temperature=0.0)
    xs = {x.l: x.sigma_per_electron_mb for x in cross_sections("Cu", 1486.6)}
    f = np.where(cu_dos.energies < 0, 1.0, np.where(cu_dos.energies > 0, 0.0, 0.5))
    np.testing.assert_allclose(spec.select(shell="d"), (xs[2] * cu_dos.select(shell="d") * f)[::-1],
                               rtol=1e-12)


def test_angular_factor_applied(cu_dos):
    # Unpolarised light at θ = 90°: factor 1 + β/4 (Cooper & Zare 1968, P2(0) = −½).
    beta_d = next(x.beta for x in cross_sections("Cu", 1486.6) if x.l == 2)
    a = _raw(cu_dos, "Al-Ka", geometry=(90.0, "unpolarized")).select(shell="d").sum()
    b = _raw(cu_dos, "Al-Ka").select(shell="d").sum()
    assert a / b == pytest.approx(1 + beta_d / 4, rel=1e-10)


def test_layer_weights(cu_dos):
    # A depth weight exp(−z/λ) scales the site's components (Beer–Lambert, textbook).
    w = depth_weights([5.0], 15.0, 0.0)
    a = _raw(cu_dos, "Al-Ka", layer_weights=w).intensity.sum()
    b = _raw(cu_dos, "Al-Ka").intensity.sum()
    assert a / b == pytest.approx(np.exp(-5.0 / 15.0), rel=1e-12)
    with pytest.raises(SettingsError, match="site"):
        simulate_spectrum(cu_dos, "Al-Ka", layer_weights={3: 1.0})


def test_closed_shell_zero_contribution(monkeypatch):
    # A subshell with σ = 0 (below threshold) contributes zero and its β is reported as None.
    from valband.atom import tables
    from valband.atom.photoionization import ValenceCrossSection

    def fake(element, hv, relativity="scalar"):
        return [ValenceCrossSection("Cu", "4s", 0, 1.0, 4.9, hv, 0.0, 0.0, float("nan")),
                ValenceCrossSection("Cu", "3d", 2, 10.0, 5.3, hv, 1.0, 0.1, 1.0)]

    monkeypatch.setattr(tables, "cross_sections", fake)
    e = np.linspace(-6, 2, 401)
    ch = (Channel(0, "Cu", "s"), Channel(0, "Cu", "d"))
    dos = DOSResult(e, np.ones_like(e) * 2, np.ones((2, e.size)), ch, 0.0, 11.0, 1)
    spec = simulate_spectrum(dos, 100.0)
    assert np.all(spec.select(shell="s") == 0.0) and spec.select(shell="d").max() > 0
    s_row = next(x for x in spec.settings["cross_sections"] if x["shell"] == "s")
    assert np.isnan(s_row["beta"])


def test_round_trip(cu_dos):
    spec = simulate_spectrum(cu_dos, "Mg-Ka")
    back = Spectrum.from_dict(spec.to_dict())
    np.testing.assert_array_equal(back.intensity, spec.intensity)
    np.testing.assert_array_equal(back.components, spec.components)
    assert back.component_labels == spec.component_labels
    assert back.settings == spec.settings
    with pytest.raises(InputError, match="kind"):
        Spectrum.from_dict({"kind": "other"})


@pytest.mark.parametrize("kw, exc, word", [
    ({"photon_energy": "Zr-Mz"}, SettingsError, "photon energy"),
    ({"photon_energy": -5.0}, SettingsError, "photon energy"),
    ({"temperature": -1.0}, SettingsError, "temperature"),
    ({"gaussian_fwhm": -0.1}, SettingsError, "FWHM"),
    ({"gaussian_fwhm": float("nan")}, SettingsError, "FWHM"),
    ({"lorentz": (-0.1, 0.0)}, SettingsError, "Γ0"),
    ({"lorentz": (0.1,)}, SettingsError, "lifetime"),
    ({"geometry": (30.0, "circular")}, SettingsError, "polarization"),
    ({"geometry": (400.0, "linear")}, SettingsError, "angle"),
])
def test_bad_settings(cu_dos, kw, exc, word):
    args = {"photon_energy": "Al-Ka"} | kw
    with pytest.raises(exc, match=word):
        simulate_spectrum(cu_dos, **args)


def test_bad_dos():
    e = np.array([-1.0, -0.5, 0.2, 1.0])
    dos = DOSResult(e, np.ones(4), np.ones((1, 4)), (Channel(0, "Cu", "d"),), 0.0, 11.0, 1)
    with pytest.raises(SettingsError, match="uniform"):
        simulate_spectrum(dos, "Al-Ka")
    e = np.linspace(-1, 1, 5)
    bad = DOSResult(e, np.ones(5), np.ones((1, 5)), (Channel(0, "Cu", "f"),), 0.0, 11.0, 1)
    with pytest.raises(InputError, match="shell 'f'"):
        simulate_spectrum(bad, "Al-Ka")
    unknown = DOSResult(e, np.ones(5), np.ones((1, 5)), (Channel(0, "Xx", "d"),), 0.0, 11.0, 1)
    with pytest.raises(InputError, match="Xx"):
        simulate_spectrum(unknown, "Al-Ka")
    with pytest.raises(InputError, match="DOSResult"):
        simulate_spectrum({"energies": e}, "Al-Ka")
