"""One entry for the DOS of a structure by any method: k-mesh, VCA, CPA, charge neutrality, spin.

:func:`dos_by_method` is what the command-line jobs and campaigns call. It always returns the
DOS and a record for ``summary.json`` that states what was done and why:

``alloy="vca"`` / ``"cpa"``
    the structure must come from a ``random`` or ``sqs`` spec; its composition and parent
    lattice are used instead of the decorated supercell (:mod:`valband.alloy.vca`,
    :mod:`valband.alloy.cpa`; CPA needs a Lorentzian broadening η — the DOS width is used).
``neutral="auto"`` (default), ``"off"``, ``"site"``, ``"element"``, ``"layer"``
    charge self-consistency by local charge neutrality (:mod:`valband.alloy.neutrality`). With
    ``"auto"`` it is on, per site, for every structure that is not a single element with all
    sites symmetry-equivalent (alloys, compounds, slabs, overlayers, defective or distorted
    cells) and off for such a pure cell, whose sites are neutral by symmetry
    (:func:`neutrality_choice`). "layer" needs a slab or overlayer spec.
``soc=None`` (automatic), ``True``, ``False``; ``magnetic``
    spin–orbit coupling and Stoner magnetism (:mod:`valband.spin`). Automatic spin–orbit is on
    for spectra (``context="spectra"``) of structures with an element heavier than Kr and off
    otherwise (:func:`spin_orbit_choice`).

Neutrality combined with spin: the shifts are solved on the scalar-relativistic,
non-magnetic model and the spin run is made on the shifted model (spin–orbit coupling moves
site charges little, since Tr L·S = 0 on every shell; the record says so).
"""

from __future__ import annotations

import dataclasses

from valband.errors import SettingsError

__all__ = ["dos_by_method", "neutrality_choice", "spin_orbit_choice", "ALLOY_METHODS",
           "NEUTRAL_MODES", "NEUTRAL_CHOICES", "SOC_HEAVY_Z", "alloy_parent"]

ALLOY_METHODS = ("supercell", "vca", "cpa")
NEUTRAL_MODES = ("site", "element", "layer")
#: What ``neutral`` accepts: the modes, "auto" (the default rule) and "off".
NEUTRAL_CHOICES = ("auto", "off") + NEUTRAL_MODES
#: k-divisions of the neutrality loop relative to the DOS mesh (NeutralitySettings.mesh_scale).
DEFAULT_LOOP_MESH_SCALE = 0.5
#: Largest residual (electrons per site) of the coarse loop's shifts on the DOS mesh before the
#: loop is run again on the DOS mesh itself (≈ 10–30 meV of shift at metallic local DOS).
FINAL_MESH_TOLERANCE = 1e-2
#: Automatic spin–orbit in spectra for structures holding an element with Z above this (Kr).
SOC_HEAVY_Z = 36


def alloy_parent(info: dict):
    """Parent lattice (one site) and composition of a ``random``/``sqs`` spec's info."""
    from ase.build import bulk

    from valband.structure import Structure

    if info.get("kind") not in ("random", "sqs"):
        raise SettingsError(f"VCA and CPA need a random alloy spec such as 'random "
                            f"Cu0.75Pd0.25 fcc 2x2x2 seed=1' (composition and lattice); got "
                            f"{info.get('kind', 'a structure file')}")
    comp = dict(info["composition"])
    words = str(info["parent"]).split()
    lattice = words[0]
    opts = dict(w.split("=", 1) for w in words[1:])
    kwargs = {k: float(v) for k, v in opts.items() if k in ("a", "c")}
    atoms = bulk(next(iter(comp)), lattice, **kwargs)
    return Structure.from_atoms(atoms, source=info["parent"]), comp


def neutrality_choice(structure, requested: str = "auto", *, alloy: str = "supercell",
                      charged: bool = False) -> tuple[str | None, str]:
    """Return the neutrality mode to run (or None) and the reason, for summary and stdout.

    Parameters
    ----------
    structure : valband.structure.Structure
    requested : "auto", "off", "site", "element" or "layer"
    alloy : the alloy method; VCA and CPA have one effective site and run without neutrality
    charged : True when the electron count was set by hand (``--electrons``): a charged cell
        cannot be neutral site by site, so "auto" turns neutrality off
    """
    if requested not in NEUTRAL_CHOICES:
        raise SettingsError(f"neutrality {requested!r}: accepted {', '.join(NEUTRAL_CHOICES)}")
    if requested == "off":
        return None, "switched off (--neutral off)"
    if requested != "auto":
        return requested, f"requested (--neutral {requested})"
    if alloy != "supercell":
        return None, f"{alloy.upper()} has one effective site (no local neutrality)"
    if charged:
        return None, "the electron count was set by hand (a charged cell is not neutral by site)"
    elements = sorted(set(structure.symbols))
    if len(elements) > 1:
        return "site", f"{len(elements)} elements ({', '.join(elements)})"
    from valband.kspace.symmetry import equivalent_sites

    n_classes = len(set(equivalent_sites(structure).tolist()))
    if n_classes == 1:
        return None, "one element, all sites symmetry-equivalent (neutral by symmetry)"
    return "site", f"one element on {n_classes} inequivalent kinds of site (surface or defect)"


