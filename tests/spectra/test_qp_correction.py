"""The photoemission-calibrated d-band correction: the map, its record, its use by default."""

from __future__ import annotations

import numpy as np
import pytest

from valband.errors import ParameterError, SettingsError
from valband.results.channels import Channel
from valband.results.dos import DOSResult
from valband.spectra import simulate_spectrum
from valband.spectra.quasiparticle import (
    QPCorrection,
    apply_qp_correction,
    corrections_for,
    describe_record,
    load_corrections,
    map_density,
)


def _toy_dos(set_name="valband-tc-2026"):
    """Two Gaussian d 'bands' of Cu and an s band on a 0.01 eV grid (invented numbers)."""
    e = np.round(np.arange(-10.0, 3.0 + 1e-9, 0.01), 10)
    d = np.exp(-0.5 * ((e + 2.0) / 0.1) ** 2) + np.exp(-0.5 * ((e + 4.0) / 0.1) ** 2)
    s_band = 0.1 * (e > -9.0)
    ch = np.stack([s_band, d])
    return DOSResult(energies=e, total=ch.sum(axis=0), channels=ch,
                     channel_labels=(Channel(0, "Cu", "s"), Channel(0, "Cu", "d")),
                     fermi_level=0.0, n_electrons=11.0, n_sites=1,
                     provenance={"parameter_set": {"name": set_name, "version": "x"}})


def _peaks(e, y):
    from scipy.signal import find_peaks

    return e[find_peaks(y, prominence=0.1 * y.max())[0]]


def test_map_moves_features_linearly_and_conserves_weight():
    # Definition of the map (module docstring): a level at E goes to Δ + s·E, weight kept.
    dos = _toy_dos()
    out = map_density(dos.energies, dos.channels[1], -0.5, 0.9)[0]
    np.testing.assert_allclose(_peaks(dos.energies, out), [-0.5 + 0.9 * -4.0, -0.5 + 0.9 * -2.0],
                               atol=0.011)
    assert out.sum() == pytest.approx(dos.channels[1].sum(), rel=1e-12)
    assert out.min() >= -1e-12


def test_identity_and_weight_piled_at_grid_ends():
    e = np.linspace(-1.0, 1.0, 201)
    y = np.exp(-0.5 * (e / 0.2) ** 2)
    np.testing.assert_allclose(map_density(e, y, 0.0, 1.0)[0], y, atol=1e-12)
    far = map_density(e, y, -5.0, 1.0)[0]          # moved entirely below the grid
    assert far[0] == pytest.approx(y.sum(), rel=1e-12) and np.all(far[1:] == 0)


def test_apply_touches_only_the_d_channel_and_keeps_ef():
    dos = _toy_dos()
    new, rec = apply_qp_correction(dos, {"Cu": QPCorrection("Cu", -0.5, 0.9)})
    np.testing.assert_array_equal(new.channels[0], dos.channels[0])   # s unchanged
    np.testing.assert_allclose(new.total, new.channels.sum(axis=0), atol=1e-12)
    assert new.fermi_level == dos.fermi_level and new.n_electrons == dos.n_electrons
    assert rec["applied"]["Cu"] == {"delta_eV": -0.5, "scale": 0.9, "parameter_set": ""}
    assert new.settings["qp_correction"]["applied"]


def test_shipped_constants_are_keyed_by_set_and_carry_sources():
    doc = load_corrections()
    entry = doc["sets"]["valband-tc-2026"]
    for el in ("Cu", "Ag", "Au", "Ni"):
        rec = entry["elements"][el]
        assert rec["features"] and all("from memory" in f["source"] for f in rec["features"])
        assert {f["role"] for f in rec["features"]} == {"fit", "held_out"}
    assert entry["elements"]["Ni"]["delta_eV"] == 0.0        # d band crosses E_F: Δ fixed
    assert corrections_for("harrison-universal") == {}        # not fitted on that set
    assert set(corrections_for("valband-tc-2026")) == {"Cu", "Ag", "Au", "Ni"}


