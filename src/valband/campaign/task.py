"""Run one candidate: build → DOS (k-mesh or KPM) → descriptors → spectra; never raises.

:func:`evaluate` is what every executor ships to its workers. It takes the candidate's JSON
inputs and returns a JSON-ready record with ``status`` "done" or "failed"; any exception of the
calculation (a missing parameter, a bad spec, a numerical failure) becomes ``status="failed"``
with its type and message, so one bad candidate never stops a campaign. Only
``KeyboardInterrupt``/``SystemExit`` pass through.

Threads: each worker runs numba with one thread (set per call) so that two candidates on two
workers do not fight over the same cores, and so that results do not depend on the executor.
"""

from __future__ import annotations

import os
import platform
import socket
import time
from datetime import UTC, datetime

__all__ = ["evaluate"]

_PARAMS: dict[str, object] = {}


def _now() -> str:
    return datetime.now(UTC).isoformat(timespec="microseconds")


def _params(ref: str):
    from valband.params import load_parameter_set

    if ref not in _PARAMS:
        _PARAMS[ref] = load_parameter_set(ref)
    return _PARAMS[ref]


def _cpa_dos(structure, info: dict, params, settings: dict, composition=None):
    """CPA DOS on a parent lattice (valband.alloy).

    The composition is the candidate's grid point when the system has one (the structure
    template then gives the one-site parent lattice, e.g. ``{A} fcc``), else that of a
    ``random …``/``sqs …`` spec; a one-site structure without a composition is its own CPA.
    """
    from valband.alloy import CPASettings, cpa_dos
    from valband.errors import SettingsError
    from valband.params import orthogonal_counterpart
    from valband.workflows import DOSSettings
    from valband.workflows.methods import alloy_parent

    if composition and structure.n_sites == 1:
        parent, comp = structure, {e: float(x) for e, x in composition.items() if x > 0}
    elif info.get("kind") in ("random", "sqs"):
        parent, comp = alloy_parent(info)
    elif structure.n_sites == 1:
        parent, comp = structure, {structure.symbols[0]: 1.0}
    else:
        raise SettingsError("method cpa needs 'random …' or 'sqs …' structure templates (a "
                            "composition on a lattice) or one-site pure end points")
    mesh = settings.get("mesh", 12)
    eta = float(settings.get("eta", settings.get("width", 0.1)))
    s = DOSSettings(mesh=tuple(mesh) if isinstance(mesh, list) else mesh, mesh_kind="gamma",
                    method="lorentzian", width=eta, step=float(settings.get("step", 0.02)))
    return cpa_dos(parent, comp, orthogonal_counterpart(params), s, CPASettings(eta=eta))


def _kmesh_dos(structure, info: dict, params, settings: dict):
    """k-mesh DOS with the CLI's charge self-consistency rule (``neutral``, default "auto")."""
    from valband.tb import build_model
    from valband.workflows import DOSSettings
    from valband.workflows.methods import dos_by_method

    mesh = settings.get("mesh", 12)
    if isinstance(mesh, list):
        mesh = tuple(mesh)
    s = DOSSettings(mesh=mesh, mesh_kind=settings.get("mesh_kind", "monkhorst-pack"),
                    method=settings.get("smearing", "gaussian"),
                    width=float(settings.get("width", 0.1)),
                    step=float(settings.get("step", 0.02)),
                    symmetry=bool(settings.get("symmetry", True)))
    return dos_by_method(build_model(structure, params), info, s, params=params,
                         neutral=settings.get("neutral", "auto"), soc=False)


def _kpm_dos(structure, info: dict, params, settings: dict, seed: int):
    """KPM DOS on the orthogonal counterpart of the set (an S solve per step costs ~300×)."""
    from valband.kpm import KPMSettings, build_sparse, compute_kpm_dos
    from valband.params import orthogonal_counterpart

    reps = tuple(settings.get("repeat", (1, 1, 1)))
    big = structure.repeat(reps) if reps != (1, 1, 1) else structure
    resolve = settings.get("resolve", "element")
    groups = None
    if resolve == "layer":
        layers = info.get("layers")
        if layers is None:
            raise ValueError("kpm resolve = 'layer' needs a slab or overlayer structure spec")
        n_img = big.n_sites // structure.n_sites
        per_site = [int(x) for x in layers] * n_img
        groups = [[i for i, lay in enumerate(per_site) if lay == k]
                  for k in sorted(set(per_site))]
        resolve = "element"
    keys = ("resolution", "accuracy", "n_moments", "n_vectors", "trace", "step", "margin",
            "memory_mb", "lanczos_steps")
    kw = {k: settings[k] for k in keys if k in settings}
    s = KPMSettings(seed=int(seed), resolve=resolve, threads=1, **kw)
    return compute_kpm_dos(build_sparse(big, orthogonal_counterpart(params)), s, groups=groups)


