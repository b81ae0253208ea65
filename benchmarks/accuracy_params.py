"""Accuracy of the shipped first-principles set: d-band centres, widths and Γ1 of 12 metals.

For bulk Fe (bcc), Co, Ru, Os (hcp), Ni, Cu, Rh, Pd, Ag, Ir, Pt, Au (fcc), non-magnetic, at
ASE's reference lattice constants (``ase.data.reference_states``), with ``valband-tc-2026``:

* d-band centre = first moment of the element's Mulliken d pDOS (per atom) over the window
  [E_F − 15 eV, E_F + 5 eV] (the valence band and the empty part of the d resonance); also over
  the whole grid (all d weight of the model, which includes d character mixed into the p bands
  10–25 eV above E_F);
* d-band width = square root of the second central moment over the same window;
* Γ1 = lowest band at Γ (eV relative to E_F); the d manifold = extent of the states with
  Mulliken d weight > 0.5 at Γ, X and L (fcc only).

DOS: Gaussian σ = 0.1 eV on a 0.01 eV grid, Monkhorst–Pack mesh 24³ (cubic) or 16³ (hcp).

Reference d-band centres: Ruban, Hammer, Stoltze, Skriver & Nørskov, J. Mol. Catal. A 115, 421
(1997), bulk LMTO-ASA values, *from memory* (±0.1 eV; the Os value is the least certain,
±0.3 eV, and is reported but left out of the second mean). The Cu band energies are LDA values
from memory (±0.3 eV). The confinement defaults were fitted with Ni, Cu, Pd, Pt and Au (see
``valband/twocentre/confinement.py``), so the table marks those as "fit" and the others "test".

Run: ``PYTHONPATH=src python benchmarks/accuracy_params.py [--jobs 2] [--mesh-scale 0.5]``.
"""

from __future__ import annotations

import argparse
import math
from concurrent.futures import ProcessPoolExecutor

import numpy as np

SHIPPED = "valband-tc-2026"
RUBAN = {"Fe": -0.92, "Co": -1.17, "Ni": -1.29, "Cu": -2.67, "Ru": -1.41, "Rh": -1.73,
         "Pd": -1.83, "Ag": -4.30, "Os": -2.20, "Ir": -2.11, "Pt": -2.25, "Au": -3.56}
IN_FIT = {"Ni", "Cu", "Pd", "Pt", "Au"}
LATTICE = {"Fe": "bcc", "Co": "hcp", "Ru": "hcp", "Os": "hcp"}
WINDOW = (-15.0, 5.0)


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


def run(el: str, mesh_scale: float = 1.0) -> dict:
    """Descriptors of one element (see the module docstring)."""
    import scipy.linalg

    from valband.params import load_parameter_set
    from valband.structure import build_structure
    from valband.tb import build_model
    from valband.workflows import compute_dos, describe
    from valband.workflows.dos import DOSSettings

    ps = load_parameter_set(SHIPPED)
    spec = _spec(el)
    model = build_model(build_structure(spec), ps)
    mesh = max(6, int(round((16 if "hcp" in spec else 24) * mesh_scale)))
    dos = compute_dos(model, DOSSettings(mesh=mesh, width=0.1, emin=-16.0))
    ef = dos.fermi_level
    win = describe(dos, "d", WINDOW).elements[el]
    whole = describe(dos, "d").elements[el]
    h, s = model.hamiltonian_and_overlap(np.zeros((1, 3)))
    g1 = float(scipy.linalg.eigh(h[0], s[0], eigvals_only=True)[0] - ef)
    out = {"element": el, "structure": spec, "mesh": mesh, "centre": win.centre,
           "centre_whole": whole.centre, "width": win.width, "filling": win.filling, "G1": g1}
    if "fcc" in spec:
        out["d_bottom"], out["d_top"] = _d_manifold(model, ef)
    return out


def main(argv=None) -> int:
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--jobs", type=int, default=1)
    p.add_argument("--mesh-scale", type=float, default=1.0, help="scale the k-meshes (quick runs)")
    args = p.parse_args(argv)
    els = list(RUBAN)
    if args.jobs > 1:
        with ProcessPoolExecutor(args.jobs) as pool:
            rows = list(pool.map(run, els, [args.mesh_scale] * len(els)))
    else:
        rows = [run(el, args.mesh_scale) for el in els]
    print(f"{SHIPPED}: d-band centre = first moment of the d pDOS over E_F {WINDOW[0]:+g} … "
          f"{WINDOW[1]:+g} eV; width = sqrt(2nd moment) there; eV relative to E_F")
    head = ("el", "structure", "set", "Ruban", "centre", "error", "whole grid", "width",
            "filling", "Γ1", "d manifold")
    print(" | ".join(head))
    err, err_no_os, err_test = [], [], []
    for r in rows:
        el = r["element"]
        e = r["centre"] - RUBAN[el]
        err.append(abs(e))
        if el != "Os":
            err_no_os.append(abs(e))
        if el not in IN_FIT:
            err_test.append(abs(e))
        manifold = (f"{r['d_bottom']:.2f} … {r['d_top']:.2f}" if "d_top" in r else "—")
        print(" | ".join([el, r["structure"], "fit" if el in IN_FIT else "test",
                          f"{RUBAN[el]:.2f}", f"{r['centre']:.2f}", f"{e:+.2f}",
                          f"{r['centre_whole']:.2f}", f"{r['width']:.2f}",
                          f"{r['filling']:.2f}", f"{r['G1']:.2f}", manifold]))
    mae = sum(err) / len(err)
    print(f"mean absolute error: all 12 {mae:.3f} eV; without Os {sum(err_no_os) / 11:.3f} eV; "
          f"the 7 not in the fit {sum(err_test) / len(err_test):.3f} eV "
          f"(issue target 0.3 eV: {'met' if mae <= 0.3 else 'missed'})")
    whole = [abs(r["centre_whole"] - RUBAN[r["element"]]) for r in rows]
    print(f"with the whole-grid centre instead: mean absolute error {sum(whole) / 12:.3f} eV")
    return 0 if math.isfinite(mae) else 1


if __name__ == "__main__":
    raise SystemExit(main())
