"""Tests of the exact ray trace: geometry, lost-ray flags, mirrors, ideal lenses, chunking,
per-ray indices, and convergence to the paraxial trace as the ray height goes to zero.

Closed forms used here are Snell's law and the law of reflection (common practice); the checks
against published worked results are in tests/outside/test_rays_published.py.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from layoutlang import loads
from layoutlang.engines import paraxial, realrays
from layoutlang.engines.firstorder import first_order
from layoutlang.system import Boundary, Medium, System


def _system(text: str) -> System:
    return loads(text).system


def _parallel(h, z=-5.0):
    h = np.atleast_1d(np.asarray(h, dtype=float))
    return realrays.Rays.start(0.0, h, z, 0.0, 0.0, 1.0)


def _crossing(rays, i=0):
    return rays.z[i] - rays.y[i] * rays.kz[i] / rays.ky[i]


def test_geometry_places_vertices_along_the_path_and_back_after_a_mirror():
    system = _system("start in air\nsurface a flat\ngap 10\nmirror m flat\ngap 4\nsurface b flat")
    geo = realrays.geometry(system)
    assert geo.vertex_z == (0.0, 10.0, 6.0)
    assert [s.sense_after for s in geo.steps] == [1, -1, -1]
    assert [s.sense_before for s in geo.steps] == [1, 1, -1]


def test_stop_inside_a_gap_is_its_own_plane_and_a_stop_at_a_surface_is_that_surface():
    inside = _system("start in air\nsurface a flat\ngap 10\nsurface b flat\n"
                     "stop 4 after a, diameter 2")
    geo = realrays.geometry(inside, stop_radius=1.0)
    assert [s.name for s in geo.steps] == ["a", "stop", "b"]
    assert geo.steps[1].z == 4.0 and geo.stop_step == 1
    at = _system("start in air\nsurface a radius 20\ngap 10\nsurface b flat\nstop at a, diameter 2")
    geo = realrays.geometry(at, stop_radius=1.0)
    assert [s.name for s in geo.steps] == ["a", "b"] and geo.stop_step == 0
    assert geo.steps[0].clear_radius == 1.0


def test_snell_law_holds_at_a_tilted_flat_boundary():
    system = _system("medium glass index 1.5\nstart in air\nsurface flat into glass")
    angle = math.radians(30)
    rays = realrays.Rays.start(0.0, 0.0, -1.0, 0.0, math.sin(angle), math.cos(angle))
    realrays.trace(rays, realrays.geometry(system), system.indices())
    assert 1.5 * rays.ky[0] == pytest.approx(math.sin(angle), rel=1e-14)
    assert rays.kx[0] ** 2 + rays.ky[0] ** 2 + rays.kz[0] ** 2 == pytest.approx(1.0, abs=1e-15)
    assert rays.z[0] == pytest.approx(0.0, abs=1e-15)


def test_total_internal_reflection_is_flagged_at_the_named_surface():
    system = _system("medium glass index 1.5\nstart in glass\nsurface first flat into glass\n"
                     "gap 5\nsurface exit flat into air")
    steep = math.radians(50)  # beyond the critical angle asin(1/1.5) = 41.8°
    rays = realrays.Rays.start(0.0, [0.0, 0.0], -1.0, 0.0, [math.tan(steep), 0.1], 1.0)
    geo = realrays.geometry(system)
    realrays.trace(rays, geo, system.indices())
    assert rays.status.tolist() == [realrays.TOTAL_REFLECTION, realrays.OK]
    assert geo.steps[rays.failed_at[0]].name == "exit"


def test_a_ray_above_the_sphere_misses_it_and_one_beyond_the_clear_diameter_is_vignetted():
    system = _system("medium glass index 1.5\nstart in air\n"
                     "surface lens radius 10 into glass, clear diameter 8\ngap 2\n"
                     "surface back flat into air")
    geo = realrays.geometry(system)
    rays = realrays.trace(_parallel([1.0, 6.0, 12.0]), geo, system.indices())
    assert rays.status.tolist() == [realrays.OK, realrays.VIGNETTED, realrays.MISSED]
    assert rays.failed_at.tolist() == [-1, 0, 0]
    assert np.isfinite(rays.y[1])  # a vignetted ray is still traced on


def test_an_ideal_lens_focuses_every_parallel_ray_at_its_focal_point():
    # tangent form: tan u' = tan u - y/f, so all heights meet at f (an ideal paraxial lens)
    system = _system("start in air\nlens focal length 50")
    rays = realrays.trace(_parallel([0.5, 10.0, 30.0]), realrays.geometry(system),
                          system.indices())
    for i in range(3):
        assert _crossing(rays, i) == pytest.approx(50.0, rel=1e-12)


def test_chunked_trace_equals_one_block_and_per_ray_indices_match_separate_traces():
    system = _system("medium glass index 1.6\nstart in air\nsurface radius 30 into glass\n"
                     "gap 4\nsurface radius -50 into air")
    geo = realrays.geometry(system)
    h = np.linspace(-9, 9, 1001)
    one = realrays.trace(_parallel(h), geo, system.indices(), chunk=10_000)
    small = realrays.trace(_parallel(h), geo, system.indices(), chunk=7)
    assert np.array_equal(one.data, small.data)
    # two wavelengths in one call: an index array per space, one value per ray
    both = realrays.Rays.start(0.0, np.r_[h, h], -5.0, 0.0, 0.0, 1.0)
    glass = np.r_[np.full(h.size, 1.6), np.full(h.size, 1.62)]
    realrays.trace(both, geo, [1.0, glass, 1.0], chunk=64)
    other = realrays.trace(_parallel(h), geo, [1.0, 1.62, 1.0])
    assert np.allclose(both.data[:, :h.size], one.data, rtol=0, atol=1e-12)
    assert np.allclose(both.data[:, h.size:], other.data, rtol=0, atol=1e-12)


def test_a_ray_that_starts_further_than_the_centre_of_a_concave_surface_meets_its_vertex_side():
    # B = k_z - c (p·k) is negative here; the root is still the vertex-side one
    system = _system("medium glass index 1.5\nstart in air\nsurface radius -10 into glass")
    rays = realrays.trace(_parallel([1.0], z=-15.0), realrays.geometry(system),
                          system.indices())
    sag = -10 + math.sqrt(100 - 1)  # the vertex-side point of the sphere at height 1
    assert rays.z[0] == pytest.approx(sag, rel=1e-12)


# --- convergence to the paraxial trace (property) -----------------------------------------------

_radius = st.one_of(st.floats(15, 400), st.floats(-400, -15))


@settings(max_examples=60, deadline=None)
@given(radii=st.lists(_radius, min_size=2, max_size=4),
       gaps=st.lists(st.floats(0.5, 10), min_size=3, max_size=3),
       index=st.floats(1.4, 1.9))
def test_real_rays_converge_to_the_paraxial_ray_as_the_height_goes_to_zero(radii, gaps, index):
    media = [("glass" if i % 2 == 0 else "air") for i in range(len(radii))]
    text = [f"medium glass index {index}", "start in air"]
    for i, (radius, medium) in enumerate(zip(radii, media)):
        text.append(f"surface radius {radius} into {medium}")
        if i < len(radii) - 1:
            text.append(f"gap {gaps[i]}")
    system = _system("\n".join(text))
    steps = paraxial.steps_of(system)
    geo = realrays.geometry(system)
    errors = []
    for h in (1e-2, 1e-3):
        y_par, nu_par = paraxial.trace(h, 0.0, steps)
        rays = realrays.trace(_parallel([h], z=0.0), geo, system.indices())
        assert rays.status[0] == realrays.OK
        # compare at the last vertex plane: height and slope along the sense of travel
        last = geo.vertex_z[-1]
        y_real = rays.y[0] + (last - rays.z[0]) * rays.ky[0] / rays.kz[0]
        slope_real = rays.ky[0] / abs(rays.kz[0])
        slope_par = nu_par / system.indices()[-1]
        scale = h * (1 + sum(abs(s.value) for s in steps if s.kind == paraxial.REFRACTION) * 50)
        errors.append(abs(y_real - y_par) / scale + abs(slope_real - slope_par) / scale)
    # third order: the difference falls at least as h² relative to h
    assert errors[1] <= errors[0] * 0.02 + 1e-12


# --- optical path length -----------------------------------------------------------------


def test_optical_path_from_a_mirrors_centre_of_curvature_back_to_it_is_twice_the_radius():
    # every ray from the centre of curvature meets the sphere normally and returns through the
    # centre (common practice; Fermat's principle): the optical path is 2 R for every ray
    system = _system("start in air\nmirror radius -100\ngap 100\nsurface back flat")
    angles = np.radians(np.linspace(-20.0, 20.0, 9))
    rays = realrays.Rays.start(0.0, 0.0, -100.0, 0.0, np.sin(angles), np.cos(angles))
    realrays.trace(rays, realrays.geometry(system), system.indices())
    assert rays.ok.all()
    np.testing.assert_allclose(rays.opl, 200.0, rtol=1e-13)
    np.testing.assert_allclose(rays.y, 0.0, atol=1e-11)


def test_optical_path_through_a_plate_is_n_times_the_tilted_thickness():
    # a plate of thickness t and index n: the path inside is n t / cos θ' with
    # sin θ = n sin θ' (Snell's law; common practice), plus the air paths before and after
    n, t = 1.5, 4.0
    system = _system(f"medium glass index {n}\nstart in air\nsurface a flat into glass\n"
                     f"gap {t}\nsurface b flat into air\ngap 3\nsurface c flat")
    theta = np.radians([0.0, 10.0, 30.0])
    rays = realrays.Rays.start(0.0, 0.0, -2.0, 0.0, np.sin(theta), np.cos(theta))
    realrays.trace(rays, realrays.geometry(system), system.indices())
    inner = np.arcsin(np.sin(theta) / n)
    expected = 2.0 / np.cos(theta) + n * t / np.cos(inner) + 3.0 / np.cos(theta)
    np.testing.assert_allclose(rays.opl, expected, rtol=1e-14)


def test_optical_path_of_an_ideal_lens_makes_a_plane_wave_a_spherical_one():
    # after an ideal lens of focal length f, every ray of a plane wave reaches the focus with
    # the same optical path (the lens model's phase; Fermat's principle)
    system = _system("start in air\nlens focal length 50\ngap 50\nsurface focus flat")
    heights = np.linspace(-10.0, 10.0, 7)
    rays = realrays.Rays.start(0.0, heights, -5.0, 0.0, 0.0, 1.0)
    realrays.trace(rays, realrays.geometry(system), system.indices())
    np.testing.assert_allclose(rays.y, 0.0, atol=1e-12)
    np.testing.assert_allclose(rays.opl, rays.opl[3], rtol=1e-14)
    assert rays.opl[3] == pytest.approx(55.0)
