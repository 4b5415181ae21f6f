"""Tests of the interpreter: statements become the right System, and every semantic mistake
raises one typed error pointing at the offending words."""

from __future__ import annotations

import math
from pathlib import Path

import pytest

from layoutlang import loads
from layoutlang.errors import (LayoutError, LayoutFileError, LayoutNameError, LayoutUnitError,
                               LayoutValueError)
from layoutlang.interpret.interpreter import load_file
from layoutlang.system import IDEAL, MIRROR, REFRACT

LENS = "medium glass index 1.5\nstart in air\nsurface front radius 50 into glass\ngap 5\n" \
       "surface back radius -50 into air\n"


def error_of(text: str, kind: type[LayoutError] = LayoutError, base: Path | None = None):
    with pytest.raises(kind) as info:
        loads(text, "t.lay", base=base)
    return info.value


# --- building the System ---------------------------------------------------------------------


def test_a_lens_becomes_boundaries_gaps_and_media() -> None:
    system = loads(LENS + "object 100 before, height 2\nimage 40 after\n").system
    assert system.start_medium == "air"
    assert [b.name for b in system.boundaries] == ["front", "back"]
    assert [b.kind for b in system.boundaries] == [REFRACT, REFRACT]
    assert system.boundaries[0].curvature == pytest.approx(1 / 50)
    assert system.boundaries[1].curvature == pytest.approx(-1 / 50)
    assert system.gaps == (5.0,)
    assert system.indices() == [1.0, 1.5, 1.0]
    assert (system.object.distance, system.object.height) == (100.0, 2.0)
    assert system.image.distance == 40.0


def test_unnamed_boundaries_get_numbers_and_lenses_keep_their_power() -> None:
    system = loads("start in air\nlens focal length 25\ngap 10\nlens power 20 diopters\n"
                   "gap 5\nmirror flat\n").system
    assert [b.name for b in system.boundaries] == ["#1", "#2", "#3"]
    assert [b.kind for b in system.boundaries] == [IDEAL, IDEAL, MIRROR]
    assert system.boundaries[0].power == pytest.approx(1 / 25)
    assert system.boundaries[1].power == pytest.approx(0.02)  # 20 diopters = 0.02 / mm
    assert system.directions() == [1, 1, 1, -1]


def test_a_surface_without_into_stays_in_the_same_medium() -> None:
    system = loads("medium oil index 1.6\nstart in oil\nsurface flat\n").system
    assert system.indices() == [1.6, 1.6]


@pytest.mark.parametrize("units, gap, expected", [
    ("mm", "5", 5.0), ("mm", "5 mm", 5.0), ("mm", "1 in", 25.4), ("mm", "0.5 cm", 5.0),
    ("mm", "0.01 m", 10.0), ("mm", "2500 um", 2.5), ("mm", "2500 µm", 2.5),
    ("mm", "1e6 nm", 1.0), ("cm", "5 mm", 0.5), ("m", "5 mm", 0.005), ("in", "25.4 mm", 1.0),
    ("um", "1 mm", 1000.0), ("nm", "1 um", 1000.0),
])
def test_lengths_are_kept_in_the_script_unit(units: str, gap: str, expected: float) -> None:
    system = loads(f"units {units}\nstart in air\nlens a focal length 10\ngap {gap}\n"
                   "lens b focal length 10\n").system
    assert system.units == units
    assert system.gaps[0] == pytest.approx(expected)


def test_field_angle_in_degrees_and_radians() -> None:
    degrees = loads("start in air\nlens l focal length 10\nobject at infinity, field angle 5 deg\n")
    radians = loads("start in air\nlens l focal length 10\n"
                    "object at infinity, field angle 0.0872664626 rad\n")
    assert degrees.system.object.field_angle == pytest.approx(math.radians(5))
    assert radians.system.object.field_angle == pytest.approx(math.radians(5))


def test_power_in_diopters_in_a_metre_script() -> None:
    system = loads("units m\nstart in air\nlens l power 4 diopters\n").system
    assert system.boundaries[0].power == pytest.approx(4.0)


def test_let_values_feed_later_statements() -> None:
    program = loads("let r = 40\nlet t = r / 8\nmedium glass index 1.5\nstart in air\n"
                    "surface radius r into glass\ngap t\nsurface radius -r into air\n")
    assert program.names["t"].value == 5.0
    assert program.system.gaps == (5.0,)
    assert program.system.boundaries[1].curvature == pytest.approx(-1 / 40)


