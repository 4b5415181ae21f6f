"""Where the drawing puts things: vertices folded by mirrors, profiles, apertures, and rays that
cross the axis where published imaging formulas put the image."""

from __future__ import annotations

import math

import numpy as np
import pytest

from layoutlang import loads
from layoutlang.engines.firstorder import first_order
from layoutlang.reports.cross_section import APERTURE_MARGIN, cross_section, sag


def _section(text: str):
    return cross_section(loads(text).system)


def _axis_crossing(z, y) -> float:
    """z where a polyline crosses y = 0 (the first sign change)."""
    for (z0, y0), (z1, y1) in zip(zip(z, y), zip(z[1:], y[1:])):
        if abs(y1) < 1e-12:
            return z1
        if y0 * y1 < 0:
            return z0 + (z1 - z0) * y0 / (y0 - y1)
    raise AssertionError("the ray never crosses the axis")


def test_sag_matches_the_sphere() -> None:
    # Sag of a sphere of radius R at height y: R - sqrt(R^2 - y^2) (common practice, geometry).
    for radius in (52.9, -38.1, 10.0):
        y = np.array([0.0, 1.0, 5.0, 9.0])
        expected = radius - np.sign(radius) * np.sqrt(radius ** 2 - y ** 2)
        assert np.allclose(sag(1 / radius, y), expected)
    assert np.all(sag(0.0, np.array([1.0, 2.0])) == 0)


def test_thin_lens_rays_meet_where_the_gaussian_formula_says() -> None:
    # 1/s + 1/s' = 1/f (Hecht 2017, Optics, 5th ed., eq. 5.17; number from memory):
    # f = 50, s = 100 → s' = 100,
    # magnification -s'/s = -1, so the chief ray from height 2 ends at -2.
    section = _section("""object 100 before, height 2
start in air
lens thin focal length 50
stop at thin, diameter 10
image at focus
""")
    marginal = [r for r in section.rays if r.role == "marginal"]
    chief = [r for r in section.rays if r.role == "chief"]
    assert len(marginal) == 2 and len(chief) == 1
    assert section.object_plane == (-100.0, 2.0)
    assert marginal[0].z[0] == pytest.approx(-100) and marginal[0].y[0] == pytest.approx(0)
    assert marginal[0].z[-1] == pytest.approx(100)
    assert marginal[0].y[-1] == pytest.approx(0, abs=1e-9)
    assert chief[0].y[-1] == pytest.approx(-2.0)
    assert section.image[0] == pytest.approx(100)
    assert section.stop == (pytest.approx(0.0), pytest.approx(5.0))
    # no clear diameter: the aperture comes from the ray heights, with a margin
    assert section.profiles[0].semi_aperture == pytest.approx(5.0 * APERTURE_MARGIN)
    assert not section.profiles[0].from_clear_diameter


def test_a_far_object_is_not_drawn_and_the_rays_are_cut_short() -> None:
    section = _section("""object 5000 before, height 2
start in air
lens thin focal length 50
stop at thin, diameter 10
image at focus
""")
    assert section.object_plane is None
    assert any("far away" in note for note in section.notes)
    assert all(r.z[0] > -5000 for r in section.rays)


def test_concave_mirror_folds_the_path_back_to_its_focus() -> None:
    # A spherical mirror focuses a distant object at f = |R|/2 in front of it (Hecht 2017,
    # Optics, 5th ed., sec. 5.4.3; number from memory): R = 200 → the focus lies 100 upstream
    # of the vertex.
    section = _section("""object at infinity, field angle 1 deg
start in air
mirror main radius -200, clear diameter 40
stop at main, diameter 40
image at focus
""")
    ray = next(r for r in section.rays if r.role == "marginal")
    assert ray.z[0] < 0 and ray.z[-1] == pytest.approx(-100)  # arrives from -z, goes back
    assert ray.y[0] == pytest.approx(ray.y[1])  # collimated before the mirror
    assert _axis_crossing(ray.z[1:], ray.y[1:]) == pytest.approx(-100)
    assert section.profiles[0].semi_aperture == 20  # from the clear diameter
    assert section.profiles[0].from_clear_diameter
    chief = next(r for r in section.rays if r.role == "chief")
    # image height f·tan(field angle) in size (Hecht 2017, sec. 5.4.3, from memory;
    # common practice)
    assert abs(chief.y[-1]) == pytest.approx(100 * math.tan(math.radians(1)), rel=1e-9)


