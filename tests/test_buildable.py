"""Layouts that cannot be made are caught, naming the surfaces; edge thickness and sag are
quantities of their own."""

from __future__ import annotations

import math
from pathlib import Path

import pytest

from layoutlang import load, loads
from layoutlang.checks import check_program
from layoutlang.errors import LayoutError, LayoutValueError

HERE = Path(__file__).parent


def _lens(gap: float = 7, clear: float = 20, stop: float = 10, radius: float = 20) -> str:
    return ("start in air\nmedium glass index 1.5\nobject at infinity\n"
            f"surface front radius {radius} into glass, clear diameter {clear}\ngap {gap}\n"
            f"surface back radius -{radius} into air, clear diameter {clear}\n"
            f"stop at front, diameter {stop}\n")


def test_the_shipped_magnifier_as_it_was_fails_loudly_naming_the_surface():
    with pytest.raises(LayoutValueError) as caught:
        load(HERE / "fixtures" / "bench_magnifier_unbuildable.lay")
    text = str(caught.value)
    assert "'eye_side'" in text and "50 mm, is larger than the surface itself" in text
    assert "49.2 mm" in text and caught.value.span.line == 13


def test_the_shipped_magnifier_is_buildable_now():
    program = load(HERE.parent / "examples" / "bench_magnifier.lay")
    assert all(r.passed for r in check_program(program))
    assert not program.warnings


def test_sag_and_edge_thickness_of_a_biconvex_lens():
    # sphere sag R - sqrt(R² - h²) (common practice): R 20, h 10 gives 2.67949
    sag = 20 - math.sqrt(400 - 100)
    program = loads(_lens() + "expect sag of front = 2.67949 ± 1e-5\n"
                              "expect edge thickness of front = 1.64102 ± 1e-5\n"
                              "expect sag of back < 0\n")
    checked = check_program(program)
    assert all(r.passed for r in checked), [r.outcome.message for r in checked]
    assert checked[0].outcome.actual == pytest.approx(sag)
    assert checked[1].outcome.actual == pytest.approx(7 - 2 * sag)


def test_report_names_the_surface_quantities():
    program = loads(_lens() + "report edge thickness of front\nreport sag of back\n")
    assert [r.describe() for r in program.surface_requests] == ["edge thickness of front",
                                                                "sag of back"]


@pytest.mark.parametrize("tail, words", [
    ("expect sag < 1\n", "say which surface"),
    ("report edge thickness\n", "say which surface"),
    ("expect sag of nowhere < 1\n", "no surface named 'nowhere'"),
    ("expect sag of front at wavelength d < 1\n", "not taken 'at"),
])
def test_surface_quantities_need_one_surface(tail: str, words: str):
    with pytest.raises(LayoutError, match=words):
        loads(_lens() + tail)


def test_a_negative_edge_thickness_is_an_error_naming_both_surfaces():
    with pytest.raises(LayoutValueError) as caught:
        loads(_lens(gap=2))
    text = str(caught.value)
    assert "edge thickness from 'front' to 'back' is -3.359 mm" in text


def test_surfaces_that_cross_inside_their_aperture_are_an_error():
    # a meniscus air gap: the second surface bulges back through the first within the aperture
    text = ("start in air\nmedium glass index 1.5\nobject at infinity\n"
            "surface a radius 20 into glass, clear diameter 10\ngap 3\n"
            "surface b radius 8 into air, clear diameter 10\ngap 0.2\n"
            "surface c radius 12 into glass, clear diameter 16\ngap 6\n"
            "surface d flat into air, clear diameter 16\nstop at a, diameter 8\n")
    with pytest.raises(LayoutValueError, match="'b' and 'c' cross inside their common aperture"):
        loads(text)


def test_a_drawn_aperture_beyond_the_sphere_is_a_warning():
    text = ("start in air\nmedium glass index 1.5\nobject at infinity\n"
            "surface front radius 5 into glass\ngap 2\nsurface back flat into air\n"
            "stop at front, diameter 9.8\n")
    program = loads(text)
    assert any("drawn aperture" in w and "'front'" in w for w in program.warnings)


def test_a_paraxial_bundle_faster_than_light_allows_is_a_warning():
    program = loads("start in air\nobject at infinity\nlens fast focal length 10\n"
                    "stop at fast, diameter 30\n")
    assert any("numerical aperture is 1.5" in w and "index 1 of image space" in w
               for w in program.warnings)


def test_a_clear_diameter_that_limits_the_aperture_is_named():
    program = loads(_lens(stop=10, clear=18) + "")  # fine: the bundle is 10 mm
    assert not program.warnings
    partly = loads(_lens(stop=10, clear=20).replace(
        "back radius -20 into air, clear diameter 20", "back radius -20 into air, clear diameter 8"))
    assert any("'back' limits the aperture" in w for w in partly.warnings)
    most = loads(_lens(stop=30, clear=20, gap=12))  # a warning: the rays still have numbers
    assert any("'front' limits the aperture, not the stop" in w and "44.44%" in w
               for w in most.warnings)


def test_a_bundle_exactly_at_the_rim_is_not_vignetted():
    program = loads(_lens(stop=20, clear=20, gap=12))  # the stop is the front's own rim
    assert not any("limits the aperture" in w for w in program.warnings)
