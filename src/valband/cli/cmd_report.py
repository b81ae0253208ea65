"""``valband report``: one self-contained HTML file (and the main figure) of a run folder."""

from __future__ import annotations

import sys

__all__ = ["add_arguments", "run"]


def add_arguments(p) -> None:
    """Options of ``valband report``."""
    p.add_argument("run_dir", metavar="RUN_DIR", help="the --out folder of a valband run (demo, "
                   "dos, simulate, compare, …)")
    p.add_argument("--out", default=None, metavar="FILE",
                   help="HTML file to write (default RUN_DIR/report.html)")
    p.add_argument("--figure", default=None, metavar="FILE",
                   help="also export the main figure (.png, .pdf or .svg) for papers")
    p.add_argument("--title", default=None, help="report title (default: from the run)")
    p.add_argument("--quiet", action="store_true", help="print nothing but errors")


def run(args) -> int:
    """Write the report (and figure), print where."""
    from valband.report.figure import main_figure
    from valband.report.html import build_report

    path = build_report(args.run_dir, args.out, args.title)
    fig = main_figure(args.run_dir, args.figure) if args.figure else None
    if not args.quiet:
        print(f"wrote {path}" + (f" and {fig}" if fig else ""), file=sys.stderr)
    return 0
