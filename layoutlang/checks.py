"""Evaluate a program's expectations against its first-order properties."""

from __future__ import annotations

from dataclasses import dataclass

from .engines.firstorder import FirstOrder, first_order
from .interpret.interpreter import Expectation, Program
from .quantities import POWER
from .measure import LENGTH_UNITS
from .testing import Outcome, compare

__all__ = ["CheckResult", "check_program", "display_unit", "to_display"]


@dataclass(frozen=True)
class CheckResult:
    expectation: Expectation
    outcome: Outcome

    @property
    def passed(self) -> bool:
        return self.outcome.passed


def display_unit(kind: str, units: str) -> str:
    """The unit a quantity of this kind is shown in: lengths in the layout's units, powers in
    diopters, plain numbers without a unit."""
    return {"length": units, "power": "diopters"}.get(kind, "")


def to_display(value, kind: str, units: str):
    """Convert an internal value (powers are per layout unit) to its display unit."""
    if kind == POWER and isinstance(value, (int, float)):
        return value * 1000.0 / LENGTH_UNITS[units]
    return value


def check_program(program: Program, results: FirstOrder | None = None) -> list[CheckResult]:
    """Every expectation of the program with its outcome, in script order."""
    results = results or first_order(program.system)
    units = program.system.units
    checked = []
    for expectation in program.expectations:
        kind = expectation.kind
        actual = to_display(results[expectation.quantity], kind, units)
        expected = to_display(expectation.expected, kind, units)
        tolerance = expectation.tolerance
        if tolerance is not None and not expectation.relative:
            tolerance = to_display(tolerance, kind, units)
        outcome = compare(actual, expectation.op, expected, tolerance, expectation.relative,
                          display_unit(kind, units), expectation.quantity)
        checked.append(CheckResult(expectation, outcome))
    return checked
