"""Simulated valence-band photoemission spectrum from partial densities of states.

Model (one-electron, dipole, sudden approximation; common practice for XPS/HAXPES valence
bands, e.g. the "cross-section-weighted DOS")::

    I_c(E) = σ_c(hν) · A_c(θ) · w_site · D_c(E) · f(E, T)
    I(BE)  = G_FWHM ∗ L_Γ(E) [ Σ_c I_c ]         with BE = E_F − E

for every DOS channel c (site × shell or site × orbital): σ_c the per-electron
photoionization cross section (Mb) of the channel's element and shell at hν
(:func:`valband.atom.tables.cross_sections`), A_c the dipole angular factor from the subshell's
β (:func:`valband.atom.cross_section.angular_factor`), w_site an optional depth weight
(layer-resolved DOS, :func:`valband.spectra.imfp.depth_weights`), D_c the partial DOS
(states/eV/cell) and f the Fermi–Dirac occupation; then the lifetime Lorentzian and the
instrument Gaussian (:mod:`valband.spectra.broadening`). Every channel is broadened on its own
and kept as a component, so the components (plus the optional inelastic background, kept as
its own curve) sum to the total exactly.

Intensity unit: Mb · states / eV per cell (σ in Mb times DOS in states/eV/cell, dimensionless
angular and depth factors) — proportional to counts, with the analyser transmission, flux and
photoelectron escape beyond ``layer_weights`` left out.

A subshell below its threshold (σ = 0) contributes zero; its β is undefined and reported as
null. Matrix-element effects beyond the atomic cross section (e.g. solid-state changes of the
d cross section, band-structure final states at UPS energies) are not modelled.
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field

import numpy as np
from numpy.typing import NDArray

from valband.arrays import readonly
from valband.conventions import SHELL_L
from valband.errors import InputError, SettingsError
from valband.results.channels import Channel
from valband.results.dos import DOSResult
from valband.spectra.broadening import (
    DEFAULT_A_PER_EV,
    DEFAULT_GAMMA0_EV,
    LIFETIME_SOURCE,
    check_uniform_grid,
    fermi_dirac,
    gaussian_broaden,
    lorentzian_broaden,
)

__all__ = ["Spectrum", "simulate_spectrum", "channel_weights", "resolve_d_correction",
           "DEFAULT_GAUSSIAN_FWHM_EV", "DEFAULT_GEOMETRY", "MAGIC_ANGLE_DEG", "SPECTRUM_KIND"]

#: Instrument resolution default, FWHM in eV: a monochromated Al Kα lab spectrometer
#: (common practice, order of magnitude).
DEFAULT_GAUSSIAN_FWHM_EV = 0.3
#: arccos(1/√3) in degrees: the angular factor is 1 whatever β (Cooper & Zare 1968).
MAGIC_ANGLE_DEG = math.degrees(math.acos(1.0 / math.sqrt(3.0)))
#: Default geometry: unpolarised source at the magic angle to the analyser (common practice).
DEFAULT_GEOMETRY = (MAGIC_ANGLE_DEG, "unpolarized")
SPECTRUM_KIND = "valband.spectrum"
_POLARIZATIONS = ("unpolarized", "linear")


@dataclass(frozen=True, eq=False)
class Spectrum:
    """A simulated valence-band photoemission spectrum.

    Attributes
    ----------
    binding_energy : (n_e,) float64, eV
        BE = E_F − E, **ascending** (E_F at BE = 0, occupied states at BE > 0). Plots draw it
        decreasing to the right.
    intensity : (n_e,) float64, Mb · states / eV per cell
        Total spectrum: the sum of ``components`` plus ``background``.
    components : (n_c, n_e) float64, same unit
        One broadened curve per DOS channel (site × shell, or site × orbital).
    background : (n_e,) float64 or None, same unit
        The optional inelastic background (``inelastic`` of :func:`simulate_spectrum`).
    component_labels : tuple of Channel
    settings : dict
        Photon energy (eV) and source name, temperature (K), Gaussian FWHM (eV), lifetime law
        (HWHM Γ₀ in eV, a in eV⁻¹), geometry, layer weights, and the cross sections used
        (per element and shell: subshell, σ per electron in Mb, β, angular factor).
    provenance : dict
        The DOS's provenance, settings and Fermi level.
    """

    binding_energy: NDArray[np.float64]
    intensity: NDArray[np.float64]
    components: NDArray[np.float64]
    component_labels: tuple[Channel, ...]
    settings: dict = field(default_factory=dict)
    provenance: dict = field(default_factory=dict)
    background: NDArray[np.float64] | None = None

    def __post_init__(self) -> None:
        object.__setattr__(self, "binding_energy", readonly(self.binding_energy))
        if self.background is not None:
            object.__setattr__(self, "background", readonly(self.background))
            if self.background.shape != self.binding_energy.shape:
                raise InputError("Spectrum: background must share the energy axis")
        object.__setattr__(self, "intensity", readonly(self.intensity))
        object.__setattr__(self, "component_labels", tuple(self.component_labels))
        object.__setattr__(self, "components",
                           readonly(self.components).reshape(len(self.component_labels), -1))
        n = self.binding_energy.shape
        if self.intensity.shape != n or self.components.shape[1:] != n:
            raise InputError("Spectrum: binding_energy, intensity and components must share "
                             "the energy axis")

    @property
    def component_names(self) -> tuple[str, ...]:
        """Column names, e.g. ``Cu0:d``."""
        return tuple(c.name for c in self.component_labels)

    def select(self, element: str | None = None, shell: str | None = None,
               site: int | None = None) -> NDArray[np.float64]:
        """Sum of the components matching every given criterion, shape (n_e,)."""
        mask = np.array([(element is None or c.element == element)
                         and (shell is None or c.shell == shell)
                         and (site is None or c.site == site) for c in self.component_labels])
        if not mask.any():
            have = sorted({f"{c.element}:{c.shell}" for c in self.component_labels})
            raise InputError(f"no spectrum component matches element={element}, shell={shell}, "
                             f"site={site}; available: {', '.join(have)}")
        return self.components[mask].sum(axis=0)

    def to_dict(self) -> dict:
        """JSON-ready dictionary holding every array and label."""
        return {
            "kind": SPECTRUM_KIND,
            "binding_energy_eV": self.binding_energy.tolist(),
            "intensity": self.intensity.tolist(),
            "components": self.components.tolist(),
            "component_labels": [c.to_dict() for c in self.component_labels],
            "intensity_unit": "Mb states/eV per cell",
            "background": None if self.background is None else self.background.tolist(),
            "settings": self.settings,
            "provenance": self.provenance,
        }

    @classmethod
    def from_dict(cls, d: dict) -> Spectrum:
        """Inverse of :meth:`to_dict`."""
        if d.get("kind") != SPECTRUM_KIND:
            raise InputError(f"spectrum dictionary: kind {d.get('kind')!r}; expected "
                             f"{SPECTRUM_KIND!r}")
        try:
            return cls(
                binding_energy=np.array(d["binding_energy_eV"], dtype=np.float64),
                intensity=np.array(d["intensity"], dtype=np.float64),
                components=np.array(d["components"], dtype=np.float64),
                component_labels=tuple(Channel.from_dict(c) for c in d["component_labels"]),
                settings=dict(d.get("settings", {})),
                provenance=dict(d.get("provenance", {})),
                background=None if d.get("background") is None
                else np.array(d["background"], dtype=np.float64),
            )
        except (KeyError, TypeError, ValueError) as exc:
            raise InputError(f"spectrum dictionary: malformed ({type(exc).__name__}: {exc})") \
                from None


# ------------------------------------------------------------------------------ settings
def _photon(photon_energy) -> tuple[float, str | None]:
    from valband.atom.tables import PHOTON_SOURCES, photon_energy_of

    e = photon_energy_of(photon_energy)
    name = next((n for n, v in PHOTON_SOURCES.items() if v == e), None)
    return e, name


def _geometry(geometry) -> tuple[float, str]:
    try:
        theta, pol = geometry
        theta = float(theta)
    except (TypeError, ValueError):
        raise SettingsError(f"geometry {geometry!r}: expected (theta_deg, polarization) with "
                            f"polarization one of {', '.join(_POLARIZATIONS)}") from None
    if not math.isfinite(theta) or not 0.0 <= theta <= 180.0:
        raise SettingsError(f"geometry angle {theta!r}°: accepted 0–180 degrees")
    if pol not in _POLARIZATIONS:
        raise SettingsError(f"polarization {pol!r}: accepted {', '.join(_POLARIZATIONS)}")
    return theta, pol


def _lifetime(lorentz) -> tuple[float, float]:
    try:
        g0, a = (float(x) for x in lorentz)
    except (TypeError, ValueError):
        raise SettingsError(f"lifetime {lorentz!r}: expected (Γ0 in eV, a in 1/eV)") from None
    for name, v, unit in (("lifetime Γ0", g0, "eV"), ("lifetime coefficient a", a, "1/eV")):
        if not math.isfinite(v) or v < 0:
            raise SettingsError(f"{name} {v!r} {unit}: must be finite and ≥ 0")
    return g0, a


def _site_weights(layer_weights, sites: Sequence[int]) -> dict[int, float]:
    if layer_weights is None:
        return {s: 1.0 for s in sites}
    if isinstance(layer_weights, Mapping):
        missing = [s for s in sites if s not in layer_weights]
        if missing:
            raise SettingsError(f"layer_weights: no weight for site(s) {missing}; give one per "
                                f"site {list(sites)}")
        w = {s: layer_weights[s] for s in sites}
    else:
        arr = np.asarray(layer_weights, dtype=np.float64).ravel()
        if arr.size <= max(sites):
            raise SettingsError(f"layer_weights: {arr.size} values for sites 0…{max(sites)}; "
                                "give one weight per site (index = site)")
        w = {s: arr[s] for s in sites}
    out = {}
    for s, v in w.items():
        try:
            v = float(v)
        except (TypeError, ValueError):
            raise SettingsError(f"layer_weights[{s}] = {v!r}: must be a number ≥ 0") from None
        if not math.isfinite(v) or v < 0:
            raise SettingsError(f"layer_weights[{s}] = {v!r}: must be finite and ≥ 0")
        out[s] = v
    return out


def channel_weights(dos: DOSResult, photon_energy_ev: float,
                    geometry=DEFAULT_GEOMETRY) -> tuple[NDArray[np.float64], list[dict]]:
    """Per-channel weight σ·A (Mb) and the cross sections used, per element and shell.

    Raises
    ------
    InputError
        A channel's element is unknown to the cross-section tables, or its shell is not s, p, d
        or has no valence subshell of that l.
    """
    from valband.atom.cross_section import angular_factor
    from valband.atom.tables import cross_sections

    theta, pol = _geometry(geometry)
    used: dict[tuple[str, str], dict] = {}
    weights = np.empty(len(dos.channel_labels))
    for i, ch in enumerate(dos.channel_labels):
        key = (ch.element, ch.shell)
        if key not in used:
            if ch.shell not in SHELL_L:
                raise InputError(f"DOS channel {ch.name}: shell {ch.shell!r} has no cross "
                                 f"section; accepted shells {', '.join(SHELL_L)}")
            try:
                rows = cross_sections(ch.element, photon_energy_ev)
            except InputError as exc:
                raise InputError(f"cross section of {ch.element} (DOS channel {ch.name}): "
                                 f"{exc}") from None
            l = SHELL_L[ch.shell]  # noqa: E741
            match = [r for r in rows if r.l == l]
            if not match:
                raise InputError(f"cross section of {ch.element} {ch.shell}: the element has no "
                                 f"valence subshell with l = {l} (has "
                                 f"{', '.join(r.subshell for r in rows)})")
            r = min(match, key=lambda x: x.binding_energy_ev)  # the outermost such subshell
            sig = float(r.sigma_per_electron_mb)
            if sig > 0.0:
                beta = float(r.beta)
                ang = angular_factor(min(2.0, max(-1.0, beta)), theta, pol)
            else:  # below threshold: closed, contributes nothing
                beta, ang = math.nan, 0.0
            used[key] = {"element": ch.element, "shell": ch.shell, "subshell": r.subshell,
                         "sigma_per_electron_mb": sig, "beta": beta, "angular_factor": ang,
                         "weight_mb": sig * ang, "note": r.note}
        weights[i] = used[key]["weight_mb"]
    return weights, list(used.values())


# ------------------------------------------------------------------------------ simulation
def simulate_spectrum(dos: DOSResult, photon_energy, temperature: float = 300.0,
                      gaussian_fwhm: float = DEFAULT_GAUSSIAN_FWHM_EV,
                      lorentz: tuple[float, float] = (DEFAULT_GAMMA0_EV, DEFAULT_A_PER_EV),
                      geometry: tuple[float, str] = DEFAULT_GEOMETRY,
                      layer_weights=None, keep_area: bool = True,
                      inelastic: tuple[str, float] | None = None,
                      d_correction="auto") -> Spectrum:
    """Simulate a valence-band photoemission spectrum (model in the module docstring).

    Parameters
    ----------
    dos : DOSResult
        Partial DOS on a uniform grid (E − E_F, eV).
    photon_energy : float (eV) or str
        A number of eV or a lab source name ("Al-Ka", "Ga-Ka", "He-I", …).
    temperature : K, ≥ 0 (0: step occupation)
    gaussian_fwhm : instrument resolution, FWHM in eV, ≥ 0
    lorentz : (Γ₀ in eV, a in eV⁻¹)
        Lifetime HWHM Γ(E) = Γ₀ + a (E − E_F)²; default the d-hole law of
        :mod:`valband.spectra.broadening` (0.01 eV, 0.01 eV⁻¹, from measured Cu d-hole widths).
    geometry : (θ in degrees, "unpolarized" | "linear")
        θ between photon beam and analyser (unpolarised) or between polarisation vector and
        analyser (linear). Default: magic angle, unpolarised.
    layer_weights : None, sequence indexed by site, or {site: weight}
        Depth weights of the sites (e.g. :func:`~valband.spectra.imfp.depth_weights`); None: 1.
    keep_area : bool
        Broadening keeps the area on the grid (see :mod:`valband.spectra.broadening`).
    inelastic : None, ("shirley", k) or ("tougaard", B)
        Optional inelastic background added to the total and kept as ``background``: k (1/eV)
        times the spectrum's area at lower binding energy
        (:func:`~valband.spectra.background.shirley_shape`), or B (eV²) times the spectrum
        convolved with the universal loss shape T/(C + T²)²
        (:func:`~valband.spectra.background.tougaard_shape`, Tougaard 1988; a typical B for
        metals is ~3000 eV², common practice).
    d_correction : "auto" (default), None/False, or element → QPCorrection
        The photoemission-calibrated d-band correction (:mod:`valband.spectra.quasiparticle`):
        "auto" looks up the constants fitted on the DOS's parameter set (elements without
        any stay uncorrected, and the record says so); None or False switches it off.

    Returns
    -------
    Spectrum
    """
    if not isinstance(dos, DOSResult):
        raise InputError(f"simulate_spectrum needs a DOSResult, got {type(dos).__name__}")
    dos, d_record = resolve_d_correction(dos, d_correction)
    hv, source = _photon(photon_energy)
    try:
        t = float(temperature)
    except (TypeError, ValueError):
        raise SettingsError(f"temperature {temperature!r}: must be a number of K") from None
    if not math.isfinite(t) or t < 0:
        raise SettingsError(f"temperature {temperature!r} K: must be a finite number ≥ 0")
    try:
        fwhm = float(gaussian_fwhm)
    except (TypeError, ValueError):
        raise SettingsError(f"Gaussian FWHM {gaussian_fwhm!r}: must be a number of eV") from None
    if not math.isfinite(fwhm) or fwhm < 0:
        raise SettingsError(f"Gaussian FWHM {gaussian_fwhm!r} eV: must be finite and ≥ 0")
    g0, a = _lifetime(lorentz)
    theta, pol = _geometry(geometry)
    check_uniform_grid(dos.energies, "DOS energy grid")
    if not np.all(np.isfinite(dos.channels)):
        raise InputError("DOS channels contain NaN or infinite values")

    weights, used = channel_weights(dos, hv, (theta, pol))
    site_w = _site_weights(layer_weights, dos.sites)
    weights = weights * np.array([site_w[c.site] for c in dos.channel_labels])

    occ = fermi_dirac(dos.energies, t)
    raw = dos.channels * weights[:, None] * occ[None, :]
    # to the binding-energy axis, ascending: BE = −(E − E_F), reverse the order
    be = -dos.energies[::-1]
    raw = raw[:, ::-1]
    comp = lorentzian_broaden(be, raw, g0, a, keep_area=keep_area, origin=0.0)
    comp = gaussian_broaden(be, comp, fwhm, keep_area=keep_area)
    background, inel = _inelastic(inelastic, float(be[1] - be[0]), comp.sum(axis=0))
    settings = {
        "photon_energy_eV": hv,
        "photon_source": source,
        "temperature_K": t,
        "gaussian_fwhm_eV": fwhm,
        "lifetime": {"gamma0_eV": g0, "a_per_eV": a, "law": "HWHM = gamma0 + a*(E-E_F)^2",
                     "width_kind": "HWHM",
                     "source": LIFETIME_SOURCE if (g0, a) == (DEFAULT_GAMMA0_EV,
                                                              DEFAULT_A_PER_EV) else "given"},
        "geometry": {"theta_deg": theta, "polarization": pol},
        "cross_sections": used,
        "cross_section_unit": "Mb per electron",
        "layer_weights": {str(s): w for s, w in site_w.items()} if layer_weights is not None
        else None,
        "keep_area": bool(keep_area),
        "inelastic_background": inel,
        "d_band_correction": d_record,
        "intensity_unit": "Mb states/eV per cell",
        "binding_energy_order": "ascending",
    }
    provenance = {"dos_provenance": dos.provenance, "dos_settings": dos.settings,
                  "fermi_level_eV": dos.fermi_level, "n_electrons": dos.n_electrons}
    total = comp.sum(axis=0) if background is None else comp.sum(axis=0) + background
    return Spectrum(binding_energy=be, intensity=total, components=comp,
                    component_labels=dos.channel_labels, settings=settings,
                    provenance=provenance, background=background)


_INELASTIC = {"shirley": ("k", "1/eV"), "tougaard": ("B", "eV^2")}


def resolve_d_correction(dos: DOSResult, d_correction="auto",
                         d_offset: float = 0.0) -> tuple[DOSResult, dict]:
    """Apply the d-band correction chosen by ``d_correction`` (see :func:`simulate_spectrum`).

    Returns the (possibly new) DOS and the record stored in the settings:
    ``{"enabled", "parameter_set", "applied": {El: {delta_eV, scale}}, "not_corrected", …}``.
    """
    from valband.spectra.quasiparticle import (
        QPCorrection,
        apply_qp_correction,
        corrections_for,
    )

    set_name = (dos.provenance.get("parameter_set") or {}).get("name")
    if d_correction is None or d_correction is False:
        corr, enabled, origin = {}, False, "switched off"
    elif isinstance(d_correction, str):
        if d_correction != "auto":
            raise SettingsError(f"d_correction {d_correction!r}: accepted 'auto', None/False or "
                                "a mapping element → QPCorrection")
        corr, enabled = corrections_for(set_name) if set_name else {}, True
        origin = f"fitted on {set_name} (valband/data/spectra/qp_corrections.json)"
    elif isinstance(d_correction, Mapping):
        corr, enabled, origin = {}, True, "given"
        for el, c in d_correction.items():
            if isinstance(c, QPCorrection):
                corr[el] = c
            else:
                try:
                    delta, scale = (float(v) for v in c)
                except (TypeError, ValueError):
                    raise SettingsError(f"d_correction[{el!r}] = {c!r}: expected a "
                                        "QPCorrection or (delta_eV, scale)") from None
                corr[el] = QPCorrection(el, delta, scale, "given")
    else:
        raise SettingsError(f"d_correction {d_correction!r}: accepted 'auto', None/False or a "
                            "mapping element → QPCorrection")
    new, rec = apply_qp_correction(dos, corr, d_offset=d_offset)
    rec = {"enabled": enabled, "parameter_set": set_name, "origin": origin} | rec
    has_soc = bool((dos.settings.get("spin") or {}).get("spin_orbit", False))
    odd = [el for el, c in corr.items() if el in rec["applied"] and c.spin_orbit is not None
           and c.spin_orbit != has_soc]
    if odd:
        rec["caution"] = (f"{', '.join(odd)} fitted with spin–orbit "
                          f"{'on' if not has_soc else 'off'}, this DOS has it "
                          f"{'off' if not has_soc else 'on'}")
    if rec["applied"] and len({c.element for c in dos.channel_labels}) > 1:
        rec["transfer_note"] = ("constants fitted on the pure fcc metals, transferred unchanged "
                                "to this compound or alloy")
    if not enabled:
        rec["not_corrected"] = []
        rec["note"] = "first-principles d bands (correction switched off)"
    return new, rec


def _inelastic(inelastic, h: float, peak: NDArray) -> tuple[NDArray | None, dict | None]:
    """Build the optional inelastic background of :func:`simulate_spectrum` and its record."""
    if inelastic is None:
        return None, None
    from valband.spectra.background import TOUGAARD_C, shirley_shape, tougaard_shape

    try:
        kind, amp = inelastic
        amp = float(amp)
    except (TypeError, ValueError):
        raise SettingsError(f"inelastic {inelastic!r}: expected (kind, amplitude) with kind "
                            f"one of {', '.join(_INELASTIC)}") from None
    if kind not in _INELASTIC:
        raise SettingsError(f"inelastic background {kind!r}: accepted {', '.join(_INELASTIC)}")
    name, unit = _INELASTIC[kind]
    if not math.isfinite(amp) or amp < 0:
        raise SettingsError(f"inelastic {kind} amplitude {name} = {amp!r} {unit}: must be "
                            "finite and ≥ 0")
    shape = shirley_shape(h, peak) if kind == "shirley" else tougaard_shape(h, peak)
    record = {"kind": kind, name: amp, "unit": unit}
    if kind == "tougaard":
        record["C_eV2"] = TOUGAARD_C
    return amp * shape, record
