"""Benchmarks of the alloy and surface methods (issue targets; ratios to a numpy baseline).

Targets: the CPA DOS of a binary spd alloy on 200 energies in < 30 s; a 500-atom supercell at Γ
by dense diagonalisation in < 60 s; local charge neutrality on a ~100-atom slab in < 2 min.
The baseline, measured in the same process, is numpy's ``eigh`` of one random symmetric
500×500 matrix, so machines of different speed can be compared by the ratios.

Usage: python benchmarks/bench_alloy.py [--quick]
"""

from __future__ import annotations

import argparse

import numpy as np
from timing import best_of


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--quick", action="store_true", help="smaller systems (a smoke run)")
    a = ap.parse_args()

    from valband.alloy import CPASettings, cpa_dos, neutral_dos
    from valband.params import load_parameter_set
    from valband.structure import build_structure, load_structure_with_info, random_alloy
    from valband.tb import build_model
    from valband.workflows import DOSSettings, compute_dos

    params = load_parameter_set("harrison-universal")
    rng = np.random.default_rng(0)
    m = rng.standard_normal((500, 500))
    m = m + m.T
    t_base = best_of(lambda: np.linalg.eigh(m), 3)
    print(f"baseline numpy eigh 500x500   {t_base * 1e3:9.1f} ms")

    # CPA: Cu0.5Pd0.5 fcc, 200 energies (step chosen to give 200 points over the band range)
    parent = build_structure("Cu fcc 3.75")
    settings = DOSSettings(mesh=12 if a.quick else 16, mesh_kind="gamma", method="lorentzian",
                           width=0.1, emin=-12.0, emax=4.0, step=16.0 / 199)
    cpa_dos(parent, {"Cu": 0.5, "Pd": 0.5}, params, settings, CPASettings(eta=0.1))  # compile
    t_cpa = best_of(lambda: cpa_dos(parent, {"Cu": 0.5, "Pd": 0.5}, params, settings,
                                    CPASettings(eta=0.1)), 1)
    print(f"CPA Cu0.5Pd0.5, 200 energies  {t_cpa:9.2f} s    (target < 30 s)   "
          f"ratio {t_cpa / t_base:8.1f}")

    # 500-atom random supercell at Γ (dense diagonalisation)
    n = 6 if a.quick else 8                      # n³ primitive fcc cells: 216 or 512 atoms
    big = random_alloy(build_structure("Cu fcc 3.75"), {"Cu": 0.5, "Pd": 0.5}, supercell=n,
                       seed=1)
    model = build_model(big, params)
    gamma = DOSSettings(mesh="1", mesh_kind="gamma", symmetry=False)
    t_sc = best_of(lambda: compute_dos(model, gamma), 1)
    print(f"{big.n_sites}-atom supercell at Γ     {t_sc:9.2f} s    (target < 60 s for 500) "
          f"ratio {t_sc / t_base:8.1f}")

    # charge neutrality of a ~100-atom slab
    size = 3 if a.quick else 4
    slab, info = load_structure_with_info(f"slab Pt fcc111 layers=6 size={size}x{size}")
    smodel = build_model(slab, params)
    t_n = best_of(lambda: neutral_dos(smodel, DOSSettings(mesh="2x2x1"), "layer", info,
                                      params=params), 1)
    print(f"neutrality, {slab.n_sites}-atom slab      {t_n:9.2f} s    (target < 120 s)  "
          f"ratio {t_n / t_base:8.1f}")


if __name__ == "__main__":
    main()
