"""Options shared by several subcommands, and the few steps they share (load, model, DOS)."""

from __future__ import annotations

import argparse
import sys

__all__ = [
    "add_model_arguments", "add_dos_arguments", "add_output_arguments",
    "load_model", "load_model_with_info", "add_depth_arguments", "depth_weights_of",
    "add_method_arguments", "method_dos", "layer_block", "print_layer_table",
    "dos_settings", "print_json", "window_of", "print_method_record",
]

from valband.defaults import DEFAULT_PARAMETER_SET as DEFAULT_PARAMS


def add_model_arguments(p: argparse.ArgumentParser) -> None:
    """STRUCTURE and --params."""
    p.add_argument("structure", help="structure file (any format ASE reads: CIF, POSCAR, extxyz, …) "
                   "or a build spec in quotes, e.g. 'Cu fcc' or 'Pd fcc 3.89' (lattice constant in Å)")
    p.add_argument("--params", default=DEFAULT_PARAMS, metavar="SET",
                   help=f"parameter set: a shipped name or a .toml path (default {DEFAULT_PARAMS})")


def add_dos_arguments(p: argparse.ArgumentParser) -> None:
    """k-mesh, DOS method and grid options."""
    g = p.add_argument_group("k-mesh and DOS")
    g.add_argument("--mesh", default="24", help="k-points per reciprocal lattice vector: N or N1xN2xN3 "
                   "(default 24)")
    g.add_argument("--gamma", action="store_true",
                   help="Γ-centred mesh instead of Monkhorst–Pack (which shifts even meshes by half a step)")
    g.add_argument("--method", default="gaussian", choices=["gaussian", "lorentzian", "tetrahedron"],
                   help="DOS method (default gaussian)")
    g.add_argument("--width", type=float, default=0.1,
                   help="smearing width in eV: Gaussian σ or Lorentzian HWHM (default 0.1)")
    g.add_argument("--step", type=float, default=0.01, help="energy grid step in eV (default 0.01)")
    g.add_argument("--emin", type=float, default=None, help="grid start, eV relative to E_F")
    g.add_argument("--emax", type=float, default=None, help="grid end, eV relative to E_F")
    g.add_argument("--resolve", default="l", choices=["l", "m"],
                   help="partial DOS per shell (l, default) or per orbital (m; uses the full mesh)")
    g.add_argument("--no-symmetry", action="store_true", help="do not reduce the mesh by symmetry")
    g.add_argument("--electrons", type=float, default=None,
                   help="valence electrons per cell (default: from the parameter set)")
    g.add_argument("--window", type=float, nargs=2, metavar=("EMIN", "EMAX"), default=None,
                   help="energy window for the descriptors, eV relative to E_F (default -15 5, "
                   "clipped to the grid)")
    g.add_argument("--shell", default="d", choices=["s", "p", "d"],
                   help="shell the descriptors describe (default d)")


def add_method_arguments(p: argparse.ArgumentParser) -> None:
    """Alloy method, charge neutrality, spin–orbit and magnetism options."""
    g = p.add_argument_group("alloys, surfaces and spin")
    g.add_argument("--alloy-method", default="supercell", choices=["supercell", "vca", "cpa"],
                   help="for a 'random …' or 'sqs …' spec: the decorated supercell (default), "
                   "the virtual crystal (vca) or the coherent potential approximation (cpa; "
                   "Lorentzian η = --width)")
    g.add_argument("--neutral", default="auto", choices=["auto", "off", "site", "element", "layer"],
                   help="charge self-consistency: onsite shifts keeping each site, element or "
                   "layer (slabs) charge neutral; auto (default): per site for alloys, "
                   "compounds, slabs and overlayers, off for a pure cell whose sites are all "
                   "equivalent; off: the plain model")
    g.add_argument("--soc", dest="soc", action="store_true", default=None,
                   help="spin–orbit coupling λL·S on p and d shells (constants from the "
                   "parameter set, else from valband's atom engine); default: on in simulate "
                   "and compare for structures with an element heavier than Kr, else off")
    g.add_argument("--no-soc", dest="soc", action="store_false",
                   help="no spin–orbit coupling, also where it would be on by default")
    g.add_argument("--magnetic", action="store_true",
                   help="collinear Stoner magnetism, self-consistent with the Fermi level")
    g.add_argument("--stoner", default=None, metavar="EL=I,…",
                   help="Stoner parameters in eV overriding the built-in table, e.g. Fe=0.9")
    g.add_argument("--initial-moment", type=float, default=None, metavar="MU",
                   help="starting moment per magnetic site in μB (default 2)")
    g.add_argument("--order", default=None, choices=["fm", "afm"],
                   help="magnetic start: ferromagnetic (default) or two-sublattice "
                   "antiferromagnetic")