def test_vertices_walk_back_after_a_mirror() -> None:
    section = _section("""object at infinity
start in air
mirror first radius -800, clear diameter 200
gap 300
mirror second radius -266.667, clear diameter 70
stop at first, diameter 200
image at focus
""")
    assert [p.z for p in section.profiles] == [0.0, -300.0]
    assert [p.sense_in for p in section.profiles] == [1, -1]


def test_lens_elements_and_virtual_image() -> None:
    # A plano-convex magnifier: object inside the focal length, a virtual image upstream.
    section = _section("""medium acrylic index 1.4917
object 35 before, height 2.5
start in air
surface board flat into acrylic, clear diameter 30
gap 8
surface eye radius -24.6 into air, clear diameter 30
image at focus
""")
    assert len(section.elements) == 1 and section.elements[0].medium == "acrylic"
    z, y = section.elements[0].outline(section.profiles)
    assert z[0] == z[-1] and y[0] == y[-1]  # closed
    assert any(r.virtual_z for r in section.rays)
    ray = next(r for r in section.rays if r.virtual_z)
    assert ray.virtual_z[-1] < 0  # the image is upstream of the lens
    assert section.notes and "no stop" in section.notes[0]


def test_exact_rays_show_the_spherical_aberration_of_a_mirror() -> None:
    pytest.importorskip("layoutlang.engines.realrays")
    # A ray parallel to the axis at height h meets a sphere of radius R at angle θ, sin θ = h/R,
    # and after reflection crosses the axis R / (2 cos θ) from the centre of curvature
    # (common practice: plane geometry of reflection at a sphere). R = 200, h = 40 → the ray
    # crosses 200 - 100/cos θ = 97.938 before the vertex, closer than the paraxial 100.
    text = """object at infinity
start in air
mirror main radius -200, clear diameter 80
stop at main, diameter 80
image at focus
"""
    section = cross_section(loads(text).system, exact=True)
    ray = next(r for r in section.rays if r.role == "marginal")
    assert ray.label == "exact"
    theta = math.asin(40 / 200)
    assert _axis_crossing(ray.z[1:], ray.y[1:]) == pytest.approx(-(200 - 100 / math.cos(theta)),
                                                                  rel=1e-9)
    paraxial = cross_section(loads(text).system, exact=False)
    assert _axis_crossing(paraxial.rays[0].z[1:], paraxial.rays[0].y[1:]) == pytest.approx(-100)


def test_exact_rays_fall_back_to_paraxial_with_a_note() -> None:
    section = cross_section(loads("""medium glass index 1.5
object 35 before, height 2
start in air
surface flat into glass, clear diameter 20
gap 8
surface radius -24.6 into air
image at focus
""").system, exact=True)
    assert section.rays and all(r.label == "" for r in section.rays)
    assert any("paraxial rays are drawn (exact rays need a stop)" in n for n in section.notes)


def test_degenerate_layouts_give_a_clear_error_not_inf_or_nan() -> None:
    from layoutlang.errors import LayoutValueError

    with pytest.raises(LayoutValueError, match="one plane"):
        _section("""object 0 before, height 3
start in air
surface s0 flat into air
stop at s0, diameter 3
""")
    # since the numeric guard, such numbers are refused where they are written
    with pytest.raises(LayoutValueError, match="cannot be drawn|too small"):
        _section("""medium glass index 1.5
object at infinity, field angle 1 deg
start in air
surface s0 radius 1e-38 into glass
stop 1e300 before s0, f-number 1
image at focus
""")


