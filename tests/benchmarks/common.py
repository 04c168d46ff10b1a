"""Helpers shared by the benchmarks: median wall time and one result row."""

from __future__ import annotations

import statistics
import time
from collections.abc import Callable


def median_time(func: Callable[[], object], repeat: int = 7, number: int = 1) -> float:
    """Median over `repeat` runs of the wall time of `number` calls, per call, in seconds."""
    times = []
    for _ in range(repeat):
        start = time.perf_counter()
        for _ in range(number):
            func()
        times.append((time.perf_counter() - start) / number)
    return statistics.median(times)


def row(name: str, ours_s: float, baseline_s: float | None = None, baseline: str = "",
        goal: str = "", note: str = "") -> dict:
    """One line of the benchmark table; ratio = baseline time / our time where a baseline exists."""
    return {
        "benchmark": name,
        "ours_ms": ours_s * 1e3,
        "baseline": baseline,
        "baseline_ms": None if baseline_s is None else baseline_s * 1e3,
        "speed-up": None if baseline_s is None else baseline_s / ours_s,
        "goal": goal,
        "note": note,
    }
