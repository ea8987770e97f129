"""The one timing rule of the benchmark scripts: a warm-up call, then the best of ``repeat``."""

from __future__ import annotations

import time


def best_time(fn, repeat):
    """Seconds of the fastest of ``repeat`` calls of ``fn`` after one warm-up call, and the
    result of the last call."""
    out = fn()
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        out = fn()
        times.append(time.perf_counter() - t0)
    return min(times), out