def test_wavelengths_are_lengths_in_script_units_with_one_primary() -> None:
    system = loads("start in air\nlens l focal length 10\n"
                   "wavelengths 486.1 nm, 587.6 nm primary, 0.6563 um\n").system
    assert [w.value for w in system.wavelengths] == pytest.approx([486.1e-6, 587.6e-6, 656.3e-6])
    assert system.primary_wavelength.value == pytest.approx(587.6e-6)


def test_expectations_are_converted_to_layout_units() -> None:
    program = loads("start in air\nlens l focal length 80\n"
                    "expect focal length = 8 cm ± 0.5 mm\nexpect magnification = 2 within 5%\n"
                    "expect power > 10 diopters\n")
    first, second, third = program.expectations
    assert (first.quantity, first.op, first.expected, first.tolerance) == (
        "focal length", "=", pytest.approx(80.0), pytest.approx(0.5))
    assert (second.tolerance, second.relative) == (pytest.approx(0.05), True)
    assert third.expected == pytest.approx(0.01) and third.tolerance is None
    assert first.span.line == 3 and first.text == "expect focal length = 8 cm ± 0.5 mm"


def test_quantity_aliases_resolve() -> None:
    program = loads("start in air\nlens l focal length 80\nexpect efl = 80 ± 1\nreport bfd\n")
    assert program.expectations[0].quantity == "effective focal length"
    assert program.reports == (("back focal distance",),)


@pytest.mark.parametrize("anchor, after, offset", [
    ("stop at back, diameter 4", 1, 0.0),
    ("stop 2 after front, diameter 4", 0, 2.0),
    ("stop 2 before back, diameter 4", 0, 3.0),
    ("stop 10 before front, diameter 4", -1, -10.0),
    ("stop 30 after back, diameter 4", 1, 30.0),
])
def test_stop_placement(anchor: str, after: int, offset: float) -> None:
    stop = loads(LENS + anchor + "\n").system.stop
    assert (stop.after, stop.offset, stop.size_kind, stop.size) == (after, offset, "diameter", 4.0)


# --- semantic errors: class, line and column ---------------------------------------------------


