"""Entry point of the ``valband`` command: one command, one subcommand per job.

Each subcommand is a module in :mod:`valband.cli` with ``add_arguments(parser)`` and
``run(args) -> int``; heavy imports happen inside ``run`` so ``valband --help`` stays fast.
"""

from __future__ import annotations

import argparse
import importlib
import sys

__all__ = ["main", "build_parser", "COMMANDS"]

#: subcommand name → (module, one-line help)
COMMANDS: dict[str, tuple[str, str]] = {
    "dos": ("valband.cli.cmd_dos", "total and partial DOS, Fermi level and d-band descriptors"),
    "bands": ("valband.cli.cmd_bands", "band structure along a path, with orbital character"),
    "describe": ("valband.cli.cmd_describe", "d-band descriptors only (table or JSON)"),
    "simulate": ("valband.cli.cmd_simulate", "simulated valence-band photoemission spectrum at a photon energy"),
    "compare": ("valband.cli.cmd_compare", "fit the simulated spectrum to a measured one (overlay, residuals, band centre)"),
    "xsec": ("valband.cli.cmd_xsec", "valence-subshell photoionization cross sections and β at a photon energy"),
    "params": ("valband.cli.cmd_params", "generate (first principles), show or fit parameter sets"),
    "report": ("valband.cli.cmd_report", "self-contained HTML report of a run folder, and its main figure for papers"),
    "demo": ("valband.cli.cmd_demo", "run the bundled (invented) demo scenario end to end"),
    "screen": ("valband.cli.cmd_screen", "run a screening campaign (many candidates, local processes or Dask) into an SQLite database"),
}


def build_parser() -> argparse.ArgumentParser:
    """The full argument parser (subcommand modules are imported to add their options)."""
    from valband import __version__

    parser = argparse.ArgumentParser(
        prog="valband",
        description="Valence-band DOS, band structures and d-band descriptors of metals and "
        "alloys from Slater-Koster tight binding. Energies in eV, lengths in Å.",
    )
    parser.add_argument("--version", action="version", version=f"valband {__version__}")
    parser.add_argument("--debug", action="store_true", help="show the full traceback on errors")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")
    for name, (module, help_text) in COMMANDS.items():
        p = sub.add_parser(name, help=help_text, description=help_text)
        importlib.import_module(module).add_arguments(p)
        p.set_defaults(_module=module)
    return parser


def main(argv: list[str] | None = None) -> int:
    """Run ``valband`` with ``argv`` (default ``sys.argv[1:]``); return the exit code."""
    argv = list(sys.argv[1:] if argv is None else argv)
    parser = build_parser()
    args = parser.parse_args(argv)
    if not getattr(args, "command", None):
        parser.print_help()
        return 2
    from valband.errors import ValbandError

    module = importlib.import_module(args._module)
    try:
        return int(module.run(args) or 0)
    except ValbandError as exc:
        if args.debug:
            raise
        print(f"valband {args.command}: error: {exc}", file=sys.stderr)
        return 1
    except KeyboardInterrupt:
        print(f"valband {args.command}: interrupted", file=sys.stderr)
        return 130


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
