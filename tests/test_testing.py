"""Tests of the one comparison behind `expect` (layoutlang/testing.py)."""

from __future__ import annotations

import pytest

from layoutlang.engines.firstorder import Unavailable
from layoutlang.testing import assert_quantity, compare, format_number


@pytest.mark.parametrize("actual, op, expected, tolerance, relative, passed", [
    (80.4, "=", 80.0, 0.5, False, True),
    (80.5, "=", 80.0, 0.5, False, True),  # the edge counts as inside
    (80.6, "=", 80.0, 0.5, False, False),
    (-0.4645, "=", -0.46, 0.01, True, True),  # within 1% of -0.46
    (-0.4647, "=", -0.46, 0.01, True, False),
    (3.0, "<", 4.0, None, False, True), (4.0, "<", 4.0, None, False, False),
    (4.0, "<=", 4.0, None, False, True), (4.0, ">", 4.0, None, False, False),
    (4.0, ">=", 4.0, None, False, True), (5.0, ">", 4.0, None, False, True),
])
def test_compare(actual, op, expected, tolerance, relative, passed) -> None:
    assert compare(actual, op, expected, tolerance, relative, "mm", "q").passed is passed


def test_failure_message_shows_both_values_units_and_tolerance() -> None:
    outcome = compare(90.0243, "=", 80.0, 0.5, unit="mm", quantity="focal length")
    assert outcome.message == ("focal length = 90.0243 mm, expected 80 mm ± 0.5 mm; "
                               "off by 10.0243 mm")
    outcome = compare(-0.559588, "=", -0.46, 0.01, relative=True, quantity="magnification")
    assert "± 1% (± 0.0046)" in outcome.message


def test_unavailable_actual_fails_with_its_reason() -> None:
    outcome = compare(Unavailable("at infinity (afocal layout)"), "<", 5.0, unit="mm",
                      quantity="image distance")
    assert not outcome.passed
    assert outcome.message == "image distance is at infinity (afocal layout); expected < 5 mm"


def test_assert_quantity_raises_with_the_same_message() -> None:
    assert_quantity(1.0, "<", 2.0)
    with pytest.raises(AssertionError, match="value = 3, expected < 2"):
        assert_quantity(3.0, "<", 2.0)


@pytest.mark.parametrize("value, text", [
    (0.0, "0"), (-0.0, "0"), (90.02431, "90.0243"), (1e-7, "1e-7"), (123456789.0, "1.23457e8"),
    (-2.5, "-2.5"), (0.000123, "0.000123"),
])
def test_format_number(value: float, text: str) -> None:
    assert format_number(value) == text
