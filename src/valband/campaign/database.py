"""The SQLite results database of a campaign: one row per finished candidate.

Layout (format :data:`DB_FORMAT`)::

    meta(key TEXT PRIMARY KEY, value TEXT)
        format, schema_version (valband.output.SCHEMA_VERSION), fingerprint, campaign_name,
        campaign_path, n_candidates, created_utc, valband_version
    candidates(
        key TEXT PRIMARY KEY,        -- SHA-256 prefix of the candidate's identifying inputs
        position INTEGER,            -- index in the campaign's expansion order
        system TEXT, structure TEXT, composition TEXT (JSON), strain REAL, method TEXT,
        params TEXT, seed INTEGER,
        inputs TEXT NOT NULL,        -- all inputs, JSON
        status TEXT NOT NULL,        -- 'done' or 'failed'
        error_type TEXT, error TEXT,
        descriptors TEXT, results TEXT, provenance TEXT,    -- JSON
        started_utc TEXT, finished_utc TEXT, wall_s REAL, cpu_s REAL, worker TEXT,
        executor TEXT)               -- JSON: kind, workers, address

Only the coordinating process writes, one committed transaction per finished candidate
(write-ahead log), so a killed campaign leaves exactly its finished rows and never a partial
one. The fingerprint (:attr:`valband.campaign.Campaign.fingerprint`, a hash of the sorted
candidate keys) is written when the database is created; opening it for a campaign with a
different fingerprint is refused.
"""

from __future__ import annotations

import json
import sqlite3
from datetime import UTC, datetime
from pathlib import Path

from valband.errors import InputError

__all__ = ["DB_FORMAT", "ResultsDB", "read_rows"]

#: Version of the database layout above.
DB_FORMAT = 1

_COLUMNS = ("key", "position", "system", "structure", "composition", "strain", "method",
            "params", "seed", "inputs", "status", "error_type", "error", "descriptors",
            "results", "provenance", "started_utc", "finished_utc", "wall_s", "cpu_s",
            "worker", "executor")
_JSON = ("composition", "inputs", "descriptors", "results", "provenance", "executor")

_SCHEMA = """
CREATE TABLE IF NOT EXISTS meta (key TEXT PRIMARY KEY, value TEXT);
CREATE TABLE IF NOT EXISTS candidates (
    key TEXT PRIMARY KEY, position INTEGER, system TEXT, structure TEXT, composition TEXT,
    strain REAL, method TEXT, params TEXT, seed INTEGER, inputs TEXT NOT NULL,
    status TEXT NOT NULL CHECK (status IN ('done', 'failed')), error_type TEXT, error TEXT,
    descriptors TEXT, results TEXT, provenance TEXT, started_utc TEXT, finished_utc TEXT,
    wall_s REAL, cpu_s REAL, worker TEXT, executor TEXT
);
"""


def _connect(path: Path) -> sqlite3.Connection:
    try:
        con = sqlite3.connect(str(path), timeout=30.0)
        con.execute("PRAGMA journal_mode=WAL")
        con.execute("PRAGMA synchronous=NORMAL")
        return con
    except sqlite3.DatabaseError as exc:
        raise InputError(f"database {path}: not an SQLite database ({exc}); give a new file "
                         "name with --db") from None


def _meta(con: sqlite3.Connection, path: Path) -> dict:
    try:
        tables = {r[0] for r in con.execute("SELECT name FROM sqlite_master WHERE type='table'")}
    except sqlite3.DatabaseError as exc:
        raise InputError(f"database {path}: not an SQLite database ({exc}); give a new file "
                         "name with --db") from None
    if not tables:
        return {}
    if not {"meta", "candidates"} <= tables:
        raise InputError(f"database {path}: an SQLite file but not a valband campaign database "
                         f"(tables {sorted(tables)}); give a new file name with --db")
    return dict(con.execute("SELECT key, value FROM meta"))


