"""A time budget for sympy calls that can run away (solve, factor of large inputs).

On the main thread of a Unix process a real-time alarm interrupts the call and `OverBudget` is
raised; elsewhere (threads, Windows) the call runs unguarded and only the size limits of the
algebra protect it, which is why every caller also checks sizes before calling sympy.
"""

from __future__ import annotations

import signal
import threading
from contextlib import contextmanager
from typing import Iterator

__all__ = ["OverBudget", "time_budget", "SOLVE_SECONDS"]

#: How long an exact solve may take before the numeric route is used instead.
SOLVE_SECONDS = 3.0


class OverBudget(Exception):
    """The call did not finish within its time budget."""


@contextmanager
def time_budget(seconds: float) -> Iterator[None]:
    usable = (hasattr(signal, "setitimer") and
              threading.current_thread() is threading.main_thread())
    if not usable:
        yield
        return

    def expire(signum, frame):  # noqa: ARG001 — signal handler signature
        raise OverBudget(f"more than {seconds:g} s")

    previous = signal.signal(signal.SIGALRM, expire)
    signal.setitimer(signal.ITIMER_REAL, seconds)
    try:
        yield
    finally:
        signal.setitimer(signal.ITIMER_REAL, 0)
        signal.signal(signal.SIGALRM, previous)
