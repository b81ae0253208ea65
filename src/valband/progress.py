"""A minimal progress bar for long loops: drawn on a terminal's stderr, silent otherwise."""

from __future__ import annotations

import sys
import time

__all__ = ["Progress"]


class Progress:
    """Progress over ``total`` units; ``update(n)`` after each step, ``close()`` at the end.

    Draws only when ``enabled`` and stderr is a terminal, so logs and pipes stay clean.
    """

    def __init__(self, total: int, label: str, enabled: bool = True, min_seconds: float = 0.5):
        self.total = max(int(total), 1)
        self.label = label
        self.done = 0
        self.start = time.perf_counter()
        self.min_seconds = min_seconds
        self.active = bool(enabled) and sys.stderr.isatty()
        self._drawn = False

    def update(self, n: int = 1) -> None:
        """Advance by ``n`` units and redraw (no more than needed)."""
        self.done += n
        if not self.active:
            return
        elapsed = time.perf_counter() - self.start
        if elapsed < self.min_seconds and self.done < self.total:
            return
        frac = min(self.done / self.total, 1.0)
        eta = elapsed / frac - elapsed if frac > 0 else 0.0
        bar = "#" * int(30 * frac)
        sys.stderr.write(f"\r{self.label} [{bar:<30}] {100 * frac:5.1f}%  eta {eta:5.1f} s")
        sys.stderr.flush()
        self._drawn = True

    def close(self) -> None:
        """Finish the line if a bar was drawn."""
        if self._drawn:
            sys.stderr.write("\n")
            sys.stderr.flush()
            self._drawn = False
