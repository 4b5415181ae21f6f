"""Tests of the ray aberrations: aiming at the real stop, virtual objects, best focus, spots and
the default wavelength.

The expected behaviour follows from the definitions (common practice): a chief ray passes the
centre of the stop, the least-RMS plane is a minimum of the RMS radius, and every real
aberration vanishes as the aperture and field go to zero.
"""

from __future__ import annotations

import numpy as np
import pytest

from layoutlang import loads
from layoutlang.engines import aberrations, realrays
from layoutlang.engines.firstorder import Unavailable, first_order

# a thick singlet with the stop 8 mm behind it, inside the air gap before a flat window
SINGLET = """
medium glass index 1.6
object at infinity, field angle 10 deg
start in air
surface front radius 40 into glass
gap 6
surface back radius -200 into air
gap 20
surface window flat into glass
gap 2
surface out flat into air
stop 8 after back, diameter 12
image at focus
"""


def _setup(text: str):
    system = loads(text).system
    return aberrations.setup(system, first_order(system))


def test_aimed_rays_pass_the_real_stop_at_the_asked_fractions():
    s = _setup(SINGLET)
    px = np.array([0.0, 0.0, 1.0, -0.5])
    py = np.array([0.0, 1.0, 0.0, 0.5])
    ex, ey = aberrations.aim(s, 1.0, px, py)
    head = realrays.trace(aberrations._object_rays(s, 1.0, ex, ey), s.geo, s.indices,
                          s.geo.up_to_stop())
    assert (head.status == realrays.OK).all()
    assert head.x == pytest.approx(px * s.stop_radius, abs=1e-9)
    assert head.y == pytest.approx(py * s.stop_radius, abs=1e-9)
    rays = aberrations.launch(s, 1.0, px, py)
    assert np.array_equal(aberrations.launch(s, 1.0, px, py).data, rays.data)  # deterministic


def test_without_aiming_the_chief_ray_misses_the_stop_centre_by_the_pupil_aberration():
    s = _setup(SINGLET)
    rays = realrays.trace(aberrations._object_rays(s, 1.0, np.zeros(1), np.zeros(1)),
                          s.geo, s.indices, s.geo.up_to_stop())
    assert abs(rays.y[0]) > 1e-4  # the paraxial entrance pupil is not the real one at 10°


def test_a_virtual_object_converges_to_its_paraxial_image_as_the_aperture_shrinks():
    text = """
medium glass index 1.5
object -50 before, height 2
start in air
surface front radius 40 into glass
gap 3
surface back flat into air
stop at front, diameter 8
image at focus
"""
    s = _setup(text)
    rows = aberrations.marginal(s, [1.0, 0.01])
    assert abs(rows[0].longitudinal) > 1e-3
    assert abs(rows[1].longitudinal) < abs(rows[0].longitudinal) * 2e-4


def test_best_focus_is_a_minimum_of_the_rms_spot_radius():
    s = _setup(SINGLET)
    shift = aberrations.best_focus_shift(s)
    focus_z = s.geo.vertex_z[-1] + s.paraxial_focus
    best = aberrations.spot(s, 0.0, z=focus_z + shift).rms_radius
    for delta in (-0.05, 0.05):
        assert aberrations.spot(s, 0.0, z=focus_z + shift + delta).rms_radius > best
    assert aberrations.spot(s, 0.0, z=focus_z).rms_radius > best


def test_spot_radii_are_about_the_centroid_and_count_every_ray():
    s = _setup(SINGLET)
    row = aberrations.spot(s, 1.0, points=9)
    assert row.rays == row.used == len(aberrations.pupil_grid(9)[0])
    assert 0 < row.rms_radius <= row.max_radius


def test_default_wavelength_is_the_d_line_and_a_layout_without_a_stop_has_no_rays():
    system = loads("start in air\nsurface radius 10").system
    [(wavelength, _)] = aberrations.wavelength_sets(system)
    assert wavelength == pytest.approx(587.6e-6)
    assert isinstance(aberrations.setup(system), Unavailable)
    analysis = aberrations.analyse(system)
    assert analysis.unavailable is not None and "stop" in analysis.unavailable.reason
