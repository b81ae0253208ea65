"""Valence-subshell cross sections of real atoms against xraylib and facts of the trade."""

from __future__ import annotations

import math

import pytest

from valband.atom.photoionization import valence_cross_sections
from valband.errors import SettingsError

#: xraylib shells of the valence d subshells (its M4/M5, N4/N5, O4/O5).
D_SHELLS = {"Ni": ("M4", "M5"), "Cu": ("M4", "M5"), "Pd": ("N4", "N5"), "Ag": ("N4", "N5"),
            "Pt": ("O4", "O5"), "Au": ("O4", "O5")}


def _xraylib_subshell_mb(xrl, element: str, shells, photon_ev: float) -> float:
    """xraylib partial photoionization cross section of a subshell pair, Mb per atom."""
    z = xrl.SymbolToAtomicNumber(element)
    cm2_per_g = sum(xrl.CS_Photo_Partial(z, getattr(xrl, f"{s}_SHELL"), photon_ev / 1000.0)
                    for s in shells)
    avogadro = 6.02214076e23  # exact since the 2019 SI redefinition
    return cm2_per_g * xrl.AtomicWeight(z) / avogadro * 1e18


@pytest.mark.parametrize("element", sorted(D_SHELLS))
@pytest.mark.parametrize("photon_ev", [1253.6, 1486.6, 3000.0])
def test_d_subshell_against_xraylib(element, photon_ev):
    # External reference: xraylib (general-purpose X-ray library from PyPI, tested with 4.3.0),
    # partial photoionization cross sections; within 15 % at 1.25–3 keV (issue requirement).
    xrl = pytest.importorskip("xraylib")
    d = next(x for x in valence_cross_sections(element, photon_ev) if x.l == 2)
    ref = _xraylib_subshell_mb(xrl, element, D_SHELLS[element], photon_ev)
    assert d.sigma_mb == pytest.approx(ref, rel=0.15)


#: Closed d10 s2 atoms of the three transition rows, whose xraylib d-subshell values are smooth
#: in Z up to 8 keV (unlike those of Cu, Rh, Pd, Ag, Ir, Pt, Au there; DEVELOPERS.md).
CLOSED_D_SHELLS = {"Zn": ("M4", "M5"), "Cd": ("N4", "N5"), "Hg": ("O4", "O5")}


@pytest.mark.parametrize("element", sorted(CLOSED_D_SHELLS))
@pytest.mark.parametrize("photon_ev", [5900.0, 8000.0])
def test_d_subshell_against_xraylib_at_haxpes_energies(element, photon_ev):
    # External reference: xraylib 4.3.0 partial cross sections, within 25 % at 5.9 and 8 keV
    # (issue requirement), for the closed-shell atoms where xraylib's own values are smooth in
    # Z. For Cu, Pd, Ag, Pt, Au xraylib's per-electron d values at 8 keV jump by factors 3–16
    # between neighbours (e.g. Ni 0.71, Cu 0.28, Zn 1.57 µMb), so they cannot serve as a
    # reference there; smoothness of ours is checked below instead.
    xrl = pytest.importorskip("xraylib")
    d = next(x for x in valence_cross_sections(element, photon_ev) if x.l == 2)
    ref = _xraylib_subshell_mb(xrl, element, CLOSED_D_SHELLS[element], photon_ev)
    assert d.sigma_mb == pytest.approx(ref, rel=0.25)


@pytest.mark.parametrize("row", [("Co", "Ni", "Cu", "Zn"), ("Rh", "Pd", "Ag", "Cd"),
                                 ("Ir", "Pt", "Au", "Hg")])
def test_haxpes_d_cross_section_per_electron_grows_smoothly_along_a_row(row):
    # Physics (common practice): at a photon energy far above the d threshold the per-electron
    # cross section grows with Z along a transition row (the d orbital contracts), without
    # jumps — successive ratios between 1 and 1.6.
    per_e = [next(x for x in valence_cross_sections(el, 8000.0) if x.l == 2)
             .sigma_per_electron_mb for el in row]
    ratios = [b / a for a, b in zip(per_e, per_e[1:], strict=False)]
    assert all(1.0 < r < 1.6 for r in ratios), dict(zip(row[1:], ratios, strict=True))


@pytest.mark.parametrize("element", ["Cu", "Ag", "Au"])
def test_d_to_s_ratio_falls_towards_haxpes(element):
    # Common practice (HAXPES): the per-electron s/d cross-section ratio grows with photon
    # energy, i.e. σ(d)/σ(s) per electron falls from 1.5 to 8 keV.
    def ratio(e):
        xs = {x.l: x for x in valence_cross_sections(element, e)}
        return xs[2].sigma_per_electron_mb / xs[0].sigma_per_electron_mb

    assert ratio(8000.0) < ratio(3000.0) < ratio(1486.6)


def test_s_subshell_beta_is_two():
    # Dipole, non-relativistic: β = 2 for every s subshell (Cooper & Zare 1968; common practice).
    s = next(x for x in valence_cross_sections("Cu", 1486.6) if x.l == 0)
    assert s.beta == pytest.approx(2.0, abs=1e-12)


def test_below_threshold_is_zero_with_a_note():
    xs = valence_cross_sections("Au", 3.0)  # 5d and 6s bind by about 6–7 eV (LDA)
    d = next(x for x in xs if x.l == 2)
    assert d.sigma_mb == 0.0 and d.note
    assert math.isnan(d.beta)


def test_empty_valence_levels_get_a_per_electron_weight():
    # Pd is 4d10 5s0 (NIST SRD 141 configuration); its 5s and 5p partial DOS still need weights.
    xs = {x.subshell: x for x in valence_cross_sections("Pd", 1486.6)}
    assert set(xs) == {"4d", "5s", "5p"}
    assert xs["5s"].occupation == 0.0 and xs["5s"].sigma_per_electron_mb > 0
    assert xs["5s"].sigma_mb == 0.0


@pytest.mark.parametrize("bad", [0.0, -10.0, float("nan")])
def test_bad_photon_energy(bad):
    with pytest.raises(SettingsError, match="photon energy"):
        valence_cross_sections("Cu", bad)