def _pairs(text: str | None, what: str) -> dict | None:
    if text is None:
        return None
    from valband.errors import SettingsError

    out = {}
    for item in text.split(","):
        key, sep, val = item.partition("=")
        try:
            out[key.strip()] = float(val)
        except ValueError:
            sep = ""
        if not sep or not key.strip():
            raise SettingsError(f"{what} {text!r}: expected EL=VALUE pairs separated by commas, "
                                "e.g. Fe=0.9,Ni=1.0")
    return out


def method_dos(args, model, info, context: str = "dos"):
    """(DOS, record) by the method options (:func:`valband.workflows.methods.dos_by_method`).

    ``context="spectra"`` (simulate, compare) turns automatic spin–orbit coupling on for heavy
    elements. The choices and their reasons are printed on stderr unless ``--quiet``/``--json``.
    """
    from valband.params import load_parameter_set
    from valband.workflows.methods import dos_by_method

    quiet = args.quiet or getattr(args, "json", False)
    dos, record = dos_by_method(
        model, info, dos_settings(args), params=load_parameter_set(args.params),
        alloy=args.alloy_method, neutral=args.neutral, soc=args.soc, magnetic=args.magnetic,
        stoner=_pairs(args.stoner, "--stoner"), initial_moment=args.initial_moment,
        order=args.order, context=context, progress=not quiet)
    if not quiet:
        print_method_record(record)
    return dos, record


def print_method_record(record: dict, out=None) -> None:
    """One line each for charge self-consistency and spin–orbit coupling (what and why)."""
    out = out or sys.stderr
    neu = record.get("neutrality")
    if neu is not None:
        if neu["mode"] is None:
            print(f"charge self-consistency: off — {neu['reason']}", file=out)
        else:
            print(f"charge self-consistency: local neutrality per {neu['mode']} — {neu['reason']}; "
                  f"converged in {neu['iterations']} iterations (max residual "
                  f"{neu['max_residual_per_site']:.1e} e/site)", file=out)
    so = record.get("spin_orbit")
    if so is not None:
        print(f"spin–orbit coupling: {'on' if so['on'] else 'off'} — {so['reason']}", file=out)


def layer_block(dos, info, shell: str, window=None):
    """Layer/group descriptors of a slab or overlayer (surface first), or None for bulk."""
    if info.get("kind") not in ("slab", "overlayer") or dos.n_sites != len(info.get("depth", ())):
        return None
    from valband.alloy import layer_descriptors
    from valband.workflows.describe import DEFAULT_WINDOW

    if window is None:   # the same default window as the element and site descriptors
        window = (max(float(dos.energies[0]), DEFAULT_WINDOW[0]),
                  min(float(dos.energies[-1]), DEFAULT_WINDOW[1]))
    return layer_descriptors(dos, info, shell, window)


def print_layer_table(table, out=None) -> None:
    """Surface-first table of the group descriptors of a slab."""
    out = out or sys.stdout
    print(f"{table.shell}-band descriptors by layer group (eV relative to E_F; surface first)",
          file=out)
    print(f"  {'group':12s} {'sites':>10s} {'centre':>8s} {'width':>7s} {'filling':>8s} "
          f"{'upper edge':>10s}", file=out)
    for name, d in table.groups.items():
        sites = ",".join(str(i) for i in table.sites[name])
        print(f"  {name:12s} {sites:>10s} {d.centre:8.3f} {d.width:7.3f} {d.filling:8.3f} "
              f"{d.upper_edge:10.3f}", file=out)