def spin_orbit_choice(structure, requested: bool | None = None,
                      context: str = "dos") -> tuple[bool, str]:
    """Whether to add spin–orbit coupling, and the reason.

    ``requested=None`` is automatic: on for spectra (``context="spectra"``) of structures with an
    element heavier than Kr (4d and 5d metals and beyond, whose d doublets photoemission
    resolves), off elsewhere (the first moment of a shell's DOS, the d-band centre, does not
    change under λL·S, since Tr L·S = 0, and the doubled basis costs 4–8×).
    """
    from ase.data import atomic_numbers

    if requested is not None:
        return bool(requested), "requested (--soc)" if requested else "switched off (--no-soc)"
    heavy = sorted({s for s in structure.symbols if atomic_numbers[s] > SOC_HEAVY_Z})
    if context != "spectra":
        return False, "off by default outside spectra (d-band centres are unchanged by λL·S)"
    if heavy:
        return True, f"automatic for spectra: {', '.join(heavy)} heavier than Kr"
    return False, "automatic for spectra: no element heavier than Kr"


def dos_by_method(model, info: dict, settings, *, params, alloy: str = "supercell",
                  neutral: str = "auto", soc: bool | None = False, magnetic: bool = False,
                  stoner=None, initial_moment=None, order=None, context: str = "dos",
                  neutrality=None, progress: bool = False):
    """DOS by the requested method and the record of what was done: ``(DOSResult, dict)``.

    Combinations: one alloy method (VCA, CPA) with nothing else; neutrality with spin–orbit
    and/or magnetism (module docstring); stated errors otherwise. ``neutrality`` takes
    :class:`valband.alloy.NeutralitySettings`. A neutrality loop that does not converge raises
    :class:`valband.errors.CalculationError` with its iterations and residual.
    """
    if alloy not in ALLOY_METHODS:
        raise SettingsError(f"alloy method {alloy!r}: accepted {', '.join(ALLOY_METHODS)}")
    charged = getattr(settings, "n_electrons", None) is not None
    mode, why = neutrality_choice(model.structure, neutral, alloy=alloy, charged=charged)
    use_soc, soc_why = spin_orbit_choice(model.structure, soc, context)
    spin = bool(use_soc or magnetic)
    chosen = [n for n, on in (("--alloy-method " + alloy, alloy != "supercell"),
                              ("--neutral", mode is not None), ("--soc/--magnetic", spin)) if on]
    if alloy != "supercell" and len(chosen) > 1:
        raise SettingsError(f"{' and '.join(chosen)} cannot be combined; VCA and CPA run alone")
    if not spin and (stoner or initial_moment is not None or order):
        raise SettingsError("--stoner, --initial-moment and --order need --magnetic")
    if alloy != "supercell":
        return _alloy_dos(model, info, settings, params, alloy, progress)

    final = None
    record: dict = {"neutrality": {"mode": mode, "requested": neutral, "reason": why},
                    "spin_orbit": {"on": use_soc, "reason": soc_why}}
    if mode is not None:
        from valband.alloy import (
            NeutralitySettings,
            corrected_shifts,
            shifted_model,
            site_charge_residuals,
            solve_neutrality,
        )
        from valband.kspace import parse_mesh

        if mode == "layer" and info.get("kind") not in ("slab", "overlayer"):
            raise SettingsError("--neutral layer needs a slab or overlayer spec (e.g. 'slab Pt "
                                "fcc111 layers=5'); use --neutral site or element for bulk cells")
        groups = info if mode == "layer" else None
        loop = neutrality or NeutralitySettings(mesh_scale=DEFAULT_LOOP_MESH_SCALE)
        report = solve_neutrality(model, settings, mode, groups, params=params, neutrality=loop)
        shifted = shifted_model(model, report.site_shifts)
        final = None
        if loop.loop_mesh(settings.mesh) != parse_mesh(settings.mesh):
            from valband.workflows import compute_dos

            record["neutrality"]["coarse_loop_mesh"] = list(loop.loop_mesh(settings.mesh))

            final = compute_dos(shifted, settings, progress=progress)
            worst = max(abs(v) for v in site_charge_residuals(final, report).values())
            if worst > FINAL_MESH_TOLERANCE:   # one Newton step on the DOS mesh
                v = corrected_shifts(final, report, loop.min_dos)
                trial = compute_dos(shifted_model(model, v), settings, progress=progress)
                moved = dataclasses.replace(report, site_shifts=v)
                after = max(abs(r) for r in site_charge_residuals(trial, moved).values())
                record["neutrality"] |= {"coarse_residual_on_dos_mesh": worst,
                                         "newton_step_on_dos_mesh": True}
                if after < worst:
                    shifted, final, worst = shifted_model(model, v), trial, after
                    report = _with_shifts(report, v)
            if worst > FINAL_MESH_TOLERANCE:   # not enough: go on from there on the DOS mesh
                coarse = report.iterations
                loop = dataclasses.replace(loop, mesh_scale=1.0)
                report = solve_neutrality(model, settings, mode, groups, params=params,
                                          neutrality=loop, initial_shifts=report.site_shifts)
                shifted, final = shifted_model(model, report.site_shifts), None
                record["neutrality"] |= {"coarse_loop_iterations": coarse,
                                         "residual_before_dos_mesh_loop": worst}
                worst = report.max_residual
            record["neutrality"]["final_mesh_max_residual_per_site"] = worst
        record["neutrality"] |= {"converged": True, "iterations": report.iterations,
                                 "max_residual_per_site": report.max_residual,
                                 "loop_mesh": list(loop.loop_mesh(settings.mesh))}
        record["report"] = report.to_dict()
        model = shifted
    names = (["local charge neutrality per " + mode] if mode else []) + (
        ["spin-orbit"] if use_soc else []) + (["Stoner magnetism"] if magnetic else [])
    record["method"] = " + ".join(names) if names else "k-mesh"
    if not spin:
        from valband.workflows import compute_dos

        dos = final if final is not None else compute_dos(model, settings, progress=progress)
        if mode is not None:
            dos = dataclasses.replace(dos, settings={**dos.settings,
                                                     "neutrality": record["report"]})
        return dos, record
    from valband.spin import spin_dos

    res = spin_dos(model, settings, soc=use_soc, magnetic=magnetic, params=params, stoner=stoner,
                   initial_moment=initial_moment, order=order, progress=progress)
    record["spin"] = res.summary()
    if mode is not None:
        record["neutrality"]["note"] = ("shifts solved on the scalar-relativistic, non-magnetic "
                                        "model; the spin run uses the shifted model")
    return res.total, record


