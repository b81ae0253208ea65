"""Accuracy of valband's defaults: bulk d bands of 12 metals and published alloy/surface trends.

What it computes, with the program's defaults (parameter set = ``valband.cli.common.
DEFAULT_PARAMS`` read at run time unless ``--params`` names another; default DOS settings:
Gaussian σ = 0.1 eV, 0.01 eV grid, descriptor window E_F − 15 … E_F + 5 eV):

(a) per metal (Fe bcc; Co, Ru, Os hcp; the others fcc; ASE reference lattice constants, as in
    ``benchmarks/accuracy_params.py``, whose reference table and structures are reused): the
    d-band centre and width of the bulk metal (k-mesh 24³, the program default), against the
    d-band centres of Ruban, Hammer, Stoltze, Skriver & Nørskov, J. Mol. Catal. A 115, 421
    (1997), from memory, each row marked "fit" or "held out" by what the set was fitted to
    (:func:`fitted_elements`). No published widths are in the repository: the widths are
    listed without a reference.
(b) per trend of ``tests/data/dband_trends.toml`` (alloy components, overlayers, Pt–M–Pt
    subsurface alloys, strain, a slab's central layer): model vs published vs source, both
    plain and with local charge neutrality per site (:mod:`valband.alloy.trends`; the rule the
    program is adopting as its default decides which one is "model"). k-meshes: about 50 Å ·
    |b|/2π points per reciprocal vector (24 on primitive fcc Cu), one point along a slab
    normal. Each trend is also computed at the coarse density of the CI tests
    (``tests/physics/test_trends.py``) and the JSON records whether the sign and the verdict
    (agrees or not) are the same.

It writes ``benchmarks/accuracy.json`` (settings, set name and version, versions, date, every
number) and prints the Markdown section rendered from that JSON by :func:`render`; with
``--write-readme`` it replaces the text between ``<!-- accuracy:begin -->`` and
``<!-- accuracy:end -->`` in README.md (or ``--readme PATH``). ``--render-only`` renders the
existing JSON without computing.

Run (one core, ~5 minutes):
``PYTHONPATH=src python benchmarks/accuracy.py [--params SET] [--write-readme]``.
"""

from __future__ import annotations

import argparse
import datetime
import json
import math
import platform
import sys
import time
import tomllib
from pathlib import Path

HERE = Path(__file__).resolve().parent
REPO = HERE.parent
JSON_PATH = HERE / "accuracy.json"
TRENDS_PATH = REPO / "tests" / "data" / "dband_trends.toml"
README = REPO / "README.md"
BEGIN, END = "<!-- accuracy:begin -->", "<!-- accuracy:end -->"

#: k-point density (Å) of the benchmark and of the CI tests (valband.alloy.trends.mesh_for).
DENSITY = 50.0
TEST_DENSITY = 30.0

#: Elements each parameter set's free choices were fitted to, where its provenance does not
#: say (valband-tc-2026: confinement radii fitted to Ni, Cu, Pd, Pt, Au d-band centres and Cu
#: band energies; valband/twocentre/confinement.py).
FITTED_TO = {"valband-tc-2026": ("Ni", "Cu", "Pd", "Pt", "Au"),
             # confinement refitted to band shape and the centres of Ni, Cu, Pd, Pt
             # (valband/data/targets/confinement-targets.toml, benchmarks/fit_confinement.py)
             "valband-tc2-2026": ("Ni", "Cu", "Pd", "Pt")}


def _accuracy_params():
    sys.path.insert(0, str(HERE))
    try:
        import accuracy_params
    finally:
        sys.path.pop(0)
    return accuracy_params


