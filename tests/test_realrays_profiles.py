"""Exact rays through conic and aspheric profiles, apertures with obscurations and holes, and
batches of layouts: the intersection lies on `Profile.sag`, the refraction obeys Snell's law
about `Profile.slope`'s normal (common practice), every lost ray is flagged with its step, and
a batch traces exactly what the layouts traced one by one."""

from __future__ import annotations

from dataclasses import replace

import numpy as np
import pytest

from layoutlang.engines import realrays
from layoutlang.system import MIRROR, Boundary, Medium, System

AIR, GLASS = Medium("air", 1.0), Medium("glass", 1.6)


def _singlet(front: Boundary, thickness: float = 5.0) -> System:
    back = Boundary("back", -1 / 80.0, "air")
    return System((AIR, GLASS), "air", (front, back, Boundary("image", 0.0, "air")),
                  (thickness, 40.0))


def _rays(count=41, extent=9.0, slope=0.05):
    heights = np.linspace(-extent, extent, count)
    return realrays.Rays.start(0.3 * heights, heights, -4.0, 0.01, slope, 1.0)


def _head(system, rays, steps=1):
    geo = realrays.geometry(system)
    return realrays.trace(rays, geo, system.indices(), geo.steps[:steps])


ASPHERES = [
    Boundary("front", 1 / 30.0, "glass", conic=-0.7, even_terms=(2e-5, -3e-8, 4e-11, -1e-14)),
    Boundary("front", -1 / 45.0, "glass", conic=-2.5, even_terms=(-1e-5,)),
    Boundary("front", 1 / 30.0, "glass", conic=0.4, q_terms=(1e-3, -2e-4, 5e-5), q_radius=10.0),
    Boundary("front", 0.0, "glass", even_terms=(1e-4, 2e-7)),
]


@pytest.mark.parametrize("front", ASPHERES)
def test_the_intersection_lies_on_the_profile_and_refraction_follows_its_normal(front):
    system = _singlet(front)
    before = _rays()
    k_in = before.data[3:6].copy()
    rays = _head(system, before.copy())
    assert rays.ok.all()
    rho = rays.x ** 2 + rays.y ** 2
    profile = front.profile
    np.testing.assert_allclose(rays.z, profile.sag(rho), atol=1e-12)
    slope = profile.slope(rho)
    normal = np.array([-2 * rays.x * slope, -2 * rays.y * slope, np.ones_like(rho)])
    normal /= np.linalg.norm(normal, axis=0)
    # Snell's law in vector form: n (k × N) = n' (k' × N), and k' is a unit vector
    cross_in = np.cross(k_in.T, normal.T)
    cross_out = np.cross(rays.data[3:6].T, normal.T)
    np.testing.assert_allclose(1.6 * cross_out, 1.0 * cross_in, atol=1e-13)
    np.testing.assert_allclose(np.linalg.norm(rays.data[3:6], axis=0), 1.0, atol=1e-14)


def test_a_zero_coefficient_takes_the_newton_path_to_the_sphere_answer():
    sphere = _singlet(Boundary("front", 1 / 30.0, "glass"))
    newton = _singlet(Boundary("front", 1 / 30.0, "glass", even_terms=(0.0,)))
    conic = _singlet(Boundary("front", 1 / 30.0, "glass", conic=1e-300))
    a = realrays.trace(_rays(), realrays.geometry(sphere), sphere.indices())
    for other in (newton, conic):
        b = realrays.trace(_rays(), realrays.geometry(other), other.indices())
        np.testing.assert_allclose(b.data, a.data, rtol=0, atol=1e-12)
        np.testing.assert_allclose(b.opl, a.opl, rtol=1e-14)


