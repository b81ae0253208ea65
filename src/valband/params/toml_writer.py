"""A small TOML 1.0 emitter for parameter files (the standard library only reads TOML).

Supports what parameter files contain: tables, strings, booleans, integers, floats and
(nested) arrays of those. A table whose values are all scalars or arrays is written inline
(``key = { ... }``) when it and all its sibling tables of that kind fit on a line; every
other table gets a ``[header]``.
Output is deterministic (dict order is kept), so a generated file can be compared byte for
byte with a shipped one.
"""

from __future__ import annotations

import math
import re
from collections.abc import Mapping
from pathlib import Path
from typing import Any

__all__ = ["dumps", "write_parameter_set"]

_BARE = re.compile(r"[A-Za-z0-9_]+")
_INLINE_WIDTH = 160


def _key(k: str) -> str:
    if not isinstance(k, str):
        raise TypeError(f"TOML keys must be strings, got {k!r}")
    return k if _BARE.fullmatch(k) else _string(k)


def _string(s: str) -> str:
    out = ['"']
    for ch in s:
        code = ord(ch)
        if ch == '"':
            out.append('\\"')
        elif ch == "\\":
            out.append("\\\\")
        elif ch == "\n":
            out.append("\\n")
        elif ch == "\t":
            out.append("\\t")
        elif ch == "\r":
            out.append("\\r")
        elif code < 0x20 or code == 0x7F:
            out.append(f"\\u{code:04X}")
        else:
            out.append(ch)
    out.append('"')
    return "".join(out)


def _float(x: float) -> str:
    if math.isnan(x):
        return "nan"
    if math.isinf(x):
        return "inf" if x > 0 else "-inf"
    text = repr(x)  # shortest string that reads back to the same double
    if "e" in text and "." not in text.split("e")[0]:
        mantissa, exp = text.split("e")
        text = f"{mantissa}.0e{exp}"
    return text


def _value(v: Any) -> str:
    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, int):
        return str(v)
    if isinstance(v, float):
        return _float(v)
    if isinstance(v, str):
        return _string(v)
    if isinstance(v, (list, tuple)):
        return "[" + ", ".join(_value(x) for x in v) + "]"
    if isinstance(v, Mapping):
        if not v:
            return "{}"
        return "{ " + ", ".join(f"{_key(k)} = {_value(x)}" for k, x in v.items()) + " }"
    raise TypeError(f"cannot write {type(v).__name__} {v!r} as TOML")


def _is_flat(v: Any) -> bool:
    """True for values that contain no tables (scalars and arrays of scalars/arrays)."""
    if isinstance(v, Mapping):
        return False
    if isinstance(v, (list, tuple)):
        for x in v:
            if isinstance(x, Mapping):
                raise TypeError("arrays of tables are not supported by this emitter")
            if not _is_flat(x):
                return False
    return True


def _flat_table(v: Any) -> bool:
    return isinstance(v, Mapping) and all(_is_flat(x) for x in v.values())


def _emit(path: list[str], table: Mapping[str, Any], lines: list[str]) -> None:
    # Sub-tables without sub-tables of their own are written inline when every one of them
    # fits on a line, otherwise all of them get headers: siblings share one layout.
    flat = [k for k, v in table.items() if _flat_table(v)]
    fits = all(len(f"{_key(k)} = {_value(table[k])}") <= _INLINE_WIDTH for k in flat)
    as_inline = {k for k, v in table.items() if not isinstance(v, Mapping) or (fits and k in flat)}
    inline = [(k, v) for k, v in table.items() if k in as_inline]
    nested = [(k, v) for k, v in table.items() if k not in as_inline]
    if path and (inline or not nested):
        if lines:
            lines.append("")
        lines.append("[" + ".".join(_key(p) for p in path) + "]")
    for k, v in inline:
        lines.append(f"{_key(k)} = {_value(v)}")
    for k, v in nested:
        _emit(path + [k], v, lines)


def dumps(data: Mapping[str, Any], header: str | None = None) -> str:
    """Render a dict as TOML text.

    Parameters
    ----------
    data
        Nested dicts of str / bool / int / float / lists.
    header
        Optional comment placed at the top, one ``#`` line per line of text.

    Returns
    -------
    str
        TOML that :func:`tomllib.loads` parses back to a dict equal to ``data`` (tuples
        become lists).
    """
    lines: list[str] = []
    if header:
        lines.extend(("# " + line).rstrip() for line in header.splitlines())
        lines.append("")
    body: list[str] = []
    _emit([], data, body)
    lines.extend(body)
    return "\n".join(lines) + "\n"


def write_parameter_set(pset: Any, path: str | Path, header: str | None = None) -> Path:
    """Write a :class:`~valband.params.model.ParameterSet` to ``path`` as TOML (UTF-8)."""
    path = Path(path)
    path.write_text(dumps(pset.to_dict(), header=header), encoding="utf-8")
    return path
