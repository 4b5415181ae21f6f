"""The one comparison behind `expect`, the pytest plugin and users' own Python tests.

`compare` decides whether an actual value meets an expectation and writes the failure message
that shows both values with their units and the tolerance. `assert_quantity` is the same check
for Python tests.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

#: How a number that is not finite is printed (never 'inf' or 'nan').
NOT_COMPUTED = "(cannot be computed)"

__all__ = ["Outcome", "compare", "assert_quantity", "assert_script", "format_number",
           "with_unit", "unit_words"]


def format_number(value: float, digits: int = 6) -> str:
    """A number as reports print it: `digits` significant digits, no exponent for everyday
    magnitudes, never 'inf' or 'nan': a value that is not finite prints as the words
    'cannot be computed' (the exit half of the numeric guard, `layoutlang.guard`)."""
    if value == 0:
        return "0"
    if not math.isfinite(value):
        return NOT_COMPUTED
    text = f"{value:.{digits}g}"
    if "e" in text:
        mantissa, exponent = text.split("e")
        return f"{mantissa}e{int(exponent)}"
    return text


@dataclass(frozen=True)
class Outcome:
    """Whether one expectation holds, with the words to say so."""

    passed: bool
    actual: Any
    message: str


#: Unit words that have a singular: "1 diopter", "2 diopters"; "1 depth of focus".
_SINGULAR = {"diopters": "diopter", "depths of focus": "depth of focus"}


def unit_words(shown: str, unit: str) -> str:
    """The unit word as it reads after the printed number `shown` (singular after 1)."""
    if shown in ("1", "-1") and unit in _SINGULAR:
        return _SINGULAR[unit]
    return unit


def with_unit(value: float, unit: str, digits: int = 6) -> str:
    """A number and its unit as every report prints them ('1 diopter', '2.5 mm', '0.3')."""
    if not math.isfinite(value):
        return NOT_COMPUTED
    shown = format_number(value, digits)
    return f"{shown} {unit_words(shown, unit)}".rstrip()


_with_unit = with_unit


def _difference(actual: float, expected: float, digits: int = 6) -> float:
    """actual − expected, or 0 when the two print the same (a difference below the display
    precision is rounding noise, not news: no 'off by -5.68e-14')."""
    if format_number(actual, digits) == format_number(expected, digits):
        return 0.0
    return actual - expected


def compare(
    actual: Any,
    op: str,
    expected: float,
    tolerance: float | None = None,
    relative: bool = False,
    unit: str = "",
    quantity: str = "value",
) -> Outcome:
    """Check `actual op expected` (with a tolerance for '=').

    Args:
        actual: the computed value, or an object whose str() says why there is none.
        op: one of = < <= > >=.
        expected: the expected value, in the same unit as `actual`.
        tolerance: for '=': the allowed difference, absolute or (relative=True) a fraction.
        relative: whether `tolerance` is a fraction of `expected`.
        unit: the unit word both values are in (for the message).
        quantity: the quantity's name (for the message).
    """
    if not isinstance(actual, (int, float)):
        return Outcome(False, actual, f"{quantity} is {actual}; expected {op} "
                       f"{_with_unit(expected, unit)}")
    if not math.isfinite(actual):
        from .guard import NOT_FINITE_REASON

        return Outcome(False, actual, f"{quantity} {NOT_FINITE_REASON}; expected {op} "
                       f"{_with_unit(expected, unit)}")
    if op == "=":
        allowed = abs(tolerance * expected) if relative else abs(tolerance or 0.0)
        passed = abs(actual - expected) <= allowed * (1 + 1e-12)
        tol_text = (f"± {format_number(tolerance * 100)}% (± {_with_unit(allowed, unit)})"
                    if relative else f"± {_with_unit(allowed, unit)}")
        detail = (f"{quantity} = {_with_unit(actual, unit)}, expected "
                  f"{_with_unit(expected, unit)} {tol_text}; off by "
                  f"{_with_unit(_difference(actual, expected), unit)}")
    else:
        passed = {"<": actual < expected, "<=": actual <= expected,
                  ">": actual > expected, ">=": actual >= expected}[op]
        detail = f"{quantity} = {_with_unit(actual, unit)}, expected {op} {_with_unit(expected, unit)}"
    return Outcome(bool(passed), actual, detail)


def assert_quantity(actual: Any, op: str, expected: float, tolerance: float | None = None,
                    relative: bool = False, unit: str = "", quantity: str = "value") -> None:
    """`compare`, raising AssertionError with the same message when it fails."""
    outcome = compare(actual, op, expected, tolerance, relative, unit, quantity)
    if not outcome.passed:
        raise AssertionError(outcome.message)


def assert_script(script: Any) -> None:
    """Every expectation of a script holds, else AssertionError listing each failure as the
    pytest plugin shows it (file:line, the line as written, expected/actual/tolerance).

    Args:
        script: a path to a layout script, or a Program from `layoutlang.load`/`loads`.
    """
    from .checks import check_program
    from .interpret.interpreter import load_file

    program = script if hasattr(script, "expectations") else load_file(script)
    failed = [r for r in check_program(program) if not r.passed]
    if failed:
        lines = [f"{len(failed)} expectation(s) of {program.file} do not hold:"]
        for result in failed:
            span = result.expectation.span
            lines.append(f"{span.file}:{span.line}: {result.expectation.text}\n"
                         f"  {result.outcome.message}")
        raise AssertionError("\n".join(lines))