def fitted_elements(ps) -> tuple[tuple[str, ...] | None, str]:
    """Elements whose references entered the set's fit, and where that was read.

    The set's provenance (JSON) is searched for ``fit`` / ``fit_targets`` / ``fitted_to``
    entries naming elements; otherwise :data:`FITTED_TO`; otherwise ``(None, "not recorded")``.
    """
    try:
        prov = json.loads(ps.provenance)
    except (TypeError, ValueError):
        prov = {}

    def find(obj, depth=0):
        if not isinstance(obj, dict) or depth > 4:
            return None
        for key in ("fitted_to", "fit_elements", "fit_targets", "fit"):
            v = obj.get(key)
            if isinstance(v, dict):
                v = v.get("elements", v.get("fit_elements"))
            if isinstance(v, list | tuple) and v and all(isinstance(e, str) for e in v):
                return tuple(v)
        for v in obj.values():
            got = find(v, depth + 1)
            if got:
                return got
        return None

    got = find(prov)
    if got:
        return got, "parameter-set provenance"
    if ps.name in FITTED_TO:
        return FITTED_TO[ps.name], "benchmarks/accuracy.py FITTED_TO"
    return None, "not recorded"


def metal_rows(ps, fitted) -> list[dict]:
    """Bulk d-band centre and width of each metal of accuracy_params.RUBAN (module docstring)."""
    from valband.structure import build_structure
    from valband.tb import build_model
    from valband.workflows import DOSSettings, compute_dos, describe

    ap = _accuracy_params()
    rows = []
    for el, ref in ap.RUBAN.items():
        spec = ap._spec(el)
        dos = compute_dos(build_model(build_structure(spec), ps), DOSSettings())
        d = describe(dos, "d").elements[el]
        rows.append({
            "element": el, "structure": spec, "mesh": DOSSettings().mesh,
            "centre": d.centre, "width": d.width, "published_centre": ref,
            "error": d.centre - ref,
            "role": "unknown" if fitted is None else ("fit" if el in fitted else "held out"),
        })
    return rows


def _mae(rows, role=None, skip=()):
    e = [abs(r["error"]) for r in rows if (role is None or r["role"] == role)
         and r["element"] not in skip]
    return (sum(e) / len(e), len(e)) if e else (float("nan"), 0)


def trend_rows(ps, density: float, test_density: float) -> list[dict]:
    """Every case of the trends file at ``density`` and (sign check) at ``test_density``."""
    from valband.alloy.trends import case_from_dict, evaluate_case

    cases = [case_from_dict(c) for c in tomllib.loads(TRENDS_PATH.read_text())["case"]]
    rows = []
    for case in cases:
        t0 = time.perf_counter()
        r = evaluate_case(case, ps, density).to_dict()
        r["seconds"] = round(time.perf_counter() - t0, 2)
        dens = case.ci_density or test_density
        q = evaluate_case(case, ps, dens)
        r["test_density"] = {"density_A": dens, "model": q.value, "plain": q.plain,
                             "neutral": q.neutral, "agrees": case.agrees(q.value),
                             "same_verdict": case.agrees(q.value) == r["agrees"],
                             "same_sign": bool(case.published == 0 or math.copysign(1, q.value)
                                               == math.copysign(1, r["model"]))}
        rows.append(r)
        print(f"  {case.id:18s} model {r['model']:+.3f} (plain {r['plain']:+.3f}, neutral "
              f"{r['neutral']:+.3f}) published {case.published:+.2f} ± {case.tolerance:.2f}  "
              f"{r['seconds']:.1f} s", flush=True)
    return rows


