"""The one surface description: forms, apertures, placements, and Boundary's view of them."""

from __future__ import annotations

import math

import numpy as np
import pytest

from layoutlang.surfaces import Aperture, Placement, Profile
from layoutlang.surfaces.aperture import BLOCKED, MEETS, OUTSIDE, THROUGH_HOLE
from layoutlang.system import IDEAL, Boundary


def test_forms_are_named_by_what_is_given():
    assert Profile(0.02).form == "sphere"
    assert Profile(0.02, -1).form == "conic"
    assert Profile(0.02, 0, (1e-6,)).form == "even asphere"
    assert Profile(0.02, 0, (), (1e-3,), 5.0).form == "Q-type asphere"
    assert Profile(0.0).is_flat and not Profile(0.0, -1).is_flat


def test_profile_works_on_floats_arrays_and_sample_axes():
    profile = Profile(np.array([0.02, 0.025]), np.array([0.0, -1.0]))
    rho = np.array([[4.0], [9.0]])  # broadcast: rows of rho against per-sample parameters
    assert profile.sag(rho).shape == (2, 2)
    assert Profile(0.02).sag(4.0) == pytest.approx(50 - math.sqrt(2496))


def test_float_outside_the_domain_raises_and_arrays_give_nan():
    with pytest.raises(ValueError):
        Profile(0.1).sag(200.0)
    assert np.isnan(Profile(0.1).sag(np.array([200.0])))[0]


def test_sympy_profile_stays_exact():
    sympy = pytest.importorskip("sympy")
    c, k = sympy.symbols("c k")
    sag = Profile(c, k).sag(sympy.Integer(4))
    assert sympy.simplify(sag.subs({k: -1}) - 2 * c) == 0


def test_aperture_classifies_each_ray():
    aperture = Aperture(clear_diameter=10, obscuration_diameter=3, hole_diameter=2)
    found = aperture.classify(np.array([0.5, 1.6**2, 4.9**2, 5.0**2, 5.1**2]))
    assert list(found) == [BLOCKED, MEETS, MEETS, MEETS, OUTSIDE]
    assert list(Aperture(10, None, 4).classify(np.array([1.0, 9.0]))) == [THROUGH_HOLE, MEETS]
    assert Aperture(100, 30).obscuration_ratio == pytest.approx(0.3)
    assert Aperture().is_open


def test_boundary_reads_its_profile_and_aperture():
    sphere = Boundary("front", 0.02, "glass", clear_diameter=12)
    assert sphere.profile == Profile(0.02) and sphere.is_spherical
    asphere = Boundary("back", -0.01, "air", conic=-1.2, even_terms=(1e-6,), hole_diameter=2)
    assert asphere.profile.form == "even asphere" and not asphere.is_spherical
    assert asphere.aperture.hole_diameter == 2
    assert Boundary("thin", 0.0, "air", kind=IDEAL, power=0.01).profile.is_flat


def test_zero_placement_is_identity():
    assert Placement().is_identity
    assert not Placement(tilt=(0.0, 0.01, 0.0)).is_identity