def _with_shifts(report, site_shifts):
    """Return the report with the site and group shifts after a step on the DOS mesh."""
    groups = {g: float(site_shifts[list(idx)].mean()) for g, idx in report.groups.items()}
    return dataclasses.replace(report, site_shifts=site_shifts, group_shifts=groups)


def _alloy_dos(model, info, settings, params, alloy, progress):
    """VCA or CPA DOS of a random/SQS spec's parent lattice and composition."""
    if alloy == "vca":
        from valband.alloy import vca_model
        from valband.workflows import compute_dos

        parent, comp = alloy_parent(info)
        dos = compute_dos(vca_model(parent, comp, params), settings, progress=progress)
        return dos, {"method": "virtual crystal approximation", "composition": comp,
                     "parent": info["parent"]}
    from valband.alloy import CPASettings, cpa_solve
    from valband.params import orthogonal_counterpart

    parent, comp = alloy_parent(info)
    lor = dataclasses.replace(settings, method="lorentzian")
    used = orthogonal_counterpart(params)
    res = cpa_solve(parent, comp, used, lor, CPASettings(eta=settings.width))
    rec = {"method": "coherent potential approximation", "composition": comp,
           "parent": info["parent"], "eta_eV": settings.width,
           "parameter_set_used": {"name": used.name, "version": used.version,
                                  "orthogonal_counterpart_of": None if used is params
                                  else params.name},
           "report": res.dos.settings.get("cpa")}
    if settings.method != "lorentzian":
        rec["note"] = (f"CPA evaluates the Green function at E + iη: the DOS is Lorentzian "
                       f"with η = {settings.width} eV (the --method was {settings.method})")
    return res.dos, rec