def test_simulate_uses_it_by_default_and_records_it():
    dos = _toy_dos()
    on = simulate_spectrum(dos, "Al-Ka", gaussian_fwhm=0.05)
    off = simulate_spectrum(dos, "Al-Ka", gaussian_fwhm=0.05, d_correction=None)
    rec = on.settings["d_band_correction"]
    assert rec["enabled"] and "Cu" in rec["applied"] and rec["not_corrected"] == []
    c = corrections_for("valband-tc-2026")["Cu"]
    be_on, be_off = _peaks(on.binding_energy, on.intensity), _peaks(off.binding_energy,
                                                                      off.intensity)
    np.testing.assert_allclose(be_off, [2.0, 4.0], atol=0.011)
    np.testing.assert_allclose(be_on, [-(c.delta_ev + c.scale * -2.0),
                                       -(c.delta_ev + c.scale * -4.0)], atol=0.011)
    assert not off.settings["d_band_correction"]["enabled"]
    assert "Cu Δ=" in describe_record(rec) and "not corrected" in describe_record(
        off.settings["d_band_correction"])


def test_element_without_constants_gets_none_and_the_record_says_so():
    dos = _toy_dos("harrison-universal")
    spec = simulate_spectrum(dos, "Al-Ka")
    rec = spec.settings["d_band_correction"]
    assert rec["applied"] == {} and rec["not_corrected"] == ["Cu"]
    assert "no fitted correction for Cu" in describe_record(rec)


def test_bad_corrections_are_refused():
    with pytest.raises(ParameterError, match="scale"):
        QPCorrection("Cu", 0.0, 3.0)
    with pytest.raises(SettingsError, match="d_correction"):
        simulate_spectrum(_toy_dos(), "Al-Ka", d_correction="sometimes")
    with pytest.raises(SettingsError, match=r"d_correction\['Cu'\]"):
        simulate_spectrum(_toy_dos(), "Al-Ka", d_correction={"Cu": "big"})


def test_spin_orbit_dos_has_the_same_channel_labels():
    # The spin–orbit total DOS keeps site × shell labels (valband.spin.channels), so the
    # correction finds its d channels; the j-resolved DOS maps d5/2 and d3/2 alike.
    from valband.params import load_parameter_set
    from valband.spin import spin_dos
    from valband.structure import build_structure
    from valband.tb import build_model
    from valband.workflows import DOSSettings

    ps = load_parameter_set("valband-tc-2026")
    res = spin_dos(build_model(build_structure("Au fcc"), ps),
                   DOSSettings(mesh=8, step=0.02), soc=True, params=ps)
    corr = corrections_for("valband-tc-2026")
    new, rec = apply_qp_correction(res.total, corr)
    assert "Au" in rec["applied"]
    d = [i for i, c in enumerate(res.total.channel_labels) if c.shell == "d"]
    h = res.total.energies[1] - res.total.energies[0]
    assert new.channels[d].sum() * h == pytest.approx(res.total.channels[d].sum() * h, rel=1e-9)
    newj, recj = apply_qp_correction(res.j_resolved, corr)
    assert {c.orbital for c in newj.channel_labels if c.shell == "d"} == {"d5/2", "d3/2"}
    np.testing.assert_allclose(
        sum(newj.channels[i] for i, c in enumerate(newj.channel_labels) if c.shell == "d"),
        new.channels[d].sum(axis=0), atol=1e-9)


def test_a_correction_fitted_with_spin_orbit_warns_on_a_plain_dos():
    # constants fitted on spin–orbit bands (as Ag's and Au's are): a DOS without it is warned
    from valband.spectra.simulate import resolve_d_correction

    dos = _toy_dos()
    fitted_soc = QPCorrection("Cu", -0.4, 1.0, "x", "", spin_orbit=True)
    _, rec = resolve_d_correction(dos, {"Cu": fitted_soc})
    assert "spin–orbit on" in rec["caution"] and "caution" in describe_record(rec)
    _, rec = resolve_d_correction(dos, {"Cu": QPCorrection("Cu", -0.4, 1.0, spin_orbit=False)})
    assert "caution" not in rec
