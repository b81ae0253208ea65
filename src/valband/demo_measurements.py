"""INVENTED "measured" valence-band spectra of the demo scenario, made by valband itself.

The fictional Halvard Ridge group's "beam time" is simulated: for each demo candidate with an
entry in :data:`INVENTED_SETTINGS` ``["candidates"]``, the Al Kα valence-band spectrum of the
model is broadened with an "instrument" resolution and hole lifetime of our choosing, moved by
a calibration offset (the spectrometer's Fermi level is off, as it often is before
calibration), given a Shirley-type inelastic background and a constant dark count, scaled to a
peak count rate and drawn with Poisson noise from a seeded generator. These are **not
measurements**; they exist so that ``valband demo`` and the examples can show a fit.

The result is one ISO 14976 (VAMAS) file with one block per candidate, shipped twice
(``examples/demo-measurements/`` for users, ``valband/data/demo/measurements/`` for the
installed demo; a test keeps them identical). Regenerate both with::

    python -m valband.demo_measurements --write-shipped
"""

from __future__ import annotations

import argparse
from importlib import resources
from pathlib import Path

import numpy as np

__all__ = ["INVENTED_SETTINGS", "FILE_NAME", "make_invented_spectra", "write_invented_file",
           "shipped_file"]

FILE_NAME = "halvard-ridge-valence-bands.vms"

#: d-band correction of the model that made the shipped invented spectra ("auto": the
#: program's default photoemission correction). The demo's simulate and compare use the same
#: value, so that model and "measurement" agree.
INVENTED_D_CORRECTION = "auto"

#: Everything that makes the invented spectra (recorded in the file's comment lines).
INVENTED_SETTINGS: dict = {
    "seed": 20261202,
    "params": "valband-tc2-2026",
    "method": "the program's defaults for spectra (charge neutrality and spin-orbit automatic)",
    "mesh": "16",
    "photon": "Al-Ka",
    "resolution_fwhm_eV": 0.45,
    "lifetime": (0.05, 0.03),
    "calibration_offset_eV": 0.12,
    "shirley_k_per_eV": 0.03,
    "dark_counts": 40.0,
    "peak_counts": 2.0e4,
    "binding_energy_range_eV": (-2.0, 10.0),
    "step_eV": 0.01,
    "candidates": ("Cu", "Cu3Pd", "CuPd", "Pd"),
}


def shipped_file() -> Path:
    """Return the path of the installed copy of the invented VAMAS file."""
    return Path(str(resources.files("valband") / "data" / "demo" / "measurements" / FILE_NAME))


def make_invented_spectra(settings: dict = INVENTED_SETTINGS) -> list:
    """One invented MeasuredSpectrum per candidate (block name = candidate name)."""
    from valband.demo import demo_candidates
    from valband.params import load_parameter_set
    from valband.spectra import MeasuredSpectrum, simulate_spectrum
    from valband.structure import read_structure
    from valband.tb import build_model
    from valband.workflows import DOSSettings
    from valband.workflows.methods import dos_by_method

    s = settings
    _, cands = demo_candidates()
    by_name = {c["name"]: c for c in cands}
    pset = load_parameter_set(s["params"])
    seeds = np.random.SeedSequence(s["seed"]).spawn(len(s["candidates"]))
    lo, hi = s["binding_energy_range_eV"]
    be = np.round(np.arange(lo, hi + 0.5 * s["step_eV"], s["step_eV"]), 10)
    out = []
    for name, seq in zip(s["candidates"], seeds, strict=True):
        model = build_model(read_structure(by_name[name]["path"]), pset)
        dos, _ = dos_by_method(model, {"kind": "file"}, DOSSettings(mesh=s["mesh"], step=0.01),
                               params=pset, soc=None, context="spectra")
        spec = simulate_spectrum(dos, s["photon"], gaussian_fwhm=s["resolution_fwhm_eV"],
                                 lorentz=tuple(s["lifetime"]), keep_area=False,
                                 inelastic=("shirley", s["shirley_k_per_eV"]),
                                 d_correction=INVENTED_D_CORRECTION)
        shape = np.interp(be - s["calibration_offset_eV"], spec.binding_energy, spec.intensity)
        mean = s["peak_counts"] * shape / shape.max() + s["dark_counts"]
        counts = np.random.default_rng(seq).poisson(mean).astype(np.float64)
        out.append(MeasuredSpectrum(
            binding_energy=be, intensity=counts, unit="counts", block=name,
            photon_energy=spec.settings["photon_energy_eV"],
            metadata={"invented": True}))
    return out


def write_invented_file(path: str | Path, settings: dict = INVENTED_SETTINGS) -> Path:
    """Write the invented spectra as one VAMAS file with the settings in its comment lines."""
    import valband
    from valband.spectra.vamas import write_vamas

    comment = [
        "INVENTED demo data: not a measurement. Made by valband "
        f"{valband.__version__} from its own model (valband.demo_measurements).",
        "Scenario: the fictional Halvard Ridge catalysis group; see structures/README.md.",
        *[f"{k} = {v}" for k, v in settings.items()],
    ]
    return write_vamas(path, make_invented_spectra(settings), comment=comment)


def _main(argv=None) -> int:
    p = argparse.ArgumentParser(description="Regenerate the invented demo measurements.")
    p.add_argument("--write-shipped", action="store_true",
                   help="write both shipped copies (examples/ and the package data)")
    p.add_argument("--out", default=None, help="write one file here instead")
    a = p.parse_args(argv)
    if a.out:
        print(write_invented_file(a.out))
    if a.write_shipped:
        repo = Path(__file__).resolve().parents[2]
        first = write_invented_file(shipped_file())
        copy = repo / "examples" / "demo-measurements" / FILE_NAME
        copy.parent.mkdir(parents=True, exist_ok=True)
        copy.write_bytes(first.read_bytes())
        print(first, copy)
    return 0


if __name__ == "__main__":
    raise SystemExit(_main())
