"""Tests of expression evaluation: arithmetic, units through arithmetic, functions, errors."""

from __future__ import annotations

import math

import pytest

from layoutlang import loads
from layoutlang.errors import LayoutError, LayoutNameError, LayoutUnitError, LayoutValueError


def value(expression: str, units: str = "mm"):
    """The Measure of `expression` in a script with the given length unit."""
    program = loads(f"units {units}\nlet x = {expression}\nstart in air\nlens l focal length 1\n")
    return program.names["x"]


@pytest.mark.parametrize("expression, expected", [
    ("1 + 2 * 3", 7.0),
    ("(1 + 2) * 3", 9.0),
    ("2 ^ 3 ^ 2", 512.0),
    ("-2 ^ 2", -4.0),
    ("10 / 4", 2.5),
    ("6 × 2 ÷ 3 − 1", 3.0),
    ("sqrt(16)", 4.0),
    ("abs(-3)", 3.0),
    ("exp(0) + ln(1) + log10(100)", 3.0),
    ("pi", math.pi),
])
def test_arithmetic(expression: str, expected: float) -> None:
    assert value(expression).value == pytest.approx(expected)


@pytest.mark.parametrize("expression, units, expected, dimension", [
    ("25.4 mm", "in", 1.0, (1, 0)),
    ("1 in", "mm", 25.4, (1, 0)),
    ("2 cm + 5 mm", "mm", 25.0, (1, 0)),
    ("500 nm", "um", 0.5, (1, 0)),
    ("500 nm", "mm", 5e-4, (1, 0)),
    ("3 µm", "mm", 3e-3, (1, 0)),
    ("1 m", "cm", 100.0, (1, 0)),
    ("180 deg", "mm", math.pi, (0, 1)),
    ("0.5 rad", "mm", 0.5, (0, 1)),
    ("10 diopters", "mm", 0.01, (-1, 0)),
    ("10 diopters", "m", 10.0, (-1, 0)),
    ("4 mm * 2 mm", "mm", 8.0, (2, 0)),
    ("sqrt(4 mm * 9 mm)", "mm", 6.0, (1, 0)),
    ("1 / (50 mm)", "mm", 0.02, (-1, 0)),
    ("(2 mm) ^ 2", "mm", 4.0, (2, 0)),
    ("atan(1)", "mm", math.pi / 4, (0, 1)),
    ("sin(30 deg)", "mm", 0.5, (0, 0)),
    ("cos(0)", "mm", 1.0, (0, 0)),
])
def test_units_through_arithmetic(expression, units, expected, dimension) -> None:
    measure = value(expression, units)
    assert measure.value == pytest.approx(expected)
    assert measure.dimension == dimension


def test_bare_number_takes_the_other_side_unit() -> None:
    measure = value("2 + 3 mm")
    assert (measure.value, measure.dimension, measure.bare) == (5.0, (1, 0), False)


def test_percent_is_relative() -> None:
    measure = value("5 %")
    assert measure.relative and measure.value == pytest.approx(0.05)


@pytest.mark.parametrize("expression, error, column, words", [
    ("5 mm + 2 deg", LayoutUnitError, 9, "cannot combine a length with an angle"),
    ("sin(5 mm)", LayoutUnitError, 13, "sin needs an angle"),
    ("exp(2 mm)", LayoutUnitError, 13, "needs a plain number"),
    ("2 ^ (1 mm)", LayoutUnitError, 14, "an exponent must be a plain number"),
    ("(2 mm) ^ 0.5", LayoutUnitError, 18, "whole power"),
    ("sqrt(2 mm)", LayoutUnitError, 9, "square root of this unit"),
    ("nothing + 1", LayoutNameError, 9, "unknown name 'nothing'"),
    ("sinn(1)", LayoutNameError, 9, "unknown function 'sinn'"),
    ("sin(1, 2)", LayoutValueError, 9, "takes one argument"),
    ("1 / 0", LayoutValueError, 13, "division by zero"),
    ("1 / (2 - 2)", LayoutValueError, 14, "division by zero"),
    ("sqrt(-1)", LayoutValueError, 9, "square root of a negative number"),
    ("0 ^ -1", LayoutValueError, 9, "zero cannot be raised to a negative power"),
    ("(-8) ^ 0.5", LayoutValueError, 9, "fractional power"),
    ("2 ^ 5000", LayoutValueError, 13, "exponent is too large"),
    ("10 ^ 400", LayoutValueError, 9, "too large"),
    ("1e400", LayoutValueError, 9, "too large"),
    ("exp(1000)", LayoutValueError, 9, "too large"),
    ("ln(0)", LayoutValueError, 9, "outside the function's domain"),
    ("acos(2)", LayoutValueError, 9, "outside the function's domain"),
])
def test_expression_errors(expression, error, column, words) -> None:
    with pytest.raises(error) as info:
        value(expression)
    assert isinstance(info.value, LayoutError)
    assert (info.value.line, info.value.column) == (2, column)
    assert words in info.value.message


def test_did_you_mean_for_a_misspelt_constant() -> None:
    with pytest.raises(LayoutNameError) as info:
        loads("let focal_goal = 80\nlet y = focal_gaol * 2\n")
    assert info.value.hint == "did you mean 'focal_goal'?"
    assert (info.value.line, info.value.column) == (2, 9)


def test_name_error_prints_without_key_error_quotes() -> None:
    with pytest.raises(LayoutNameError) as info:
        value("nothing")
    assert str(info.value).startswith("<script>:2:9: error: unknown name 'nothing'")
