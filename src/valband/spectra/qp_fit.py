"""Fit the photoemission-calibrated d-band correction (Δ, s) of a parameter set.

One command refits and rewrites the shipped data file for a set (a few seconds per element)::

    python -m valband.spectra.qp_fit --params valband-tc2-2026            # print, write nothing
    python -m valband.spectra.qp_fit --params valband-tc2-2026 --write    # update the data file

Procedure, per element of ``valband/data/spectra/measured_d_bands.json``:

1. the fcc metal of the element at the structure builder's lattice constant, the set's model,
   spin–orbit on for elements heavier than Kr (as in ``simulate``/``compare`` by default);
   E_F from a 16³ tetrahedron DOS;
2. model bands at Γ, X and L; a feature ``P:d_top`` / ``P:d_bottom`` is the highest / lowest
   level with d weight ≥ 0.5 at point P, ``band:d_bottom`` the lowest of them over Γ, X, L;
3. weighted least squares of Δ + s·E_model = E_measured over the features with role "fit"
   (weights 1/tolerance²); Δ = 0 for metals whose d band crosses E_F (``fermi_surface_d``);
4. the residuals of the fitted features and of the held-out ones (role "held_out"), before and
   after the correction, go into the record next to Δ and s.

The file keeps other sets' entries; ``--write`` replaces only the named set's.
"""

from __future__ import annotations

import argparse
import json
import math
import sys
from importlib import resources
from pathlib import Path

import numpy as np

from valband.defaults import DEFAULT_PARAMETER_SET
from valband.errors import InputError, SettingsError
from valband.spectra.quasiparticle import DATA_FILE, QP_KIND

__all__ = ["load_measured", "model_features", "fit_element", "fit_set", "main",
           "MEASURED_FILE", "D_WEIGHT_MIN", "SOC_ABOVE_Z"]

MEASURED_FILE = "measured_d_bands.json"
#: A level counts as a d level when its d (Mulliken) weight is at least this.
D_WEIGHT_MIN = 0.5
#: Spin–orbit on for atomic numbers above Kr's (the 4d and 5d metals), as the default runs.
SOC_ABOVE_Z = 36
_POINTS = ("G", "X", "L")
_MESH = 16


def _data_path(name: str) -> Path:
    return Path(str(resources.files("valband").joinpath("data", "spectra", name)))


def load_measured(path=None) -> dict:
    """The measured d-band energies (layout in the data file's ``description``)."""
    p = Path(path) if path is not None else _data_path(MEASURED_FILE)
    try:
        data = json.loads(p.read_text("utf-8"))
    except (OSError, json.JSONDecodeError) as exc:
        raise InputError(f"measured d-band file {p}: {exc}") from None
    if data.get("kind") != "valband.measured_d_bands":
        raise InputError(f"{p}: kind {data.get('kind')!r}, expected 'valband.measured_d_bands'")
    return data


def _needs_soc(element: str) -> bool:
    from ase.data import atomic_numbers

    return atomic_numbers[element] > SOC_ABOVE_Z


def model_features(params, element: str, soc: bool | None = None) -> dict:
    """Model d-level features of fcc ``element`` (eV relative to E_F) and how they were made.

    Returns ``{"features": {name: energy}, "soc": bool, "fermi_level_eV": E_F, "mesh": n}``.
    """
    from valband.structure import build_structure
    from valband.tb import build_model
    from valband.workflows import DOSSettings, compute_bands, compute_dos

    soc = _needs_soc(element) if soc is None else bool(soc)
    model = build_model(build_structure(f"{element} fcc"), params)
    settings = DOSSettings(mesh=_MESH, method="tetrahedron", step=0.01)
    if soc:
        from valband.spin import spin_bands, spin_dos

        res = spin_dos(model, settings, soc=True, params=params)
        e_f = res.fermi_level
        bands = spin_bands(res, path="GXL", npoints=30)["both"]
    else:
        e_f = compute_dos(model, settings).fermi_level
        bands = compute_bands(model, path="GXL", npoints=30, fermi_level=e_f)
    d_w = sum(bands.character[:, :, i] for i, c in enumerate(bands.channel_labels)
              if c.shell == "d")
    feats = {}
    letters = {"Γ": "G", "G": "G", "X": "X", "L": "L"}
    for lab, pos in zip(bands.labels, bands.label_positions, strict=True):
        name = letters.get(lab)
        if name is None or f"{name}:d_top" in feats:
            continue
        i = int(np.argmin(np.abs(bands.distance - pos)))
        e, w = bands.energies[i], d_w[i]
        d_levels = e[w >= D_WEIGHT_MIN]
        if d_levels.size == 0:
            raise SettingsError(f"{element}: no level with d weight ≥ {D_WEIGHT_MIN} at {lab}")
        feats[f"{name}:d_top"] = float(d_levels.max())
        feats[f"{name}:d_bottom"] = float(d_levels.min())
    feats["band:d_bottom"] = min(feats[f"{p}:d_bottom"] for p in _POINTS)
    return {"features": feats, "soc": soc, "fermi_level_eV": float(e_f), "mesh": _MESH}


