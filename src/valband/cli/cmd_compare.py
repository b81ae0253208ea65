"""``valband compare``: fit the model's spectrum to a measured valence-band spectrum."""

from __future__ import annotations

import sys

from valband.cli.cmd_simulate import (
    _SOURCES_HELP,
    DEFAULT_A_PER_EV,
    DEFAULT_GAMMA0_EV,
    DEFAULT_GAUSSIAN_FWHM_EV,
    MAGIC_ANGLE_DEG,
    add_qp_argument,
)
from valband.cli.common import (
    add_depth_arguments,
    add_dos_arguments,
    add_method_arguments,
    add_output_arguments,
    dos_settings,
    print_json,
)
from valband.defaults import DEFAULT_PARAMETER_SET

__all__ = ["add_arguments", "run"]

# Repeated from valband.spectra.fit so that ``valband --help`` does not import numba; a test
# checks they agree.
BACKGROUNDS = ("none", "constant", "linear", "shirley", "tougaard")
FREE_NAMES = ("shift", "d_offset", "scale", "gaussian_fwhm", "gamma0", "lifetime_a",
              "background", "weights")
DEFAULT_FREE = ("shift", "scale", "gaussian_fwhm", "gamma0", "lifetime_a", "background")


def _names(text: str) -> tuple[str, ...]:
    import argparse

    names = tuple(n.strip() for n in text.split(",") if n.strip())
    bad = [n for n in names if n not in FREE_NAMES]
    if bad:
        raise argparse.ArgumentTypeError(f"unknown parameter(s) {', '.join(bad)}; accepted: "
                                         f"{', '.join(FREE_NAMES)}")
    return names


def add_arguments(p) -> None:
    """Options of ``valband compare``."""
    p.add_argument("measured", help="measured spectrum: two-column text/CSV or VAMAS (.vms) file")
    p.add_argument("structure", help="structure file (any format ASE reads) or a build spec in "
                   "quotes, e.g. 'Cu fcc'")
    p.add_argument("--params", default=DEFAULT_PARAMETER_SET, metavar="SET",
                   help="parameter set: a shipped name or a .toml path "
                   f"(default {DEFAULT_PARAMETER_SET})")
    m = p.add_argument_group("measured file")
    m.add_argument("--block", default=None, help="VAMAS block name or 0-based index")
    m.add_argument("--axis", default="auto", choices=["auto", "binding", "kinetic"],
                   help="first column / abscissa (default auto: from the header, else binding)")
    m.add_argument("--work-function", type=float, default=4.5, metavar="EV",
                   help="analyser work function for a kinetic axis, eV (default 4.5)")
    m.add_argument("--calibrate-edge", action="store_true",
                   help="fit the Fermi edge of the measurement first and move it to BE = 0 "
                   "(the shift is then fixed unless --free names it, and the d-band offset "
                   "d_offset is fitted instead)")
    m.add_argument("--edge-window", type=float, nargs=2, default=(-1.0, 1.0),
                   metavar=("BE_LO", "BE_HI"), help="Fermi-edge fit window, eV (default -1 1)")
    g = p.add_argument_group("photoemission")
    g.add_argument("--photon-energy", default=None, metavar="E|SOURCE",
                   help=f"photon energy in eV or a source name ({_SOURCES_HELP}); default: "
                   "from the measured file")
    g.add_argument("--temperature", type=float, default=300.0, metavar="K",
                   help="sample temperature in K (default 300)")
    g.add_argument("--resolution", type=float, default=DEFAULT_GAUSSIAN_FWHM_EV, metavar="FWHM",
                   help="start (or fixed) Gaussian FWHM in eV "
                   f"(default {DEFAULT_GAUSSIAN_FWHM_EV:g})")
    g.add_argument("--lifetime", type=float, nargs=2, metavar=("G0", "A"),
                   default=(DEFAULT_GAMMA0_EV, DEFAULT_A_PER_EV),
                   help="start (or fixed) lifetime HWHM G0 + A·(E−E_F)², G0 in eV, A in 1/eV "
                   f"(default {DEFAULT_GAMMA0_EV:g} {DEFAULT_A_PER_EV:g})")
    g.add_argument("--angle", type=float, default=MAGIC_ANGLE_DEG, metavar="DEG",
                   help=f"source–analyser angle in degrees (default {MAGIC_ANGLE_DEG:.2f})")
    g.add_argument("--polarization", default="unpolarized", choices=["unpolarized", "linear"],
                   help="light polarisation (default unpolarized)")
    add_qp_argument(g)
    add_depth_arguments(g)
    f = p.add_argument_group("fit")
    f.add_argument("--background", default="shirley", choices=BACKGROUNDS,
                   help="background fitted with the model (default shirley)")
    f.add_argument("--free", type=_names, default=None, metavar="NAMES",
                   help="comma-separated free parameters among " + ", ".join(FREE_NAMES)
                   + f" (default {','.join(DEFAULT_FREE)}; after --calibrate-edge d_offset "
                   "instead of shift)")
    f.add_argument("--fix", type=_names, default=(), metavar="NAMES",
                   help="comma-separated parameters to hold at their start values")
    f.add_argument("--shift-range", type=float, nargs=2, default=(-2.0, 2.0),
                   metavar=("LO", "HI"), help="bounds of the energy shift, eV (default -2 2)")
    f.add_argument("--fit-window", type=float, nargs=2, default=None, metavar=("BE_LO", "BE_HI"),
                   help="binding-energy range fitted, eV (default: the measurement inside the "
                   "DOS grid)")
    f.add_argument("--band-window", type=float, nargs=2, default=None,
                   metavar=("BE_LO", "BE_HI"),
                   help="binding-energy window of the band-centre moments, eV (default 0 to the "
                   "deep end of the fit window)")
    add_dos_arguments(p)
    add_method_arguments(p)
    add_output_arguments(p, default_out="valband-compare")


