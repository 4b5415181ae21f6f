"""Tests of the chromatic engine: every wavelength at once through the paraxial engine agrees
with the one-wavelength first-order evaluation, and the colour quantities follow their
definitions."""

from __future__ import annotations

import numpy as np
import pytest

import layoutlang
from layoutlang.engines import chromatic
from layoutlang.engines.firstorder import Unavailable, first_order

DOUBLET = """
wavelengths d primary, F, C, g
medium crown glass code 517642
medium flint glass code 620364
{object}
start in air
surface front radius 61.07 into crown
gap 4
surface joint radius -44.2 into flint
gap 2.5
surface back radius -128.7 into air
stop 5 before front, diameter 20
image at focus
"""


def system(obj: str = "object at infinity, field angle 2 deg"):
    return layoutlang.loads(DOUBLET.format(object=obj)).system


@pytest.mark.parametrize("obj", ["object at infinity, field angle 2 deg",
                                 "object 400 before, height 12"])
def test_all_wavelengths_at_once_agree_with_one_at_a_time(obj: str) -> None:
    layout = system(obj)
    waves = np.array([w.value for w in layout.wavelengths])
    focal = chromatic.focal_lengths(layout, waves)
    image = chromatic.image_distances(layout, waves)
    for i, w in enumerate(waves):
        one = first_order(layout.at_wavelength(float(w)))
        assert focal[i] == pytest.approx(one["focal length"], rel=1e-13)
        assert image[i] == pytest.approx(one["image distance"], rel=1e-13)


def test_indices_take_a_wavelength_array() -> None:
    layout = system()
    waves = np.array([w.value for w in layout.wavelengths])
    indices = layout.indices(waves)
    assert np.all(indices[0] == 1.0)  # air in a standard-air layout: exactly one
    assert indices[1].shape == (4,) and indices[1][0] == pytest.approx(1.517, abs=1e-12)
    assert layout.indices() == layout.indices(layout.primary_wavelength.value)


def test_chief_ray_height_at_the_primary_is_the_image_height() -> None:
    for obj in ("object at infinity, field angle 2 deg", "object 400 before, height 12"):
        layout = system(obj)
        heights = chromatic.chief_heights(layout, np.array([layout.wavelengths[0].value]))
        assert heights[0] == pytest.approx(first_order(layout)["image height"], rel=1e-12)


def test_colour_quantities_follow_their_definitions() -> None:
    layout = system()
    d, f, c = (w.value for w in layout.wavelengths[:3])
    s = chromatic.image_distances(layout, np.array([f, d, c]))
    axial = chromatic.evaluate(chromatic.Request("axial colour", (f, c), ("F", "C")), layout)
    assert axial == pytest.approx(s[0] - s[2], abs=1e-15)
    spectrum = chromatic.evaluate(
        chromatic.Request("secondary spectrum", (f, d, c), ("F", "d", "C")), layout)
    assert spectrum == pytest.approx((s[0] + s[2]) / 2 - s[1], abs=1e-15)
    h = chromatic.chief_heights(layout, np.array([f, c]))
    lateral = chromatic.evaluate(chromatic.Request("lateral colour", (f, c), ("F", "C")), layout)
    assert lateral == pytest.approx(h[0] - h[1], abs=1e-15)


def test_a_mirror_in_air_has_no_colour() -> None:
    text = """wavelengths d primary, F, C
layout in standard air
object at infinity, field angle 1 deg
start in air
mirror main radius -400
stop at main, diameter 50
image at focus
"""
    layout = layoutlang.loads(text).system
    request = chromatic.Request("axial colour", (layout.wavelengths[1].value,
                                                 layout.wavelengths[2].value), ("F", "C"))
    assert chromatic.evaluate(request, layout) == 0.0


def test_without_a_stop_there_is_no_lateral_colour_and_an_afocal_layout_no_focus() -> None:
    text = """wavelengths d primary, F, C
medium glass glass code 517642
object at infinity, field angle 1 deg
start in air
surface a radius 50 into glass
gap 10
surface b radius -50 into air
gap 100
surface c radius 50 into glass
gap 10
surface e radius -50 into air
image at focus
"""
    layout = layoutlang.loads(text).system
    waves = [w.value for w in layout.wavelengths]
    assert isinstance(chromatic.chief_heights(layout, waves), Unavailable)
    # not afocal at d: the per-wavelength table still works
    assert chromatic.focal_lengths(layout, waves).shape == (3,)


def test_colour_table_only_with_two_or_more_wavelengths() -> None:
    one = layoutlang.loads(DOUBLET.format(object="object at infinity").replace(
        "wavelengths d primary, F, C, g", "wavelengths d")).system
    assert chromatic.colour_table(one) is None
    table = chromatic.colour_table(system())
    assert [r.describe() for r, _ in table.summary] == [
        "axial colour between g and C", "lateral colour between g and C",
        "secondary spectrum across g, d and C"]