class ResultsDB:
    """Open (or create) the results database of ``campaign`` at ``path``.

    Raises
    ------
    InputError
        The file is not SQLite, not a valband campaign database, has a newer layout, or
        belongs to a campaign with another fingerprint (the message names both campaigns).
    """

    def __init__(self, path: str | Path, campaign) -> None:
        self.path = Path(path)
        if self.path.is_dir():
            raise InputError(f"database {self.path}: is a folder; give a file name with --db")
        if self.path.parent and not self.path.parent.exists():
            raise InputError(f"database {self.path}: folder {self.path.parent} does not exist")
        self.con = _connect(self.path)
        meta = _meta(self.con, self.path)
        if not meta:
            self._create(campaign)
            return
        fmt = int(meta.get("format", "0"))
        if fmt > DB_FORMAT:
            self.con.close()
            raise InputError(f"database {self.path}: layout {fmt} is newer than this valband's "
                             f"({DB_FORMAT}); use a newer valband or another --db")
        if meta.get("fingerprint") != campaign.fingerprint:
            self.con.close()
            raise InputError(
                f"database {self.path} belongs to campaign {meta.get('campaign_name')!r} "
                f"({meta.get('campaign_path')}, {meta.get('n_candidates')} candidates, "
                f"fingerprint {meta.get('fingerprint')}), not to {campaign.name!r} "
                f"({campaign.path}, {len(campaign.candidates)} candidates, fingerprint "
                f"{campaign.fingerprint}); its candidates differ, so its results cannot be "
                "reused. Give another --db (or delete that file to start over)."
            )
        self.meta = meta

    def _create(self, campaign) -> None:
        import valband
        from valband.output import SCHEMA_VERSION

        meta = {"format": str(DB_FORMAT), "schema_version": str(SCHEMA_VERSION),
                "fingerprint": campaign.fingerprint, "campaign_name": campaign.name,
                "campaign_path": str(campaign.path),
                "n_candidates": str(len(campaign.candidates)),
                "created_utc": datetime.now(UTC).isoformat(timespec="seconds"),
                "valband_version": valband.__version__}
        with self.con:
            self.con.executescript(_SCHEMA)
            self.con.executemany("INSERT INTO meta VALUES (?, ?)", list(meta.items()))
        self.meta = meta

    # ------------------------------------------------------------------ rows
    def finished(self, include_failed: bool = True) -> set[str]:
        """Keys of the candidates with a row ("done", and "failed" unless excluded)."""
        sql = "SELECT key FROM candidates" + ("" if include_failed else
                                              " WHERE status = 'done'")
        return {r[0] for r in self.con.execute(sql)}

    def write(self, candidate, record: dict, executor: dict) -> None:
        """Insert (or replace) the row of one finished candidate, committed at once."""
        i = candidate.inputs
        row = {
            "key": candidate.key, "position": candidate.position, "system": i["system"],
            "structure": i["structure"], "composition": i["composition"],
            "strain": i["strain"], "method": i["method"], "params": i["params"]["name"],
            "seed": i["seed"], "inputs": i, "status": record["status"],
            "error_type": record.get("error_type"), "error": record.get("error"),
            "descriptors": record.get("descriptors"), "results": record.get("results"),
            "provenance": record.get("provenance"), "started_utc": record.get("started_utc"),
            "finished_utc": record.get("finished_utc"), "wall_s": record.get("wall_s"),
            "cpu_s": record.get("cpu_s"), "worker": record.get("worker"), "executor": executor,
        }
        values = [json.dumps(row[c], sort_keys=True, allow_nan=True) if c in _JSON else row[c]
                  for c in _COLUMNS]
        with self.con:
            self.con.execute(f"INSERT OR REPLACE INTO candidates ({', '.join(_COLUMNS)}) "
                             f"VALUES ({', '.join('?' * len(_COLUMNS))})", values)

    def rows(self) -> list[dict]:
        """Every row as a dict (JSON columns decoded), in campaign order."""
        return read_rows(self.con)

    def close(self) -> None:
        """Close the connection."""
        self.con.close()

    def __enter__(self):
        return self

    def __exit__(self, *exc) -> None:
        self.close()


def read_rows(con_or_path) -> list[dict]:
    """Rows of a results database (a connection or a path), JSON decoded, by position."""
    own = not isinstance(con_or_path, sqlite3.Connection)
    con = sqlite3.connect(str(con_or_path)) if own else con_or_path
    try:
        cur = con.execute(f"SELECT {', '.join(_COLUMNS)} FROM candidates ORDER BY position")
        out = []
        for r in cur:
            d = dict(zip(_COLUMNS, r, strict=True))
            for c in _JSON:
                if d[c] is not None:
                    d[c] = json.loads(d[c])
            out.append(d)
        return out
    finally:
        if own:
            con.close()
