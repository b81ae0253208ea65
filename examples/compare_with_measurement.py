"""Fit the model's Al Kα spectrum of Cu to an (invented) measured VAMAS file, from Python.

The fictional Halvard Ridge group recorded valence bands before calibrating their analyser
(the file is invented by valband itself: examples/demo-measurements/README.md). We fit the
simulated spectrum — free energy shift, scale, resolution, lifetime width, Shirley background —
and compare the measured valence-band centre with the model's. Model predictions are
estimates, not measurements.

Usage: python examples/compare_with_measurement.py [--mesh N] [--out FILE.png] [--block NAME]
"""

from __future__ import annotations

import argparse
from pathlib import Path

from valband.defaults import DEFAULT_PARAMETER_SET
from valband.params import load_parameter_set
from valband.report.plots import new_figure, save_figure
from valband.spectra import read_spectrum
from valband.spectra.fit import fit_spectrum
from valband.spectra.plot import plot_fit
from valband.structure import read_structure
from valband.tb import build_model
from valband.workflows import DOSSettings
from valband.workflows.methods import dos_by_method

HERE = Path(__file__).resolve().parent
FILES = {"Cu": "Cu_fcc.cif", "Cu3Pd": "Cu3Pd_L12.cif", "CuPd": "CuPd_B2.cif",
         "Pd": "Pd_fcc.vasp"}


def main() -> None:
    """Parse the options, compute, print and plot."""
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--mesh", type=int, default=20, help="k-points per reciprocal vector")
    ap.add_argument("--out", default="cu_fit.png", help="figure file (PNG or SVG)")
    ap.add_argument("--block", default="Cu", choices=sorted(FILES), help="candidate")
    args = ap.parse_args()

    measured = read_spectrum(HERE / "demo-measurements" / "halvard-ridge-valence-bands.vms",
                             block=args.block)
    model = build_model(read_structure(HERE.parent / "structures" / FILES[args.block]),
                        params := load_parameter_set(DEFAULT_PARAMETER_SET))
    # the defaults of `valband compare`: neutrality for compounds, spin-orbit for Pd
    dos, _ = dos_by_method(model, {"kind": "file"}, DOSSettings(mesh=args.mesh), params=params,
                           soc=None, context="spectra")
    fit = fit_spectrum(measured, dos, background="shirley")   # hν from the file (Al Kα)

    print(f"{args.block}: {fit.n_points} points, reduced χ² {fit.reduced_chi2:.3g}, "
          f"R-factor {fit.r_factor:.3g}")
    for name in ("shift", "gaussian_fwhm", "gamma0"):
        p = fit.parameters[name]
        print(f"  {name:14s} {p.value:8.4f} ± {p.error:.4f} {p.unit}")
    bc = fit.band_centre
    print(f"valence-band centre over BE {bc['window_eV'][0]:.1f}–{bc['window_eV'][1]:.1f} eV: "
          f"measured {bc['measured_eV']:+.3f} eV, model spectrum "
          f"{bc['model_spectrum_centre_eV']:+.3f} eV; model d-band centre (d pDOS, same window) "
          f"{bc['model_dos_centre_eV']:+.3f} eV")

    fig, _ = new_figure(6.4, 5.2)
    fig.clear()
    plot_fit(fig, fit, title=f"{args.block}: model vs invented measurement")
    save_figure(fig, args.out)
    print(f"wrote {args.out}")


if __name__ == "__main__":
    main()
