"""Every expectation's quantity on a set of built units, and whether each unit meets it.

First-order quantities of a batch come from one paraxial pass over array-valued layouts (the
paraxial engine runs on arrays). Quantities of the other engines (exact rays, colour) are
taken unit by unit through the same `check_program` that `check` uses, so a unit is judged by
exactly the rule the script states; the report says which were taken which way.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import Callable

import numpy as np

from ..checks import check_program, to_display
from ..engines.firstorder import Unavailable, first_order
from ..quantities import QUANTITIES, RAY_QUANTITIES
from ..testing import passes
from .model import YieldRequest

__all__ = ["Measured", "measured_expectations", "batched", "measure"]


@dataclass(frozen=True)
class Measured:
    """values[e, u]: expectation e's quantity on unit u, in display units (NaN: cannot be
    computed for that unit); passed[e, u]: whether it holds there."""

    values: np.ndarray
    passed: np.ndarray


def measured_expectations(program) -> list:
    """The expectations a built unit is judged by: every one but the yields themselves."""
    return [e for e in program.expectations if not isinstance(e.request, YieldRequest)]


def batched(program, expectation) -> bool:
    """Whether this expectation's quantity comes from the batched paraxial pass."""
    symbolic = program.symbolic is not None and \
        expectation.quantity in program.symbolic.expected_sensitivities
    # exact-ray and placement quantities (image shift, beam deviation) share the table of
    # names but not the paraxial pass: they are taken unit by unit
    return (expectation.request is None and expectation.quantity in QUANTITIES
            and expectation.quantity not in RAY_QUANTITIES and not symbolic)


def measure(program, batch, unit: Callable[[int], object], count: int) -> Measured:
    """Judge `count` units: `batch` is their array-valued System, `unit(i)` the i-th alone."""
    expectations = measured_expectations(program)
    values = np.full((len(expectations), count), np.nan)
    passed = np.zeros((len(expectations), count), bool)
    units = program.system.units
    one_by_one = []
    results = None
    for row, expectation in enumerate(expectations):
        if not batched(program, expectation):
            one_by_one.append(row)
            continue
        if results is None:
            with np.errstate(all="ignore"):
                results = first_order(batch)
        value = results[expectation.quantity]
        if isinstance(value, Unavailable):
            continue
        with np.errstate(all="ignore"):
            shown = np.broadcast_to(np.asarray(
                to_display(np.asarray(value, dtype=float), expectation.kind, units)), (count,))
            expected = to_display(expectation.expected, expectation.kind, units)
            tolerance = expectation.tolerance
            if tolerance is not None and not expectation.relative:
                tolerance = to_display(tolerance, expectation.kind, units)
            values[row] = np.where(np.isfinite(shown), shown, np.nan)
            passed[row] = passes(values[row], expectation.op, expected, tolerance,
                                 expectation.relative)
    if one_by_one:
        chosen = tuple(expectations[row] for row in one_by_one)
        for u in range(count):
            single = replace(program, system=unit(u), expectations=chosen, tolerances=None)
            for row, result in zip(one_by_one, check_program(single)):
                actual = result.outcome.actual
                if isinstance(actual, (int, float)) and np.isfinite(actual):
                    values[row, u] = actual
                passed[row, u] = result.passed
    return Measured(values, passed)
