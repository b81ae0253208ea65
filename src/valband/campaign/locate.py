"""Line numbers of TOML keys, so campaign errors can name the line as well as the key.

:mod:`tomllib` reports the line of a syntax error but keeps no positions for valid data. This
scanner walks the text once and records, for every ``key = value`` line, the table it sits in
(``("system", 2, "kpm")`` for a ``[system.kpm]`` table under the third ``[[system]]``) and the
line number. Multi-line arrays and strings are skipped; inline tables are attributed to the
line of their key. It is a locator for messages, not a parser: the data come from tomllib.
"""

from __future__ import annotations

import re

__all__ = ["KeyLines"]

_HEADER_ARRAY = re.compile(r"^\s*\[\[\s*([^\[\]]+?)\s*\]\]")
_HEADER = re.compile(r"^\s*\[\s*([^\[\]]+?)\s*\]")
_KEY = re.compile(r'^\s*((?:[A-Za-z0-9_\-]+|"[^"]*"|\'[^\']*\')'
                  r'(?:\s*\.\s*(?:[A-Za-z0-9_\-]+|"[^"]*"|\'[^\']*\'))*)\s*=')


def _parts(dotted: str) -> tuple[str, ...]:
    out = []
    for p in re.findall(r'"[^"]*"|\'[^\']*\'|[^.\s]+', dotted):
        out.append(p[1:-1] if p[0] in "\"'" else p)
    return tuple(out)


def _depth_change(text: str) -> tuple[int, bool]:
    """Net bracket depth of a value text outside strings, and whether a ''' or \"\"\" opens."""
    depth, i, quote = 0, 0, None
    while i < len(text):
        ch = text[i]
        if quote:
            if text.startswith(quote, i):
                i += len(quote)
                quote = None
                continue
            if ch == "\\" and quote == '"':
                i += 2
                continue
        elif text.startswith('"""', i) or text.startswith("'''", i):
            quote = text[i:i + 3]
            i += 3
            continue
        elif ch in "\"'":
            quote = ch
        elif ch == "#":
            break
        elif ch in "[{":
            depth += 1
        elif ch in "]}":
            depth -= 1
        i += 1
    return depth, quote in ('"""', "'''")


class KeyLines:
    """Map (table path, key) → 1-based line number for the keys of a TOML text."""

    def __init__(self, text: str) -> None:
        self.keys: dict[tuple, int] = {}
        self.tables: dict[tuple, int] = {}
        arrays: dict[tuple, int] = {}
        table: tuple = ()
        depth, in_string = 0, False
        for no, line in enumerate(text.splitlines(), start=1):
            if in_string:
                if '"""' in line or "'''" in line:
                    in_string = False
                continue
            if depth > 0:
                d, _ = _depth_change(line)
                depth += d
                continue
            m = _HEADER_ARRAY.match(line)
            if m:
                name = _parts(m.group(1))
                arrays[name] = arrays.get(name, -1) + 1
                table = name + (arrays[name],)
                self.tables[table] = no
                continue
            m = _HEADER.match(line)
            if m:
                table = self._resolve(_parts(m.group(1)), arrays)
                self.tables[table] = no
                continue
            m = _KEY.match(line)
            if m:
                self.keys[table + _parts(m.group(1))] = no
                d, opens = _depth_change(line[m.end():])
                depth, in_string = max(d, 0), opens and line.count('"""') + line.count("'''") == 1

    @staticmethod
    def _resolve(name: tuple, arrays: dict) -> tuple:
        """Insert the current index after every array-of-tables prefix of ``name``."""
        out: tuple = ()
        for k in range(1, len(name) + 1):
            out = out + (name[k - 1],)
            if name[:k] in arrays:
                out = out + (arrays[name[:k]],)
        return out

    def line(self, path: tuple) -> int | None:
        """Line of the key at ``path`` (table parts, array indices, key).

        Falls back to the nearest enclosing key or table header; None when nothing matches.
        """
        path = tuple(path)
        while path:
            if path in self.keys:
                return self.keys[path]
            if path in self.tables:
                return self.tables[path]
            path = path[:-1]
        return None
