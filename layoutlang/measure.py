"""Values with dimensions: lengths, angles, optical powers and plain numbers.

A script states its length unit once (`units mm`, the default); every length is kept in that
unit, every angle in radians, every power in inverse script units. A number written without a
unit is `bare`: it takes the dimension the statement needs (a bare length is in script units),
except where a unit is required (angles, wavelengths), which the interpreter enforces.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

__all__ = ["Measure", "LENGTH_UNITS", "unit_scale", "DIMENSION_WORDS", "to_nanometres",
           "from_nanometres"]

#: Length units and their size in millimetres.
LENGTH_UNITS: dict[str, float] = {
    "nm": 1e-6,
    "um": 1e-3,
    "µm": 1e-3,
    "mm": 1.0,
    "cm": 10.0,
    "m": 1000.0,
    "in": 25.4,
}

#: (length exponent, angle exponent) → words for messages.
DIMENSION_WORDS = {
    (0, 0): "a plain number",
    (1, 0): "a length",
    (-1, 0): "an optical power",
    (0, 1): "an angle",
    (2, 0): "an area",
}


def to_nanometres(length: Any, units: str) -> Any:
    """A length in the layout's unit (a wavelength, say) in nanometres."""
    return length * LENGTH_UNITS[units] * 1e6


def from_nanometres(nanometres: Any, units: str) -> Any:
    """Nanometres in the layout's length unit."""
    return nanometres * LENGTH_UNITS["nm"] / LENGTH_UNITS[units]


def unit_scale(unit: str, script_unit: str) -> tuple[float, int, int, bool]:
    """(factor to internal units, length exponent, angle exponent, relative) of a unit word."""
    if unit in LENGTH_UNITS:
        return LENGTH_UNITS[unit] / LENGTH_UNITS[script_unit], 1, 0, False
    if unit == "deg":
        import math

        return math.pi / 180.0, 0, 1, False
    if unit == "rad":
        return 1.0, 0, 1, False
    if unit == "mrad":
        return 1e-3, 0, 1, False
    if unit in ("arcmin", "arcsec"):  # 1/60 and 1/3600 of a degree
        import math

        return math.pi / 180.0 / (60.0 if unit == "arcmin" else 3600.0), 0, 1, False
    if unit == "dB":  # a ratio in decibels: a plain number, read where decibels are meant
        return 1.0, 0, 0, False
    if unit in ("diopters", "diopter"):  # 1 diopter = 1 per metre
        return LENGTH_UNITS[script_unit] / 1000.0, -1, 0, False
    if unit == "%":
        return 0.01, 0, 0, True
    raise KeyError(unit)


@dataclass(frozen=True)
class Measure:
    """A value (float, numpy array or sympy expression) and its dimension."""

    value: Any
    length: int = 0
    angle: int = 0
    bare: bool = True  # no unit was written anywhere in it
    relative: bool = False  # written as a percentage
    #: how many `let` constants written without a unit are multiplied into a bare value
    #: (divided: counted negative). Each may stand for a length in script units, so a bare
    #: value with two or more (`D * p`) is not a length; literal numbers count 0 (`2 * sep`).
    free: int = 0

    @property
    def dimension(self) -> tuple[int, int]:
        return (self.length, self.angle)

    def describe(self) -> str:
        if self.bare:
            return "a number without a unit"
        return DIMENSION_WORDS.get(self.dimension, f"length^{self.length} angle^{self.angle}")