def test_random_layouts_draw_finite_or_say_why() -> None:
    # Random layouts (including extreme values) from the fuzz tests' strategy: every drawn
    # number is finite, or the drawing is refused with a LayoutError.
    from hypothesis import HealthCheck, given, settings

    from layoutlang.errors import LayoutError

    fuzz = pytest.importorskip("test_fuzz")

    @settings(max_examples=150, deadline=None, suppress_health_check=list(HealthCheck))
    @given(fuzz.layouts())
    def check(text: str) -> None:
        try:
            system = loads(text).system
        except LayoutError:
            return
        for exact in (False, True):
            try:
                section = cross_section(system, exact=exact)
            except LayoutError:
                continue
            values = [v for r in section.rays for v in r.z + r.y + r.virtual_z + r.virtual_y]
            values += [p.semi_aperture for p in section.profiles] + list(section.extent())
            assert all(math.isfinite(v) for v in values), text

    check()


def test_exact_rays_also_show_where_a_virtual_image_seems_to_be() -> None:
    # A negative lens forms a virtual image upstream (thin-lens equation, Hecht 2017, Optics,
    # 5th ed., eq. 5.17, from memory); the exact rays' backward extensions end at its plane.
    program = loads("medium glass index 1.5\nobject 100 before, height 5\nstart in air\n"
                    "surface a radius -40 into glass\ngap 3\nsurface b radius 40 into air\n"
                    "stop at a, diameter 10\nimage at focus\n")
    section = cross_section(program.system, exact=True)
    extended = [r for r in section.rays if r.virtual_z]
    assert extended and all(r.label == "exact" for r in extended)
    image_z = first_order(program.system)["image position"]
    assert all(r.virtual_z[-1] == pytest.approx(image_z) for r in extended)
    # the marginal extensions cross the axis near the paraxial image, off it by the lens's
    # spherical aberration (a few per cent at f/4)
    marginal = [r for r in extended if r.role == "marginal"]
    assert len(marginal) == 2
    crossing = _axis_crossing(marginal[0].virtual_z, marginal[0].virtual_y)
    assert crossing != pytest.approx(image_z, abs=1e-6)
    assert abs(crossing - image_z) < 0.05 * abs(image_z)


# --- apertures from the geometry, far images, bundles, the stop ------------------------------


def test_a_ball_lens_is_drawn_as_a_ball() -> None:
    section = cross_section(loads("""medium ball_glass index 1.746
object at infinity
start in air
surface entry radius 1 into ball_glass
gap 2
surface exit radius -1 into air
stop at entry, diameter 0.3
image at focus
""").system, exact=True)
    assert [round(p.semi_aperture, 3) for p in section.profiles] == [0.999, 0.999]
    assert not section.notes  # nothing to apologise for


def test_an_ordinary_lens_keeps_the_apertures_of_its_bundles() -> None:
    section = _section("""medium glass index 1.5
object at infinity, field angle 2 deg
start in air
surface front radius 200 into glass
gap 2
surface back radius -200 into air
stop at front, diameter 10
image at focus
""")
    assert all(p.semi_aperture < 8 for p in section.profiles)  # not out to the far knife edge


def test_a_near_collimated_output_does_not_stretch_the_drawing() -> None:
    # the object sits 0.01 mm inside the focal length of a 50 mm thin lens: the image plane
    # is ~250 m away (1/s + 1/s' = 1/f, Hecht 2017, eq. 5.17, from memory)
    section = _section("""object 49.99 before, height 1
start in air
lens thin focal length 50
stop at thin, diameter 10
image at focus
""")
    z_min, z_max, _ = section.extent()
    assert z_max - z_min < 500
    assert section.image is None
    assert any("image is far away" in n and "cut short" in n for n in section.notes)


def test_bundles_at_three_fields_a_few_rays_each() -> None:
    section = _section("""object 100 before, height 2
start in air
lens thin focal length 50
stop at thin, diameter 10
image at focus
""")
    assert section.fields == (0.0, 0.7, 1.0)
    for field in section.fields:
        pupils = sorted(r.pupil for r in section.rays if r.field == field)
        assert pupils == ([-1, -0.5, 0.5, 1] if field == 0 else [-1, -0.5, 0, 0.5, 1])


