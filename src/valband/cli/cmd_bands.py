"""``valband bands``: bands along a path with orbital character (fat bands)."""

from __future__ import annotations

import sys

from valband.cli.common import add_model_arguments, add_output_arguments, print_json


def add_arguments(p) -> None:
    """Options of ``valband bands``."""
    add_model_arguments(p)
    p.add_argument("--path", default=None,
                   help="special points, e.g. GXWKGL,UX (G = Γ, comma = jump); default: the lattice's")
    p.add_argument("--npoints", type=int, default=300, help="k-points along the path (default 300)")
    p.add_argument("--mesh", default="16", help="mesh of the DOS run that fixes E_F (default 16)")
    p.add_argument("--character", default="d", metavar="[ELEMENT:]SHELL",
                   help="orbital character drawn as fat bands, e.g. d or Pd:d (default d)")
    p.add_argument("--soc", action="store_true",
                   help="spin–orbit coupling λL·S on p and d shells (constants from the "
                   "parameter set, else from valband's atom engine)")
    add_output_arguments(p, default_out="valband-bands")


def run(args) -> int:
    """Compute, write, print."""
    from valband.cli.common import load_model
    from valband.errors import SettingsError
    from valband.jobs import bands_job

    element, _, shell = args.character.rpartition(":")
    if shell not in ("s", "p", "d"):
        raise SettingsError(f"--character {args.character!r}: expected SHELL or ELEMENT:SHELL, "
                            "SHELL one of s, p, d")
    model = load_model(args)
    present = sorted(set(model.structure.symbols))
    if element and element not in present:
        raise SettingsError(f"--character {args.character!r}: {element} is not in "
                            f"{model.structure.formula}; accepted elements: {', '.join(present)}")
    extra = None
    if args.soc:
        from valband.params import load_parameter_set
        from valband.spin import spin_model

        model = spin_model(model, soc=True, params=load_parameter_set(args.params))
        extra = {"method": {"method": "spin + spin-orbit",
                            "spin_orbit": [c.to_dict() for c in model.spin_orbit.values()]}}
    summary, bands = bands_job(model, args.out, args.path, args.npoints, args.mesh, args.format,
                               element or None, shell, progress=not args.quiet, extra=extra)
    if args.json:
        print_json(summary)
    elif not args.quiet:
        print(f"{model.structure.formula}: {bands.energies.shape[1]} bands at "
              f"{len(bands.kpoints)} k-points along {bands.settings['path']}")
        print(f"wrote {args.out}/", file=sys.stderr)
    return 0
