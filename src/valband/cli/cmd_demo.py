"""``valband demo``: run the bundled, invented demo scenario and write everything to one folder."""

from __future__ import annotations

import sys

from valband.defaults import DEFAULT_PARAMETER_SET


def add_arguments(p) -> None:
    """Options of ``valband demo``."""
    p.add_argument("--out", default="valband-demo", metavar="DIR",
                   help="folder for all results (default valband-demo)")
    p.add_argument("--params", default=DEFAULT_PARAMETER_SET, metavar="SET",
                   help=f"parameter set name or .toml path (default {DEFAULT_PARAMETER_SET})")
    p.add_argument("--mesh", default="20", help="k-mesh per candidate (default 20)")
    p.add_argument("--format", default="png", choices=["png", "svg"], help="plot format")
    p.add_argument("--json", action="store_true", help="print the summary as JSON")
    p.add_argument("--quiet", action="store_true", help="print nothing but errors")


def run(args) -> int:
    """Run the scenario, print the ranking."""
    from valband.cli.common import print_json
    from valband.demo import DEMO_NOTE, run_demo

    quiet = args.quiet or args.json
    log = (lambda *a, **k: None) if quiet else (lambda m: print(m, file=sys.stderr))
    log(f"valband demo -> {args.out}/\n{DEMO_NOTE}")
    summary = run_demo(args.out, args.params, args.mesh, args.format, progress=not quiet, log=log)
    if args.json:
        print_json(summary)
    elif not args.quiet:
        print("rank  candidate  d-band centre (eV)  width (eV)  filling")
        for i, r in enumerate(summary["screening"], 1):
            print(f"{i:4d}  {r['name']:9s}  {r['d_band_centre_eV']:18.3f}  "
                  f"{r['d_band_width_eV']:10.3f}  {r['d_filling']:7.3f}")
        fitted = [r for r in summary["screening"] if r.get("fit_shift_eV") is not None]
        if fitted:
            print("fits to the invented Al Kα measurements (demo-measurements):")
            for r in fitted:
                print(f"  {r['name']:9s} shift {r['fit_shift_eV']:+.3f} eV, χ²_red "
                      f"{r['fit_reduced_chi2']:.3g}, measured VB centre "
                      f"{r['measured_band_centre_eV']:+.3f} eV")
        if summary.get("parameter_set_caution"):
            print(summary["parameter_set_caution"])
        print(f"results in {args.out}/ (report.html, figure.png/.pdf, summary.json, "
              "screening.csv, one folder per candidate)")
    return 0
