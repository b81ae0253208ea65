"""Benchmark of the DOS pipeline against the bare numpy eigensolver (ratios, one process).

Targets (9-orbital fcc metal, 48³ Monkhorst–Pack mesh):
  1. Gaussian DOS on the irreducible wedge, whole pipeline ≤ 1.5 × bare ``eigh`` (with vectors)
     of the same irreducible matrices;
  2. tetrahedron DOS on the same mesh (eigenvalues unfolded from the wedge) ≤ 0.25 × bare
     ``eigh`` of the full mesh's matrices;
  3. peak memory of a 96³ run below 1 GB (measured in a child process);
  4. ``valband --help`` start-up below 0.5 s; first ``valband dos`` (compiling) vs second (cached).
"""

from __future__ import annotations

import argparse
import os
import subprocess
import sys
import tempfile

import numpy as np
from timing import best_of


def bare_eigh_time(model, kpoints, repeat: int) -> float:
    """Best time of numpy's eigh (with vectors) on the model's H(k) at ``kpoints``."""
    h = model.hamiltonian(kpoints)
    return best_of(lambda: np.linalg.eigh(h), repeat)


def model_fcc():
    from valband.params import load_parameter_set
    from valband.structure import build_structure
    from valband.tb import build_model

    return build_model(build_structure("Cu fcc"), load_parameter_set("harrison-universal"))


def pipeline_ratios(n: int, repeat: int) -> dict:
    from valband.kspace import make_mesh
    from valband.workflows import DOSSettings, compute_dos

    model = model_fcc()
    assert model.n_orbitals == 9
    gauss = DOSSettings(mesh=n, method="gaussian", width=0.1, step=0.01)
    tetra = DOSSettings(mesh=n, method="tetrahedron", step=0.01)
    compute_dos(model, DOSSettings(mesh=4)), compute_dos(model, DOSSettings(mesh=4, method="tetrahedron"))

    km = make_mesh(model.structure, n)
    t_eigh_ir = bare_eigh_time(model, km.kpoints, repeat)
    t_gauss = best_of(lambda: compute_dos(model, gauss), repeat)

    full = make_mesh(model.structure, n, symmetry=False)
    t_eigh_full = bare_eigh_time(model, full.kpoints, max(1, repeat // 2))
    t_tetra = best_of(lambda: compute_dos(model, tetra), repeat)
    return {
        "mesh": n, "n_irreducible": km.n_irreducible, "n_full": full.n_full,
        "eigh_irreducible_s": t_eigh_ir, "gaussian_pipeline_s": t_gauss,
        "ratio_gaussian": t_gauss / t_eigh_ir,
        "eigh_full_s": t_eigh_full, "tetrahedron_pipeline_s": t_tetra,
        "ratio_tetrahedron": t_tetra / t_eigh_full,
    }


def child_peak_memory(n: int, method: str) -> float:
    """Peak resident memory (MB) of a child process that runs one DOS on an n³ mesh."""
    code = (
        "import resource, sys; sys.path[:0] = [%r];"
        "from bench_dos import model_fcc;"
        "from valband.workflows import DOSSettings, compute_dos;"
        "compute_dos(model_fcc(), DOSSettings(mesh=%d, method=%r));"
        "print(resource.getrusage(resource.RUSAGE_SELF).ru_maxrss)"
    ) % (os.path.dirname(os.path.abspath(__file__)), n, method)
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    return int(out.stdout.strip().splitlines()[-1]) / 1024.0


def startup_and_compile() -> dict:
    exe = os.path.join(os.path.dirname(sys.executable), "valband")
    cmd_help = [exe, "--help"] if os.path.exists(exe) else [sys.executable, "-m", "valband.cli.main", "--help"]
    t_help = best_of(lambda: subprocess.run(cmd_help, capture_output=True, check=True), 3)
    cmd_dos = cmd_help[:-1] + ["dos", "Cu fcc", "--mesh", "8", "--quiet"]
    with tempfile.TemporaryDirectory() as cache, tempfile.TemporaryDirectory() as work:
        env = dict(os.environ, NUMBA_CACHE_DIR=cache)
        run = lambda: subprocess.run(cmd_dos + ["--out", work], capture_output=True, check=True, env=env)  # noqa: E731
        t_first = best_of(run, 1)
        t_second = best_of(run, 2)
    return {"help_s": t_help, "dos_first_run_s": t_first, "dos_cached_run_s": t_second,
            "compile_s": t_first - t_second}


def main() -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--quick", action="store_true", help="24³ and 48³ instead of 48³ and 96³")
    ap.add_argument("--repeat", type=int, default=3)
    a = ap.parse_args()
    n, n_big = (24, 48) if a.quick else (48, 96)
    r = pipeline_ratios(n, a.repeat)
    print(f"fcc Cu, 9 orbitals, {n}³ Monkhorst–Pack: {r['n_irreducible']} irreducible of {r['n_full']}")
    print(f"  bare eigh, irreducible set      {r['eigh_irreducible_s'] * 1e3:9.1f} ms")
    print(f"  Gaussian DOS, whole pipeline    {r['gaussian_pipeline_s'] * 1e3:9.1f} ms"
          f"   ratio {r['ratio_gaussian']:.2f}  (target ≤ 1.5)")
    print(f"  bare eigh, full mesh            {r['eigh_full_s'] * 1e3:9.1f} ms")
    print(f"  tetrahedron DOS, whole pipeline {r['tetrahedron_pipeline_s'] * 1e3:9.1f} ms"
          f"   ratio {r['ratio_tetrahedron']:.3f} (target ≤ 0.25)")
    for method in ("gaussian", "tetrahedron"):
        mb = child_peak_memory(n_big, method)
        print(f"  peak memory, {n_big}³ {method:<11s}     {mb:9.0f} MB   (target < 1024 MB)")
    s = startup_and_compile()
    print(f"  valband --help                  {s['help_s'] * 1e3:9.0f} ms   (target < 500 ms)")
    print(f"  valband dos, first run (compile){s['dos_first_run_s']:9.2f} s")
    print(f"  valband dos, second run (cached){s['dos_cached_run_s']:9.2f} s   "
          f"compile time ≈ {s['compile_s']:.2f} s")
    return 0


if __name__ == "__main__":
    sys.exit(main())