def run(args) -> int:
    """Read the measurement, compute the DOS, fit, write the files, print."""
    from valband.atom.tables import photon_energy_of
    from valband.cli.common import depth_weights_of, load_model_with_info, method_dos
    from valband.spectra.compare import compare_job
    from valband.spectra.measured import read_spectrum

    hv = photon_energy_of(args.photon_energy) if args.photon_energy is not None else None
    block = args.block
    if block is not None and block.isdigit():
        block = int(block)
    measured = read_spectrum(args.measured, axis=args.axis, photon_energy=hv,
                             work_function=args.work_function, block=block)
    model, info = load_model_with_info(args)
    pre, method = method_dos(args, model, info, context="spectra")
    weights, record = depth_weights_of(args, model, info,
                                       hv if hv is not None else measured.photon_energy)
    free = args.free
    if args.fix:
        base = free if free is not None else tuple(
            ("d_offset" if (args.calibrate_edge and n == "shift") else n) for n in DEFAULT_FREE)
        free = tuple(n for n in base if n not in args.fix)
    initial = {"gaussian_fwhm": args.resolution, "gamma0": args.lifetime[0],
               "lifetime_a": args.lifetime[1]}
    summary, fit, _dos, cal = compare_job(
        model, dos_settings(args), measured, args.out, photon_energy=hv,
        temperature=args.temperature, geometry=(args.angle, args.polarization),
        background=args.background, free=free, initial=initial,
        shift_range=tuple(args.shift_range), window=args.fit_window,
        band_window=args.band_window,
        calibrate_window=tuple(args.edge_window) if args.calibrate_edge else None,
        fmt=args.format, progress=not (args.quiet or args.json), layer_weights=weights,
        depth_record=record, dos=pre, extra={"method": method},
        d_correction=None if args.no_qp_correction else "auto")
    if args.json:
        print_json(summary)
    elif not args.quiet:
        if cal:
            print(f"Fermi edge at {cal['fermi_level_eV']:+.4f} ± {cal['fermi_level_err_eV']:.4f}"
                  f" eV on the file's axis (edge FWHM {cal['edge_fwhm_eV']:.3f} eV); shifted to 0")
        print(f"{model.structure.formula} vs {args.measured}: {fit.n_points} points, "
              f"background {args.background}")
        from valband.spectra.quasiparticle import describe_record

        print("  " + describe_record(fit.settings["d_band_correction"]))
        for name, par in fit.parameters.items():
            err = f" ± {par.error:.3g}" if par.error is not None else " (fixed)"
            print(f"  {name:14s} {par.value:12.5g}{err}  {par.unit}")
        dp = fit.parameters.get("d_offset")
        if dp is not None and dp.free:
            print(f"  d-band offset (d against s, p and the {'calibrated' if cal else 'fitted'} "
                  f"edge; + = deeper): {dp.value:+.3f} ± {dp.error:.3f} eV")
        print(f"  χ² {fit.chi2:.5g}, reduced χ² {fit.reduced_chi2:.4g} (dof {fit.dof}), "
              f"R-factor {fit.r_factor:.4g}")
        bc = fit.band_centre
        if bc.get("measured_eV") is not None:
            dos_c = bc.get("model_dos_centre_eV")
            print(f"  band centre over BE {bc['window_eV'][0]:.2f}–{bc['window_eV'][1]:.2f} eV: "
                  f"measured {bc['measured_eV']:+.3f} eV, model spectrum "
                  f"{bc['model_spectrum_centre_eV']:+.3f} eV"
                  + (f", model {bc['shell']} DOS {dos_c:+.3f} eV" if dos_c is not None else "")
                  + " (spectrum moments include s, p and the cross-section weighting)")
        print("Model fits are estimates; check them against your own knowledge of the sample.")
        print(f"wrote {args.out}/", file=sys.stderr)
    return 0
