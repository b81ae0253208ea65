"""Interrupted campaigns resume without recomputing, and end identical to an unbroken run."""

from __future__ import annotations

import os
import signal
import sqlite3
import subprocess
import sys
import time
from pathlib import Path

import pytest

from valband.campaign import load_campaign, read_rows, run_campaign

from .campaigns import SLOW, comparable, write

SRC = str(Path(__file__).resolve().parents[2] / "src")


@pytest.fixture(scope="module")
def reference(tmp_path_factory):
    """The slow campaign run without interruption, in process."""
    folder = tmp_path_factory.mktemp("reference")
    camp = load_campaign(write(folder, SLOW))
    db = folder / "ref.sqlite"
    run_campaign(camp, db, workers=0, progress=False)
    return comparable(read_rows(db))


def _count(db: Path) -> int:
    try:
        with sqlite3.connect(db, timeout=5) as con:
            return con.execute("SELECT COUNT(*) FROM candidates").fetchone()[0]
    except sqlite3.OperationalError:  # the table does not exist yet
        return 0


def test_injected_interrupt_then_resume(tmp_path, reference):
    camp = load_campaign(write(tmp_path, SLOW))
    db = tmp_path / "run.sqlite"

    def stop_after_two(n, record):
        if n == 2:
            raise KeyboardInterrupt

    with pytest.raises(KeyboardInterrupt):
        run_campaign(camp, db, workers=0, progress=False, on_row=stop_after_two)
    first = {r["key"]: r["finished_utc"] for r in read_rows(db)}
    assert len(first) == 2
    summary = run_campaign(camp, db, workers=0, progress=False)
    assert (summary.skipped, summary.computed) == (2, len(camp.candidates) - 2)
    rows = read_rows(db)
    assert {r["key"]: r["finished_utc"] for r in rows if r["key"] in first} == first
    assert comparable(rows) == reference


def test_killed_process_then_resume(tmp_path, reference):
    path = write(tmp_path, SLOW)
    camp = load_campaign(path)
    db = tmp_path / "killed.sqlite"
    env = {**os.environ, "PYTHONPATH": SRC}
    proc = subprocess.Popen(
        [sys.executable, "-m", "valband.cli.main", "screen", str(path), "--db", str(db),
         "--workers", "1", "--quiet"],
        env=env, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, start_new_session=True,
    )
    try:
        deadline = time.monotonic() + 120
        while _count(db) < 2:
            assert proc.poll() is None, proc.stderr.read().decode()
            assert time.monotonic() < deadline, "no rows appeared"
            time.sleep(0.02)
    finally:
        os.killpg(proc.pid, signal.SIGKILL)  # the CLI and its worker: the group we started
        proc.wait()
        proc.stderr.close()
    before = {r["key"]: r["finished_utc"] for r in read_rows(db)}
    assert 2 <= len(before) < len(camp.candidates)
    summary = run_campaign(camp, db, workers=0, progress=False)
    assert summary.skipped == len(before)
    assert summary.computed == len(camp.candidates) - len(before)
    rows = read_rows(db)
    assert len(rows) == len(camp.candidates)
    assert {r["key"]: r["finished_utc"] for r in rows if r["key"] in before} == before
    assert comparable(rows) == reference
