"""Accuracy of the first-principles sets: d-band centres, widths, band shape of 12 metals.

For bulk Fe (bcc), Co, Ru, Os (hcp), Ni, Cu, Rh, Pd, Ag, Ir, Pt, Au (fcc), non-magnetic, at
ASE's reference lattice constants (``ase.data.reference_states``), for each set of ``--sets``
(default ``valband-tc-2026`` and ``valband-tc2-2026``):

* d-band centre = first moment of the element's Mulliken d pDOS (per atom) over the window
  [E_F − 15 eV, E_F + 5 eV] (the valence band and the empty part of the d resonance); also over
  the whole grid (all d weight of the model, which includes d character mixed into the p bands
  10–25 eV above E_F);
* d-band width = square root of the second central moment over the same window;
* Γ1 = lowest band at Γ (eV relative to E_F); X5−X1 = extent of the d levels at X; the d
  manifold = extent of the states with Mulliken d weight > 0.5 at Γ, X and L (fcc only);
* band shape: every target of ``valband/data/targets/confinement-targets.toml`` (LDA level
  energies and spacings, canonical dd ratios and distance exponents, Harrison's geometric-mean
  rule for Cu–Pt, d-band centres; each with its source there) with the set's value, error and
  whether it was in that set's fit ("fit") or not ("held-out").

DOS: Gaussian σ = 0.1 eV on a 0.01 eV grid, Monkhorst–Pack mesh 24³ (cubic) or 16³ (hcp).

Reference d-band centres: Ruban, Hammer, Stoltze, Skriver & Nørskov, J. Mol. Catal. A 115, 421
(1997), bulk LMTO-ASA values, *from memory* (±0.1 eV; the Os value is the least certain,
±0.3 eV, and is reported but left out of the second mean). Fit membership: valband-tc-2026's
radii were fitted to the centres of Ni, Cu, Pd, Pt, Au and the Cu levels Γ1, X5, L2′, X4′ and
the d manifold; valband-tc2-2026's to the targets marked "fit" in the targets file
(benchmarks/fit_confinement.py; centres of Ni, Cu, Pd, Pt).

Run: ``PYTHONPATH=src python benchmarks/accuracy_params.py [--jobs 2] [--mesh-scale 0.5]``.
"""

from __future__ import annotations

import argparse
import math
from concurrent.futures import ProcessPoolExecutor

import numpy as np

SETS = ("valband-tc-2026", "valband-tc2-2026")
RUBAN = {"Fe": -0.92, "Co": -1.17, "Ni": -1.29, "Cu": -2.67, "Ru": -1.41, "Rh": -1.73,
         "Pd": -1.83, "Ag": -4.30, "Os": -2.20, "Ir": -2.11, "Pt": -2.25, "Au": -3.56}
#: metals whose d-band centre was in each set's fit of the confinement defaults
IN_FIT = {"valband-tc-2026": {"Ni", "Cu", "Pd", "Pt", "Au"},
          "valband-tc2-2026": {"Ni", "Cu", "Pd", "Pt"}}
LATTICE = {"Fe": "bcc", "Co": "hcp", "Ru": "hcp", "Os": "hcp"}
WINDOW = (-15.0, 5.0)
#: band-shape targets in the fit of valband-tc-2026 (Cu band energies; the rest were not)
TC2026_FIT_LEVELS = {("Cu", "level:G1"), ("Cu", "level:X5"), ("Cu", "level:L2p"),
                     ("Cu", "level:X4p")}


def _spec(el: str) -> str:
    from ase.data import atomic_numbers, reference_states

    ref = reference_states[atomic_numbers[el]]
    lat = LATTICE.get(el, "fcc")
    if lat == "hcp":
        return f"{el} hcp {ref['a']:.4f} c={ref['a'] * ref['c/a']:.4f}"
    return f"{el} {lat} {ref['a']:.4f}"


