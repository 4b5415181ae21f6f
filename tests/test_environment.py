"""Tests of the surroundings: indices relative to standard air or to vacuum."""

from __future__ import annotations

import numpy as np
import pytest

from layoutlang.materials.dispersion import AIR, VACUUM, Constant, Sellmeier, StandardAir
from layoutlang.materials.environment import IN_VACUUM, STANDARD_AIR, relative_index

WAVES = np.array([0.4861327, 0.5875618, 0.6562725])
N_AIR = StandardAir().index(WAVES)


def test_air_is_exactly_one_in_standard_air_and_standard_air_in_vacuum() -> None:
    assert relative_index(StandardAir(), WAVES, STANDARD_AIR).tolist() == [1.0, 1.0, 1.0]
    assert np.array_equal(relative_index(StandardAir(), WAVES, IN_VACUUM), N_AIR)
    assert 1.00027 < float(relative_index(StandardAir(), 0.5875618, IN_VACUUM)) < 1.00029


def test_vacuum_is_one_in_vacuum_and_below_one_in_air() -> None:
    vacuum = Constant(1.0, reference=VACUUM)
    assert relative_index(vacuum, WAVES, IN_VACUUM).tolist() == [1.0, 1.0, 1.0]
    assert np.allclose(relative_index(vacuum, WAVES, STANDARD_AIR), 1 / N_AIR, rtol=0,
                       atol=1e-15)


def test_a_glass_relative_to_air_becomes_absolute_in_vacuum() -> None:
    glass = Sellmeier((1.0,), (0.01,), reference=AIR)
    in_air = relative_index(glass, WAVES, STANDARD_AIR)
    in_vacuum = relative_index(glass, WAVES, IN_VACUUM)
    assert np.array_equal(in_air, glass.index(WAVES))
    # n_abs(λ_vac) = n_rel(λ_vac / n_air) · n_air
    assert np.allclose(in_vacuum, glass.index(WAVES / N_AIR) * N_AIR, rtol=0, atol=1e-15)
    assert np.all(in_vacuum - in_air > 2.6e-4)


def test_an_absolute_formula_goes_back_and_forth() -> None:
    absolute = Sellmeier((1.0,), (0.01,), reference=VACUUM)
    relative = Sellmeier((1.0,), (0.01,), reference=AIR)
    # relative to air in a standard-air layout, then absolute again in a vacuum layout
    there = relative_index(absolute, 0.55, STANDARD_AIR)
    # the air index is taken at the stated wavelength: over the 0.03 % between air and vacuum
    # wavelengths it changes by less than 1e-8
    n_air = StandardAir().index(0.55)
    assert there == pytest.approx(absolute.index(0.55 * n_air) / n_air, abs=1e-12)
    assert abs(StandardAir().index(0.55 * n_air) - n_air) < 1e-8
    assert relative_index(relative, 0.55, STANDARD_AIR) == relative.index(0.55)


def test_a_plain_number_is_taken_as_written_everywhere() -> None:
    plain = Constant(1.5)
    assert relative_index(plain, 0.55, STANDARD_AIR) == 1.5
    assert relative_index(plain, 0.55, IN_VACUUM) == 1.5
