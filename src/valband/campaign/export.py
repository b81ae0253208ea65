"""Flat tables of a results database: one CSV row per candidate.

Column names
    ``x_<El>`` atomic fraction of each element of the campaign's grids; ``<shell>_<q>`` the
    cell's descriptor q (centre, width, filling, skewness, kurtosis, upper_edge in eV or
    plain numbers, n_states per atom) of that shell and ``<shell>_<q>_<El>`` the element's;
    ``hv<E>_peak_be``, ``hv<E>_centroid_be`` (eV) and ``hv<E>_d_fraction`` per photon energy
    E (eV); then Fermi level (eV, absolute), sites, timings, worker and the error message.
"""

from __future__ import annotations

import csv
import io
from pathlib import Path

from valband.campaign.database import read_rows
from valband.output import SCHEMA_VERSION, atomic_write

__all__ = ["flatten", "export_csv", "DESCRIPTOR_FIELDS"]

DESCRIPTOR_FIELDS = ("centre", "width", "filling", "skewness", "kurtosis", "upper_edge",
                     "n_states")
_FRONT = ("position", "key", "status", "system", "structure", "strain", "method", "params",
          "seed", "fermi_level_eV", "n_sites")
_TAIL = ("wall_s", "cpu_s", "worker", "finished_utc", "error_type", "error")


def _column_order(name: str):
    """Descriptors by shell, quantity, then cell before elements; spectra after them."""
    if name.startswith("hv"):
        return (1, name)
    parts = name.split("_", 1)
    rest = parts[1] if len(parts) > 1 else ""
    for i, q in enumerate(DESCRIPTOR_FIELDS):
        if rest == q:
            return (0, parts[0], i, "")
        if rest.startswith(q + "_"):
            return (0, parts[0], i, rest[len(q) + 1:])
    return (2, name)


def flatten(row: dict, elements: tuple[str, ...] = ()) -> dict:
    """One flat dict of a database row (column names in the module docstring)."""
    comp = row.get("composition") or {}
    out = {"position": row["position"], "key": row["key"], "status": row["status"],
           "system": row["system"], "structure": row["structure"]}
    for e in elements:
        out[f"x_{e}"] = comp.get(e, 0.0) if comp else None
    out.update(strain=row["strain"], method=row["method"], params=row["params"],
               seed=row["seed"])
    res = row.get("results") or {}
    out["fermi_level_eV"] = res.get("fermi_level_eV")
    out["n_sites"] = res.get("n_sites")
    for shell, table in (row.get("descriptors") or {}).items():
        if not table:
            continue
        for q in DESCRIPTOR_FIELDS:
            out[f"{shell}_{q}"] = table["cell"][q]
        for el, d in table["elements"].items():
            for q in DESCRIPTOR_FIELDS:
                out[f"{shell}_{q}_{el}"] = d[q]
    for sp in res.get("spectra") or []:
        tag = f"hv{sp['photon_energy_eV']:g}"
        out[f"{tag}_peak_be"] = sp["peak_binding_energy_eV"]
        out[f"{tag}_centroid_be"] = sp["centroid_binding_energy_eV"]
        out[f"{tag}_d_fraction"] = sp["d_fraction"]
    out.update(wall_s=row["wall_s"], cpu_s=row["cpu_s"], worker=row["worker"],
               finished_utc=row["finished_utc"], error_type=row["error_type"],
               error=row["error"])
    return out


def export_csv(db_path: str | Path, out_path: str | Path, campaign=None) -> Path:
    """Write the database as CSV (atomic; ``#`` comment lines first, then a header).

    ``campaign`` (optional) supplies the element columns and the fingerprint comment; without
    it the elements are collected from the rows.
    """
    rows = read_rows(db_path)
    if campaign is not None:
        elements = campaign.elements
    else:
        found: dict[str, None] = {}
        for r in rows:
            for e in (r.get("composition") or {}):
                found.setdefault(e, None)
        elements = tuple(found)
    flat = [flatten(r, elements) for r in rows]
    seen: dict[str, None] = {}
    for f in flat:
        for k in f:
            seen.setdefault(k, None)
    front = [k for k in seen if k in _FRONT or k.startswith("x_")]
    tail = [k for k in _TAIL if k in seen]
    middle = sorted((k for k in seen if k not in front and k not in tail), key=_column_order)
    header = front + middle + tail
    buf = io.StringIO()
    buf.write(f"# valband campaign results, schema_version {SCHEMA_VERSION}\n")
    if campaign is not None:
        buf.write(f"# campaign {campaign.name}, fingerprint {campaign.fingerprint}, "
                  f"{len(campaign.candidates)} candidates, {len(rows)} rows\n")
    buf.write("# energies in eV (descriptors relative to E_F, Fermi level absolute)\n")
    w = csv.DictWriter(buf, fieldnames=header, lineterminator="\n")
    w.writeheader()
    for f in flat:
        w.writerow({k: ("" if v is None else v) for k, v in f.items()})
    out_path = Path(out_path)
    with atomic_write(out_path) as fh:
        fh.write(buf.getvalue())
    return out_path