def _d_manifold(model, ef):
    import scipy.linalg

    k = np.array([[0, 0, 0], [0.5, 0, 0.5], [0.5, 0.5, 0.5]], dtype=float)
    h, s = model.hamiltonian_and_overlap(k)
    sel = model.select(shell="d")
    levels = []
    for hk, sk in zip(h, s, strict=True):
        e, c = scipy.linalg.eigh(hk, sk)
        w = np.real(np.conj(c) * (sk @ c))[sel].sum(axis=0)
        levels.append(e[w > 0.5] - ef)
    d = np.concatenate(levels)
    return float(d.min()), float(d.max())


def run(el: str, mesh_scale: float = 1.0, set_name: str = SETS[0]) -> dict:
    """Descriptors of one element with one set (see the module docstring)."""
    import scipy.linalg

    from valband.params import load_parameter_set
    from valband.structure import build_structure
    from valband.tb import build_model
    from valband.twocentre.shape import dd_shape, fcc_levels
    from valband.workflows import compute_dos, describe
    from valband.workflows.dos import DOSSettings

    ps = load_parameter_set(set_name)
    spec = _spec(el)
    model = build_model(build_structure(spec), ps)
    mesh = max(6, int(round((16 if "hcp" in spec else 24) * mesh_scale)))
    dos = compute_dos(model, DOSSettings(mesh=mesh, width=0.1, emin=-16.0))
    ef = dos.fermi_level
    win = describe(dos, "d", WINDOW).elements[el]
    whole = describe(dos, "d").elements[el]
    h, s = model.hamiltonian_and_overlap(np.zeros((1, 3)))
    g1 = float(scipy.linalg.eigh(h[0], s[0], eigvals_only=True)[0] - ef)
    out = {"element": el, "set": set_name, "structure": spec, "mesh": mesh,
           "centre": win.centre, "centre_whole": whole.centre, "width": win.width,
           "filling": win.filling, "G1": g1}
    if "fcc" in spec:
        out["d_bottom"], out["d_top"] = _d_manifold(model, ef)
        out["levels"] = fcc_levels(model, ef)
        a = float(spec.split()[2])
        out["dd"] = dd_shape(ps, el, a / np.sqrt(2.0))
    return out


def _hetero(set_name: str) -> float:
    from valband.params import load_parameter_set
    from valband.params.model import BOND_INTEGRALS

    ps = load_parameter_set(set_name)
    r = float(_spec("Pt").split()[2]) / np.sqrt(2.0)
    k = BOND_INTEGRALS.index("dds")
    v = {p: ps.hopping(*p, [r])[0, k] for p in (("Cu", "Pt"), ("Cu", "Cu"), ("Pt", "Pt"))}
    return float(abs(v["Cu", "Pt"]) / np.sqrt(v["Cu", "Cu"] * v["Pt", "Pt"]))


def _role(set_name: str, target: dict) -> str:
    if set_name == "valband-tc2-2026":
        return target["role"]
    if set_name == "valband-tc-2026":
        key = (target["element"], target["quantity"])
        fit = key in TC2026_FIT_LEVELS or (target["quantity"] == "centre"
                                           and target["element"] in IN_FIT[set_name])
        return "fit" if fit else "held-out"
    return "—"


def shape_rows(set_name: str, rows: list[dict]) -> list[dict]:
    """Every target of the targets file with this set's value, error and role."""
    from valband.twocentre.shape import load_targets, target_value

    by_el = {r["element"]: r for r in rows}
    out = []
    for t in load_targets()["target"]:
        el = t["element"]
        if el == "Cu-Pt":
            val = _hetero(set_name)
        elif el in by_el and "levels" in by_el[el]:
            r = by_el[el]
            val = target_value(t["quantity"], r["levels"], r["dd"], r["centre"])
        else:
            continue
        out.append({**t, "model": val, "error": val - t["value"], "set_role": _role(set_name, t)})
    return out


