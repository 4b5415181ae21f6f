"""Words and units as a reader expects them: singular after 1, nothing checked said so, no
rounding noise, qualifiers echoed as written, the tolerance named as the tolerance, and
dimensions that follow the arithmetic."""

from __future__ import annotations

import math

import pytest

from layoutlang import loads
from layoutlang.checks import check_program
from layoutlang.cli import main
from layoutlang.errors import LayoutError, LayoutUnitError
from layoutlang.testing import compare, with_unit

LENS = ("start in air\nmedium glass index 1.5\nsurface front radius 50 into glass\ngap 5\n"
        "surface back radius -50 into air\n")


def test_one_diopter_is_singular():
    assert with_unit(1.0, "diopters") == "1 diopter"
    assert with_unit(-1.0, "diopters") == "-1 diopter"
    assert with_unit(2.0, "diopters") == "2 diopters"
    assert "expected 1 diopter ±" in compare(1.2, "=", 1.0, 0.5, unit="diopters").message


def test_diopter_is_accepted_as_a_unit_word():
    program = loads("start in air\nlens focal length 1000\nexpect power = 1 diopter ± 1e-9\n")
    assert check_program(program)[0].passed


def _check_output(tmp_path, capsys, text: str) -> str:
    path = tmp_path / "s.lay"
    path.write_text(text, encoding="utf-8")
    main(["check", str(path)])
    return capsys.readouterr().out


def test_one_expectation_holds_in_the_singular(tmp_path, capsys):
    out = _check_output(tmp_path, capsys, LENS + "expect focal length > 0\n")
    assert out.endswith(": 1 expectation holds\n")


def test_a_script_without_expectations_says_nothing_was_checked(tmp_path, capsys):
    assert _check_output(tmp_path, capsys, LENS).endswith(": no expectations, nothing checked\n")
    from layoutlang.checks import evaluate_program
    from layoutlang.reports.text import full_report

    program = loads(LENS)
    text = full_report(program, *evaluate_program(program))
    assert "states no expectations, so nothing was checked" in text


def test_a_difference_below_display_precision_prints_as_zero():
    message = compare(43.5 + 5.68e-14, "=", 43.5, 0.1, unit="mm").message
    assert message.endswith("off by 0 mm")
    assert compare(43.6, "=", 43.5, 0.2, unit="mm").message.endswith("off by 0.1 mm")


def test_a_field_is_echoed_as_written():
    program = loads("object at infinity, field angle 5 deg\n" + LENS +
                    "stop at front, diameter 10\nexpect rms spot radius at field 3 deg < 1\n")
    assert check_program(program)[0].outcome.message.startswith(
        "rms spot radius at field 3 deg = ")


def test_a_tolerance_with_the_wrong_unit_is_named_as_the_tolerance():
    with pytest.raises(LayoutUnitError) as caught:
        loads(LENS + "expect focal length = 50 ± 2 deg\n")
    assert "the tolerance must be a length, not an angle" in str(caught.value)
    assert caught.value.span.column == 28


@pytest.mark.parametrize("sep", ["100", "100 mm"])
def test_a_length_times_a_plain_function_value_is_a_length(sep: str):
    program = loads(f"let sep = {sep}\nstart in air\nsurface a flat\n"
                    "gap 2 * sep * tan(0.25 deg)\nsurface b flat\n")
    assert program.system.gaps[0] == pytest.approx(200 * math.tan(math.radians(0.25)))


def test_two_constants_without_units_multiplied_are_not_a_length():
    with pytest.raises(LayoutUnitError) as caught:
        loads("let D = 25\nlet p = 4\nstart in air\nsurface a flat\ngap D * p\nsurface b flat\n")
    assert "multiplies 2 constants written without a unit" in str(caught.value)
    # with units the dimensions are known, and a plain factor is fine
    program = loads("let D = 25 mm\nlet p = 4\nstart in air\nsurface a flat\ngap D * p\n"
                    "surface b flat\n")
    assert program.system.gaps[0] == 100
    with pytest.raises(LayoutError, match="not an area"):
        loads("let D = 25 mm\nlet p = 4 mm\nstart in air\nsurface a flat\ngap D * p\n"
              "surface b flat\n")


def test_line_letters_in_a_vacuum_layout_are_vacuum_wavelengths():
    air = loads("wavelengths d primary\n" + LENS).system.wavelengths[0].value
    vacuum = loads("wavelengths d primary\nlayout in vacuum\n" + LENS).system.wavelengths[0]
    assert air * 1e6 == pytest.approx(587.5618)
    assert vacuum.value * 1e6 == pytest.approx(587.7248, abs=2e-4)


def test_the_glass_from_nd_and_vd_is_described_in_our_own_words():
    from layoutlang.materials.dispersion import GlassFromNdVd

    assert GlassFromNdVd(1.517, 64.2).describe() == "glass from nd 1.517 and Abbe number 64.2"
