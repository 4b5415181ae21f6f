"""Afocal and collimated layouts are first-class: a scale-aware afocal test, `image at
infinity`, `expect image at infinity`, magnification in the trade's words, rim rays pass."""

from __future__ import annotations

import pytest

from layoutlang import loads
from layoutlang.checks import check_program
from layoutlang.engines.firstorder import Unavailable, first_order
from layoutlang.errors import LayoutValueError

EXPANDER = ("start in air\nobject at infinity\nlens eyepiece focal length 20\n"
            "gap {gap}\nlens objective focal length 100\n")


def test_a_spacing_rounded_to_four_decimals_is_still_afocal():
    # 20 + 100 = 120: a written 120.0001 leaves a power of 1e-4/(20·100) per mm, 1e-6 of the
    # lenses' own (a "focal length" of -2e7 mm): afocal for every purpose
    results = first_order(loads(EXPANDER.format(gap="120.0001")).system)
    assert results.afocal
    assert isinstance(results["focal length"], Unavailable)
    assert results["afocal angular magnification"] == pytest.approx(-0.2, rel=1e-5)
    assert not first_order(loads(EXPANDER.format(gap="119")).system).afocal


def test_image_at_infinity_is_a_checked_statement():
    program = loads(EXPANDER.format(gap="120") + "image at infinity\n")
    assert program.system.image.at_infinity
    with pytest.raises(LayoutValueError) as caught:
        loads(EXPANDER.format(gap="110") + "image at infinity\n")
    assert "the image is not at infinity" in str(caught.value)
    assert "900 mm before the last boundary" in str(caught.value)
    assert caught.value.span.line == 6


def test_expect_image_at_infinity_holds_for_a_collimator_and_fails_otherwise():
    collimator = ("object 50 before\nstart in air\nlens collimator focal length 50\n"
                  "expect image at infinity\n")
    assert check_program(loads(collimator))[0].passed
    missed = check_program(loads(collimator.replace("object 50", "object 60")))[0]
    assert not missed.passed and "expected at infinity" in missed.outcome.message
    with pytest.raises(LayoutValueError, match="only the image can be expected at infinity"):
        loads(collimator + "expect focal length at infinity\n")


def test_an_expander_is_stated_as_the_trade_does():
    from layoutlang.reports.text import afocal_words

    assert afocal_words(-0.2).startswith("a 5× beam expander: the beam leaves 5 times wider")
    assert afocal_words(5.0).startswith("a 5× telescope")


def test_a_ray_exactly_on_the_rim_of_the_stop_is_not_vignetted():
    from layoutlang.engines.aberrations import analyse

    program = loads("start in air\nmedium glass index 1.5\nobject at infinity\n"
                    "surface front radius 50 into glass, clear diameter 10\ngap 4\n"
                    "surface back flat into air\nstop at front, diameter 10\n")
    rows = analyse(program.system).marginal
    assert rows[0].pupil == 1.0 and rows[0].lost == ""
    assert not isinstance(rows[0].real_focus, Unavailable)