def _print_set(set_name: str, rows: list[dict]) -> None:
    print(f"\n{set_name}: d-band centre = first moment of the d pDOS over E_F {WINDOW[0]:+g} … "
          f"{WINDOW[1]:+g} eV; width = sqrt(2nd moment) there; eV relative to E_F")
    head = ("el", "structure", "centre in fit", "Ruban", "centre", "error", "whole grid",
            "width", "filling", "Γ1", "X5−X1", "d manifold")
    print(" | ".join(head))
    err, err_no_os, err_test = [], [], []
    fit = IN_FIT.get(set_name, set())
    for r in rows:
        el = r["element"]
        e = r["centre"] - RUBAN[el]
        err.append(abs(e))
        if el != "Os":
            err_no_os.append(abs(e))
        if el not in fit:
            err_test.append(abs(e))
        manifold = (f"{r['d_bottom']:.2f} … {r['d_top']:.2f}" if "d_top" in r else "—")
        x51 = (f"{r['levels']['X5'] - r['levels']['X1']:.2f}" if "levels" in r else "—")
        print(" | ".join([el, r["structure"], "fit" if el in fit else "held-out",
                          f"{RUBAN[el]:.2f}", f"{r['centre']:.2f}", f"{e:+.2f}",
                          f"{r['centre_whole']:.2f}", f"{r['width']:.2f}",
                          f"{r['filling']:.2f}", f"{r['G1']:.2f}", x51, manifold]))
    mae = sum(err) / len(err)
    print(f"centre mean absolute error: all 12 {mae:.3f} eV; without Os "
          f"{sum(err_no_os) / len(err_no_os):.3f} eV; the {len(err_test)} not in the fit "
          f"{sum(err_test) / len(err_test):.3f} eV (issue target 0.3 eV: "
          f"{'met' if mae <= 0.3 else 'missed'})")
    whole = [abs(r["centre_whole"] - RUBAN[r["element"]]) for r in rows]
    print(f"with the whole-grid centre instead: mean absolute error {sum(whole) / 12:.3f} eV")
    shape = shape_rows(set_name, rows)
    print(f"{set_name}: targets of valband/data/targets/confinement-targets.toml "
          "(role = in this set's fit or not)")
    print(" | ".join(("el", "quantity", "role", "target", "tolerance", "model", "error",
                      "error/tolerance")))
    for t in shape:
        print(" | ".join([t["element"], t["quantity"], t["set_role"], f"{t['value']:+.3f}",
                          f"{t['tolerance']:.2f}", f"{t['model']:+.3f}", f"{t['error']:+.3f}",
                          f"{t['error'] / t['tolerance']:+.2f}"]))
    for role in ("fit", "held-out"):
        sel = [t for t in shape if t["set_role"] == role]
        ev = [abs(t["error"]) for t in sel
              if t["quantity"].split(":")[0] in ("level", "spacing")]
        z = np.array([t["error"] / t["tolerance"] for t in sel])
        if len(z):
            print(f"{role}: {len(sel)} targets, rms error/tolerance {np.sqrt(np.mean(z ** 2)):.2f}"
                  f", within tolerance {int(np.sum(np.abs(z) <= 1))}/{len(z)}; band energies "
                  f"mean |error| {np.mean(ev) if ev else float('nan'):.3f} eV ({len(ev)})")


def main(argv=None) -> int:
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--jobs", type=int, default=1)
    p.add_argument("--mesh-scale", type=float, default=1.0, help="scale the k-meshes (quick runs)")
    p.add_argument("--sets", nargs="+", default=list(SETS), help="parameter sets to compare")
    args = p.parse_args(argv)
    els = list(RUBAN)
    ok = True
    for set_name in args.sets:
        if args.jobs > 1:
            with ProcessPoolExecutor(args.jobs) as pool:
                rows = list(pool.map(run, els, [args.mesh_scale] * len(els),
                                     [set_name] * len(els)))
        else:
            rows = [run(el, args.mesh_scale, set_name) for el in els]
        _print_set(set_name, rows)
        ok = ok and all(math.isfinite(r["centre"]) for r in rows)
    return 0 if ok else 1


if __name__ == "__main__":
    raise SystemExit(main())
