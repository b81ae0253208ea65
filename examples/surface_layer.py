"""The surface layer's d band of a Pt(111) slab, layer by layer.

The fictional Halvard Ridge group wants the d-band descriptors of the atoms an adsorbate
actually meets. A 5-layer Pt(111) slab with vacuum is built from a spec, its layer-resolved d
DOS computed with the program's default local charge neutrality per site, and the surface
layer compared with the central (bulk-like) layer: the narrower surface band rises towards
E_F to keep its charge (common practice). Model predictions are estimates, not measurements.

Usage: python examples/surface_layer.py [--mesh N] [--out FILE.png] [--layers L]
"""

from __future__ import annotations

import argparse

from valband.defaults import DEFAULT_PARAMETER_SET
from valband.params import load_parameter_set
from valband.report.plots import new_figure, save_figure
from valband.structure import load_structure_with_info
from valband.tb import build_model
from valband.workflows import DOSSettings, describe
from valband.workflows.methods import dos_by_method


def main() -> None:
    """Parse the options, compute, print and plot."""
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--mesh", type=int, default=16, help="in-plane k-points per vector")
    ap.add_argument("--out", default="pt111_layers.png", help="figure file (PNG or SVG)")
    ap.add_argument("--layers", type=int, default=5, help="number of atomic layers")
    args = ap.parse_args()

    structure, info = load_structure_with_info(f"slab Pt fcc111 layers={args.layers} vacuum=12")
    params = load_parameter_set(DEFAULT_PARAMETER_SET)
    model = build_model(structure, params)
    dos, record = dos_by_method(model, info, DOSSettings(mesh=f"{args.mesh}x{args.mesh}x1"),
                                params=params)
    table = describe(dos, "d")
    depth = info["depth"]            # 0 = a surface layer, counted from the nearer surface
    print(f"Pt(111), {args.layers} layers, mesh {args.mesh}x{args.mesh}x1, E_F = "
          f"{dos.fermi_level:.3f} eV (model scale), {params.name}, {record['method']}")
    print("site  depth  d-band centre (eV)  width (eV)  upper edge (eV)")
    for i, d in table.sites.items():
        print(f"{i:4d}  {depth[i]:5d}  {d.centre:18.3f}  {d.width:10.3f}  {d.upper_edge:15.3f}")

    fig, ax = new_figure()
    for i in sorted(table.sites, key=lambda i: depth[i])[::2]:
        ax.plot(dos.energies, dos.select(site=i, shell="d"), lw=1.2,
                label=f"site {i} (depth {depth[i]})")
    ax.axvline(0, color="k", lw=0.6, ls="-.")
    ax.set_xlim(-9, 4)
    ax.set_xlabel("E − E$_F$ (eV)")
    ax.set_ylabel("d DOS (states / eV / atom)")
    ax.legend(frameon=False, fontsize=8)
    save_figure(fig, args.out)
    print(f"wrote {args.out}")


if __name__ == "__main__":
    main()
