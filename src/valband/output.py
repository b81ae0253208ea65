"""Writing output files safely: temporary file in the same folder, then an atomic rename.

Nothing half-written is ever left under the final name, and an existing file is replaced only
once its successor is complete.
"""

from __future__ import annotations

import contextlib
import json
import os
import tempfile
from collections.abc import Iterator
from pathlib import Path

import numpy as np

from valband.errors import InputError

__all__ = ["atomic_write", "write_json", "write_csv", "prepare_out_dir", "SCHEMA_VERSION"]

#: Version of every JSON summary and CSV layout valband writes. Bump only with a note in
#: DEVELOPERS.md ("Output files"), and keep readers of older versions working.
SCHEMA_VERSION = 1


@contextlib.contextmanager
def atomic_write(path: str | Path, mode: str = "w") -> Iterator:
    """Open a temporary file next to ``path``; rename it onto ``path`` only on success."""
    path = Path(path)
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".part", dir=path.parent)
    os.chmod(tmp, 0o666 & ~_umask())  # mkstemp makes 0600; give the usual permissions
    try:
        with os.fdopen(fd, mode, newline="" if "b" not in mode else None) as fh:
            yield fh
        os.replace(tmp, path)
    except BaseException:
        with contextlib.suppress(FileNotFoundError):
            os.unlink(tmp)
        raise


def _umask() -> int:
    """The process umask (read by setting and restoring it)."""
    mask = os.umask(0)
    os.umask(mask)
    return mask


def _json_default(obj):
    if isinstance(obj, np.ndarray):
        return obj.tolist()
    if isinstance(obj, (np.floating, np.integer, np.bool_)):
        return obj.item()
    if isinstance(obj, Path):
        return str(obj)
    raise TypeError(f"cannot write {type(obj).__name__} to JSON")


def to_json(data: dict) -> str:
    """JSON text of a summary (numpy values converted, NaN written as null)."""
    return json.dumps(_nan_to_none(data), indent=2, default=_json_default, allow_nan=False)


def _nan_to_none(x):
    if isinstance(x, dict):
        return {k: _nan_to_none(v) for k, v in x.items()}
    if isinstance(x, (list, tuple)):
        return [_nan_to_none(v) for v in x]
    if isinstance(x, (float, np.floating)) and not np.isfinite(x):
        return None
    return x


def write_json(path: str | Path, data: dict) -> Path:
    """Write a JSON summary atomically."""
    text = to_json(data)
    with atomic_write(path) as fh:
        fh.write(text + "\n")
    return Path(path)


def write_csv(path: str | Path, header: list[str], columns: list, comments: list[str] = ()) -> Path:
    """Write columns of equal length as CSV with ``# `` comment lines first (atomic).

    Numeric columns are written with 8 significant digits (``%.8g``), text columns as they are
    (they must not contain commas).
    """
    cols = [np.asarray(c) for c in columns]
    n = {len(c) for c in cols}
    if len(n) != 1 or len(header) != len(cols):
        raise ValueError("write_csv: columns must have equal lengths and one header each")
    text = [np.char.mod("%.8g", c.astype(np.float64)) if c.dtype.kind in "fiub" else c.astype(str)
            for c in cols]
    with atomic_write(path) as fh:
        for line in comments:
            fh.write(f"# {line}\n")
        fh.write(",".join(header) + "\n")
        for row in zip(*text, strict=True):
            fh.write(",".join(row) + "\n")
    return Path(path)


def prepare_out_dir(path: str | Path) -> Path:
    """Create the output folder (and parents); refuse a path that is an existing file."""
    path = Path(path)
    if path.exists() and not path.is_dir():
        raise InputError(f"--out {path}: exists and is not a folder")
    path.mkdir(parents=True, exist_ok=True)
    return path
