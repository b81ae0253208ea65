"""``valband simulate``: simulated valence-band photoemission spectrum at a photon energy."""

from __future__ import annotations

import sys

from valband.cli.common import (
    add_depth_arguments,
    add_dos_arguments,
    add_method_arguments,
    add_model_arguments,
    add_output_arguments,
    dos_settings,
    print_json,
)

__all__ = ["add_arguments", "run"]

# Defaults repeated here so that ``valband --help`` does not import numba; a test checks they
# equal valband.spectra's (DEFAULT_GAMMA0_EV, DEFAULT_A_PER_EV, DEFAULT_GAUSSIAN_FWHM_EV,
# MAGIC_ANGLE_DEG).
DEFAULT_GAMMA0_EV = 0.02
DEFAULT_A_PER_EV = 0.02
DEFAULT_GAUSSIAN_FWHM_EV = 0.3
MAGIC_ANGLE_DEG = 54.735610317245346

_SOURCES_HELP = "He-I 21.22, He-II 40.81, Mg-Ka 1253.6, Al-Ka 1486.6, Cr-Ka 5414.7, Ga-Ka 9251.7"


def add_arguments(p) -> None:
    """Options of ``valband simulate``."""
    add_model_arguments(p)
    g = p.add_argument_group("photoemission")
    g.add_argument("--photon-energy", required=True, metavar="E|SOURCE",
                   help=f"photon energy in eV or a lab source name ({_SOURCES_HELP})")
    g.add_argument("--temperature", type=float, default=300.0, metavar="K",
                   help="temperature of the Fermi–Dirac occupation in K (default 300; 0 = step)")
    g.add_argument("--resolution", type=float, default=DEFAULT_GAUSSIAN_FWHM_EV, metavar="FWHM",
                   help="instrument resolution, Gaussian FWHM in eV "
                   f"(default {DEFAULT_GAUSSIAN_FWHM_EV:g})")
    g.add_argument("--lifetime", type=float, nargs=2, metavar=("G0", "A"),
                   default=(DEFAULT_GAMMA0_EV, DEFAULT_A_PER_EV),
                   help="lifetime Lorentzian HWHM = G0 + A·(E−E_F)², G0 in eV, A in 1/eV "
                   f"(default {DEFAULT_GAMMA0_EV:g} {DEFAULT_A_PER_EV:g})")
    g.add_argument("--angle", type=float, default=MAGIC_ANGLE_DEG, metavar="DEG",
                   help="angle in degrees between photon beam (unpolarized) or polarisation "
                   f"vector (linear) and analyser (default magic angle {MAGIC_ANGLE_DEG:.2f})")
    g.add_argument("--polarization", default="unpolarized", choices=["unpolarized", "linear"],
                   help="light polarisation (default unpolarized)")
    g.add_argument("--inelastic", nargs=2, metavar=("KIND", "VALUE"), default=None,
                   help="add an inelastic background: 'shirley K' (K in 1/eV, times the area "
                   "at lower BE) or 'tougaard B' (B in eV², universal cross-section)")
    add_depth_arguments(g)
    add_dos_arguments(p)
    add_method_arguments(p)
    add_output_arguments(p, default_out="valband-spectrum")


def _inelastic(pair):
    """(kind, amplitude) from ``--inelastic KIND VALUE``; SettingsError for a non-number."""
    if pair is None:
        return None
    from valband.errors import SettingsError

    try:
        return pair[0], float(pair[1])
    except ValueError:
        raise SettingsError(f"--inelastic {pair[0]} {pair[1]}: the value must be a number "
                            "(K in 1/eV for shirley, B in eV² for tougaard)") from None


def run(args) -> int:
    """Compute the DOS and the spectrum, write the files, print."""
    from valband.cli.common import depth_weights_of, load_model_with_info, method_dos
    from valband.spectra.io import simulate_job

    model, info = load_model_with_info(args)
    pre, method = method_dos(args, model, info, context="spectra")
    weights, record = depth_weights_of(args, model, info, args.photon_energy)
    summary, spec, dos = simulate_job(
        model, dos_settings(args), args.out, args.photon_energy, args.temperature,
        args.resolution, tuple(args.lifetime), (args.angle, args.polarization), args.format,
        progress=not (args.quiet or args.json), inelastic=_inelastic(args.inelastic),
        layer_weights=weights, depth_record=record, dos=pre,
        extra={"method": method})
    if args.json:
        print_json(summary)
    elif not args.quiet:
        st = spec.settings
        print(f"{model.structure.formula}: spectrum at hν = {st['photon_energy_eV']:g} eV"
              f"{' (' + st['photon_source'] + ')' if st['photon_source'] else ''}, "
              f"T = {st['temperature_K']:g} K, resolution {st['gaussian_fwhm_eV']:g} eV FWHM")
        for x in st["cross_sections"]:
            print(f"  {x['element']} {x['shell']} ({x['subshell']}): σ = "
                  f"{x['sigma_per_electron_mb']:.4g} Mb/electron, angular factor "
                  f"{x['angular_factor']:.3f}")
        print(f"wrote {args.out}/", file=sys.stderr)
    return 0
