"""Run a campaign: skip what the database holds, farm the rest out, record every outcome.

Resume logic
    A candidate is identified by its key (a hash of its inputs). Before anything is sent to
    a worker the database is opened (and its fingerprint checked) and the keys it already
    holds are skipped — "done" rows always, "failed" rows unless ``retry_failed``. Rows are
    written by this process only, one commit per finished candidate, so after an interrupt
    or a kill the database holds exactly the finished candidates and a rerun computes the
    others. Outcomes the executor lost (a worker died) are not written, so they are retried.
"""

from __future__ import annotations

import time
from collections.abc import Callable
from dataclasses import dataclass, field
from pathlib import Path

from valband.campaign.database import ResultsDB
from valband.campaign.executors import DASK_CONNECT_TIMEOUT_S, Executor, Lost, make_executor
from valband.campaign.schema import Campaign
from valband.campaign.task import evaluate
from valband.progress import Progress

__all__ = ["RunSummary", "run_campaign"]


@dataclass
class RunSummary:
    """What one run did: counts, wall time, executor, and messages of lost items."""

    n_candidates: int
    skipped: int
    computed: int = 0
    failed: int = 0
    lost: list[str] = field(default_factory=list)
    wall_s: float = 0.0
    executor: dict = field(default_factory=dict)

    def to_dict(self) -> dict:
        """JSON-ready form."""
        return {"n_candidates": self.n_candidates, "skipped": self.skipped,
                "computed": self.computed, "failed": self.failed, "lost": list(self.lost),
                "wall_s": self.wall_s, "executor": self.executor}


def run_campaign(
    campaign: Campaign, db_path: str | Path, *, workers: int | None = None,
    scheduler: str | None = None, executor: Executor | None = None, progress: bool = True,
    retry_failed: bool = False, on_row: Callable[[int, dict], None] | None = None,
    connect_timeout: float = DASK_CONNECT_TIMEOUT_S,
) -> RunSummary:
    """Compute the candidates of ``campaign`` missing from the database at ``db_path``.

    Parameters
    ----------
    campaign : Campaign (:func:`valband.campaign.load_campaign`)
    db_path : SQLite file (created if absent; refused if it belongs to another campaign)
    workers : local worker processes (None: the campaign's ``workers``, else all cores;
        0: in the calling process)
    scheduler : Dask scheduler address (None: the campaign's ``scheduler``, else local)
    executor : an executor to use instead (the caller closes it)
    progress : progress bar with ETA on a terminal
    retry_failed : recompute candidates recorded as failed
    on_row : called as ``on_row(rows_written_this_run, record)`` after each row
    connect_timeout : seconds to wait for a Dask scheduler

    Returns
    -------
    RunSummary
    """
    t0 = time.perf_counter()
    db = ResultsDB(db_path, campaign)
    try:
        held = db.finished(include_failed=not retry_failed)
        pending = [c for c in campaign.candidates if c.key not in held]
        summary = RunSummary(len(campaign.candidates), len(campaign.candidates) - len(pending))
        if not pending:
            summary.wall_s = time.perf_counter() - t0
            return summary
        own = executor is None
        ex = executor or make_executor(workers if workers is not None else campaign.workers,
                                       scheduler or campaign.scheduler, connect_timeout)
        summary.executor = ex.describe()
        bar = Progress(len(pending), f"screen {campaign.name}", enabled=progress)
        try:
            outcomes = ex.imap_unordered(evaluate, [c.inputs for c in pending])
            try:
                for i, record in outcomes:
                    cand = pending[i]
                    if isinstance(record, Lost):
                        summary.lost.append(f"{cand.label}: {record.message}")
                    else:
                        db.write(cand, record, summary.executor)
                        summary.computed += 1
                        summary.failed += record["status"] == "failed"
                        if on_row is not None:
                            on_row(summary.computed, record)
                    bar.update()
            finally:
                outcomes.close()
        finally:
            bar.close()
            if own:
                ex.close()
        summary.wall_s = time.perf_counter() - t0
        return summary
    finally:
        db.close()
