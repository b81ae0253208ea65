"""One entry for the DOS of a structure by any method: k-mesh, VCA, CPA, charge neutrality, spin.

:func:`dos_by_method` is what the command-line jobs call when an option asks for more than the
plain k-mesh DOS of the structure as given:

``alloy="vca"`` / ``"cpa"``
    the structure must come from a ``random`` or ``sqs`` spec; its composition and parent
    lattice are used instead of the decorated supercell (:mod:`valband.alloy.vca`,
    :mod:`valband.alloy.cpa`; CPA needs a Lorentzian broadening η — the DOS width is used).
``neutral="site"|"element"|"layer"``
    self-consistent onsite shifts for local charge neutrality (:mod:`valband.alloy.neutrality`;
    "layer" needs a slab or overlayer spec).
``soc`` / ``magnetic``
    spin–orbit coupling and Stoner magnetism (:mod:`valband.spin`).

It returns the DOS and a record for ``summary.json`` (``None`` when nothing special was asked,
so the caller computes the plain DOS as before).
"""

from __future__ import annotations

import dataclasses

from valband.errors import SettingsError

__all__ = ["dos_by_method", "ALLOY_METHODS", "NEUTRAL_MODES", "alloy_parent"]

ALLOY_METHODS = ("supercell", "vca", "cpa")
NEUTRAL_MODES = ("site", "element", "layer")


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


def dos_by_method(model, info: dict, settings, *, params, alloy: str = "supercell",
                  neutral: str | None = None, soc: bool = False, magnetic: bool = False,
                  stoner=None, initial_moment=None, order=None, progress: bool = False):
    """DOS by the requested method and a summary record, or ``(None, None)`` for the plain one.

    Combinations: one alloy method (VCA, CPA) *or* neutrality *or* spin; VCA may be combined
    with nothing else, CPA with nothing else; spin with neither (stated errors otherwise).
    """
    if alloy not in ALLOY_METHODS:
        raise SettingsError(f"alloy method {alloy!r}: accepted {', '.join(ALLOY_METHODS)}")
    if neutral is not None and neutral not in NEUTRAL_MODES:
        raise SettingsError(f"neutrality mode {neutral!r}: accepted {', '.join(NEUTRAL_MODES)}")
    spin = bool(soc or magnetic)
    chosen = [n for n, on in (("--alloy-method " + alloy, alloy != "supercell"),
                              ("--neutral", neutral is not None), ("--soc/--magnetic", spin)) if on]
    if len(chosen) > 1:
        raise SettingsError(f"{' and '.join(chosen)} cannot be combined (yet); choose one")
    if not spin and (stoner or initial_moment is not None or order):
        raise SettingsError("--stoner, --initial-moment and --order need --magnetic")
    if not chosen:
        return None, None
    if alloy == "vca":
        from valband.alloy import vca_model
        from valband.workflows import compute_dos

        parent, comp = alloy_parent(info)
        dos = compute_dos(vca_model(parent, comp, params), settings, progress=progress)
        return dos, {"method": "virtual crystal approximation", "composition": comp,
                     "parent": info["parent"]}
    if alloy == "cpa":
        from valband.alloy import CPASettings, cpa_solve

        parent, comp = alloy_parent(info)
        lor = dataclasses.replace(settings, method="lorentzian")
        res = cpa_solve(parent, comp, params, lor, CPASettings(eta=settings.width))
        rec = {"method": "coherent potential approximation", "composition": comp,
               "parent": info["parent"], "eta_eV": settings.width,
               "report": res.dos.settings.get("cpa")}
        if settings.method != "lorentzian":
            rec["note"] = (f"CPA evaluates the Green function at E + iη: the DOS is Lorentzian "
                           f"with η = {settings.width} eV (the --method was {settings.method})")
        return res.dos, rec
    if neutral is not None:
        from valband.alloy import neutral_dos

        if neutral == "layer" and info.get("kind") not in ("slab", "overlayer"):
            raise SettingsError("--neutral layer needs a slab or overlayer spec (e.g. 'slab Pt "
                                "fcc111 layers=5'); use --neutral site or element for bulk cells")
        groups = info if neutral == "layer" else None
        dos, report = neutral_dos(model, settings, neutral, groups, params=params,
                                  progress=progress)
        return dos, {"method": f"local charge neutrality per {neutral}",
                     "report": report.to_dict()}
    from valband.spin import spin_dos

    res = spin_dos(model, settings, soc=soc, magnetic=magnetic, params=params, stoner=stoner,
                   initial_moment=initial_moment, order=order, progress=progress)
    return res.total, {"method": "spin" + (" + spin-orbit" if soc else "")
                       + (" + Stoner magnetism" if magnetic else ""), "spin": res.summary()}
