"""``valband screen``: run a screening campaign into an SQLite database; export and plot it."""

from __future__ import annotations

import sys
from pathlib import Path


def add_arguments(p) -> None:
    """Options of ``valband screen``."""
    p.add_argument("campaign", help="campaign file (TOML, schema in valband.campaign; examples "
                   "in examples/campaigns/)")
    p.add_argument("--workers", type=int, default=None, metavar="N",
                   help="local worker processes (default: the campaign's 'workers', else all "
                   "cores; 0 runs in this process)")
    p.add_argument("--scheduler", default=None, metavar="ADDRESS",
                   help="Dask scheduler address such as tcp://127.0.0.1:8786 (default: the "
                   "campaign's 'scheduler', else local processes); needs valband[screen]")
    p.add_argument("--db", default=None, metavar="FILE",
                   help="results database (default: <campaign name>.sqlite next to the "
                   "campaign file); an interrupted run resumes from it")
    p.add_argument("--retry-failed", action="store_true",
                   help="recompute candidates recorded as failed")
    p.add_argument("--export", default=None, metavar="CSV", help="write all rows as CSV")
    p.add_argument("--plot", default=None, metavar="FILE",
                   help="descriptor-vs-composition figures: FILE.png or FILE.svg (one per "
                   "system, named FILE-<system>.png)")
    p.add_argument("--plot-quantity", default="d_centre", metavar="COLUMN",
                   help="quantity to plot, a CSV column such as d_centre, d_width_Pd, "
                   "hv1486.6_centroid_be (default d_centre)")
    p.add_argument("--no-run", action="store_true",
                   help="only validate (and export/plot an existing database)")
    p.add_argument("--quiet", action="store_true", help="no progress bar or messages")


def run(args) -> int:
    """Validate, run what is missing, then export and plot."""
    from valband.campaign import export_csv, load_campaign, plot_campaign, run_campaign
    from valband.campaign.database import ResultsDB

    campaign = load_campaign(args.campaign)
    db = Path(args.db) if args.db else Path(args.campaign).with_name(f"{campaign.name}.sqlite")
    say = (lambda *a: None) if args.quiet else (lambda *a: print(*a, file=sys.stderr))  # noqa: E731
    say(f"campaign {campaign.name!r}: {len(campaign.candidates)} candidates, fingerprint "
        f"{campaign.fingerprint}, database {db}")
    if args.no_run:
        ResultsDB(db, campaign).close()  # checks (or creates) the database
    else:
        summary = run_campaign(campaign, db, workers=args.workers, scheduler=args.scheduler,
                               progress=not args.quiet, retry_failed=args.retry_failed)
        ex = summary.executor
        where = f" on {ex.get('kind')} ({ex.get('workers')} workers)" if ex else ""
        say(f"{summary.computed} computed ({summary.failed} failed), {summary.skipped} already "
            f"in the database{where}, {summary.wall_s:.1f} s")
        for msg in summary.lost:
            say(f"lost (will be retried on the next run): {msg}")
    if args.export:
        say(f"wrote {export_csv(db, args.export, campaign)}")
    if args.plot:
        for path in plot_campaign(db, args.plot, args.plot_quantity):
            say(f"wrote {path}")
    return 0
