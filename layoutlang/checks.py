"""Evaluate a program's expectations against its first-order properties."""

from __future__ import annotations

from dataclasses import dataclass

from .engines.firstorder import FirstOrder, first_order
from .interpret.interpreter import Expectation, Program
from .engines.qualitysettings import QualityRequest
from .quantities import PERCENT, POWER, RAY_QUANTITIES
from .measure import LENGTH_UNITS, to_nanometres
from .testing import Outcome, compare

__all__ = ["CheckResult", "check_program", "evaluate_program", "display_unit", "to_display"]


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
    return {"length": units, "power": "diopters", PERCENT: "%", "waves": "waves",
            "degrees": "deg"}.get(kind, "")


def to_display(value, kind: str, units: str):
    """Convert an internal value (powers are per layout unit) to its display unit."""
    if kind == POWER and isinstance(value, (int, float)):
        return value * 1000.0 / LENGTH_UNITS[units]
    if kind == PERCENT and isinstance(value, (int, float)):
        return value * 100.0
    return value


def evaluate_program(program: Program) -> tuple[FirstOrder, list[CheckResult]]:
    """The first-order results of a program and the outcome of each expectation, as every
    front end reports them (a symbolic script at its nominal values, which must all be given)."""
    if program.symbolic is not None:
        from .symbolic.program import require_numeric

        require_numeric(program)
    results = first_order(program.system)
    return results, check_program(program, results)


def check_program(program: Program, results: FirstOrder | None = None) -> list[CheckResult]:
    """Every expectation of the program with its outcome, in script order."""
    if results is None:
        results, checked = evaluate_program(program)
        return checked
    units = program.system.units
    checked = []
    for expectation in program.expectations:
        kind = expectation.kind
        label = expectation.quantity
        request = getattr(expectation, "request", None)
        if isinstance(request, QualityRequest):  # image quality (engines/quality.py)
            from .engines.quality import image_quality

            value = image_quality(program.system, program.rays, program.quality.settings,
                                  results).value(request)
            label = request.describe()
        elif request is not None:  # colour quantities and `at wavelength W` (engines/chromatic.py)
            from .engines.chromatic import evaluate

            value = evaluate(request, program.system, results)
            label = request.describe()
        elif expectation.quantity in RAY_QUANTITIES:  # exact rays or Seidel sums, traced once
            from .engines.rayquantities import ray_quantities

            rays = ray_quantities(program.system, program.rays, results)
            value = rays.value(expectation.quantity, expectation.field, expectation.scale,
                               expectation.wavelength)
            if expectation.field is not None:
                label = f"{label} at field {expectation.field:g}"
            if expectation.wavelength is not None:
                nm = to_nanometres(expectation.wavelength, units)
                label = f"{label} at {nm:.6g} nm"
            if expectation.scale:
                label = f"size of the {label} in depths of focus"
        elif program.symbolic is not None and \
                expectation.quantity in program.symbolic.expected_sensitivities:
            value = program.symbolic.expected_sensitivities[expectation.quantity]  # symbolic/
        else:
            value = results[expectation.quantity]
        actual = to_display(value, kind, units)
        expected = to_display(expectation.expected, kind, units)
        tolerance = expectation.tolerance
        if tolerance is not None and not expectation.relative:
            tolerance = to_display(tolerance, kind, units)
        unit = "depths of focus" if expectation.scale else display_unit(kind, units)
        outcome = compare(actual, expectation.op, expected, tolerance, expectation.relative,
                          unit, label)
        checked.append(CheckResult(expectation, outcome))
    return checked
