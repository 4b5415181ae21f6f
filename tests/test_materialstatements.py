"""Tests of the materials statements in scripts: media with dispersion, wavelengths by letter,
surroundings, qualifiers on expect and report, and the errors users get."""

from __future__ import annotations

import pytest

import layoutlang
from layoutlang.checks import check_program
from layoutlang.errors import LayoutError, LayoutNameError, LayoutUnitError, LayoutValueError
from layoutlang.materials.dispersion import Cauchy, GlassFromNdVd, Sellmeier, Table

LENS = """
object at infinity, field angle 1 deg
start in air
surface front radius 50 into glass
gap 5
surface back radius -50 into air
stop at front, diameter 10
image at focus
"""


def load(head: str, tail: str = ""):
    return layoutlang.loads(head + LENS + tail)


def medium(program, name="glass"):
    return program.system.medium(name)


@pytest.mark.parametrize("line, kind", [
    ("medium glass index 1.517, abbe number 64.2", GlassFromNdVd),
    ("medium glass glass code 517642", GlassFromNdVd),
    ("medium glass sellmeier wavelengths (0.6961663, 0.0684043 um), (0.8974794, 9.896161 um)",
     Sellmeier),
    ("medium glass sellmeier squared wavelengths (1.1819, 0.011313)", Sellmeier),
    ("medium glass sellmeier constant 1.2 squared wavelengths (0.9, 0.011)", Sellmeier),
    ("medium glass cauchy 1.5, 0.004, 0.0001", Cauchy),
    ("medium glass table (486.1 nm, 1.5224), (587.6 nm, 1.5168), (656.3 nm, 1.5143)", Table),
])
def test_every_model_form_makes_a_medium_with_that_model(line: str, kind) -> None:
    program = load(line + "\n")
    assert isinstance(medium(program).model, kind)
    assert 1.3 < medium(program).index < 1.7


def test_resonance_wavelengths_take_any_length_unit() -> None:
    in_um = load("medium glass sellmeier wavelengths (0.69, 0.0684 um)\n")
    in_nm = load("medium glass sellmeier wavelengths (0.69, 68.4 nm)\n")
    assert medium(in_um).model.squares == pytest.approx(medium(in_nm).model.squares)


def test_primary_index_follows_the_primary_wavelength() -> None:
    base = "medium glass glass code 517642\n"
    at_d = load("wavelengths d primary, F, C\n" + base)
    at_f = load("wavelengths d, F primary, C\n" + base)
    assert medium(at_d).index == pytest.approx(1.517, abs=1e-12)
    assert medium(at_f).index > medium(at_d).index
    assert at_f.system.indices() == at_f.system.indices(at_f.system.wavelengths[1].value)


def test_no_wavelengths_means_the_d_line_with_a_note() -> None:
    program = load("medium glass glass code 517642\n")
    assert program.system.wavelengths[0].value == pytest.approx(587.5618e-6)
    assert program.warnings[0].startswith("note: no wavelengths given")


def test_constant_layouts_are_as_before() -> None:
    program = load("medium glass index 1.5\nwavelengths d primary, F, C\n")
    assert all(m.model is None for m in program.system.media)
    assert program.system.indices() == [1.0, 1.5, 1.0]
    assert program.warnings == ()


def test_lines_by_letter_including_primed_ones() -> None:
    program = load("medium glass index 1.5\nwavelengths e primary, F', C', 532 nm\n")
    values = [w.value * 1e6 for w in program.system.wavelengths]
    assert values == pytest.approx([546.074, 479.9914, 643.8469, 532.0])
    assert program.system.wavelengths[0].primary


def test_layout_in_vacuum_makes_air_standard_air() -> None:
    program = load("layout in vacuum\nmedium glass index 1.5\n")
    assert program.system.environment == "vacuum"
    n_air = program.system.indices()[0]
    assert 1.00027 < n_air < 1.00029
    in_air = load("layout in standard air\nmedium glass index 1.5\n")
    assert in_air.system.indices()[0] == 1.0


def test_vacuum_medium_in_standard_air_is_below_one() -> None:
    text = ("layout in standard air\nmedium glass index 1.5\nobject at infinity\n"
            "start in vacuum\nsurface a radius 50 into glass\nimage at focus\n")
    program = layoutlang.loads(text)
    assert 0.99971 < program.system.indices()[0] < 0.99973


