"""Data files and summaries of results (the formats are documented in README, "Output files").

Every file starts with comment lines naming the valband version, the schema version, the
parameter set and the settings, so a CSV copied away from its summary still says what made it.
"""

from __future__ import annotations

import datetime as _dt
from pathlib import Path

import numpy as np

import valband
from valband.output import SCHEMA_VERSION, write_csv, write_json
from valband.results import BandsResult, DOSResult

__all__ = ["write_dos_csv", "write_pdos_csv", "write_bands_csv", "summary_of", "write_summary"]


def _comments(result, what: str) -> list[str]:
    ps = result.provenance.get("parameter_set", {})
    st = result.provenance.get("structure", {})
    return [
        f"valband {valband.__version__} {what} (schema_version {SCHEMA_VERSION})",
        f"structure {st.get('formula', '?')} from {st.get('source', '?')}",
        f"parameter set {ps.get('name', '?')} version {ps.get('version', '?')}",
        f"Fermi level {result.fermi_level:.6f} eV (absolute model scale); energies are E - E_F in eV",
    ]


def write_dos_csv(path: str | Path, dos: DOSResult) -> Path:
    """``dos.csv``: energy, total, integrated total, then per-atom-summed element–shell pDOS."""
    header = ["energy_eV", "total", "integrated_total"]
    cols = [dos.energies, dos.total, dos.integrated()]
    for el in dos.elements:
        for sh in dos.shells_of(el):
            header.append(f"{el}:{sh}")
            cols.append(dos.select(element=el, shell=sh))
    notes = _comments(dos, "density of states") + [
        "DOS in states/eV/cell (both spins); element:shell columns sum that element's sites",
        f"method {dos.settings.get('method')} width {dos.settings.get('width')} eV",
    ]
    return write_csv(path, header, cols, notes)


def write_pdos_csv(path: str | Path, dos: DOSResult) -> Path:
    """``pdos_sites.csv``: energy then one column per channel (``Cu0:d`` or ``Cu0:dxy``)."""
    header = ["energy_eV"] + [c.name for c in dos.channel_labels]
    cols = [dos.energies] + list(dos.channels)
    notes = _comments(dos, "partial DOS per site") + ["states/eV (both spins) per channel"]
    return write_csv(path, header, cols, notes)


def write_bands_csv(path: str | Path, bands: BandsResult) -> Path:
    """``bands.csv``: one row per (k, band): distance, k (fractional), band, energy, character."""
    nk, nb = bands.energies.shape
    kk = np.repeat(np.arange(nk), nb)
    header = ["distance_inv_angstrom", "k1", "k2", "k3", "band", "energy_eV"]
    cols = [bands.distance[kk], bands.kpoints[kk, 0], bands.kpoints[kk, 1], bands.kpoints[kk, 2],
            np.tile(np.arange(nb), nk), bands.energies.ravel()]
    groups = list(dict.fromkeys((c.element, c.shell) for c in bands.channel_labels))
    for el, sh in groups:
        header.append(f"weight_{el}:{sh}")
        cols.append(bands.character_of(el, sh).ravel())
    notes = _comments(bands, "band structure") + [
        "special points: " + " ".join(
            f"{lab}@{x:.5f}" for lab, x in zip(bands.labels, bands.label_positions, strict=True)),
        "weights are orbital character (Mulliken for non-orthogonal sets), summing to 1 per state",
    ]
    return write_csv(path, header, cols, notes)


def summary_of(command: str, dos: DOSResult | None, descriptors: list | None = None,
               extra: dict | None = None, files: dict | None = None) -> dict:
    """The ``summary.json`` document (schema ``valband.summary``, version SCHEMA_VERSION)."""
    out: dict = {
        "schema": "valband.summary",
        "schema_version": SCHEMA_VERSION,
        "command": command,
        "valband_version": valband.__version__,
        "created_utc": _dt.datetime.now(_dt.UTC).strftime("%Y-%m-%dT%H:%M:%SZ"),
    }
    if dos is not None:
        tot_at_ef = dos.value_at_fermi()
        out.update({
            "fermi_level_eV": dos.fermi_level,
            "n_electrons": dos.n_electrons,
            "electrons_below_fermi": float(np.interp(0.0, dos.energies, dos.integrated())),
            "dos_at_fermi_states_per_eV_cell": tot_at_ef,
            "settings": dos.settings,
            "provenance": dos.provenance,
        })
    if descriptors:
        out["descriptors"] = [d.to_dict() for d in descriptors]
    if extra:
        out.update(extra)
    if files:
        out["files"] = {k: str(v) for k, v in files.items()}
    out["caution"] = (
        "Model predictions from a tight-binding parameter set: estimates, not measurements."
    )
    return out


def write_summary(path: str | Path, summary: dict) -> Path:
    """Write ``summary.json`` atomically."""
    return write_json(path, summary)