def compute(params_name: str | None = None, density: float = DENSITY,
            test_density: float = TEST_DENSITY) -> dict:
    """All numbers of the accuracy section, as a JSON-ready dict."""
    import ase
    import numba
    import numpy
    import scipy
    import spglib

    import valband
    from valband.cli.common import DEFAULT_PARAMS
    from valband.params import load_parameter_set
    from valband.workflows import DOSSettings
    from valband.workflows.describe import DEFAULT_WINDOW

    t0 = time.perf_counter()
    name = params_name or DEFAULT_PARAMS
    ps = load_parameter_set(name)
    fitted, fitted_from = fitted_elements(ps)
    print(f"parameter set {ps.name} {ps.version}; fitted to {fitted} ({fitted_from})", flush=True)
    metals = metal_rows(ps, fitted)
    t1 = time.perf_counter()
    print(f"metals: {t1 - t0:.0f} s", flush=True)
    trends = trend_rows(ps, density, test_density)
    t2 = time.perf_counter()
    s = DOSSettings()
    return {
        "generated": datetime.datetime.now(datetime.UTC).strftime("%Y-%m-%d %H:%M UTC"),
        "parameter_set": {"name": ps.name, "version": ps.version, "default": name == DEFAULT_PARAMS,
                          "fitted_to": list(fitted) if fitted else None,
                          "fitted_to_from": fitted_from},
        "versions": {"valband": valband.__version__, "python": platform.python_version(),
                     "numpy": numpy.__version__, "scipy": scipy.__version__,
                     "ase": ase.__version__, "spglib": spglib.__version__,
                     "numba": numba.__version__},
        "settings": {"method": s.method, "width_eV": s.width, "step_eV": s.step,
                     "window_eV": list(DEFAULT_WINDOW), "bulk_mesh": s.mesh,
                     "trend_k_density_A": density, "test_k_density_A": test_density,
                     "neutrality": "site (on every structure but a single element with all "
                                   "sites equivalent)"},
        "metals": metals,
        "metals_summary": {
            "mae_all": _mae(metals)[0],
            "mae_fit": _mae(metals, "fit")[0], "n_fit": _mae(metals, "fit")[1],
            "mae_held_out": _mae(metals, "held out")[0],
            "n_held_out": _mae(metals, "held out")[1],
            "mae_held_out_without_Os": _mae(metals, "held out", ("Os",))[0],
        },
        "trends": trends,
        "run_time_s": {"metals": round(t1 - t0, 1), "trends": round(t2 - t1, 1),
                       "total": round(t2 - t0, 1)},
    }


# ------------------------------------------------------------------------------------------
# rendering
# ------------------------------------------------------------------------------------------
def _f(x, digits=2, sign=True):
    return f"{x:+.{digits}f}" if sign else f"{x:.{digits}f}"


