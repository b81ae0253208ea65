"""Timing helper shared by the benchmark scripts (run them from the repository root)."""

from __future__ import annotations

import time


def best_of(fn, repeat: int) -> float:
    """Shortest wall time of ``repeat`` calls of ``fn`` (seconds)."""
    times = []
    for _ in range(max(1, repeat)):
        t = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t)
    return min(times)
