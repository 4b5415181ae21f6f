"""Nothing a script says is silently ignored: every option takes effect or is an error at its
words (one test per statement or option found to be ignored or misread)."""

from __future__ import annotations

import pytest

from layoutlang import loads
from layoutlang.checks import check_program
from layoutlang.errors import LayoutError, LayoutSyntaxError
from layoutlang.syntax.parser import parse

LENS = ("object at infinity, field angle 5 deg\nstart in air\nmedium glass index 1.5\n"
        "surface front radius 50 into glass\ngap 5\nsurface back radius -50 into air\n"
        "stop at front, diameter 10\nimage at focus\n")
NEAR = LENS.replace("object at infinity, field angle 5 deg", "object 200 before, height 4")


def _error(text: str) -> LayoutError:
    with pytest.raises(LayoutError) as caught:
        loads(text)
    return caught.value


def test_a_field_angle_on_a_near_object_is_an_error_that_says_what_works():
    error = _error(NEAR.replace("height 4", "field angle 5 deg"))
    text = str(error)
    assert "sized by its height, not by a field angle" in text
    assert error.span.line == 1 and error.span.column == 32  # at the angle written
    assert "height of 17.5 mm" in text  # 200 mm · tan 5°, the height that would work


def test_a_height_at_infinity_is_an_error_that_says_what_works():
    text = str(_error(LENS.replace("field angle 5 deg", "height 4")))
    assert "an object at infinity has no height" in text and "field angle 5 deg" in text


@pytest.mark.parametrize("line", [
    "object 200 before, height 3, height 4",
    "object at infinity, field angle 1 deg, field angle 2 deg",
    "surface radius 50, clear diameter 10, clear diameter 12",
])
def test_an_option_given_twice_is_an_error_not_the_last_one_winning(line: str):
    with pytest.raises(LayoutSyntaxError, match="given twice in this statement"):
        parse(line + "\n")


@pytest.mark.parametrize("line, what", [
    ('layout "a"\nlayout "b"', "the title is given twice"),
    ("units mm\nunits cm", "the length unit is given twice"),
    ("wavelengths d, F\nwavelengths C", "the list of wavelengths is given twice"),
    ("wavelengths d, F, 587.5618 nm", "listed twice"),
])
def test_a_setting_given_twice_is_an_error(line: str, what: str):
    assert what in str(_error(line + "\n" + LENS))


def test_report_takes_a_field_as_expect_does():
    program = loads(LENS + "report rms spot radius at field 1\nreport distortion at field 3 deg\n"
                           "expect rms spot radius at field 1 < 1\n")
    requests = program.ray_requests
    assert [r.label for r in requests] == ["rms spot radius at field 1",
                                           "distortion at field 3 deg"]
    assert requests[1].field == pytest.approx(0.6)
    from layoutlang.engines.rayquantities import ray_quantities

    rays = ray_quantities(program.system, program.rays)
    checked = check_program(program)
    # the report's value is the very number the expectation compares
    assert rays.value("rms spot radius", 1.0) == checked[0].outcome.actual


def test_a_wavelength_alone_qualifies_a_spot_in_expect_and_report():
    program = loads(LENS + "wavelengths d primary, F\n"
                           "report rms spot radius at wavelength F\n"
                           "expect rms spot radius at wavelength F < 1\n")
    assert program.ray_requests[0].label == "rms spot radius at field 0 at wavelength F"
    checked = check_program(program)
    assert checked[0].passed
    assert "at wavelength F" in checked[0].outcome.message


def test_report_at_field_shows_in_the_text_report():
    from layoutlang.cli import main

    import io
    import contextlib
    import tempfile
    from pathlib import Path

    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / "s.lay"
        path.write_text(LENS + "report rms spot radius at field 1\n", encoding="utf-8")
        out = io.StringIO()
        with contextlib.redirect_stdout(out):
            main(["run", str(path)])
    assert "requested: rms spot radius at field 1" in out.getvalue()


def test_a_within_tolerance_without_a_unit_is_an_error():
    error = _error(LENS + "expect focal length = 50 within 5\n")
    assert "needs '%' or a unit" in str(error) and "within 5%" in str(error)
    assert loads(LENS + "expect focal length = 50 within 5%\n").expectations[0].relative
    absolute = loads(LENS + "expect focal length = 50 within 2 mm\n").expectations[0]
    assert not absolute.relative and absolute.tolerance == 2


def test_keywords_end_where_words_end():
    with pytest.raises(LayoutSyntaxError) as caught:
        parse("start in air\nsurface front radius 50 intocrown\n")
    text = str(caught.value)
    assert "'intocrown'" in text and "write 'into crown'" in text
    assert caught.value.span.line == 2 and caught.value.span.column == 25


def test_a_byte_order_mark_is_accepted(tmp_path):
    from layoutlang import load

    path = tmp_path / "bom.lay"
    path.write_bytes("\ufeff".encode("utf-8") + (LENS + "expect focal length > 1\n").encode())
    assert check_program(load(path))[0].passed


@pytest.mark.parametrize("sign", ["±", "+/-", "+-"])
def test_every_plus_minus_spelling_is_a_tolerance(sign: str):
    program = loads(LENS + f"expect focal length = 50 {sign} 2\n")
    assert program.expectations[0].tolerance == 2


def test_plus_minus_is_still_arithmetic_where_no_tolerance_can_stand():
    program = loads("let a = 5 +-3\n" + LENS)
    assert program.names["a"].value == 2


@pytest.mark.parametrize("line, words", [
    ("sample pupils 1, 0.5", "'sample pupils' has no effect"),
    ("sample fields 0, 1", "'sample fields' has no effect"),
    ("sample grid 9", "'sample grid' has no effect"),
    ("focus tolerance 0.02 mm", "'focus tolerance' has no effect"),
])
def test_a_ray_setting_nothing_reads_is_an_error(line: str, words: str):
    error = _error(LENS + line + "\n")
    assert words in str(error) and error.span.line == 9


def test_the_sample_grid_counts_for_spot_expectations():
    program = loads(LENS + "sample grid 9\nexpect rms spot radius < 1\n")
    assert program.rays.grid == 9
