"""Photoemission-calibrated (quasiparticle) correction of the d-projected spectral weight.

The tight-binding DOS of the first-principles sets has LDA quality: the noble-metal d bands lie
too close to E_F compared with photoemission (Cu by ~0.4 eV, Ag and Au by more) and the Ni d
band is too wide. A rigid shift of a measured spectrum cannot absorb a width error or a d–sp
offset, and a rigid lowering of the onsite d level in the model moves E_F with it. This module
applies instead a linear self-energy to the d channel of one element::

    E − E_F  →  E′ − E_F = Δ_X + s_X (E − E_F)        (d-projected weight of element X only)

so the d pDOS becomes D′_d(E′) = D_d((E′ − Δ)/s) / s — the weight of every channel is conserved
(the map is applied to the cumulative weight, so it is conserved exactly on the grid), E_F and
the s, p channels stay where the first-principles model put them. Δ_X (eV) and s_X (no unit) are
fitted per element and per parameter set to measured band energies by
:mod:`valband.spectra.qp_fit` and shipped in ``valband/data/spectra/qp_corrections.json``
together with the measured values, their sources, and the fit and held-out residuals.

For metals whose d band crosses E_F (Ni, Pd, Pt) Δ is held at 0: a quasiparticle correction
must leave the Fermi surface in place (Luttinger's theorem), so only the width is corrected.

Only :func:`valband.spectra.simulate_spectrum` / ``compare`` use the corrected DOS; ``dos``,
``describe`` and ``screen`` stay on the first-principles scale.
"""

from __future__ import annotations

import json
import math
from collections.abc import Mapping
from dataclasses import dataclass
from functools import lru_cache
from importlib import resources

import numpy as np
from numpy.typing import NDArray

from valband.errors import InputError, ParameterError, SettingsError
from valband.results.dos import DOSResult

__all__ = ["QPCorrection", "load_corrections", "corrections_for", "apply_qp_correction",
           "map_density", "describe_record", "DATA_FILE", "QP_KIND"]

#: Package-relative data file holding the fitted constants per parameter set.
DATA_FILE = "qp_corrections.json"
QP_KIND = "valband.qp_corrections"
#: Accepted range of the width factor s (outside it the "correction" would be a new model).
SCALE_RANGE = (0.5, 1.5)
#: Accepted range of the offset Δ, eV.
DELTA_RANGE = (-2.5, 2.5)


@dataclass(frozen=True)
class QPCorrection:
    """Linear self-energy of one element's d channel: E′ = Δ + s·E (E relative to E_F, eV).

    Attributes
    ----------
    element : chemical symbol
    delta_ev : Δ in eV (negative: d bands moved away from E_F, to higher binding energy)
    scale : s, dimensionless (< 1 narrows the d band about E_F)
    parameter_set : name of the set the constants were fitted on
    source : short text: what was fitted to what (the full record is in the data file)
    spin_orbit : whether the model bands of the fit had spin–orbit coupling (None: unknown)
    """

    element: str
    delta_ev: float
    scale: float
    parameter_set: str = ""
    source: str = ""
    spin_orbit: bool | None = None

    def __post_init__(self) -> None:
        for name, v, (lo, hi), unit in (("delta_ev", self.delta_ev, DELTA_RANGE, " eV"),
                                        ("scale", self.scale, SCALE_RANGE, "")):
            if not (isinstance(v, (int, float)) and math.isfinite(v) and lo <= v <= hi):
                raise ParameterError(f"d-band correction of {self.element}: {name} = {v!r}{unit}; "
                                     f"accepted {lo:g} to {hi:g}{unit}")

    def energy(self, e):
        """Corrected energy Δ + s·E (eV, relative to E_F) of model energies ``e``."""
        return self.delta_ev + self.scale * np.asarray(e, dtype=np.float64)


# ------------------------------------------------------------------------------ data file
@lru_cache(maxsize=1)
def _shipped() -> dict:
    text = resources.files("valband").joinpath("data", "spectra", DATA_FILE).read_text("utf-8")
    data = json.loads(text)
    if data.get("kind") != QP_KIND:
        raise ParameterError(f"{DATA_FILE}: kind {data.get('kind')!r}, expected {QP_KIND!r}")
    return data


def load_corrections(path=None) -> dict:
    """The correction document: ``{"kind", "sets": {set_name: {...}}, ...}``.

    ``path`` None reads the shipped file; otherwise a JSON file of the same layout.
    """
    if path is None:
        return _shipped()
    try:
        with open(path, encoding="utf-8") as fh:
            data = json.load(fh)
    except (OSError, json.JSONDecodeError) as exc:
        raise InputError(f"d-band correction file {path}: {exc}") from None
    if data.get("kind") != QP_KIND:
        raise ParameterError(f"{path}: kind {data.get('kind')!r}, expected {QP_KIND!r}")
    return data


def corrections_for(parameter_set: str, data: Mapping | None = None) -> dict[str, QPCorrection]:
    """Element → :class:`QPCorrection` fitted on ``parameter_set`` ({} when none was fitted)."""
    doc = _shipped() if data is None else data
    entry = doc.get("sets", {}).get(str(parameter_set))
    if not entry:
        return {}
    out = {}
    for el, c in entry.get("elements", {}).items():
        out[el] = QPCorrection(el, float(c["delta_eV"]), float(c["scale"]), str(parameter_set),
                               c.get("fitted_to", ""), c.get("spin_orbit"))
    return out


