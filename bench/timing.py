"""Wall-time helper shared by the benchmarks in this folder (run them as ``python bench/x.py``)."""

from __future__ import annotations

import time

__all__ = ["best_of"]


def best_of(fn, repeat: int = 3):
    """Run ``fn`` ``repeat`` times; return the shortest wall time (s) and the last result."""
    times = []
    out = None
    for _ in range(repeat):
        t0 = time.perf_counter()
        out = fn()
        times.append(time.perf_counter() - t0)
    return min(times), out
