"""Tests of the dispersion models: each formula, vectorized evaluation, glass codes, ranges."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from layoutlang.materials import dispersion as d
from layoutlang.materials.lines import SPECTRAL_LINES

LINES_UM = {k: v / 1000.0 for k, v in SPECTRAL_LINES.items()}
SILICA = d.Sellmeier.from_resonances((0.6961663, 0.4079426, 0.8974794),
                                     (0.0684043, 0.1162414, 9.896161), valid_um=(0.21, 3.71))


def test_constant_keeps_its_index_and_broadcasts() -> None:
    model = d.Constant(1.5)
    assert model.index(0.55) == 1.5
    assert model.index(np.array([0.4, 0.5, 0.6])).tolist() == [1.5, 1.5, 1.5]
    assert not model.dispersive


def test_both_sellmeier_forms_are_the_same_formula() -> None:
    # n² = 1 + Σ B λ²/(λ² − C) with C = λᵢ² is the resonance form with λᵢ: same numbers.
    squares = d.Sellmeier((0.6961663, 0.4079426, 0.8974794),
                          (0.0684043 ** 2, 0.1162414 ** 2, 9.896161 ** 2))
    waves = np.linspace(0.3, 2.0, 17)
    assert np.allclose(squares.index(waves), SILICA.index(waves), rtol=0, atol=1e-15)
    assert SILICA.form == "resonances" and squares.form == "squares"


def test_sellmeier_by_hand_at_one_wavelength() -> None:
    lam = 0.5
    n2 = 1 + sum(b * lam ** 2 / (lam ** 2 - c ** 2) for b, c in
                 ((0.6961663, 0.0684043), (0.4079426, 0.1162414), (0.8974794, 9.896161)))
    assert SILICA.index(lam) == pytest.approx(math.sqrt(n2), abs=1e-15)


def test_models_are_vectorized_and_agree_with_one_at_a_time() -> None:
    waves = np.array([0.4047, 0.4861, 0.5876, 0.6563, 0.8521])
    models = [SILICA, d.Cauchy((1.5, 0.004, 0.0001)), d.GlassFromNdVd(1.62, 36.4),
              d.Table((0.4, 0.5, 0.7, 0.9), (1.53, 1.52, 1.51, 1.505)), d.StandardAir()]
    for model in models:
        together = model.index(waves)
        assert together.shape == waves.shape
        assert together.tolist() == [model.index(float(w)) for w in waves]


def test_cauchy_is_a_series_in_inverse_square_wavelength() -> None:
    model = d.Cauchy((1.5, 0.004, 0.0001))
    assert model.index(0.5) == pytest.approx(1.5 + 0.004 / 0.25 + 0.0001 / 0.0625, abs=1e-15)


def test_model_glass_meets_nd_abbe_number_and_the_normal_line() -> None:
    glass = d.GlassFromNdVd(1.517, 64.2)
    nd, nf, nc, ng = (glass.index(LINES_UM[k]) for k in ("d", "F", "C", "g"))
    assert nd == pytest.approx(1.517, abs=1e-12)
    assert (nd - 1) / (nf - nc) == pytest.approx(64.2, abs=1e-9)
    assert (ng - nf) / (nf - nc) == pytest.approx(0.6438 - 0.001682 * 64.2, abs=1e-9)
    waves = np.linspace(0.365, 1.014, 50)
    assert np.all(np.diff(glass.index(waves)) < 0)  # normal dispersion across its range


def test_glass_code_convention_both_ways() -> None:
    # Six-digit glass code (common practice, international convention): the first three digits
    # are (nd − 1)·1000 rounded, the last three νd·10; a '.ddd' suffix gives the density.
    assert d.parse_glass_code("517642") == (pytest.approx(1.517), pytest.approx(64.2))
    assert d.parse_glass_code("620364.360") == (pytest.approx(1.620), pytest.approx(36.4))
    assert d.glass_code(1.5168, 64.17) == "517642"
    assert d.glass_code(1.45846, 67.82) == "458678"
    model = d.GlassFromNdVd.from_code("517642")
    assert (model.nd, model.vd, model.code) == (1.517, 64.2, "517642")


@pytest.mark.parametrize("code", ["51764", "5176420", "51764x", "517642.2x", "000642", "517000"])
def test_bad_glass_codes_are_refused(code: str) -> None:
    with pytest.raises(d.DispersionError):
        d.parse_glass_code(code)


def test_table_is_exact_at_rows_and_continues_its_end_segments() -> None:
    table = d.Table((0.4, 0.5, 0.7), (1.53, 1.52, 1.51))
    assert table.index(np.array([0.4, 0.5, 0.7])).tolist() == [1.53, 1.52, 1.51]
    inside = table.index(0.6)
    assert 1.51 < inside < 1.52
    # linear in 1/λ² between 0.5 and 0.7 µm
    u = (1 / 0.36 - 1 / 0.49) / (1 / 0.25 - 1 / 0.49)
    assert inside == pytest.approx(1.51 + u * 0.01, abs=1e-15)
    assert table.index(0.8) < 1.51 < 1.53 < table.index(0.35)
    assert table.valid_um == (0.4, 0.7)


@pytest.mark.parametrize("rows", [((0.5,), (1.5,)), ((0.5, 0.4), (1.5, 1.51)),
                                  ((0.4, 0.5), (1.5,)), ((-0.4, 0.5), (1.5, 1.4))])
def test_bad_tables_are_refused(rows) -> None:
    with pytest.raises(d.DispersionError):
        d.Table(*rows)


def test_a_wavelength_at_a_resonance_is_an_error_not_nan() -> None:
    model = d.Sellmeier((1.0,), (0.25,))  # resonance at 0.5 µm
    with pytest.raises(d.DispersionError):
        model.index(0.5)
    with pytest.raises(d.DispersionError):
        model.index(np.array([0.45, 0.6]))  # n² < 0 just below the resonance


def test_range_warning_names_material_and_range() -> None:
    assert d.range_warning("fused_silica", SILICA, [0.5, 1.0]) is None
    text = d.range_warning("fused_silica", SILICA, [0.2, 0.5, 4.0])
    assert text == ("fused_silica: the dispersion data hold from 210 nm to 3710 nm; 200 nm, "
                    "4000 nm lies outside, the index there is an extrapolation")
    assert d.range_warning("anything", d.Constant(1.5), [0.01]) is None


def test_abbe_number_and_partial_dispersion_definitions() -> None:
    # νd = (nd − 1)/(nF − nC) and P(x,y) = (nx − ny)/(nF − nC) (common practice).
    assert d.abbe_number(1.5, 1.51, 1.49) == pytest.approx(25.0)
    assert d.partial_dispersion(1.52, 1.51, 1.51, 1.49) == pytest.approx(0.5)


@given(st.lists(st.floats(0.25, 2.5), min_size=1, max_size=20))
def test_any_wavelengths_at_once_equal_one_at_a_time(waves: list[float]) -> None:
    together = SILICA.index(np.array(waves))
    assert together.tolist() == [SILICA.index(w) for w in waves]
    assert np.all(np.isfinite(together))


def test_colour_is_measured_between_f_and_c_when_they_are_listed() -> None:
    # F and C around d, or F' and C' around e, are the trade's colour ends (common practice;
    # ISO 7944 names the lines); other lists fall back to their outermost wavelengths.
    from layoutlang.materials.lines import SPECTRAL_LINES as L, colour_pair

    assert colour_pair([L["d"], L["F"], L["C"], L["g"]]) == ("d", L["F"], L["C"])
    assert colour_pair([L["e"], L["F'"], L["C'"], L["F"]]) == ("e", L["F'"], L["C'"])
    assert colour_pair([500.0, 450.0, 700.0]) == (None, 450.0, 700.0)
    assert colour_pair([550.0]) is None
