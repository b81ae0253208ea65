"""Cost of the default charge self-consistency: default ``describe`` against the plain model.

Issue target: the default ``describe`` of a 5-layer slab and of a 32-atom SQS (local charge
neutrality per site, the default) costs at most 3× the plain run (``--neutral off``) of the
same structure and mesh. Both are timed in this process, each the best of ``--repeat`` runs
after a warm-up (numba compiled, parameter set loaded), through the same entry the CLI uses
(:func:`valband.workflows.methods.dos_by_method` + :func:`valband.workflows.describe`); the
ratio is the figure, seconds depend on the machine. The load average seen is printed.

Usage: python benchmarks/bench_selfconsistency.py [--repeat N]
"""

from __future__ import annotations

import argparse
import os

from timing import best_of

CASES = (
    ("slab Pt fcc111 layers=5 vacuum=12", (12, 12, 1)),
    ("slab Cu fcc111 layers=5 vacuum=12", (12, 12, 1)),
    ("overlayer Pd/Cu fcc111 layers=5", (12, 12, 1)),
    ("sqs Cu0.5Pd0.5 fcc 32 seed=1", 4),
    ("Cu3Pd L12", 24),
)


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--repeat", type=int, default=3)
    a = ap.parse_args()

    from valband.defaults import DEFAULT_PARAMETER_SET
    from valband.params import load_parameter_set
    from valband.structure import load_structure_with_info
    from valband.tb import build_model
    from valband.workflows import DOSSettings, describe
    from valband.workflows.methods import dos_by_method

    params = load_parameter_set(DEFAULT_PARAMETER_SET)
    print(f"parameter set {params.name}; load average before: {os.getloadavg()[0]:.2f}")
    print(f"{'structure':38s} {'mesh':>9s} {'plain s':>8s} {'default s':>9s} {'ratio':>6s}  loop")
    for spec, mesh in CASES:
        structure, info = load_structure_with_info(spec)
        model = build_model(structure, params)
        settings = DOSSettings(mesh=mesh)

        def run(neutral, model=model, info=info, settings=settings):
            dos, rec = dos_by_method(model, info, settings, params=params, neutral=neutral)
            describe(dos, "d")
            return rec

        rec = run("auto")   # warm-up of both paths
        run("off")
        t_plain = best_of(lambda: run("off"), a.repeat)
        t_sc = best_of(lambda: run("auto"), a.repeat)
        neu = rec["neutrality"]
        coarse = neu.get("coarse_loop_mesh", neu["loop_mesh"])
        loop = (f"{neu.get('coarse_loop_iterations', neu['iterations'])} iterations on "
                f"{coarse}" + (f" + {neu['iterations']} on the DOS mesh"
                               if "coarse_loop_iterations" in neu else
                               " + a Newton step on the DOS mesh"
                               if "newton_step_on_dos_mesh" in neu else ""))
        print(f"{spec:38s} {str(mesh):>9s} {t_plain:8.2f} {t_sc:9.2f} {t_sc / t_plain:6.2f}  "
              f"{loop}")
    print(f"load average after: {os.getloadavg()[0]:.2f}")


if __name__ == "__main__":
    main()