# ------------------------------------------------------------------------------ the map
def map_density(energies: NDArray, rows: NDArray, delta: float, scale: float) -> NDArray:
    """Rows of a density on a uniform grid after E → Δ + s·E, weight conserved on the grid.

    The cumulative weight N(E) (trapezoid-consistent: cumulative sum × step) is carried over
    to N′(E′) = N((E′ − Δ)/s) by linear interpolation and differentiated again, so Σ row·h is
    unchanged whenever the mapped band stays inside the grid; weight mapped beyond the grid
    ends is piled into the end bins (nothing is lost).
    """
    e = np.asarray(energies, dtype=np.float64)
    y = np.atleast_2d(np.asarray(rows, dtype=np.float64))
    if not (math.isfinite(scale) and scale > 0 and math.isfinite(delta)):
        raise SettingsError(f"d-band map: scale {scale!r} must be > 0 and delta {delta!r} finite")
    h = float(e[1] - e[0])
    # bin edges of the grid points and the cumulative weight at each edge
    edges = np.concatenate([[e[0] - 0.5 * h], e + 0.5 * h])
    cum = np.concatenate([np.zeros((y.shape[0], 1)), np.cumsum(y, axis=1) * h], axis=1)
    src = (edges - delta) / scale       # model energy that lands on each output edge
    out_cum = np.stack([np.interp(src, edges, c) for c in cum])
    out_cum[:, 0] = 0.0                  # weight mapped below the grid piles into the first bin
    out_cum[:, -1] = cum[:, -1]          # and above it into the last bin
    return np.diff(out_cum, axis=1) / h


def apply_qp_correction(dos: DOSResult, corrections: Mapping[str, QPCorrection] | None,
                        d_offset: float = 0.0, shell: str = "d") -> tuple[DOSResult, dict]:
    """Apply the per-element d-channel map to ``dos``; return the new DOS and a record.

    Parameters
    ----------
    dos : DOSResult (plain, spin–orbit total, per-spin or j-resolved: every channel whose
        ``shell`` is ``shell`` is mapped, whatever its ``orbital`` field)
    corrections : element → QPCorrection (None or {}: no correction)
    d_offset : extra rigid move (eV) of the d channels of *every* element, applied after the
        map (positive: deeper, i.e. E′ → E′ − d_offset); used by the fit's d-band offset
    shell : the shell to correct (default d)

    Returns
    -------
    (DOSResult, dict) — the DOS (the same object when nothing changes) and
    ``{"applied": {El: {"delta_eV", "scale"}}, "not_corrected": [El, ...], ...}``.
    """
    if not isinstance(dos, DOSResult):
        raise InputError(f"apply_qp_correction needs a DOSResult, got {type(dos).__name__}")
    corr = dict(corrections or {})
    elements = list(dict.fromkeys(c.element for c in dos.channel_labels if c.shell == shell))
    applied, missing = {}, []
    channels = np.array(dos.channels, dtype=np.float64, copy=True)
    changed = False
    for el in elements:
        c = corr.get(el)
        delta, scale = (c.delta_ev, c.scale) if c is not None else (0.0, 1.0)
        if c is None:
            missing.append(el)
        else:
            applied[el] = {"delta_eV": c.delta_ev, "scale": c.scale,
                           "parameter_set": c.parameter_set}
            if c.spin_orbit is not None:
                applied[el]["fitted_with_spin_orbit"] = c.spin_orbit
        delta -= float(d_offset)
        if delta == 0.0 and scale == 1.0:
            continue
        rows = [i for i, ch in enumerate(dos.channel_labels)
                if ch.element == el and ch.shell == shell]
        channels[rows] = map_density(dos.energies, dos.channels[rows], delta, scale)
        changed = True
    record = {"shell": shell, "applied": applied, "not_corrected": missing,
              "law": "E' - E_F = delta + scale * (E - E_F) on the d-projected weight "
                     "(weight conserved; E_F, s and p channels unchanged)"}
    if d_offset:
        record["d_offset_eV"] = float(d_offset)
    if not changed:
        return dos, record
    total = dos.total + (channels - dos.channels).sum(axis=0)
    settings = dict(dos.settings) | {"qp_correction": record}
    return DOSResult(energies=dos.energies, total=total, channels=channels,
                     channel_labels=dos.channel_labels, fermi_level=dos.fermi_level,
                     n_electrons=dos.n_electrons, n_sites=dos.n_sites, settings=settings,
                     provenance=dos.provenance), record


def describe_record(record: dict | None) -> str:
    """One printable line: ``d bands corrected to photoemission: Cu Δ=-0.57 eV, s=0.894``."""
    if record is None or not record.get("enabled", True):
        return "d bands not corrected (first-principles scale, --no-qp-correction)"
    parts = [f"{el} Δ={v['delta_eV']:+.2f} eV, s={v['scale']:.3f}"
             for el, v in record.get("applied", {}).items()]
    text = ("d bands corrected to photoemission: " + "; ".join(parts)) if parts else \
        "d bands not corrected"
    if record.get("caution"):
        text += f"; caution: {record['caution']}"
    if record.get("not_corrected"):
        text += (f" (no fitted correction for {', '.join(record['not_corrected'])} with "
                 f"{record.get('parameter_set', 'this parameter set')}: first-principles scale)")
    return text