@pytest.mark.parametrize("text, kind, line, column, words", [
    # duplicate names
    ("let a = 1\nlet a = 2\n", LayoutNameError, 2, 5, "'a' is already defined"),
    ("medium g index 1.5\nmedium g index 1.6\n", LayoutNameError, 2, 8, "already defined"),
    ("medium air index 1.1\n", LayoutNameError, 1, 8, "already defined"),
    ("start in air\nlens a focal length 5\ngap 1\nlens a focal length 5\n",
     LayoutNameError, 4, 6, "a surface named 'a' already exists"),
    # unknown medium
    ("start in glas\n", LayoutNameError, 1, 10, "unknown medium 'glas'"),
    ("start in air\nsurface radius 5 into glass\n", LayoutNameError, 2, 23, "unknown medium"),
    # order
    ("surface radius 5\n", LayoutValueError, 1, 1, "a surface before any medium"),
    ("lens focal length 5\n", LayoutValueError, 1, 1, "a lens before any medium"),
    ("start in air\nstart in air\n", LayoutValueError, 2, 1, "starting medium is given twice"),
    ("start in air\nlens a focal length 5\nunits cm\n", LayoutValueError, 3, 1,
     "units must come before"),
    ("start in air\ngap 5\nlens a focal length 5\n", LayoutValueError, 2, 1,
     "a gap before the first surface"),
    # values
    ("start in air\nlens a focal length 5\ngap -2\nlens b focal length 5\n",
     LayoutValueError, 3, 5, "a gap must be zero or more"),
    ("start in air\nsurface radius 0\n", LayoutValueError, 2, 16, "a radius cannot be zero"),
    ("start in air\nsurface radius 1e-310\n", LayoutValueError, 2, 16, "too small"),
    ("start in air\nlens a focal length 0\n", LayoutValueError, 2, 21, "cannot be zero"),
    ("medium g index 0\n", LayoutValueError, 1, 16, "refractive index must be more than zero"),
    ("medium g index 1.5 mm\n", LayoutUnitError, 1, 16, "refractive index is a plain number"),
    ("start in air\nsurface radius 5 deg\n", LayoutUnitError, 2, 16, "a radius must be a length"),
    ("start in air\nlens a power 5 mm\n", LayoutUnitError, 2, 14, "must be an optical power"),
    ("start in air\nlens a focal length 5, clear diameter -1\n", LayoutValueError, 2, 39,
     "clear diameter must be more than zero"),
    ("units furlong\n", LayoutUnitError, 1, 7, "unknown length unit"),
    ("units deg\n", LayoutUnitError, 1, 7, "unknown length unit"),
    # gaps
    ("start in air\nlens a focal length 5\ngap 1\ngap 2\nlens b focal length 5\n",
     LayoutValueError, 4, 1, "two gaps in a row"),
    ("start in air\nlens a focal length 5\ngap 1\n", LayoutValueError, 3, 1,
     "nothing follows this gap"),
    ("let a = 1\n", LayoutValueError, 1, 1, "the layout has no surfaces"),
    # object, field angle, wavelengths
    ("start in air\nlens a focal length 5\nobject at infinity, field angle 5\n",
     LayoutUnitError, 3, 33, "a field angle needs a unit"),
    ("start in air\nlens a focal length 5\nobject at infinity, field angle 5 mm\n",
     LayoutUnitError, 3, 33, "must be an angle"),
    ("start in air\nlens a focal length 5\nobject at infinity, field angle 95 deg\n",
     LayoutValueError, 3, 33, "less than 90 deg"),
    ("start in air\nlens a focal length 5\nobject at infinity\nobject 5 before\n",
     LayoutValueError, 4, 1, "the object is given twice"),
    ("start in air\nlens a focal length 5\nobject 5 deg before\n",
     LayoutUnitError, 3, 8, "must be a length"),
    ("start in air\nlens a focal length 5\nwavelengths 500\n", LayoutUnitError, 3, 13,
     "a wavelength needs a length unit"),
    ("start in air\nlens a focal length 5\nwavelengths 500 nm primary, 600 nm primary\n",
     LayoutValueError, 3, 1, "only one wavelength can be primary"),
    # the stop
    ("start in air\nlens a focal length 5\nstop at b, diameter 2\n", LayoutNameError, 3, 9,
     "no surface named 'b'"),
    ("start in air\nlens a focal length 5\ngap 3\nlens b focal length 5\n"
     "stop 4 after a, diameter 2\n", LayoutValueError, 5, 6, "the stop cannot be placed"),
    ("start in air\nlens a focal length 5\ngap 3\nlens b focal length 5\n"
     "stop 4 before b, diameter 2\n", LayoutValueError, 5, 6, "the stop cannot be placed"),
    ("start in air\nlens a focal length 5\nstop at a, diameter -2\n", LayoutValueError, 3, 21,
     "stop diameter must be more than zero"),
    ("start in air\nlens a focal length 5\nobject 9 before\nstop at a, numerical aperture 1\n",
     LayoutValueError, 4, 31, "less than the object-space index"),
    ("start in air\nlens a focal length 5\nstop at a, diameter 2\nstop at a, diameter 3\n",
     LayoutValueError, 4, 1, "the stop is given twice"),
    ("start in air\nlens a focal length 5\nimage at focus\nimage 3 after\n",
     LayoutValueError, 4, 1, "the image plane is given twice"),
    # expectations
    ("start in air\nlens a focal length 5\nexpect focal length = 5\n", LayoutValueError, 3, 1,
     "needs a tolerance"),
    ("start in air\nlens a focal length 5\nexpect focal length < 5 ± 1\n", LayoutValueError, 3,
     25, "a tolerance only goes with '='"),
    ("start in air\nlens a focal length 5\nexpect focal lenght = 5 ± 1\n", LayoutNameError, 3,
     8, "unknown quantity 'focal lenght'"),
    ("start in air\nlens a focal length 5\nexpect focal length = 5 deg ± 1\n", LayoutUnitError,
     3, 23, "must be a length"),
    ("start in air\nlens a focal length 5\nexpect focal length = 5 ± -1\n", LayoutValueError,
     3, 27, "a tolerance must be zero or more"),
    ("start in air\nlens a focal length 5\nreport focal lenght\n", LayoutNameError, 3, 8,
     "unknown quantity"),
])
def test_semantic_errors(text: str, kind: type, line: int, column: int, words: str) -> None:
    error = error_of(text, kind)
    assert (error.file, error.line, error.column) == ("t.lay", line, column)
    assert words in error.message
    # the message points at the line with a caret
    rendered = str(error)
    assert rendered.startswith(f"t.lay:{line}:{column}: error: ")
    assert "^" in rendered


