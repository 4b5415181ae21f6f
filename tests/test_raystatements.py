"""Tests of the ray statements (grammar/rays.lark): parsing, interpretation, clear errors,
`expect` of ray and Seidel quantities, and the report sections of `layoutlang run`.

Expected values are the engine's own closed forms (an ideal lens images perfectly, a single
mirror's Petzval radius is R/2 — common practice); published checks are in tests/outside/.
"""

from __future__ import annotations

import re

import pytest

from layoutlang import loads
from layoutlang.checks import check_program
from layoutlang.cli import main
from layoutlang.errors import LayoutError
from layoutlang.reports.text import full_report
from layoutlang.engines.firstorder import first_order

LENS = """
medium glass index 1.5
object at infinity, field angle 2 deg
start in air
surface front radius 50 into glass
gap 4
surface back flat into air
stop at front, diameter 10
image at focus
"""


def _run(text: str) -> str:
    program = loads(text)
    results = first_order(program.system)
    return full_report(program, results, check_program(program, results))


def _checks(text: str):
    program = loads(text)
    return check_program(program)


def test_sample_statements_set_what_the_report_traces():
    program = loads(LENS + "sample pupils 1, 0.5\nsample fields 0, 1 deg, 2 deg\n"
                          "sample grid 9\nfocus tolerance 0.02 mm\nreport exact rays\n")
    rays = program.rays
    assert rays.pupils == (1.0, 0.5)
    assert rays.fields == pytest.approx((0.0, 0.5, 1.0))
    assert rays.grid == 9 and rays.tolerance == 0.02


def test_fields_as_heights_for_a_near_object():
    program = loads("object 200 before, height 5\nstart in air\nlens thin focal length 50\n"
                    "stop at thin, diameter 10\nsample fields 0, 2.5 mm, 5 mm\n"
                    "report exact rays\n")
    assert program.rays.fields == pytest.approx((0.0, 0.5, 1.0))


@pytest.mark.parametrize("line, words", [
    ("sample grid 2", "from 3 to 201"),
    ("sample pupils 0", "more than 0"),
    ("sample fields 1.5", "within the full field"),
    ("sample fields 2 mm", "finite distance"),
    ("focus tolerance -1", "more than zero"),
    ("expect focal length at field 1 < 3", "first-order quantity"),
    ("expect coma sum at field 1 < 3", "does not depend on the field"),
    ("expect coma sum < 3 depth of focus", "only the marginal focus shift"),
    ("expect rms spot radius at field 1 = 3", "needs a tolerance"),
    ("expect distortion < 1 mm", "percent"),
    ("expect distortion at field 1 at wavelength F < 1 %", "primary wavelength only"),
    ("expect rms spot radius at field 1 at wavelength q < 1 mm", "unknown wavelength"),
    ("expect rms spot radius at field 1 < 3 deg", "length"),
])
def test_bad_ray_statements_give_one_clear_error_with_a_caret(line, words):
    with pytest.raises(LayoutError) as caught:
        loads(LENS + line + "\n")
    text = str(caught.value)
    assert words in text
    assert "^" in text and ":" in text.splitlines()[0]


def test_expectations_of_ray_and_seidel_quantities_are_checked():
    checked = _checks(LENS + """
expect rms spot radius at field 0 < 1 mm
expect rms spot radius at field 0 > 1 mm
expect distortion at field 1 < 1 %
expect marginal focus shift < 0 mm
expect marginal focus shift < 1000 depth of focus
expect spherical sum > 0
expect petzval radius = -150 ± 0.5
""")
    assert [r.passed for r in checked] == [True, False, True, True, True, True, True]
    assert "rms spot radius at field 0" in checked[1].outcome.message
    assert "depths of focus" in checked[4].outcome.message


