"""``valband xsec``: valence-subshell photoionization cross sections and β at one photon energy."""

from __future__ import annotations

import sys

__all__ = ["add_arguments", "run", "JSON_SCHEMA"]

JSON_SCHEMA = "valband.xsec"

_SOURCES_HELP = "He-I 21.22, He-II 40.81, Mg-Ka 1253.6, Al-Ka 1486.6, Cr-Ka 5414.7, Ga-Ka 9251.7"


def add_arguments(p) -> None:
    """Options of ``valband xsec``."""
    p.add_argument("element", help="element symbol (e.g. Cu) or atomic number")
    p.add_argument("--photon-energy", required=True, metavar="E",
                   help=f"photon energy in eV or a lab source name ({_SOURCES_HELP}; "
                   "case-insensitive, dash optional)")
    p.add_argument("--relativity", default="scalar", choices=["none", "scalar"],
                   help="treatment of the bound orbitals (default scalar)")
    p.add_argument("--direct", action="store_true",
                   help="compute at this energy directly instead of interpolating the table")
    p.add_argument("--json", action="store_true", help="print the result as JSON on stdout")
    p.add_argument("--plot", default=None, metavar="FILE",
                   help="draw σ per electron against photon energy (log-log) into FILE "
                   "(.png or .svg)")


def _plot(path: str, table, energy: float, rows) -> None:
    from pathlib import Path

    import numpy as np

    from valband.errors import SettingsError
    from valband.report.plots import SHELL_COLOURS, new_figure, save_figure

    if Path(path).suffix.lower() not in (".png", ".svg"):
        raise SettingsError(f"--plot {path}: file name must end in .png or .svg")
    fig, ax = new_figure()
    e = table.photon_energies_ev
    for i, label in enumerate(table.labels):
        sig = table.sigma_per_electron_mb[i]
        open_ = sig > 0
        colour = SHELL_COLOURS.get("spd"[table.l[i]], "0.3")
        ax.loglog(e[open_], sig[open_], color=colour, lw=1.3,
                  label=f"{table.element} {label} ({table.occupation[i]:g} e)")
        r = rows[i]
        if r.sigma_per_electron_mb > 0:
            ax.plot([energy], [r.sigma_per_electron_mb], "o", color=colour, ms=5)
    ax.axvline(energy, color="k", lw=0.7, ls="-.")
    ax.set_xlabel("photon energy (eV)")
    ax.set_ylabel("σ per electron (Mb)")
    ax.set_xlim(e[0], e[-1])
    ax.set_title(f"{table.element} valence subshells ({table.relativity} relativity); "
                 f"marked: {energy:g} eV", fontsize=10)
    ax.legend(frameon=False, fontsize=8)
    if not np.isfinite(ax.get_ylim()).all():  # pragma: no cover - defensive
        ax.set_ylim(auto=True)
    save_figure(fig, path)


def run(args) -> int:
    """Print the table (or JSON) of the element's valence subshells; optionally plot."""
    from valband import __version__
    from valband.atom.configurations import resolve_element
    from valband.atom.photoionization import valence_atom, valence_cross_sections
    from valband.atom.tables import interpolate, photon_energy_of, table_for
    from valband.output import to_json

    _, symbol = resolve_element(args.element)
    energy = photon_energy_of(args.photon_energy)
    table = where = None
    if args.direct:
        rows = valence_cross_sections(symbol, energy, args.relativity)
        source = "direct calculation"
        functional = valence_atom(symbol, args.relativity).functional
    else:
        table, where = table_for(symbol, args.relativity)
        rows = interpolate(table, energy)
        source = f"table ({where})"
        functional = table.provenance.get("functional", "not recorded")
    if args.plot:
        if table is None:
            table, where = table_for(symbol, args.relativity)
        _plot(args.plot, table, energy, rows)
    if args.json:
        summary = {
            "schema": JSON_SCHEMA,
            "schema_version": 1,
            "valband_version": __version__,
            "element": symbol,
            "photon_energy_ev": energy,
            "relativity": args.relativity,
            "functional": functional,
            "source": source,
            "units": {"energy": "eV", "sigma": "Mb (1e-22 m^2)"},
            "subshells": [
                {"subshell": r.subshell, "l": r.l, "occupation": r.occupation,
                 "binding_energy_ev": r.binding_energy_ev, "sigma_mb": r.sigma_mb,
                 "sigma_per_electron_mb": r.sigma_per_electron_mb, "beta": r.beta,
                 "note": r.note}
                for r in rows
            ],
        }
        if args.plot:
            summary["plot"] = str(args.plot)
        sys.stdout.write(to_json(summary) + "\n")
        return 0
    print(f"{symbol}: valence photoionization at {energy:g} eV ({args.relativity} relativity; "
          f"{source})")
    print(f"atom: {functional}")
    head = ("subshell", "occupation", "BE (eV)", "σ subshell (Mb)", "σ per e (Mb)", "β")
    body = [(r.subshell, f"{r.occupation:g}", f"{r.binding_energy_ev:.3f}", f"{r.sigma_mb:.4e}",
             f"{r.sigma_per_electron_mb:.4e}", "—" if r.beta != r.beta else f"{r.beta:.3f}")
            for r in rows]
    widths = [max(len(x[i]) for x in [head, *body]) for i in range(len(head))]
    for row in [head, *body]:
        print("  ".join(c.ljust(w) if i == 0 else c.rjust(w)
                        for i, (c, w) in enumerate(zip(row, widths, strict=True))))
    for r in rows:
        if r.sigma_per_electron_mb == 0.0:
            print(f"note: {r.subshell}: {r.note}")
    if args.plot:
        print(f"plot: {args.plot}")
    return 0