def fit_element(element: str, entry: dict, model: dict) -> dict:
    """Δ, s of one element from its measured ``entry`` and the ``model`` features."""
    feats = entry["features"]
    fit_rows = [f for f in feats if f["role"] == "fit"]
    if not fit_rows:
        raise SettingsError(f"{element}: no feature with role 'fit'")
    fs = entry.get("fermi_surface_d", False)
    e_mod = np.array([model["features"][f["feature"]] for f in fit_rows])
    e_meas = np.array([f["energy_eV"] for f in fit_rows])
    w = 1.0 / np.array([f["tolerance_eV"] for f in fit_rows])
    if fs:
        delta = 0.0
        scale = float(np.sum(w * w * e_mod * e_meas) / np.sum(w * w * e_mod * e_mod))
    else:
        if len(fit_rows) < 2:
            raise SettingsError(f"{element}: Δ and s need at least two fitted features")
        a = np.stack([np.ones_like(e_mod), e_mod], axis=1) * w[:, None]
        delta, scale = (float(v) for v in np.linalg.lstsq(a, e_meas * w, rcond=None)[0])
    rows = []
    for f in feats:
        em = model["features"][f["feature"]]
        corr = delta + scale * em
        rows.append({"feature": f["feature"], "label": f.get("label", ""), "role": f["role"],
                     "measured_eV": f["energy_eV"], "tolerance_eV": f["tolerance_eV"],
                     "model_eV": round(em, 4), "corrected_eV": round(corr, 4),
                     "error_before_eV": round(em - f["energy_eV"], 4),
                     "error_after_eV": round(corr - f["energy_eV"], 4),
                     "source": f["source"]})

    def rms(role, key):
        v = [r[key] for r in rows if r["role"] == role]
        return round(math.sqrt(sum(x * x for x in v) / len(v)), 4) if v else None

    return {"delta_eV": round(delta, 4), "scale": round(scale, 4),
            "delta_fixed_at_zero": bool(fs),
            "fitted_to": ", ".join(f"{f.get('label') or f['feature']} {f['energy_eV']:g} eV"
                                   for f in fit_rows),
            "spin_orbit": model["soc"], "fermi_level_eV": round(model["fermi_level_eV"], 4),
            "mesh": model["mesh"], "features": rows,
            "rms_fit_before_eV": rms("fit", "error_before_eV"),
            "rms_fit_after_eV": rms("fit", "error_after_eV"),
            "rms_held_out_before_eV": rms("held_out", "error_before_eV"),
            "rms_held_out_after_eV": rms("held_out", "error_after_eV")}


def fit_set(params_name: str, measured: dict | None = None, elements=None) -> dict:
    """The data-file entry of one parameter set: ``{"elements": {El: record}, ...}``."""
    from valband.params import load_parameter_set

    ps = load_parameter_set(params_name)
    meas = measured or load_measured()
    out = {}
    for el, entry in meas["elements"].items():
        if elements is not None and el not in elements:
            continue
        out[el] = fit_element(el, entry, model_features(ps, el))
    return {"parameter_set": str(ps.name), "parameter_version": str(getattr(ps, "version", "")),
            "command": f"python -m valband.spectra.qp_fit --params {params_name} --write",
            "elements": out, "not_fitted": meas.get("not_fitted", {})}


def _write(entry: dict, path: Path) -> None:
    doc = {"kind": QP_KIND, "sets": {}}
    if path.exists():
        doc = json.loads(path.read_text("utf-8"))
    doc["kind"] = QP_KIND
    doc["description"] = (
        "Photoemission-calibrated d-band correction E' - E_F = delta + scale*(E - E_F) of the "
        "d-projected weight, per parameter set and element, fitted by valband.spectra.qp_fit "
        "to the measured band energies of measured_d_bands.json (from memory of the cited "
        "papers, tolerances there). 'features' lists every measured value, its role (fit or "
        "held_out), the model value and the errors before and after the correction.")
    doc.setdefault("sets", {})[entry["parameter_set"]] = entry
    tmp = path.with_suffix(".tmp")
    tmp.write_text(json.dumps(doc, indent=1, ensure_ascii=False) + "\n", "utf-8")
    tmp.replace(path)


def main(argv=None) -> int:
    """Command line: fit, print a table, and with ``--write`` update the data file."""
    p = argparse.ArgumentParser(prog="python -m valband.spectra.qp_fit",
                                description="fit the photoemission d-band correction of a "
                                "parameter set")
    p.add_argument("--params", default=DEFAULT_PARAMETER_SET,
                   help="parameter set name or .toml (default: the default set)")
    p.add_argument("--write", action="store_true",
                   help=f"store the result in the package's data/spectra/{DATA_FILE}")
    p.add_argument("--out", default=None, help="write the data file here instead")
    args = p.parse_args(argv)
    entry = fit_set(args.params)
    for el, r in entry["elements"].items():
        print(f"{el}: Δ = {r['delta_eV']:+.3f} eV, s = {r['scale']:.4f}"
              f"{' (Δ fixed: d band at E_F)' if r['delta_fixed_at_zero'] else ''}; "
              f"rms fit {r['rms_fit_before_eV']} → {r['rms_fit_after_eV']} eV, held out "
              f"{r['rms_held_out_before_eV']} → {r['rms_held_out_after_eV']} eV")
        for f in r["features"]:
            print(f"   {f['role']:8s} {f['label']:28.28s} measured {f['measured_eV']:+.2f} "
                  f"model {f['model_eV']:+.2f} corrected {f['corrected_eV']:+.2f} "
                  f"(±{f['tolerance_eV']:g})")
    if args.write or args.out:
        path = Path(args.out) if args.out else _data_path(DATA_FILE)
        _write(entry, path)
        print(f"wrote {path}", file=sys.stderr)
    return 0


if __name__ == "__main__":  # pragma: no cover
    raise SystemExit(main())