def test_a_mirror_asphere_reflects_about_the_profiles_normal():
    mirror = Boundary("m", -1 / 200.0, "air", MIRROR, conic=-1.0, even_terms=(1e-8,))
    system = System((AIR,), "air", (mirror, Boundary("p", 0.0, "air")), (100.0,))
    rays = _head(system, realrays.Rays.start(0.0, np.linspace(1, 40, 9), -10.0, 0.0, 0.0, 1.0))
    rho = rays.y ** 2
    slope = mirror.profile.slope(rho)
    normal = np.array([np.zeros_like(rho), -2 * rays.y * slope, np.ones_like(rho)])
    normal /= np.linalg.norm(normal, axis=0)
    k_in = np.array([0.0, 0.0, 1.0])[:, None]
    expected = k_in - 2 * (normal * k_in).sum(0) * normal
    np.testing.assert_allclose(rays.data[3:6], expected, atol=1e-14)


def test_rays_past_an_ellipsoids_rim_are_missed_at_that_surface_never_a_silent_nan():
    # a prolate ellipsoid c = 1/10, κ = -0.5 exists only out to r = 1/sqrt((1 + κ) c²) = 14.1
    front = Boundary("front", 1 / 10.0, "glass", conic=-0.5, even_terms=(1e-6,))
    system = _singlet(front)
    rays = realrays.trace(_rays(9, 20.0, 0.0), realrays.geometry(system), system.indices())
    outside = np.abs(np.linspace(-20.0, 20.0, 9)) > 14.2
    assert (rays.status[outside] == realrays.MISSED).all()
    assert (rays.failed_at[outside] == 0).all()
    assert (rays.status[~outside] != realrays.MISSED).all()


def _primary(**aperture) -> System:
    primary = Boundary("primary", -1 / 400.0, "air", MIRROR, conic=-1.0, clear_diameter=100.0,
                       **aperture)
    return System((AIR,), "air", (primary, Boundary("focus", 0.0, "air")), (200.0,))


def test_obscuration_and_hole_flag_their_rays_with_the_surface():
    heights = np.array([0.0, 8.0, 12.0, 20.0, 49.0, 51.0])
    system = _primary(hole_diameter=20.0)
    geo = realrays.geometry(system)
    rays = realrays.trace(realrays.Rays.start(0.0, heights, -10.0, 0.0, 0.0, 1.0), geo,
                          system.indices(), geo.steps[:1])
    assert rays.status.tolist() == [realrays.THROUGH_HOLE, realrays.THROUGH_HOLE, realrays.OK,
                                    realrays.OK, realrays.OK, realrays.VIGNETTED]
    assert (rays.failed_at[rays.status != realrays.OK] == 0).all()
    assert rays.kz[0] == 1.0 and rays.kz[1] == 1.0  # through the hole: straight on
    # the obscuration stands in front of the surface: it blocks before the hole is reached
    system = _primary(hole_diameter=20.0, obscuration_diameter=30.0)
    rays = realrays.trace(realrays.Rays.start(0.0, heights, -10.0, 0.0, 0.0, 1.0),
                          realrays.geometry(system), system.indices())
    assert rays.status.tolist() == [realrays.BLOCKED] * 3 + [realrays.OK] * 2 + [
        realrays.VIGNETTED]
    assert rays.kz[2] < 0 and np.isfinite(rays.data[:, 2]).all()  # a blocked path is defined
    assert realrays.THROUGH_HOLE in realrays.LOST and realrays.BLOCKED not in realrays.LOST


def _perturbed(count: int, seed: int = 3) -> list[System]:
    rng = np.random.default_rng(seed)
    base = _singlet(ASPHERES[0])
    layouts = []
    for _ in range(count):
        front, back, image = base.boundaries
        front = replace(front, curvature=front.curvature * (1 + 0.02 * rng.standard_normal()),
                        conic=front.conic + 0.05 * rng.standard_normal(),
                        even_terms=tuple(a * (1 + 0.1 * rng.standard_normal())
                                         for a in front.even_terms),
                        clear_diameter=float(rng.uniform(16.0, 20.0)))
        back = replace(back, curvature=back.curvature * (1 + 0.02 * rng.standard_normal()))
        gaps = (base.gaps[0] + 0.1 * rng.standard_normal(), base.gaps[1])
        media = (AIR, replace(GLASS, index=1.6 + 0.001 * rng.standard_normal()))
        layouts.append(replace(base, boundaries=(front, back, image), gaps=gaps, media=media))
    return layouts


