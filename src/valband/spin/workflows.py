"""Spin–orbit and Stoner runs as verbs: spin_dos (soc_dos, magnetic_dos), spin_bands, ….

``spin_describe`` gives the descriptors per spin and per j.

Stoner self-consistency (see :mod:`valband.spin.stoner`): start from moments m⁰ (μB per
site); each iteration splits the d levels by ΔE_i = I_i m_i, diagonalises on the mesh, finds
the common Fermi level of both spins for the fixed electron count, takes the d moments
m_out from the occupied projections (smearing: the integrated line shape; tetrahedron:
Blöchl's weights), and mixes (Anderson, :mod:`valband.spin.mixing`) until
max |m_out − m_in| < tolerance. The DOS is that of the last iteration.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import asdict

import numpy as np

from valband.dos import band_descriptors
from valband.errors import CalculationError, SettingsError
from valband.results import Channel, DOSResult
from valband.spin.dos import Integrator
from valband.spin.kmesh import colours_of, equivalent_sites_of, spin_mesh
from valband.spin.mixing import AndersonMixer
from valband.spin.model import SpinBlockModel, SpinModel
from valband.spin.result import MagneticReport, SpinDOSResult
from valband.spin.soc import spin_orbit_constants
from valband.spin.states import CollinearSolver, DoubledSolver, site_moments
from valband.spin.stoner import stoner_parameters
from valband.workflows import DOSSettings, compute_bands, describe
from valband.workflows.provenance import provenance_of

__all__ = ["DEFAULT_INITIAL_MOMENT", "NON_MAGNETIC_MOMENT", "spin_dos", "soc_dos",
           "magnetic_dos", "spin_bands", "spin_describe"]

#: Starting moment (μB) of every magnetic site when none is given.
DEFAULT_INITIAL_MOMENT = 2.0
_ORDERS = ("fm", "afm")
#: A converged state with every |m_d| below this (μB) is reported non-magnetic.
NON_MAGNETIC_MOMENT = 1e-3


def _shells_of(model) -> dict[str, tuple[str, ...]]:
    out: dict[str, list[str]] = {}
    for o in model.orbitals:
        lst = out.setdefault(o.element, [])
        if o.shell not in lst:
            lst.append(o.shell)
    return {e: tuple(s) for e, s in out.items()}


def _initial_moments(initial_moment, order, model, magnetic_sites) -> tuple[np.ndarray, str]:
    st = model.structure
    n_sites = st.n_sites
    orb_count = np.bincount([o.site for o in model.orbitals], minlength=n_sites)
    if order is not None and order not in _ORDERS:
        raise SettingsError(f"magnetic order {order!r}: accepted {', '.join(_ORDERS)}")
    m0 = np.zeros(n_sites)
    if isinstance(initial_moment, Sequence) and not isinstance(initial_moment, str):
        if order is not None:
            raise SettingsError("give either order='fm'/'afm' or a per-site list of initial "
                                "moments, not both (the list sets the pattern)")
        vals = np.asarray(initial_moment, dtype=np.float64).reshape(-1)
        if vals.shape != (n_sites,) or not np.all(np.isfinite(vals)):
            raise SettingsError(f"initial_moment: a list needs {n_sites} finite values (μB, one "
                                f"per site), got {len(vals)}")
        m0, label = vals, "given"
    else:
        if isinstance(initial_moment, Mapping):
            bad = [e for e in initial_moment if e not in st.elements]
            if bad:
                raise SettingsError(f"initial_moment for {bad}, not in the structure; elements "
                                    f"present: {', '.join(st.elements)}")
            mag = {e: float(v) for e, v in initial_moment.items()}
        else:
            try:
                value = DEFAULT_INITIAL_MOMENT if initial_moment is None else float(initial_moment)
            except (TypeError, ValueError):
                raise SettingsError(f"initial_moment {initial_moment!r}: accepted a number (μB), "
                                    "element → μB, or one value per site") from None
            mag = {e: value for e in st.elements}
        for i in magnetic_sites:
            m0[i] = abs(mag.get(st.symbols[i], 0.0))
        label = order or "fm"
        if label == "afm":
            if len(magnetic_sites) != 2:
                raise SettingsError(
                    f"order='afm' sets up two sublattices and needs exactly two magnetic sites "
                    f"(e.g. bcc as a two-site cubic cell); this cell has {len(magnetic_sites)}. "
                    "Give initial_moment as one value per site for other patterns"
                )
            m0[magnetic_sites[1]] *= -1.0
    for i in range(n_sites):
        if m0[i] != 0 and i not in magnetic_sites:
            raise SettingsError(f"initial moment {m0[i]:g} μB on site {i} ({st.symbols[i]}), "
                                "which carries no d shell with a Stoner parameter > 0")
        if abs(m0[i]) > orb_count[i]:
            raise SettingsError(f"initial moment {m0[i]:g} μB on site {i}: accepted |m| ≤ "
                                f"{orb_count[i]} (one per orbital of the site)")
    return m0, label


def _grid(s: DOSSettings, lo: float, hi: float, e_f: float) -> np.ndarray:
    pad = 1.0 + (0.0 if s.method == "tetrahedron" else 5.0 * s.width)
    emin = s.emin if s.emin is not None else np.floor(lo - e_f - pad)
    emax = s.emax if s.emax is not None else np.ceil(hi - e_f + pad)
    n_e = int(round((emax - emin) / s.step)) + 1
    if n_e > 2_000_000:
        raise SettingsError(f"energy grid of {n_e} points: increase the step or narrow the range")
    return emin + s.step * np.arange(n_e)


def spin_dos(
    model, settings: DOSSettings | None = None, *, soc=False, magnetic: bool = False,
    params=None, stoner: Mapping[str, float] | None = None, initial_moment=None,
    order: str | None = None, mixing: float = 0.3, history: int = 6,
    tolerance: float = 1e-5, max_iterations: int = 100, max_step: float = 0.5,
    progress: bool = False,
) -> SpinDOSResult:
    """DOS with spin–orbit coupling and/or collinear Stoner magnetism.

    Parameters
    ----------
    model : valband.tb.TBModel
    settings : DOSSettings (``resolve`` must be "l")
    soc : False, True (ξ from ``params`` when it has them, else the atom engine) or a mapping
        element → ξ_d in eV (or element → {shell: ξ}); see :mod:`valband.spin.soc`
    magnetic : run the Stoner self-consistency (moment along z)
    params : the ParameterSet of the model (for spin–orbit constants it may carry)
    stoner : element → I in eV overriding :data:`valband.spin.stoner.STONER_TABLE`
    initial_moment : None (2 μB), a number (μB per magnetic site), element → μB, or one value
        per site (sets the pattern); only with ``magnetic=True``
    order : "fm" (default) or "afm" (two magnetic sites, opposite starts)
    mixing, history, max_step : Anderson β, number of kept steps, step cap (μB)
    tolerance : max |m_out − m_in| (μB) at convergence; max_iterations : iteration limit

    Returns
    -------
    SpinDOSResult

    Raises
    ------
    SettingsError
        Bad settings, a Stoner parameter < 0, magnetic options on a non-magnetic run.
    ParameterError
        An element without a tabulated Stoner parameter or spin–orbit constant.
    CalculationError
        The Stoner iteration does not converge within ``max_iterations``.
    """
    if isinstance(model, (SpinModel, SpinBlockModel)):
        raise SettingsError("spin_dos takes the plain TBModel; spin terms are added here")
    s = settings or DOSSettings()
    s.validate()
    if s.resolve != "l":
        raise SettingsError(f"resolve {s.resolve!r}: spin runs offer 'l' (site × shell, with "
                            "spin and j channels in separate results)")
    if not magnetic:
        given = [n for n, v in (("initial_moment", initial_moment), ("stoner", stoner),
                                ("order", order)) if v is not None]
        if given:
            raise SettingsError(f"{', '.join(given)} given, but the run is not magnetic; "
                                "ask for magnetic=True (magnetic_dos) to use them")
    for name, val, ok in (("mixing", mixing, 0 < mixing <= 1), ("tolerance", tolerance,
                          tolerance > 0), ("max_step", max_step, max_step > 0)):
        if not (np.isfinite(val) and ok):
            raise SettingsError(f"{name} = {val!r}: accepted a finite number > 0"
                                + (" and ≤ 1" if name == "mixing" else ""))
    if not (isinstance(max_iterations, int) and max_iterations >= 1):
        raise SettingsError(f"max_iterations = {max_iterations!r}: accepted an integer ≥ 1")
    if not (isinstance(history, int) and history >= 0):
        raise SettingsError(f"history = {history!r}: accepted an integer ≥ 0")

    st = model.structure
    shells = _shells_of(model)
    consts = spin_orbit_constants(shells, soc, params) if soc is not False else {}
    has_soc = any(c.xi_ev > 0 for c in consts.values())
    n_el = model.n_electrons if s.n_electrons is None else float(s.n_electrons)

    colours, stoner_used, i_site, m0, order_label = None, {}, np.zeros(st.n_sites), None, None
    mag_sites: list[int] = []
    if magnetic:
        with_d = tuple(e for e, sh in shells.items() if "d" in sh)
        stoner_used = stoner_parameters(with_d, stoner, st.elements)
        i_site = np.array([stoner_used[e].value_ev if e in stoner_used else 0.0
                           for e in st.symbols])
        mag_sites = [i for i in range(st.n_sites) if i_site[i] > 0]
        if not mag_sites and initial_moment is not None:
            raise SettingsError("initial_moment given, but no site carries a d shell with a "
                                "Stoner parameter > 0, so no moment can form")
        m0, order_label = _initial_moments(initial_moment, order, model, mag_sites)
        colours = colours_of(m0)

    kmesh, cell = spin_mesh(st, s.mesh, s.mesh_kind, s.symmetry, colours, has_soc)
    rep = equivalent_sites_of(cell) if kmesh.symmetry else np.arange(st.n_sites)
    integ = Integrator(kmesh, st.reciprocal_cell, s.method, s.width)
    solver = (DoubledSolver(model, consts, kmesh.kpoints, rep, spin=magnetic, progress=progress)
              if has_soc
              else CollinearSolver(model, kmesh.kpoints, rep, progress))

    report = None
    if magnetic and mag_sites:
        states, e_f, m_d, report = _stoner_loop(
            solver, integ, n_el, i_site, m0, st.n_sites, mixing, history, tolerance,
            max_iterations, max_step, order_label, stoner_used)
    else:
        states = solver(np.zeros(st.n_sites))
        e_f = integ.fermi_level(states.eig, n_el)
        m_d = np.zeros(st.n_sites)
    splitting = i_site * m_d if report is not None else np.zeros(st.n_sites)
    return _results(model, s, kmesh, integ, states, e_f, n_el, consts, splitting, report,
                    magnetic, has_soc)


def _stoner_loop(solver, integ, n_el, i_site, m0, n_sites, mixing, history, tol, max_it,
                 max_step, order_label, stoner_used):
    mixer = AndersonMixer(mixing, history, max_step)
    mag = i_site > 0
    m_in = m0.copy()
    res_hist, mom_hist = [], []
    for it in range(1, max_it + 1):
        states = solver(i_site * m_in)
        e_f = integ.fermi_level(states.eig, n_el)
        w, labels, spins = states.families["spin"]
        occ = integ.occupations(states.eig, w, e_f)
        m_out = site_moments(occ, labels, spins, n_sites, shell="d") * mag
        res = float(np.max(np.abs(m_out - m_in)))
        res_hist.append(res)
        mom_hist.append(tuple(float(x) for x in m_out))
        if res < tol:
            report = MagneticReport(
                converged=True, iterations=it,
                non_magnetic=bool(np.all(np.abs(m_out) < NON_MAGNETIC_MOMENT)),
                residual=res, tolerance=tol, mixing=mixing, history=history, max_step=max_step,
                order=order_label, initial_moments=tuple(float(x) for x in m0),
                d_moments=tuple(float(x) for x in m_in),
                splitting_eV=tuple(float(x) for x in i_site * m_in),
                stoner={e: p.to_dict() for e, p in stoner_used.items()},
                residual_history=tuple(res_hist), moment_history=tuple(mom_hist))
            return states, e_f, m_in, report
        m_in = mixer(m_in, m_out - m_in) * mag
    raise CalculationError(
        f"the Stoner self-consistency did not converge in {max_it} iterations: last "
        f"max |m_out − m_in| = {res_hist[-1]:.3g} μB (tolerance {tol:g}), moments "
        f"{', '.join(f'{x:.3f}' for x in mom_hist[-1])} μB; try more iterations, a smaller "
        "mixing, a larger smearing width, or another initial moment"
    )


def _results(model, s, kmesh, integ, states, e_f, n_el, consts, splitting, report, magnetic,
             has_soc) -> SpinDOSResult:
    st = model.structure
    eig = states.eig
    lo, hi = float(eig.min()), float(eig.max())
    grid = _grid(s, lo, hi, e_f)
    # the site × shell curves of a spin–orbit run are the sums of its j curves
    kinds = (["j"] if has_soc else ["shell"]) + (["spin"] if report is not None else [])
    ws = [states.families[k][0] for k in kinds]
    sizes = [w.shape[2] for w in ws]
    total, chans = integ.dos(eig, np.concatenate(ws, axis=2), grid + e_f)
    parts = np.split(chans, np.cumsum(sizes)[:-1], axis=0)
    curves = dict(zip(kinds, parts, strict=True))
    if has_soc:
        shell_of = {c: i for i, c in enumerate(states.families["shell"][1])}
        curves["shell"] = np.zeros((len(shell_of), len(grid)))
        for c, curve in zip(states.families["j"][1], curves["j"], strict=True):
            curves["shell"][shell_of[Channel(c.site, c.element, c.shell)]] += curve

    recorded = asdict(s)
    recorded.update(mesh=kmesh.to_dict(), n_electrons=n_el,
                    energy_range_eV=[float(grid[0]), float(grid[-1])],
                    band_range_eV=[lo - e_f, hi - e_f])
    if s.method == "tetrahedron":
        recorded["width"] = None
        recorded["count"] = "linear tetrahedra with Blöchl's correction"
    mesh_note = ("full mesh (magnetism with spin–orbit coupling breaks time reversal)"
                 if magnetic and has_soc and report is not None else
                 "wedge of the magnetic pattern with time reversal" if report is not None
                 else "crystal wedge with time reversal")
    recorded["spin"] = {"spin_orbit": has_soc, "magnetic": report is not None,
                        "states_per_band": 1, "mesh_reduction": mesh_note if kmesh.symmetry
                        else "full mesh"}
    prov = provenance_of(model)
    prov["spin"] = SpinModel(model, consts, splitting).describe()
    if report is not None:
        prov["spin"]["stoner"] = report.stoner

    def result(total_curve, ch, labels, n, which):
        rec = dict(recorded)
        rec["spin"] = dict(recorded["spin"], channels=which)
        return DOSResult(energies=grid, total=total_curve, channels=ch, channel_labels=labels,
                         fermi_level=float(e_f), n_electrons=float(n), n_sites=st.n_sites,
                         settings=rec, provenance=prov)

    shell_labels = states.families["shell"][1]
    out = {"total": result(total, curves["shell"], shell_labels, n_el, "both spins")}
    moments = None
    if report is not None:
        w, labels, spins = states.families["spin"]
        occ = integ.occupations(eig, w, e_f)
        for sp in ("up", "down"):
            sel = np.array([x == sp for x in spins])
            ch = curves["spin"][sel]
            out[sp] = result(ch.sum(axis=0), ch, tuple(np.array(labels, dtype=object)[sel]),
                             occ[sel].sum(), f"spin {sp} only")
        site_m = site_moments(occ, labels, spins, st.n_sites)
        moments = {
            "sites": [{"site": i, "element": st.symbols[i], "moment": float(site_m[i]),
                       "d_moment": float(report.d_moments[i])} for i in range(st.n_sites)],
            "elements": {e: float(np.mean([site_m[i] for i in range(st.n_sites)
                                           if st.symbols[i] == e])) for e in st.elements},
            "cell": float(site_m.sum()),
            "per_atom": float(site_m.sum() / st.n_sites),
        }
    if has_soc:
        out["j_resolved"] = result(total, curves["j"], states.families["j"][1], n_el,
                                   "site × shell × j (both spins)")
    return SpinDOSResult(
        total=out["total"], up=out.get("up"), down=out.get("down"),
        j_resolved=out.get("j_resolved"), moments=moments, magnetism=report,
        spin_orbit=tuple(c.to_dict() for c in consts.values()),
        model=SpinModel(model, consts, splitting))


def soc_dos(model, settings: DOSSettings | None = None, soc=True, params=None,
            progress: bool = False) -> SpinDOSResult:
    """Non-magnetic DOS with spin–orbit coupling (see :func:`spin_dos`)."""
    return spin_dos(model, settings, soc=soc, params=params, progress=progress)


def magnetic_dos(model, settings: DOSSettings | None = None, stoner=None, initial_moment=None,
                 order: str | None = None, soc=False, params=None, **scf) -> SpinDOSResult:
    """Stoner-magnetic DOS, optionally with spin–orbit coupling (see :func:`spin_dos`)."""
    return spin_dos(model, settings, soc=soc, magnetic=True, params=params, stoner=stoner,
                    initial_moment=initial_moment, order=order, **scf)


def spin_bands(source, path: str | None = None, npoints: int = 300,
               fermi_level: float | None = None, progress: bool = False) -> dict:
    """Bands of a spin run along a path.

    ``source`` is a :class:`SpinDOSResult` (its model and Fermi level are used) or a
    :class:`SpinModel`. Returns ``{"up": BandsResult, "down": BandsResult}`` for a collinear
    magnetic model without spin–orbit coupling, else ``{"both": BandsResult}`` (doubled basis;
    site × shell character summed over spin).
    """
    if isinstance(source, SpinDOSResult):
        sm, ef = source.model, source.fermi_level
    elif isinstance(source, SpinModel):
        sm, ef = source, 0.0
    else:
        raise SettingsError(f"spin_bands takes a SpinDOSResult or SpinModel, got "
                            f"{type(source).__name__}")
    ef = ef if fermi_level is None else float(fermi_level)
    if sm.magnetic and not sm.has_spin_orbit:
        return {sp: compute_bands(SpinBlockModel(sm.base, sp, sm.splitting), path, npoints, ef,
                                  progress=progress) for sp in ("up", "down")}
    return {"both": compute_bands(sm, path, npoints, ef, progress=progress)}


def spin_describe(result: SpinDOSResult, shell: str = "d",
                  window: tuple[float, float] | None = None) -> dict:
    """Descriptors of ``shell``: ``"both"``, per spin (``"up"``, ``"down"``) and per j.

    The j entry maps element → j label (e.g. "d5/2") → BandDescriptors of that element's
    j-projected DOS per atom.
    """
    out = {"both": describe(result.total, shell, window)}
    for sp in ("up", "down"):
        r = getattr(result, sp)
        if r is not None:
            out[sp] = describe(r, shell, window)
    jr = result.j_resolved
    if jr is not None:
        win = out["both"].window
        per = {}
        for el in jr.elements:
            n = len(jr.sites_of(el))
            labels = dict.fromkeys(c.orbital for c in jr.channel_labels
                                   if c.element == el and c.shell == shell)
            per[el] = {lab: band_descriptors(jr.energies,
                                             jr.select(element=el, shell=shell, orbital=lab) / n,
                                             win) for lab in labels}
        out["j"] = per
    return out