def add_output_arguments(p: argparse.ArgumentParser, default_out: str | None) -> None:
    """--out, --format, --json, --quiet."""
    p.add_argument("--out", default=default_out, metavar="DIR",
                   help="folder for the data files, plots and summary.json"
                   + (f" (default {default_out})" if default_out else ""))
    p.add_argument("--format", default="png", choices=["png", "svg"], help="plot format (default png)")
    p.add_argument("--json", action="store_true", help="print the summary as JSON on stdout")
    p.add_argument("--quiet", action="store_true", help="no progress bar or messages")


def load_model(args):
    """Structure + parameter set → model (the expensive imports happen here)."""
    return load_model_with_info(args)[0]


def load_model_with_info(args):
    """Structure + parameter set → (model, spec info of the structure: layers, seed, …)."""
    from valband.params import load_parameter_set
    from valband.structure import load_structure_with_info
    from valband.tb import build_model

    structure, info = load_structure_with_info(args.structure)
    params = load_parameter_set(args.params)
    if params.caution and not (getattr(args, "quiet", False) or getattr(args, "json", False)):
        print(f"caution ({params.name}): {params.caution}", file=sys.stderr)
    return build_model(structure, params), info


def add_depth_arguments(g) -> None:
    """--depth-weighting and --emission-angle (slab and overlayer structures)."""
    g.add_argument("--depth-weighting", default=None, metavar="LAMBDA|auto",
                   help="weight each site of a slab by exp(-z/(λ cos θ)), z its depth below the "
                   "top surface: λ in Å, or 'auto' for TPP-2M of the slab's main element "
                   "(default: no depth weighting)")
    g.add_argument("--emission-angle", type=float, default=0.0, metavar="DEG",
                   help="emission angle from the surface normal for the depth weights, degrees "
                   "(default 0)")


def depth_weights_of(args, model, info, photon_energy):
    """(layer_weights, record) from the depth options, or (None, None) without them."""
    if args.depth_weighting is None:
        return None, None
    from valband.atom.tables import photon_energy_of
    from valband.spectra.depth import slab_depth_weights

    lam = args.depth_weighting
    try:
        lam = float(lam)
    except ValueError:  # "auto", or a word that slab_depth_weights rejects by name
        pass
    return slab_depth_weights(model.structure, info, photon_energy_of(photon_energy), lam,
                              args.emission_angle)


def dos_settings(args):
    """DOSSettings from the parsed options."""
    from valband.workflows import DOSSettings

    return DOSSettings(
        mesh=args.mesh, mesh_kind="gamma" if args.gamma else "monkhorst-pack", method=args.method,
        width=args.width, step=args.step, emin=args.emin, emax=args.emax, resolve=args.resolve,
        symmetry=not args.no_symmetry, n_electrons=args.electrons,
    )


def window_of(args):
    """The descriptor window as a tuple, or None."""
    return tuple(args.window) if args.window else None


def print_json(summary: dict) -> None:
    """Summary JSON on stdout."""
    from valband.output import to_json

    sys.stdout.write(to_json(summary) + "\n")


def print_descriptor_table(table, out=None) -> None:
    """A plain-text table of descriptors per element and site (on stdout by default)."""
    out = out or sys.stdout
    rows = [("", "centre", "width", "filling", "skew", "kurt", "upper edge")]
    for name, d in list(table.elements.items()) + [
        (f"  site {i} {table.site_labels.get(i, '')}".rstrip(), d) for i, d in table.sites.items()
    ]:
        rows.append((name, f"{d.centre:.3f}", f"{d.width:.3f}", f"{d.filling:.3f}",
                     f"{d.skewness:.3f}", f"{d.kurtosis:.3f}", f"{d.upper_edge:.3f}"))
    widths = [max(len(r[i]) for r in rows) for i in range(len(rows[0]))]
    print(f"{table.shell}-band descriptors (eV relative to E_F; window "
          f"{table.window[0]:.2f} to {table.window[1]:.2f} eV)", file=out)
    for r in rows:
        print("  ".join(c.rjust(w) if i else c.ljust(w) for i, (c, w) in enumerate(zip(r, widths, strict=True))), file=out)
