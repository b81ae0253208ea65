"""d-band centre across the Cu(1−x)Pd(x) composition range from random fcc supercells.

The fictional Halvard Ridge group wants to see how the d-band centre of a random Cu–Pd alloy
moves between pure Cu and pure Pd. Each composition is built as random substitutional
supercells (seeded, several configurations) and the centre is averaged, with the spread over
configurations shown as error bars. Model predictions are estimates, not measurements.

Usage: python examples/composition_scan.py [--mesh N] [--out FILE.png] [--configs K] [--seed S]
"""

from __future__ import annotations

import argparse

import numpy as np

from valband.defaults import DEFAULT_PARAMETER_SET
from valband.params import load_parameter_set
from valband.report.plots import new_figure, save_figure
from valband.structure import build_structure, random_configurations
from valband.tb import build_model
from valband.workflows import DOSSettings, describe
from valband.workflows.methods import dos_by_method

FRACTIONS = (0.0, 0.25, 0.5, 0.75, 1.0)


def main() -> None:
    """Parse the options, compute, print and plot."""
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--mesh", type=int, default=8, help="k-points per reciprocal vector")
    ap.add_argument("--out", default="cupd_scan.png", help="figure file (PNG or SVG)")
    ap.add_argument("--configs", type=int, default=3, help="random configurations per x")
    ap.add_argument("--seed", type=int, default=11, help="seed of the configurations")
    args = ap.parse_args()

    params = load_parameter_set(DEFAULT_PARAMETER_SET)
    parent = build_structure("Cu fcc 3.75")   # near the Vegard average of Cu and Pd
    rows = []
    print(f"random fcc Cu(1-x)Pd(x), 8-atom supercells, {args.configs} configurations per x, "
          f"seed {args.seed}, {params.name}, local charge neutrality per site (the default)")
    for x in FRACTIONS:
        centres = []
        n = 1 if x in (0.0, 1.0) else args.configs
        for conf in random_configurations(parent, {"Cu": 1 - x, "Pd": x}, 2, n_configs=n,
                                          seed=args.seed):
            dos, _ = dos_by_method(build_model(conf.structure, params), {"kind": "random"},
                                   DOSSettings(mesh=args.mesh), params=params)
            centres.append(describe(dos, "d").cell.centre)
        rows.append((x, float(np.mean(centres)), float(np.std(centres))))
        print(f"  x = {x:4.2f}: d-band centre {rows[-1][1]:+.3f} ± {rows[-1][2]:.3f} eV")

    fig, ax = new_figure()
    xs, mean, spread = (np.array(c) for c in zip(*rows, strict=True))
    ax.errorbar(xs, mean, yerr=spread, marker="o", color="#283593", capsize=3)
    ax.set_xlabel("Pd fraction x")
    ax.set_ylabel("d-band centre (eV rel. E$_F$)")
    ax.set_title("random Cu$_{1-x}$Pd$_x$ (model estimate)", fontsize=10)
    save_figure(fig, args.out)
    print(f"wrote {args.out}")


if __name__ == "__main__":
    main()