def test_out_of_range_wavelength_gives_a_warning_naming_the_material() -> None:
    text = "wavelengths 2 um\nmedium glass glass code 517642\n"
    program = load(text)
    assert any("glass: the dispersion data hold from 365 nm to 1014 nm; 2000 nm lies outside"
               in w for w in program.warnings)
    assert any(w.startswith("<script>:2:1: warning:") for w in program.warnings)


def test_qualified_expectations_are_checked() -> None:
    tail = """expect refractive index of glass at d = 1.517 ± 1e-9
expect abbe number of glass = 64.2 ± 1e-6
expect abbe number of glass across F, d and C = 64.2 ± 1e-6
expect focal length at wavelength F < focal length_at_c
expect axial colour between F and C < 0
expect axial colour < 0
expect secondary spectrum across F, d and C > -1
expect lateral colour between F and C < 1
expect relative partial dispersion of glass = 0.5358 ± 0.0001
"""
    tail = tail.replace("focal length_at_c", "100")
    program = load("wavelengths d primary, F, C\nmedium glass glass code 517642\n", tail)
    checked = check_program(program)
    assert [r.passed for r in checked] == [True] * 9, [r.outcome.message for r in checked]
    assert checked[1].outcome.message.startswith("abbe number of glass across F, d and C = 64.2")


def test_reports_with_qualifiers_are_kept_as_requests() -> None:
    program = load("wavelengths d primary, F, C\nmedium glass glass code 517642\n",
                   "report focal length at F\nreport axial colour\n"
                   "report abbe number of glass\n")
    described = [r.describe() for r in program.colour.reports]
    assert described == ["focal length at F", "axial colour between F and C",
                         "abbe number of glass across F, d and C"]


def test_the_run_report_shows_surroundings_colour_table_and_achromat() -> None:
    from layoutlang.engines.firstorder import first_order
    from layoutlang.reports.text import full_report

    program = load("wavelengths d primary, F, C\nmedium glass glass code 517642\n"
                   "medium flint glass code 620364\n",
                   "achromat from glass and flint, focal length 100\n")
    results = first_order(program.system)
    text = full_report(program, results, check_program(program, results))
    assert "surroundings: in standard air" in text
    assert "colour (paraxial, per wavelength)" in text
    assert "axial colour between F and C" in text
    assert "colour: φ₁/ν₁ + φ₂/ν₂ = 0" in text
    assert "glass element focal length 43.3022 mm" in text


@pytest.mark.parametrize("text, error, words", [
    ("medium glass sellmeier wavelengths (0.69, 0.0684)\n", LayoutUnitError,
     "a resonance wavelength needs a length unit"),
    ("medium glass sellmeier squared wavelengths (0.69, 0.0684 um)\n", LayoutUnitError,
     "a Sellmeier C is a squared wavelength"),
    ("medium glass glass code 51764\n", LayoutValueError, "not a six-digit glass code"),
    ("medium glass index 1.5 mm, abbe number 60\n", LayoutUnitError, "a plain number"),
    ("medium glass table (0.5 um, 1.5), (0.4 um, 1.51)\n", LayoutValueError,
     "short to long"),
    ("medium glass cauchy 1.5, valid from 0.7 um to 0.4 um\n", LayoutValueError,
     "the valid range must go from short to long"),
    ("medium glass cauchy 1.5, valid from 0.4 to 0.7\n", LayoutUnitError, "needs a length unit"),
    ("medium glass index 1.5\nwavelengths q\n", LayoutNameError, "unknown name 'q'"),
    ("medium glass index 1.5\nwavelengths G'\n", LayoutNameError, "there is no spectral line G'"),
    ("let d = 500 nm\nmedium glass index 1.5\nwavelengths d\n", LayoutNameError,
     "both a spectral line and a name"),
    ("medium glass glass code 517642\nmedium glass index 1.5\n", LayoutNameError,
     "already defined"),
    ("medium air sellmeier squared wavelengths (1.1, 0.01)\n", LayoutNameError,
     "already defined"),
    ("layout in vacuum\nlayout in vacuum\nmedium glass index 1.5\n", LayoutValueError,
     "surroundings are given twice"),
    ("medium glass sellmeier squared wavelengths (1.0, 0.4)\n", LayoutValueError,
     "no real refractive index"),
])
def test_mistakes_in_media_and_wavelengths(text: str, error, words: str) -> None:
    with pytest.raises(error) as caught:
        load(text)
    assert words in str(caught.value)
    assert caught.value.span is not None