def _descriptors(dos, shells, window) -> dict:
    from valband.kpm import describe_kpm

    out = {}
    for shell in shells:
        if not any(c.shell == shell for c in dos.channel_labels):
            out[shell] = None  # no element of this candidate has the shell
            continue
        t = describe_kpm(dos, shell, tuple(window) if window else None)
        out[shell] = {"window_eV": list(t.window), "cell": t.cell.to_dict(),
                      "elements": {e: d.to_dict() for e, d in t.elements.items()}}
    return out


def _spectra(dos, photons, fwhm, temperature) -> list[dict]:
    import numpy as np

    from valband.atom.tables import photon_energy_of
    from valband.spectra.simulate import simulate_spectrum

    out = []
    for hv in photons:
        sp = simulate_spectrum(dos, hv, temperature=temperature, gaussian_fwhm=fwhm)
        be, y = sp.binding_energy, sp.intensity
        occ = be >= -3.0 * max(fwhm, 0.05)
        area = float(np.trapezoid(y[occ], be[occ]))
        per_el = {}
        for e in dos.elements:
            per_el[e] = float(np.trapezoid(sp.select(element=e)[occ], be[occ])) / area
        d = [c.shell == "d" for c in sp.component_labels]
        d_area = float(np.trapezoid(sp.components[np.array(d)].sum(axis=0)[occ], be[occ])) \
            if any(d) else 0.0
        out.append({
            "photon_energy_eV": photon_energy_of(hv), "photon": hv,
            "peak_binding_energy_eV": float(be[int(np.argmax(y))]),
            "centroid_binding_energy_eV": float(np.trapezoid(be[occ] * y[occ], be[occ]) / area),
            "area": area, "d_fraction": d_area / area, "element_fraction": per_el,
            "cross_sections": sp.settings["cross_sections"],
        })
    return out


def _provenance(inputs: dict, dos) -> dict:
    import numba
    import numpy
    import scipy

    import valband

    return {
        "valband_version": valband.__version__,
        "parameter_set": inputs["params"],
        "parameter_set_used": dos.provenance.get("parameter_set"),
        "structure": {k: dos.provenance.get("structure", {}).get(k)
                      for k in ("formula", "source", "n_sites", "space_group")},
        "seed": inputs["seed"],
        "software": {"python": platform.python_version(), "numpy": numpy.__version__,
                     "scipy": scipy.__version__, "numba": numba.__version__},
    }


def evaluate(inputs: dict) -> dict:
    """Compute one candidate (inputs as made by :mod:`valband.campaign.schema`).

    Returns
    -------
    dict
        ``status`` ("done" | "failed"), ``error`` and ``error_type`` (None when done),
        ``descriptors`` ({shell: {"window_eV", "cell", "elements"}}), ``results`` (Fermi level
        in eV, electrons, sites, formula, method details, spectra summaries), ``provenance``,
        ``started_utc``, ``finished_utc``, ``wall_s``, ``cpu_s``, ``worker`` (host:pid).
    """
    started, t0, c0 = _now(), time.perf_counter(), time.thread_time()
    record = {"status": "failed", "error": None, "error_type": None, "descriptors": None,
              "results": None, "provenance": None}
    try:
        import numba

        numba.set_num_threads(1)
        method = inputs["method"]
        from valband.structure import load_structure_with_info

        params = _params(inputs["params"]["ref"])
        structure, info = load_structure_with_info(inputs["structure"])
        scheme = None
        if method == "kmesh":
            dos, scheme = _kmesh_dos(structure, info, params, inputs["settings"])
        elif method == "cpa":
            dos = _cpa_dos(structure, info, params, inputs["settings"],
                           inputs.get("composition"))
        else:
            dos = _kpm_dos(structure, info, params, inputs["settings"], inputs["seed"])
        record["descriptors"] = _descriptors(dos, inputs["descriptors"], inputs["window"])
        settings = dos.settings
        details = {k: settings.get(k) for k in ("method", "n_moments", "n_vectors", "trace",
                                                 "stochastic_error_peak_rel", "width", "mesh")}
        record["results"] = {
            "fermi_level_eV": dos.fermi_level, "n_electrons": dos.n_electrons,
            "n_sites": dos.n_sites, "formula": structure.formula,
            "structure_info": {k: info.get(k) for k in ("kind", "seed", "counts", "formula")},
            "dos": details,
            "neutrality": None if scheme is None else {
                k: v for k, v in scheme["neutrality"].items()},
            "spectra": _spectra(dos, inputs["spectra"], inputs["spectrum_fwhm"],
                                inputs["temperature"]),
        }
        record["provenance"] = _provenance(inputs, dos)
        record["status"] = "done"
    except Exception as exc:  # noqa: BLE001 - every failure is recorded, the campaign goes on
        record["error_type"] = type(exc).__name__
        record["error"] = str(exc) or type(exc).__name__
    record.update(started_utc=started, finished_utc=_now(), wall_s=time.perf_counter() - t0,
                  cpu_s=time.thread_time() - c0,
                  worker=f"{socket.gethostname()}:{os.getpid()}")
    return record
