"""Benchmark of the kernel polynomial method (ratios to baselines run in the same process).

Targets (issue 7):
  1. KPM cost linear in the system size from 10³ to 10⁵ orbitals: the fitted exponent of the
     recursion time against the number of orbitals (target ≈ 1), at fixed moments and
     vectors. Baseline per size: scipy's CSR product H·X on the same block, times the number
     of steps — the ratio says what the fused numba recursion costs relative to plain scipy.
  2. d DOS of a 20,000-atom random Cu0.75Pd0.25 (111) slab (8 layers of 50×50; 180,000
     orbitals) at 0.1 eV resolution, 5 % accuracy: wall time, target < 120 s on 2 cores.

The machine may be shared: every time is the best of ``--repeat`` runs, and printed with the
baseline it is divided by. ``--quick`` stops at 3·10⁴ orbitals and a 5,000-atom slab.
"""

from __future__ import annotations

import argparse
import math
import sys
import time

import numpy as np
from timing import best_of


def _params():
    from valband.params import load_parameter_set

    return load_parameter_set("harrison-universal")


def _alloy(n_side: int, seed: int = 1):
    """Random Cu0.75Pd0.25 fcc cell of n_side³ primitive cells (9 orbitals per site)."""
    from valband.structure import load_structure

    return load_structure(f"random Cu0.75Pd0.25 fcc {n_side}x{n_side}x{n_side} seed={seed}")


def scaling(sides, n_moments: int, n_vectors: int, repeat: int) -> list[dict]:
    """Recursion time vs size at fixed N and R; scipy H·X baseline per size."""
    from valband.kpm import build_sparse
    from valband.kpm.chebyshev import scale_factors
    from valband.kpm.dos import kpm_channels
    from valband.kpm.moments import chebyshev_moments, random_phase_columns
    from valband.kpm.operators import Operator, lanczos_bounds

    params = _params()
    out = []
    for side in sides:
        t0 = time.perf_counter()
        st = _alloy(side)
        t_struct = time.perf_counter() - t0
        t0 = time.perf_counter()
        sm = build_sparse(st, params)
        t_build = time.perf_counter() - t0
        op = Operator(sm.hamiltonian)
        b = lanczos_bounds(op, 30, seed=0)
        a, c = scale_factors(b["emin"], b["emax"], 0.05)
        labels, chan, _ = kpm_channels(sm, "element")

        def run(op=op, a=a, c=c, chan=chan, labels=labels):
            chebyshev_moments(op, a, c, n_moments, chan, len(labels), "stochastic", n_vectors,
                              0, 2 * n_vectors)

        run()  # compile / warm
        t_kpm = best_of(run, repeat)
        x = random_phase_columns(sm.n_orbitals, 0, 0, n_vectors)
        h = sm.hamiltonian
        t_mv = best_of(lambda h=h, x=x: h @ x, max(3, repeat * 3))
        out.append({"sites": st.n_sites, "orbitals": sm.n_orbitals, "nnz": h.nnz,
                    "structure_s": t_struct, "build_s": t_build, "kpm_s": t_kpm,
                    "scipy_steps_s": t_mv * n_moments, "ratio": t_kpm / (t_mv * n_moments)})
    return out


def slab_dos(n_side: int, layers: int, resolution: float, accuracy: float) -> dict:
    """The d DOS of a random Cu0.75Pd0.25 (111) slab, end to end, with a time per stage."""
    from valband.kpm import KPMSettings, build_sparse, compute_kpm_dos, describe_kpm
    from valband.structure import load_structure
    from valband.structure.alloys import random_alloy

    t0 = time.perf_counter()
    host = load_structure(f"slab Cu fcc111 layers={layers} size={n_side}x{n_side} vacuum=12")
    st = random_alloy(host, {"Cu": 0.75, "Pd": 0.25}, 1, seed=2024)
    t_struct = time.perf_counter() - t0
    t0 = time.perf_counter()
    sm = build_sparse(st, _params())
    t_build = time.perf_counter() - t0
    t0 = time.perf_counter()
    dos = compute_kpm_dos(sm, KPMSettings(resolution=resolution, accuracy=accuracy, seed=7))
    t_dos = time.perf_counter() - t0
    table = describe_kpm(dos, "d")
    s = dos.settings
    return {"sites": st.n_sites, "orbitals": sm.n_orbitals, "nnz": sm.hamiltonian.nnz,
            "structure_s": t_struct, "build_s": t_build, "dos_s": t_dos,
            "total_s": t_struct + t_build + t_dos, "n_moments": s["n_moments"],
            "n_vectors": s["n_vectors"], "trace": s["trace"], "timings": s["timings_s"],
            "stochastic_error": s["stochastic_error_peak_rel"],
            "d_centre": {e: d.centre for e, d in table.elements.items()}}


def main() -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--quick", action="store_true", help="up to 3·10⁴ orbitals, 5,000-atom slab")
    ap.add_argument("--repeat", type=int, default=2)
    ap.add_argument("--moments", type=int, default=200)
    ap.add_argument("--vectors", type=int, default=2)
    ap.add_argument("--skip-slab", action="store_true")
    a = ap.parse_args()
    import numba

    print(f"numba threads: {numba.get_num_threads()} (machine may be shared; times are noisy)")
    sides = (5, 7, 10, 15) if a.quick else (5, 7, 10, 15, 22)
    rows = scaling(sides, a.moments, a.vectors, a.repeat)
    print(f"1. KPM recursion, N = {a.moments} moments, R = {a.vectors} random-phase vectors "
          f"({2 * a.vectors} real columns)")
    print("   orbitals        nnz   build s    KPM s   scipy H·X×N s   ratio")
    for r in rows:
        print(f"   {r['orbitals']:8d} {r['nnz']:10d} {r['build_s']:9.2f} {r['kpm_s']:8.3f}"
              f" {r['scipy_steps_s']:15.3f} {r['ratio']:7.2f}")
    n = np.array([r["orbitals"] for r in rows], dtype=float)
    t = np.array([r["kpm_s"] for r in rows])
    slope = np.polyfit(np.log(n), np.log(t), 1)[0]
    big = n >= 5000
    slope_big = np.polyfit(np.log(n[big]), np.log(t[big]), 1)[0] if big.sum() >= 2 else math.nan
    print(f"   fitted exponent t ∝ n^p: p = {slope:.3f} over all sizes, "
          f"{slope_big:.3f} above 5·10³ orbitals (target ≈ 1)")
    if a.skip_slab:
        return 0
    side, layers = (25, 8) if a.quick else (50, 8)
    s = slab_dos(side, layers, 0.1, 0.05)
    print(f"2. random Cu0.75Pd0.25(111) slab, {s['sites']} sites, {s['orbitals']} orbitals, "
          f"nnz {s['nnz']}")
    print(f"   N = {s['n_moments']} moments, trace {s['trace']}, R = {s['n_vectors']}, "
          f"stochastic error (peak-relative) {s['stochastic_error']}")
    print(f"   structure {s['structure_s']:.1f} s, H assembly {s['build_s']:.1f} s, "
          f"bounds {s['timings']['bounds']:.1f} s, moments {s['timings']['moments']:.1f} s")
    print(f"   total {s['total_s']:.1f} s (target < 120 s on 2 cores);"
          f" d-band centres {', '.join(f'{e} {v:.2f} eV' for e, v in s['d_centre'].items())}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
