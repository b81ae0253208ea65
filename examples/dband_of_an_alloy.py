"""d-band descriptors of an ordered alloy from Python (invented demo scenario).

The fictional Halvard Ridge catalysis group wants to know how diluting Pd in Cu (ordered L1₂
Cu₃Pd) moves the d band of each element. Model predictions are estimates, not measurements.

Usage: python examples/dband_of_an_alloy.py [--mesh N] [--out FILE.png]
"""

from __future__ import annotations

import argparse
from pathlib import Path

from valband.defaults import DEFAULT_PARAMETER_SET
from valband.params import load_parameter_set
from valband.report.plots import new_figure, plot_dos, save_figure
from valband.structure import read_structure
from valband.tb import build_model
from valband.workflows import DOSSettings, describe
from valband.workflows.methods import dos_by_method

HERE = Path(__file__).resolve().parent


def main() -> None:
    """Parse the options, compute, print and plot."""
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--mesh", type=int, default=24, help="k-points per reciprocal vector")
    ap.add_argument("--out", default="cu3pd_dos.png", help="figure file (PNG or SVG)")
    args = ap.parse_args()

    structure = read_structure(HERE.parent / "structures" / "Cu3Pd_L12.cif")
    params = load_parameter_set(DEFAULT_PARAMETER_SET)
    model = build_model(structure, params)
    # the program's default method: local charge neutrality per site for a compound
    dos, record = dos_by_method(model, {"kind": "file"},
                                DOSSettings(mesh=args.mesh, method="tetrahedron"), params=params)
    table = describe(dos, "d", window=(-10.0, 4.0))

    print(f"{structure.formula}: {model.n_orbitals} orbitals, E_F = {dos.fermi_level:.3f} eV "
          f"(model scale), {dos.settings['mesh']['n_irreducible']} irreducible k-points, "
          f"{params.name}, {record['method']}")
    print(f"d-band centre per element over {table.window} eV relative to E_F:")
    for element, d in table.elements.items():
        print(f"  {element:2s}  centre {d.centre:+.3f} eV  width {d.width:.3f} eV  "
              f"filling {d.filling:.3f}")
    fig, ax = new_figure()
    plot_dos(ax, dos, title="Cu3Pd (L1$_2$) — invented demo scenario")
    print("figure:", save_figure(fig, args.out))


if __name__ == "__main__":
    main()
