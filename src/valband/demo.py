"""The bundled demo scenario (invented): a few Cu–Pd catalyst candidates, run end to end.

Reads ``valband/data/demo/demo-candidates.toml`` (a copy of the repository's ``structures/``),
runs DOS, descriptors and bands for each candidate into ``OUT/<name>/``, the Al Kα spectrum into
``OUT/<name>/spectrum/`` and, where the invented "beam time" file has a block for the candidate
(:mod:`valband.demo_measurements`), a fit of the model to that invented measurement into
``OUT/<name>/compare/``; then a screening table ranking the candidates by d-band centre
(``screening.csv``), the self-contained ``report.html`` and the main figure
(``figure.png``, ``figure.pdf``).
"""

from __future__ import annotations

import tomllib
from importlib import resources
from pathlib import Path

from valband.defaults import DEFAULT_PARAMETER_SET
from valband.output import prepare_out_dir, write_csv
from valband.writers import summary_of, write_summary

__all__ = ["demo_candidates", "run_demo", "DEMO_NOTE"]

DEMO_NOTE = (
    "Invented demo scenario: the Halvard Ridge catalysis group is fictional. Results are model "
    "estimates from a tight-binding parameter set, not measurements."
)

#: Parameters the demo fits to the invented measurements (the lifetime law fully free).
DEMO_FIT_FREE = ("shift", "scale", "gaussian_fwhm", "gamma0", "lifetime_a", "background")

def demo_folder() -> Path:
    """Folder of the installed demo files."""
    return Path(str(resources.files("valband") / "data" / "demo"))


def demo_candidates() -> tuple[str, list[dict]]:
    """Scenario title and the candidate list (name, file path, note)."""
    folder = demo_folder()
    spec = tomllib.loads((folder / "demo-candidates.toml").read_text())
    cands = [dict(c, path=folder / c["file"]) for c in spec["candidate"]]
    return spec["scenario"], cands


def run_demo(out_dir: str | Path, params: str = DEFAULT_PARAMETER_SET, mesh: str = "20",
             fmt: str = "png", progress: bool = False, log=print) -> dict:
    """Run every candidate; return (and write) the demo summary with its screening table."""
    from valband.demo_measurements import INVENTED_D_CORRECTION, shipped_file
    from valband.jobs import bands_job, dos_job
    from valband.params import load_parameter_set
    from valband.spectra.compare import compare_job
    from valband.spectra.io import simulate_job
    from valband.spectra.vamas import read_vamas
    from valband.structure import read_structure
    from valband.tb import build_model
    from valband.workflows import DOSSettings
    from valband.workflows.methods import dos_by_method

    out = prepare_out_dir(out_dir)
    scenario, cands = demo_candidates()
    pset = load_parameter_set(params)
    measured = {sp.block: sp for sp in read_vamas(shipped_file())}
    settings = DOSSettings(mesh=mesh)
    rows = []
    for c in cands:
        log(f"  {c['name']:8s} {c['note']}")
        structure = read_structure(c["path"])
        model = build_model(structure, pset)
        sub = out / c["name"]
        info = {"kind": "file"}
        dos, record = dos_by_method(model, info, settings, params=pset, progress=progress)
        summary, dos, table = dos_job(model, settings, sub, fmt=fmt, progress=progress, dos=dos,
                                      extra={"method": record})
        bands_job(model, sub / "bands", mesh=str(min(int(mesh.split("x")[0]), 16)), fmt=fmt,
                  progress=progress)
        spec_dos, spec_record = dos_by_method(model, info, settings, params=pset, soc=None,
                                              context="spectra", progress=progress)
        simulate_job(model, settings, sub / "spectrum", "Al-Ka", 300.0, 0.3, (0.02, 0.02),
                     (54.735610317245346, "unpolarized"), fmt, dos=spec_dos,
                     extra={"method": spec_record}, d_correction=INVENTED_D_CORRECTION)
        row = {
            "name": c["name"], "formula": model.structure.formula, "note": c["note"],
            "d_band_centre_eV": table.cell.centre, "d_band_width_eV": table.cell.width,
            "d_filling": table.cell.filling, "d_upper_edge_eV": table.cell.upper_edge,
            "dos_at_fermi": dos.value_at_fermi() / model.structure.n_sites,
            "per_element_centre_eV": {e: d.centre for e, d in table.elements.items()},
            "measured_band_centre_eV": None, "fit_shift_eV": None, "fit_reduced_chi2": None,
        }
        if c["name"] in measured:
            _, fit, _, _ = compare_job(model, settings, measured[c["name"]], sub / "compare",
                                       photon_energy="Al-Ka", fmt=fmt, dos=spec_dos,
                                       free=DEMO_FIT_FREE, extra={"method": spec_record},
                                       d_correction=INVENTED_D_CORRECTION)
            row |= {"measured_band_centre_eV": fit.band_centre.get("measured_eV"),
                    "fit_shift_eV": fit.value("shift"), "fit_shift_err_eV": fit.error("shift"),
                    "fit_reduced_chi2": fit.reduced_chi2, "fit_r_factor": fit.r_factor}
        rows.append(row)
    rows.sort(key=lambda r: r["d_band_centre_eV"], reverse=True)
    cautions = [f"Caution ({pset.name}): {pset.caution}"] if pset.caution else []
    nan = float("nan")
    write_csv(
        out / "screening.csv",
        ["rank", "name", "formula", "d_band_centre_eV", "d_band_width_eV", "d_filling",
         "d_upper_edge_eV", "dos_at_fermi_per_atom", "measured_band_centre_eV", "fit_shift_eV",
         "fit_reduced_chi2"],
        [list(range(1, len(rows) + 1)), [r["name"] for r in rows], [r["formula"] for r in rows]]
        + [[r[k] for r in rows] for k in (
            "d_band_centre_eV", "d_band_width_eV", "d_filling", "d_upper_edge_eV", "dos_at_fermi")]
        + [[nan if r[k] is None else r[k] for r in rows]
           for k in ("measured_band_centre_eV", "fit_shift_eV", "fit_reduced_chi2")],
        comments=[DEMO_NOTE, *cautions,
                  "energies in eV relative to E_F; DOS at E_F in states/eV/atom (both spins)",
                  "measured_band_centre_eV and fit_*: fit to the INVENTED Al Ka spectra of "
                  "demo-measurements (nan: no invented spectrum for this candidate)",
                  f"parameter set {pset.name} {pset.version}; mesh {mesh}; Gaussian 0.1 eV"],
    )
    summary = summary_of("demo", None, extra={
        "scenario": scenario, "note": DEMO_NOTE,
        "parameter_set_caution": cautions[0] if cautions else None,
        "parameter_set": {"name": pset.name, "version": pset.version},
        "settings": {"mesh": mesh, "method": "gaussian", "width": 0.1},
        "screening": rows,
        "invented_measurements": str(shipped_file().name),
    }, files={"screening": out / "screening.csv", "report": out / "report.html",
              "figure": out / "figure.png", "figure_pdf": out / "figure.pdf"}
       | {r["name"]: out / r["name"] for r in rows})
    write_summary(out / "summary.json", summary)
    from valband.report.figure import main_figure
    from valband.report.html import build_report

    main_figure(out, out / "figure.png")
    main_figure(out, out / "figure.pdf")
    build_report(out)
    return summary