def render(data: dict) -> str:
    """The README accuracy section (Markdown, without the markers) from the JSON dict."""
    ps = data["parameter_set"]
    st = data["settings"]
    ms = data["metals_summary"]
    out = [
        "## Accuracy",
        "",
        f"Generated by `benchmarks/accuracy.py` from `benchmarks/accuracy.json` "
        f"({data['generated']}, valband {data['versions']['valband']}, parameter set "
        f"`{ps['name']}` version {ps['version']}{' (the default)' if ps['default'] else ''}). "
        "Do not edit by hand: a test compares this section with the rendering of the JSON.",
        "",
        "> These are model estimates compared with published values, several of them recalled "
        "from memory (marked so in the sources); they show where the defaults can be trusted "
        "for trends and where they cannot.",
        "",
        f"Settings: Gaussian σ = {st['width_eV']:g} eV, grid step {st['step_eV']:g} eV; d-band "
        f"centre = first moment of the d partial DOS per atom over E_F "
        f"{st['window_eV'][0]:+g} … {st['window_eV'][1]:+g} eV; width = square root of the "
        f"second central moment there; bulk k-mesh {st['bulk_mesh']}³; trend meshes "
        f"{st['trend_k_density_A']:g} Å·|b|/2π points per reciprocal vector (one along a slab "
        f"normal). Charge neutrality: {st['neutrality']}.",
        "",
        "### Bulk d bands",
        "",
        "Published centres: Ruban, Hammer, Stoltze, Skriver & Nørskov, J. Mol. Catal. A 115, "
        "421 (1997), from memory (±0.1 eV; Os ±0.3 eV). \"fit\" rows entered the parameter "
        f"set's fit ({ps['fitted_to_from']}); \"held out\" rows did not.",
        "",
        "| metal | structure | role | centre (eV) | published (eV) | error (eV) | width (eV) |",
        "|---|---|---|---:|---:|---:|---:|",
    ]
    for r in data["metals"]:
        out.append(f"| {r['element']} | {r['structure']} | {r['role']} | {_f(r['centre'])} | "
                   f"{_f(r['published_centre'])} | {_f(r['error'])} | "
                   f"{_f(r['width'], sign=False)} |")
    out += [
        "",
        f"Mean absolute error of the centre: {ms['mae_fit']:.2f} eV on the {ms['n_fit']} fit "
        f"metals, {ms['mae_held_out']:.2f} eV on the {ms['n_held_out']} held-out ones "
        f"({ms['mae_held_out_without_Os']:.2f} eV without Os); {ms['mae_all']:.2f} eV on all. "
        "No published widths are in the repository; the widths are listed for comparison.",
        "",
        "### Alloy and surface trends",
        "",
        "Shifts of the d-band centre (eV; strain: eV per % biaxial strain). *model* is what the "
        "defaults give (site neutrality wherever the rule applies); *plain* is without charge "
        "self-consistency. *agrees*: published sign and within the stated tolerance. None of "
        "these values was used in any fit.",
        "",
        "| trend | model | plain | neutral | published ± tol. | agrees | source |",
        "|---|---:|---:|---:|---:|:---:|---|",
    ]
    bad = []
    for r in data["trends"]:
        ok = "yes" if r["agrees"] else "**no**"
        if not r["agrees"]:
            bad.append(r)
        out.append(f"| {r['label']} | {_f(r['model'])} | {_f(r['plain'])} | "
                   f"{_f(r['neutral'])} | {_f(r['published'])} ± {r['tolerance']:.2f} | {ok} | "
                   f"{r['source']}; {r['note']} |")
    out += ["", "Known disagreements (each is an `xfail(strict=True)` test in "
                "`tests/physics/test_trends.py`, which fails loudly once the model agrees):", ""]
    if bad:
        for r in bad:
            out.append(f"- {r['label']}: model {_f(r['model'])} against {_f(r['published'])} ± "
                       f"{r['tolerance']:.2f} (plain {_f(r['plain'])}).")
    else:
        out.append("- none.")
    rt = data["run_time_s"]
    out += ["", f"Wall time of the run (one process): {rt['total']:.0f} s (metals "
                f"{rt['metals']:.0f} s, trends {rt['trends']:.0f} s, each trend also at the "
                "coarse mesh of the CI tests).", ""]
    return "\n".join(out).strip("\n")


def splice(readme_text: str, section: str) -> str:
    """README text with the section between the markers replaced (InputError-free: ValueError)."""
    if readme_text.count(BEGIN) != 1 or readme_text.count(END) != 1:
        raise ValueError(f"README needs exactly one {BEGIN} and one {END} marker")
    head, rest = readme_text.split(BEGIN)
    _, tail = rest.split(END)
    return f"{head}{BEGIN}\n{section}\n{END}{tail}"


def readme_section(readme_text: str) -> str:
    """The text between the markers (without the newlines next to them)."""
    if readme_text.count(BEGIN) != 1 or readme_text.count(END) != 1:
        raise ValueError(f"README needs exactly one {BEGIN} and one {END} marker")
    return readme_text.split(BEGIN)[1].split(END)[0].strip("\n")


def main(argv=None) -> int:
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--params", default=None, help="parameter set (default: the program's)")
    p.add_argument("--density", type=float, default=DENSITY, help="trend k-point density, Å")
    p.add_argument("--json", type=Path, default=JSON_PATH, help="output JSON path")
    p.add_argument("--render-only", action="store_true", help="render the existing JSON")
    p.add_argument("--write-readme", action="store_true", help="splice the section into README")
    p.add_argument("--readme", type=Path, default=README, help="README path (--write-readme)")
    args = p.parse_args(argv)
    if args.render_only:
        data = json.loads(args.json.read_text())
    else:
        data = compute(args.params, args.density)
        args.json.write_text(json.dumps(data, indent=1, ensure_ascii=False) + "\n")
    section = render(data)
    print(section)
    if args.write_readme:
        args.readme.write_text(splice(args.readme.read_text(), section))
        print(f"wrote the section into {args.readme}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
