"""Vacuum wavelengths of the standard lines, against tabulated values.

Source: NIST Atomic Spectra Database (A. Kramida et al.), the air and vacuum wavelengths of
the helium d line (587.5618 nm in air, 587.7249 nm in vacuum) and the hydrogen F and C lines
(486.1327 / 486.2692 nm and 656.2725 / 656.4533 nm) — from memory, to about 0.001 nm.
"""

from __future__ import annotations

import pytest

from layoutlang.materials.lines import line_nm


@pytest.mark.parametrize("letter, vacuum", [("d", 587.7249), ("F", 486.2692), ("C", 656.4533)])
def test_vacuum_wavelengths_of_the_lines(letter: str, vacuum: float):
    assert line_nm(letter, "vacuum") == pytest.approx(vacuum, abs=1.5e-3)
    assert line_nm(letter) < line_nm(letter, "vacuum")