def test_hints_for_near_misses() -> None:
    assert error_of("start in vacum\n").hint == "did you mean 'vacuum'?"
    assert error_of("start in air\nlens a focal length 5\nexpect focal lenght = 5 ± 1\n"
                    ).hint == "did you mean 'focal length'?"
    assert error_of("start in air\nlens front focal length 5\nstop at frnt, diameter 2\n"
                    ).hint == "did you mean 'front'?"


# --- use ----------------------------------------------------------------------------------


def test_use_of_a_missing_library() -> None:
    error = error_of("use no_such_library_here\n", LayoutNameError)
    assert (error.line, error.column) == (1, 1)
    assert "no library named 'no_such_library_here'" in error.message


def test_use_of_a_missing_file(tmp_path: Path) -> None:
    error = error_of('use "absent.lay"\n', LayoutFileError, base=tmp_path)
    assert (error.line, error.column) == (1, 1)
    assert "cannot read" in error.message and "absent.lay" in error.message


def test_use_of_a_file_brings_its_media_and_names(tmp_path: Path) -> None:
    (tmp_path / "parts.lay").write_text("medium glass index 1.5\nlet t = 4\n")
    program = loads('use "parts.lay"\nstart in air\nsurface radius 10 into glass\ngap t\n'
                    "surface flat into air\n", base=tmp_path)
    assert program.system.gaps == (4.0,)
    assert program.system.indices() == [1.0, 1.5, 1.0]


def test_using_a_file_twice_loads_it_once(tmp_path: Path) -> None:
    (tmp_path / "parts.lay").write_text("let t = 4\n")
    program = loads('use "parts.lay"\nuse "parts.lay"\nstart in air\nlens l focal length t\n',
                    base=tmp_path)
    assert program.names["t"].value == 4.0


def test_use_cycle(tmp_path: Path) -> None:
    (tmp_path / "a.lay").write_text('use "b.lay"\nstart in air\nlens l focal length 5\n')
    (tmp_path / "b.lay").write_text('let q = 1\nuse "a.lay"\n')
    with pytest.raises(LayoutValueError) as info:
        load_file(tmp_path / "a.lay")
    error = info.value
    assert error.file.endswith("b.lay") and (error.line, error.column) == (2, 1)
    assert "a.lay -> b.lay -> a.lay" in error.message


def test_a_file_using_itself(tmp_path: Path) -> None:
    (tmp_path / "self.lay").write_text('use "self.lay"\n')
    with pytest.raises(LayoutValueError) as info:
        load_file(tmp_path / "self.lay")
    assert "in a circle" in info.value.message and info.value.line == 1


def test_errors_inside_a_used_file_name_that_file(tmp_path: Path) -> None:
    (tmp_path / "bad.lay").write_text("let x = 1\nlet y = nothing\n")
    error = error_of('use "bad.lay"\n', LayoutNameError, base=tmp_path)
    assert error.file.endswith("bad.lay") and (error.line, error.column) == (2, 9)


def test_load_file_that_does_not_exist(tmp_path: Path) -> None:
    with pytest.raises(LayoutFileError):
        load_file(tmp_path / "missing.lay")


def test_a_declared_hazard_puts_its_caution_in_the_report() -> None:
    # the usual caution for focused laser light (common practice: defer to the local
    # laser-safety code and licensed practice)
    from layoutlang.checks import evaluate_program
    from layoutlang.reports.text import full_report

    program = loads("hazard laser\nhazard laser\nstart in air\n"
                               "lens l focal length 10\nimage at focus\n")
    assert program.hazards == ("laser",)
    report = full_report(program, *evaluate_program(program))
    assert "CAUTION" in report and "laser" in report and "licensed practice" in report


def test_an_unknown_hazard_names_the_known_ones() -> None:
    with pytest.raises(LayoutNameError) as caught:
        loads("hazard lazer\nstart in air\nlens l focal length 10\n")
    assert caught.value.line == 1 and "did you mean 'laser'" in str(caught.value)