def test_exact_rays_pass_through_the_drawn_stop_wherever_it_is() -> None:
    pytest.importorskip("layoutlang.engines.realrays")
    section = cross_section(loads("""medium glass index 1.6
object at infinity, field angle 5 deg
start in air
surface front radius 40 into glass
gap 5
surface back radius -120 into air
stop 12 after back, diameter 6
image at focus
""").system, exact=True)
    z, radius = section.stop
    for ray in section.rays:
        assert ray.label == "exact"
        at = [y for zz, y in zip(ray.z, ray.y) if abs(zz - z) < 1e-9]
        assert at, "every ray has a point on the stop plane"
        if ray.field == 0 and abs(ray.pupil) == 1:
            assert abs(at[0]) == pytest.approx(radius, rel=1e-6)
        if ray.pupil == 0:
            assert at[0] == pytest.approx(0, abs=1e-6 * radius)


def test_each_note_once_and_in_sentences() -> None:
    section = _section("""object 100 before, height 2
start in air
lens thin focal length 50
image at focus
""")
    assert len(section.notes) == len(set(section.notes))
    assert section.notes == ["no rays are drawn: the layout has no stop and the first boundary "
                             "no clear diameter"]
    assert section.rays == []


def test_a_paraboloid_is_drawn_with_its_own_sag() -> None:
    # A paraboloid of vertex radius R has sag r²/(2R) at every height (common practice: the
    # conic of ISO 10110-12 with κ = -1); its sphere would sit at R - sqrt(R² - r²).
    section = _section("""
object at infinity
start in air
mirror main radius -200, conic constant -1, clear diameter 120
image at focus
""")
    profile = section.profiles[0]
    z, y = profile.points()
    assert np.allclose(z - profile.z, -y ** 2 / 400)
    assert profile.z_at(60.0) - profile.z == pytest.approx(-9.0)
    sphere = 200 - math.sqrt(200 ** 2 - 60 ** 2)
    assert abs(profile.z_at(60.0) - profile.z + sphere) > 0.1


def test_an_ellipsoid_reaches_past_its_sphere_and_a_hole_leaves_a_gap() -> None:
    # A prolate ellipsoid z = c r²/(1 + sqrt(1 - (1 + κ) c² r²)) exists to r = 1/(c sqrt(1 + κ))
    # (ISO 10110-12 sag formula; geometry): with R = 100, κ = -0.5 that is 141.4, past the
    # vertex sphere's 100, so a clear diameter of 240 is drawn whole.
    section = _section("""
object at infinity
start in air
mirror main radius -100, conic constant -0.5, clear diameter 240, obscuration diameter 40, hole diameter 20
image at focus
""")
    profile = section.profiles[0]
    assert profile.semi_aperture == pytest.approx(120.0)
    rho = 120.0 ** 2
    expected = -rho / 100 / (1 + math.sqrt(1 - 0.5 * rho / 100 ** 2))
    assert profile.z_at(120.0) - profile.z == pytest.approx(expected)
    assert any("hole of 20 mm" in note and "obscuration of 40 mm" in note
               for note in section.notes)
    z, y = profile.points()
    gap = np.isnan(y)
    assert gap.sum() == 1 and np.isnan(z[gap]).all()
    assert np.nanmin(np.abs(y)) == pytest.approx(10.0)
    band_z, band_y = profile.obscuration_points()
    assert np.nanmin(np.abs(band_y)) == pytest.approx(10.0)
    assert np.nanmax(np.abs(band_y)) == pytest.approx(20.0)


def test_rays_blocked_by_an_obscuration_end_on_the_surface() -> None:
    from layoutlang.engines.firstorder import first_order as fo

    system = loads(open("examples/two_mirror_telescope.lay").read()).system
    section = cross_section(system, fo(system), exact=True)
    blocked = [note for note in section.notes if "blocked by the central obscuration" in note]
    assert blocked and all("at primary" in note for note in blocked)
    primary = section.profiles[0]
    for ray in section.rays:
        if ray.pupil == 0 and ray.field > 0:  # the centre of an off-axis bundle: blocked
            assert ray.z[-1] == pytest.approx(primary.z_at(ray.y[-1]), abs=1e-6)
