"""Decenter and tilt tolerances (grammar/tolerances.lark, tolerance/perturb.py): a surface or
an element off its place in every built unit, judged in the sensitivity and Monte Carlo runs."""

from __future__ import annotations

import math

import pytest

from layoutlang import loads
from layoutlang.errors import LayoutError
from layoutlang.tolerance.analysis import analyse
from layoutlang.tolerance.worst import unit_script

THIN_LENS = """units mm
object {object}
start in air
lens thin focal length 50, clear diameter 20
stop at thin, diameter 10
image at focus
expect image shift < 1 mm
{tolerances}
"""


def _rows(text: str):
    program = loads(text)
    result = analyse(program, monte=False)
    return program, result


@pytest.mark.parametrize("object_words, magnification", [("at infinity", 0.0),
                                                         ("100 before", -1.0),
                                                         ("150 before", -0.5)])
def test_a_decentred_thin_lens_moves_the_image_by_decenter_times_one_minus_m(
        object_words: str, magnification: float) -> None:
    """Image shift of a thin lens decentred by δ: δ(1 − m) (the image point moves with the
    lens's axis; common practice, e.g. Smith 2008, Modern Optical Engineering, on decentred
    elements)."""
    text = THIN_LENS.format(object=object_words,
                            tolerances="tolerance decenter of thin ± 0.05 mm")
    _, result = _rows(text)
    row = result.rows[0]
    expected = 0.05 * (1 - magnification)
    assert row.plus[0] == pytest.approx(expected, rel=1e-6)
    assert row.minus[0] == pytest.approx(expected, rel=1e-6)  # a distance: the same either way
    assert result.nominal[0] == 0.0
    assert row.item.label == "decenter of thin along y"


FOLD = """units mm
object at infinity
start in air
lens objective focal length 60, clear diameter 20
gap 20
fold turn at 45 deg about x, clear diameter 30
stop at objective, diameter 10
image at focus
expect beam deviation = 90 deg ± 1 deg
expect image shift < 1 mm
tolerance tilt of turn ± 2 arcmin
"""


def test_a_tilted_plane_mirror_turns_the_line_of_sight_by_twice_its_tilt() -> None:
    """A plane mirror tilted by θ turns the reflected beam by 2θ (law of reflection; common
    practice), and the focus d = 60 − 20 = 40 after the mirror moves by 2θ·d (small angles); the sensor
    stays where the design put it (the tolerance's axis returns)."""
    _, result = _rows(FOLD)
    row = result.rows[0]
    tilt = math.radians(2 / 60)
    assert result.nominal[0] == pytest.approx(90.0, abs=1e-9)
    assert abs(row.plus[0]) == pytest.approx(math.degrees(2 * tilt), rel=1e-6)
    assert row.plus[0] == pytest.approx(-row.minus[0], rel=1e-6)
    assert row.plus[1] == pytest.approx(2 * tilt * 40, rel=1e-4)


def test_an_element_tilt_about_its_first_vertex_and_the_rss_estimate() -> None:
    """A cemented pair tilted as one body; the estimate of a uniform tolerance is the slope
    times L/√3 (statistics, common practice) — zero for a quantity even in the tilt."""
    text = """units mm
object at infinity, field angle 1 deg
start in air
medium glass index 1.5
surface a radius 40 into glass
gap 4
surface b radius -40 into air
stop at a, diameter 8
image at focus
expect image shift < 1 mm
expect focal length = 40 ± 1
tolerance tilt of a through b ± 0.1 deg about x
"""
    _, result = _rows(text)
    row = result.rows[0]
    assert row.item.label == "tilt of a through b about x"
    assert row.plus[0] > 0 and row.plus[0] == pytest.approx(row.minus[0], rel=1e-6)
    assert row.plus[1] == 0.0  # the paraxial (nominal, coaxial) focal length does not move
    assert result.estimate[0] == 0.0  # even in the tilt: no linear term


def test_the_monte_carlo_yield_of_a_decenter_is_the_fraction_inside_the_bound() -> None:
    """Uniform decenter ±0.05 mm of a lens imaging from infinity: the image shift is |δ|, so
    `image shift < 0.025 mm` holds for half of the units (within the sampling error)."""
    text = THIN_LENS.format(object="at infinity", tolerances="""tolerance decenter of thin ± 0.05 mm
monte carlo 400 samples, seed 3""").replace("expect image shift < 1 mm",
                                            "expect image shift < 0.025 mm")
    program = loads(text)
    result = analyse(program)
    monte = result.monte_carlo
    assert monte.samples == 400
    assert abs(monte.yield_all - 0.5) < 4 * math.sqrt(0.25 / 400)
    low, high = monte.interval
    assert low < monte.yield_all < high
    # a worst unit written back as a script gives that unit's image shift
    unit, deltas, failures = monte.worst[0]
    body, skipped = unit_script(program, text, deltas, unit, failures)
    assert not skipped and "decenter thin through thin by" in body
    again = loads(body)
    shift = again.expectations[0]
    from layoutlang.checks import check_program

    outcome = check_program(again)[0].outcome
    assert outcome.actual == pytest.approx(abs(deltas[0]), rel=1e-6)
    assert shift.quantity == "image shift"


@pytest.mark.parametrize("line, words", [
    ("tolerance radius of a through b ± 0.1 mm", "belong to a decenter or tilt"),
    ("tolerance tilt of a ± 2", "needs a unit"),
    ("tolerance decenter of a ± 1 %", "not a percentage"),
    ("tolerance decenter of a ± 0.1 mm along z", "across the axis"),
    ("tolerance tilt of a ± 20 deg", "small angle"),
    ("tolerance tilt of b through a ± 1 arcmin", "comes before"),
    ("tolerance decenter of c ± 0.1 mm", "no surface named 'c'"),
])
def test_placement_tolerance_errors_point_at_their_words(line: str, words: str) -> None:
    text = """units mm
object at infinity
start in air
medium glass index 1.5
surface a radius 40 into glass
gap 4
surface b radius -40 into air
stop at a, diameter 8
image at focus
expect focal length = 40 ± 1
""" + line + "\n"
    with pytest.raises(LayoutError) as caught:
        loads(text)
    assert words in str(caught.value)
    assert ":11:" in str(caught.value)