def test_a_batch_traces_what_each_layout_traces_alone():
    layouts = _perturbed(6)
    rays = _rays(count=31)
    group = realrays.batch(layouts, len(rays))
    together = group.trace(rays)
    assert len(together) == 6 * 31
    for i, system in enumerate(layouts):
        alone = realrays.trace(rays.copy(), realrays.geometry(system), system.indices())
        np.testing.assert_allclose(group.per_layout(together.y)[i], alone.y, rtol=0, atol=1e-12)
        np.testing.assert_allclose(group.per_layout(together.kz)[i], alone.kz, atol=1e-15)
        np.testing.assert_allclose(group.per_layout(together.opl)[i], alone.opl, rtol=1e-14)
        assert (group.per_layout(together.status)[i] == alone.status).all()


def test_a_layout_whose_numbers_are_arrays_is_the_same_batch():
    layouts = _perturbed(4)
    front = layouts[0].boundaries[0]
    arrays = replace(
        layouts[0],
        boundaries=(replace(front,
                            curvature=np.array([s.boundaries[0].curvature for s in layouts]),
                            conic=np.array([s.boundaries[0].conic for s in layouts])),
                    replace(layouts[0].boundaries[1],
                            curvature=np.array([s.boundaries[1].curvature for s in layouts])),
                    layouts[0].boundaries[2]),
        gaps=(np.array([s.gaps[0] for s in layouts]), layouts[0].gaps[1]))
    rays = _rays(count=11)
    one = realrays.batch(arrays, len(rays)).trace(rays)
    same = [replace(arrays, boundaries=(replace(s.boundaries[0], even_terms=front.even_terms,
                                                clear_diameter=front.clear_diameter),
                                        s.boundaries[1], s.boundaries[2]),
                    gaps=s.gaps, media=arrays.media) for s in layouts]
    listed = realrays.batch(same, len(rays)).trace(rays)
    np.testing.assert_allclose(one.data, listed.data, atol=1e-12)


def test_a_batch_of_layouts_that_only_move_gaps_keeps_the_closed_form_sphere_path():
    base = System((AIR, GLASS), "air", (Boundary("a", 1 / 30.0, "glass"),
                                        Boundary("b", 0.0, "air")), (4.0,))
    group = realrays.batch([replace(base, gaps=(g,)) for g in (3.0, 4.0, 5.0)], 5)
    assert all(step.form == "sphere" and np.ndim(step.curvature) == 0
               for step in group.geometry.steps)
    assert np.ndim(group.geometry.steps[1].z) == 1


def test_layouts_of_different_structure_cannot_share_a_batch():
    one = _singlet(Boundary("front", 1 / 30.0, "glass"))
    other = replace(one, boundaries=(replace(one.boundaries[0], kind=MIRROR),) +
                    one.boundaries[1:])
    with pytest.raises(ValueError, match="differ"):
        realrays.batch([one, other], 3)
    with pytest.raises(ValueError, match="rays per layout"):
        realrays.batch([one, one], 3).trace(_rays(count=4))


def test_the_diode_collimator_needs_its_asphere() -> None:
    # examples/diode_collimator.lay: the hyperboloid κ = -n² focuses a plane wave perfectly
    # (Cartesian oval of a plane wave: Born & Wolf 1999, Principles of Optics, §4.2.3, from
    # memory); its r⁴, r⁶ terms correct the cover window. Every expectation holds as written,
    # and the same lens with a spherical back face fails the image-quality ones.
    from pathlib import Path

    from layoutlang import check, loads

    text = (Path(__file__).parents[1] / "examples" / "diode_collimator.lay").read_text()
    assert all(r.outcome.passed for r in check(loads(text)))
    aspheric = ", conic constant -n_lens * n_lens, r4 coefficient -3.711e-5, " \
        "r6 coefficient 4.102e-6"
    assert aspheric in text
    sphere = check(loads(text.replace(aspheric, "")))
    failed = {r.label for r in sphere if not r.outcome.passed}
    assert {"marginal focus shift", "rms spot radius at field 0", "wavefront error rms"} <= failed
