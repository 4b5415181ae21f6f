"""One tolerance analysis per program and run: `expect yield`, `report tolerances` and the
`tolerance` command share it (the Monte Carlo run is the expensive part)."""

from __future__ import annotations

from ..engines.firstorder import Unavailable
from .analysis import ToleranceResult, analyse
from .evaluate import measured_expectations
from .model import YieldRequest

__all__ = ["analysis_of", "remember", "yield_value"]

_CACHE: dict[int, tuple[object, ToleranceResult]] = {}
_KEPT = 4


def analysis_of(program, **options) -> ToleranceResult:
    """The (cached) analysis of this program object with the script's own settings."""
    if options:
        return analyse(program, **options)
    found = _CACHE.get(id(program))
    if found is not None and found[0] is program:
        return found[1]
    result = analyse(program)
    remember(program, result)
    return result


def remember(program, result: ToleranceResult) -> None:
    """Keep an analysis run elsewhere (the command's own runner) for this program object."""
    if len(_CACHE) >= _KEPT:
        _CACHE.pop(next(iter(_CACHE)))
    _CACHE[id(program)] = (program, result)


def yield_value(program, request: YieldRequest):
    """The fraction of built units meeting every expectation (or those on one quantity)."""
    expectations = measured_expectations(program)
    if not expectations:
        return Unavailable("none: the script states no other expectation to meet")
    result = analysis_of(program)
    monte = result.monte_carlo
    if request.quantity is None:
        return monte.yield_all
    rows = [i for i, e in enumerate(expectations) if e.quantity == request.quantity]
    if not rows:
        return Unavailable(f"none: no expectation on {request.quantity}")
    return monte.joint_yield(rows)
