"""Evaluate a program's expectations against its first-order properties."""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from .engines.firstorder import FirstOrder, Unavailable, first_order
from .interpret.interpreter import Expectation, Program
from .quantities import ANGLE, BEAM_QUANTITIES, DECIBEL, DEGREES, PERCENT, POWER, QUANTITIES
from .quantities import RAY_QUANTITIES
from .measure import LENGTH_UNITS, to_nanometres
from .testing import Outcome, compare
from .guard import guarded

__all__ = ["CheckResult", "QuantityReading", "check_program", "evaluate_program", "read_quantity",
           "display_unit", "to_display", "surface_value", "beam_label"]


@dataclass(frozen=True)
class CheckResult:
    expectation: Expectation
    outcome: Outcome
    label: str = ""  # the quantity with its qualifiers, in words
    unit: str = ""  # the unit the value and the message are in

    @property
    def passed(self) -> bool:
        return self.outcome.passed


def display_unit(kind: str, units: str) -> str:
    """The unit a quantity of this kind is shown in: lengths in the layout's units, powers in
    diopters, plain numbers without a unit."""
    return {"length": units, "power": "diopters", PERCENT: "%", ANGLE: "mrad",
            DECIBEL: "dB", DEGREES: "deg"}.get(kind, "")


def to_display(value, kind: str, units: str):
    """Convert an internal value (powers are per layout unit) to its display unit."""
    if kind == POWER and isinstance(value, (int, float)):
        return value * 1000.0 / LENGTH_UNITS[units]
    if kind == PERCENT and isinstance(value, (int, float)):
        return value * 100.0
    if kind == ANGLE and isinstance(value, (int, float)):
        return value * 1000.0
    if kind == DEGREES and isinstance(value, (int, float)):
        return math.degrees(value)
    return value


def surface_value(request, system, results):
    """`edge thickness of NAME` or `sag of NAME` (engines/buildable.py)."""
    from .engines.buildable import edge_thickness, surface_sag

    i = system.boundary_index(request.surface)
    if request.name == "edge thickness":
        return edge_thickness(system, results, i)
    return surface_sag(system, results, i)


def beam_label(name: str, place) -> str:
    """A beam quantity's name with its place, as messages show it."""
    return name if place is None or not place.label else f"{name} at {place.label}"


@guarded
def _at_infinity(results: FirstOrder, units: str) -> Outcome:
    """Whether the paraxial output is collimated (`expect image at infinity`)."""
    from .testing import with_unit

    value = results["image distance"]
    if isinstance(value, Unavailable) and "infinity" in str(value):
        return Outcome(True, value, f"image is {value}, expected at infinity")
    if isinstance(value, Unavailable):
        return Outcome(False, value, f"image is {value}; expected at infinity")
    side = "after" if value >= 0 else "before"
    return Outcome(False, value, f"image lies {with_unit(abs(value), units)} {side} the last "
                                 "boundary, expected at infinity (collimated output)")


def evaluate_program(program: Program) -> tuple[FirstOrder, list[CheckResult]]:
    """The first-order results of a program and the outcome of each expectation, as every
    front end reports them (a symbolic script at its nominal values, which must all be given)."""
    if program.symbolic is not None:
        from .symbolic.program import require_numeric

        require_numeric(program)
    results = first_order(program.system)
    return results, check_program(program, results)


@guarded
def check_program(program: Program, results: FirstOrder | None = None) -> list[CheckResult]:
    """Every expectation of the program with its outcome, in script order."""
    if results is None:
        results, checked = evaluate_program(program)
        return checked
    units = program.system.units
    checked = []
    for expectation in program.expectations:
        kind = expectation.kind
        if expectation.op == "at infinity":  # expect image at infinity
            checked.append(CheckResult(expectation, _at_infinity(results, units), "image", units))
            continue
        reading = read_quantity(program, results, expectation.quantity, field=expectation.field,
                                wavelength=expectation.wavelength, scale=expectation.scale,
                                request=getattr(expectation, "request", None), kind=kind,
                                label=getattr(expectation, "label", ""))
        expected = to_display(expectation.expected, kind, units)
        tolerance = expectation.tolerance
        if tolerance is not None and not expectation.relative:
            tolerance = to_display(tolerance, kind, units)
        outcome = compare(reading.value, expectation.op, expected, tolerance,
                          expectation.relative, reading.unit, reading.label)
        checked.append(CheckResult(expectation, outcome, reading.label, reading.unit))
    return checked


@dataclass(frozen=True)
class QuantityReading:
    """One quantity as a script names it: its label in words, its value in the display unit
    (or the `Unavailable` saying why there is none) and that unit."""

    label: str
    value: Any
    unit: str


def read_quantity(program: Program, results: FirstOrder, quantity: str, *,
                  field: float | None = None, wavelength: float | None = None, scale: str = "",
                  request: Any = None, kind: str | None = None, label: str = ""
                  ) -> QuantityReading:
    """The value of a quantity with its qualifiers, as `expect` checks it and `compare` shows it.

    Args:
        program: the interpreted script.
        results: its first-order results.
        quantity: the quantity's name (quantities.QUANTITIES, or a sensitivity's name).
        field: ray quantities: the field fraction (None: the quantity's default).
        wavelength: ray quantities: the wavelength in layout units (None: the primary).
        scale: 'depth of focus' when the value is wanted in depths of focus.
        request: colour quantities and `at wavelength`: an engines.chromatic.Request; beam
            quantities: an engines.beams.Place (or None).
        kind: the quantity's kind when it is not in the table (e.g. a sensitivity).
        label: ray quantities: the label as the script wrote it (default: made from the
            field and wavelength).
    """
    units = program.system.units
    kind = kind or QUANTITIES[quantity].kind
    written, label = label, quantity
    if quantity in BEAM_QUANTITIES:  # Gaussian beams (engines/beams.py)
        from .engines.beams import beam_value

        value = beam_value(program.system, quantity, request)
        label = beam_label(quantity, request)
    elif request is not None and hasattr(request, "surface"):  # edge thickness of NAME
        value = surface_value(request, program.system, results)
        label = request.describe()
    elif request is not None:  # colour quantities and `at wavelength W` (engines/chromatic.py)
        from .engines.chromatic import evaluate

        value = evaluate(request, program.system, results)
        label = request.describe()
    elif quantity in RAY_QUANTITIES:  # exact rays or Seidel sums, traced once
        from .engines.rayquantities import ray_quantities

        rays = ray_quantities(program.system, program.rays, results)
        value = rays.value(quantity, field, scale, wavelength)
        if written:
            label = written
        else:
            if field is not None:
                label = f"{label} at field {field:g}"
            if wavelength is not None:
                label = f"{label} at wavelength {to_nanometres(wavelength, units):.6g} nm"
        if scale:
            label = f"size of the {label} in depths of focus"
    elif program.symbolic is not None and quantity in program.symbolic.expected_sensitivities:
        value = program.symbolic.expected_sensitivities[quantity]  # symbolic/
    else:
        value = results[quantity]
    unit = "depths of focus" if scale else display_unit(kind, units)
    return QuantityReading(label, to_display(value, kind, units), unit)
