"""Timing shared by the benchmarks: the best of several runs, taken interleaved."""

from __future__ import annotations

import time
from typing import Callable

__all__ = ["timed", "best_of"]


def timed(function: Callable[[], object]) -> float:
    """Wall time of one call, in seconds."""
    start = time.perf_counter()
    function()
    return time.perf_counter() - start


def best_of(*functions: Callable[[], object], repeats: int,
            before: Callable[[], object] | None = None) -> list[float]:
    """The shortest time of each function, run interleaved so that a busy moment on a shared
    machine slows them alike rather than one of them (`before` runs ahead of every call,
    untimed, e.g. to clear a cache)."""
    times: list[list[float]] = [[] for _ in functions]
    for _ in range(repeats):
        for found, function in zip(times, functions):
            if before is not None:
                before()
            found.append(timed(function))
    return [min(found) for found in times]
