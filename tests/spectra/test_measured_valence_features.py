"""Simulated XPS valence bands of Cu, Ag, Au, Ni, Pd, Pt against measured spectral features.

Reference values: ``tests/data/photoemission_valence_features.json`` (every value recalled from
memory of the cited work, with its tolerance and source; "fitted" features are close to the
d-band tops the photoemission correction was fitted to and are no validation, "held_out" ones
were used in no fit). Defaults as a user gets them: valband-tc-2026, the d-band correction
on, the d-hole lifetime law, spin–orbit on for Ag, Au, Pd, Pt (``--soc``, the default the
lead's tri-state option will choose for elements heavier than Kr); Ni non-magnetic.

Meshes: 12³ Gaussian (σ 0.1 eV, step 0.02 eV), about a second per metal with spin–orbit.
Checked against a 24³ tetrahedron DOS (same step): every feature agreed within 0.06 eV
(maxima 3.10/3.14 Cu, 4.94/4.94 Ag, 3.80/3.84 and 5.78/5.84 Au, 1.22/1.20 Ni, 2.20/2.18 Pd,
1.70/1.66 Pt; half-maximum widths within 0.02 eV except Au, 4.26/4.20), well inside the
tolerances.
"""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest
from scipy.signal import find_peaks

DATA = json.loads((Path(__file__).parents[1] / "data" /
                   "photoemission_valence_features.json").read_text("utf-8"))
SOC = {"Ag", "Au", "Pd", "Pt"}
#: Features that the physics we have does not reproduce (numbers in the reasons).
XFAIL = {
    ("Ag", "maxima_separation"): "the model's Ag 4d band shows one maximum (4.94 eV) with a "
    "shoulder, not the two measured maxima 1.3 eV apart: second maximum missing",
    ("Ni", "main_maximum"): "non-magnetic Ni: maximum at 1.22 eV BE after the correction "
    "(1.54 eV without), measured about 0.5 eV; the Fermi-level peak is too weak",
    ("Pd", "main_maximum"): "Pd: strongest model maximum at 2.2 eV BE, the maxima at 0.28 and "
    "1.26 eV reach 0.87 and 0.91 of it; measured strongest intensity within 2 eV of E_F "
    "(no correction fitted for Pd)",
    ("Au", "maxima_separation"): "Au: main maxima at 3.80 and 5.78 eV after the correction, "
    "1.98 eV apart against 2.4 ± 0.4 measured: too small by 0.42 eV",
}
#: A feature must lie inside the tolerance by at least one energy step (0.02 eV), so a value
#: on the edge of the window does not count as agreement.
MARGIN_EV = 0.02

_spectra: dict = {}


def spectrum(el: str, correction="auto"):
    """Simulated Al Kα spectrum of fcc ``el`` (cached per element and correction)."""
    key = (el, correction)
    if key not in _spectra:
        from valband.params import load_parameter_set
        from valband.spectra import simulate_spectrum
        from valband.spin import spin_dos
        from valband.structure import build_structure
        from valband.tb import build_model
        from valband.workflows import DOSSettings, compute_dos

        ps = load_parameter_set("valband-tc-2026")
        model = build_model(build_structure(f"{el} fcc"), ps)
        s = DOSSettings(mesh=12, method="gaussian", width=0.1, step=0.02)
        dos = spin_dos(model, s, soc=True, params=ps).total if el in SOC else compute_dos(model, s)
        _spectra[key] = simulate_spectrum(dos, "Al-Ka", gaussian_fwhm=DATA["resolution_fwhm_eV"],
                                          d_correction=correction)
    return _spectra[key]


def features(spec) -> dict:
    """Half-maximum edges, FWHM, the global maximum and the upper/lower main maxima (eV BE)."""
    sel = (spec.binding_energy > -0.5) & (spec.binding_energy < 12.0)
    be, y = spec.binding_energy[sel], spec.intensity[sel]
    half = np.flatnonzero(y >= 0.5 * y.max())
    lo, hi = float(be[half[0]]), float(be[half[-1]])
    mid = 0.5 * (lo + hi)
    pk, _ = find_peaks(y, prominence=0.03 * y.max())
    up = [p for p in pk if be[p] < mid]
    dn = [p for p in pk if be[p] >= mid]
    out = {"half_max_low": lo, "fwhm": hi - lo, "max": float(be[np.argmax(y)])}
    out["max_within"] = out["max"]
    if up:
        out["peak_upper"] = float(be[max(up, key=lambda p: y[p])])
    if dn:
        out["peak_lower"] = float(be[max(dn, key=lambda p: y[p])])
    if up and dn:
        out["separation"] = out["peak_lower"] - out["peak_upper"]
    return out


CASES = [(el, f) for el, rows in DATA["metals"].items() for f in rows]


@pytest.mark.parametrize(("el", "ref"), [
    pytest.param(el, f, id=f"{el}-{f['name']}-{f['role']}",
                 marks=[pytest.mark.xfail(strict=True, reason=XFAIL[(el, f["name"])])]
                 if (el, f["name"]) in XFAIL else [])
    for el, f in CASES])
def test_measured_feature(el, ref):
    # Source: beside each value in tests/data/photoemission_valence_features.json (from memory).
    got = features(spectrum(el)).get(ref["kind"])
    assert got is not None, f"{el}: the simulated spectrum has no {ref['kind']} feature"
    assert abs(got - ref["value"]) <= ref["tol"] - MARGIN_EV, (el, ref["name"], got, ref["value"])


def test_correction_is_what_moves_ag_onto_the_measurement():
    # Held-out Ag upper maximum 4.9 ± 0.4 eV (Hüfner 2003, from memory): the first-principles
    # d band misses it by about 1 eV; the correction (fitted to the d-band top and bottom
    # energies of ARPES, not to this spectrum) brings it within tolerance.
    ref = next(f for f in DATA["metals"]["Ag"] if f["name"] == "upper_maximum")
    before = features(spectrum("Ag", None))["peak_upper"]
    after = features(spectrum("Ag"))["peak_upper"]
    assert abs(before - ref["value"]) > 0.8
    assert abs(after - ref["value"]) <= ref["tol"]


def test_pd_pt_stay_uncorrected_and_say_so():
    # No fitted constants for Pd and Pt (data file's "not_fitted"): the record names them.
    for el in ("Pd", "Pt"):
        rec = spectrum(el).settings["d_band_correction"]
        assert rec["enabled"] and el in rec["not_corrected"] and not rec["applied"]