@pytest.mark.parametrize("tail, words", [
    ("expect abbe number = 60 ± 1\n", "say which medium"),
    ("expect axial colour of glass < 1\n", "belongs to the layout, not to one medium"),
    ("expect refractive index of glass between F and C = 1 ± 1\n", "not taken 'between"),
    ("expect abbe number of glass at g = 1 ± 1\n", "an Abbe number is taken at d or e"),
    ("expect axial colour at F < 1\n", "not taken 'at"),
    ("expect focal length between F and C < 1\n", "not taken 'between"),
    ("expect focal length at F at C < 1\n", "'at' is given twice"),
    ("expect focal length at wavelength x < 1\n", "unknown wavelength 'x'"),
    ("expect focal length at 500 < 1\n", "or a unit"),
    ("expect abbe number of nothing = 1 ± 1\n", "unknown medium 'nothing'"),
    ("report axial colour, focal length\n", "cannot be mixed"),
    ("achromat from glass and glass\n", "two different media"),
])
def test_mistakes_in_qualifiers(tail: str, words: str) -> None:
    head = "wavelengths d primary, F\nmedium glass glass code 517642\n"
    with pytest.raises(LayoutError) as caught:
        load(head, tail)
    assert words in str(caught.value)


def test_colour_quantities_need_enough_wavelengths() -> None:
    head = "wavelengths d\nmedium glass glass code 517642\n"
    with pytest.raises(LayoutValueError, match="axial colour needs two wavelengths"):
        load(head, "expect axial colour < 1\n")
    with pytest.raises(LayoutValueError, match="secondary spectrum needs three"):
        load(head, "expect secondary spectrum < 1\n")


def test_achromat_of_a_constant_medium_is_refused() -> None:
    with pytest.raises(LayoutValueError, match="has a constant index"):
        load("medium glass index 1.5\nmedium flint glass code 620364\n",
             "achromat from glass and flint\n")


def test_check_prints_range_warnings_on_standard_error(tmp_path, capsys) -> None:
    from layoutlang.cli import main

    script = tmp_path / "far.lay"
    script.write_text("wavelengths 2 um\nmedium glass glass code 517642\n" + LENS
                      + "expect focal length > 0\n", encoding="utf-8")
    assert main(["check", str(script)]) == 0
    captured = capsys.readouterr()
    assert "1 expectation holds" in captured.out
    assert f"{script}:2:1: warning: glass: the dispersion data hold from 365 nm to 1014 nm" \
        in captured.err
    assert "air" not in captured.err  # air in standard air is exactly 1, whatever the range


def test_an_infrared_material_with_a_resonance_near_d_is_usable_in_its_range() -> None:
    # n² = 1 + 1.0 λ²/(λ² − 0.4): no real index at the d line, fine from 1 µm on
    program = load("wavelengths 2 um primary, 3 um\n"
                   "medium glass sellmeier squared wavelengths (1.0, 0.4), "
                   "valid from 1 um to 5 um\n")
    assert program.warnings == ()
    assert medium(program).index == pytest.approx((1 + 4 / 3.6) ** 0.5)


def test_colour_section_of_a_constant_layout_says_why_there_is_no_colour() -> None:
    from layoutlang.engines.firstorder import first_order
    from layoutlang.reports.text import full_report

    program = load("medium glass index 1.5\nwavelengths d primary, F, C\n")
    results = first_order(program.system)
    text = full_report(program, results, check_program(program, results))
    assert "axial colour between F and C          0 mm" in text
    assert "note: every medium here has a constant index, so no colour shows" in text
    assert "surroundings" not in text  # indices as written: nothing to say about air


def test_the_achromat_condition_uses_f_and_c_when_listed_beside_other_lines() -> None:
    # The Abbe number is defined over F and C around d (common practice; ISO 7944 names the
    # lines); a g line listed as well must not replace F as the blue end.
    program = layoutlang.loads("layout in standard air\nwavelengths d primary, F, C, g\n"
                    "medium crown glass code 517642\nmedium flint glass code 620364\n"
                    "start in air\nsurface a radius 50 into crown\ngap 4\n"
                    "surface b radius -50 into flint\ngap 2\nsurface c flat into air\n"
                    "achromat from crown and flint, focal length 100\n")
    (achromat,) = program.colour.achromats
    assert achromat.labels == ("F", "d", "C")
    n_d, n_f, n_c = achromat.first_indices[1], achromat.first_indices[0], achromat.first_indices[2]
    assert (n_d - 1) / (n_f - n_c) == pytest.approx(64.2, abs=0.05)