def test_an_ideal_lens_has_no_ray_aberration():
    checked = _checks("object at infinity, field angle 5 deg\nstart in air\n"
                      "lens thin focal length 50\nstop at thin, diameter 20\n"
                      "expect marginal focus shift = 0 ± 1e-9 mm\n"
                      "expect rms spot radius at field 1 < 1e-9 mm\n"
                      "expect distortion at field 1 = 0 ± 1e-7 %\n")
    assert all(r.passed for r in checked), [r.outcome.message for r in checked]


def test_run_prints_the_requested_sections_and_no_nan_for_lost_rays():
    text = _run(LENS.replace("surface back flat into air",
                             "surface back flat into air, clear diameter 9.9")
                + "report exact rays\nreport seidel sums\nreport rms spot radius, focal length\n")
    assert "exact rays against the paraxial numbers" in text
    assert "third-order (Seidel) sums" in text
    assert "outside the clear diameter at 'back'" in text
    assert "rms spot radius at field 0" in text and "focal length" in text
    assert not re.search(r"\b(nan|inf)\b", text.lower())


def test_total_internal_reflection_is_reported_with_the_surface_name():
    # a steep glass sphere: the marginal ray cannot leave the back of a ball-like lens
    text = _run("""
medium glass index 1.9
object at infinity
start in air
surface front radius 5 into glass
gap 3
surface back radius -2 into air
stop at front, diameter 9.5
image 1 after
report exact rays
""")
    assert "totally internally reflected at 'back'" in text
    assert "missed the surface at 'back'" in text
    assert "no marginal ray reaches the image" in text
    assert not re.search(r"\b(nan|inf)\b", text.lower())


def test_without_a_stop_the_ray_report_says_why():
    text = _run("medium glass index 1.5\nstart in air\nsurface radius 20 into glass\n"
                "report exact rays\nreport seidel sums\n")
    assert "not traced: none: real rays need a stop" in text
    assert "not computed" in text


def test_a_stated_tolerance_replaces_the_depth_of_focus_in_the_verdict():
    text = _run(LENS + "focus tolerance 5 mm\nreport exact rays\n")
    assert "within the stated tolerance 5 mm" in text


def test_check_command_exit_status_follows_the_ray_expectations(tmp_path, capsys):
    good = tmp_path / "good.lay"
    good.write_text(LENS + "expect rms spot radius at field 1 < 1 mm\n", encoding="utf-8")
    bad = tmp_path / "bad.lay"
    bad.write_text(LENS + "expect rms spot radius at field 1 < 0.0001 mm\n", encoding="utf-8")
    assert main(["check", str(good)]) == 0
    assert main(["check", str(bad)]) == 1
    assert "rms spot radius at field 1" in capsys.readouterr().out


def test_json_output_carries_the_ray_sections_without_nan(tmp_path, capsys):
    import json

    path = tmp_path / "rays.lay"
    path.write_text(LENS + "report exact rays\nreport seidel sums\n", encoding="utf-8")
    assert main(["run", "--json", str(path)]) == 0
    data = json.loads(capsys.readouterr().out)  # strict JSON: NaN would not load as a number
    assert data["rays"]["exact_rays"]["marginal"][0]["pupil"] == 1.0
    assert data["rays"]["seidel"]["petzval_radius"] == pytest.approx(-150.0, rel=1e-9)


def test_spot_radius_at_another_wavelength_uses_that_wavelength_s_indices():
    # constant indices: every wavelength sees the same media, so the spot is the same
    checked = _checks(LENS + "wavelengths 587.6 nm primary, 486.1 nm\n"
                      "expect rms spot radius at field 1 at wavelength 486.1 nm < 1 mm\n"
                      "expect rms spot radius at field 1 at 532 nm < 1 mm\n")
    assert all(r.passed for r in checked)
    assert "at wavelength 486.1 nm" in checked[0].outcome.message
    program = loads(LENS + "expect rms spot radius at field 1 at wavelength F < 1 mm\n")
    assert program.expectations[0].wavelength == pytest.approx(486.1327e-6, rel=1e-9)
