"""Tests of unit words and their conversion factors (layoutlang/measure.py)."""

from __future__ import annotations

import math

import pytest

from layoutlang.measure import LENGTH_UNITS, Measure, unit_scale


@pytest.mark.parametrize("unit, millimetres", [
    # SI prefixes and the international inch (1 in = 25.4 mm exactly, common practice)
    ("nm", 1e-6), ("um", 1e-3), ("µm", 1e-3), ("mm", 1.0), ("cm", 10.0), ("m", 1000.0),
    ("in", 25.4),
])
def test_length_units_in_millimetres(unit: str, millimetres: float) -> None:
    assert LENGTH_UNITS[unit] == pytest.approx(millimetres, rel=1e-15)
    factor, length, angle, relative = unit_scale(unit, "mm")
    assert (factor, length, angle, relative) == (pytest.approx(millimetres), 1, 0, False)


@pytest.mark.parametrize("script_unit", list(LENGTH_UNITS))
def test_lengths_convert_into_the_script_unit(script_unit: str) -> None:
    # 1 m written in a script whose unit is `script_unit`
    factor = unit_scale("m", script_unit)[0]
    assert factor * LENGTH_UNITS[script_unit] == pytest.approx(1000.0)


def test_angles_are_radians() -> None:
    assert unit_scale("deg", "mm")[:3] == (pytest.approx(math.pi / 180), 0, 1)
    assert unit_scale("rad", "mm")[:3] == (1.0, 0, 1)


@pytest.mark.parametrize("script_unit, per_unit", [("mm", 1e-3), ("m", 1.0), ("cm", 1e-2)])
def test_diopters_are_per_metre(script_unit: str, per_unit: float) -> None:
    # 1 diopter = 1 m^-1 (common practice); in a mm script that is 0.001 per mm
    factor, length, angle, relative = unit_scale("diopters", script_unit)
    assert (factor, length, angle, relative) == (pytest.approx(per_unit), -1, 0, False)


def test_percent_is_a_relative_hundredth() -> None:
    assert unit_scale("%", "mm") == (0.01, 0, 0, True)


def test_unknown_unit_is_a_key_error() -> None:
    with pytest.raises(KeyError):
        unit_scale("furlong", "mm")


def test_measure_describes_its_dimension() -> None:
    assert Measure(1.0).describe() == "a number without a unit"
    assert Measure(1.0, 1, 0, bare=False).describe() == "a length"
    assert Measure(1.0, 0, 1, bare=False).describe() == "an angle"
    assert Measure(1.0, -1, 0, bare=False).describe() == "an optical power"
    assert Measure(1.0, 3, 0, bare=False).describe() == "length^3 angle^0"
