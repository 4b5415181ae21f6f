"""Tests of the first-order properties: focal lengths, conjugates, mirrors, afocal layouts,
pupils, f-number and numerical aperture, and the Lagrange invariant.

Expected values here are worked by hand from the thin-lens and mirror equations; the checks
against published worked examples are in tests/outside/.
"""

from __future__ import annotations

import math

import pytest

from layoutlang import evaluate, loads
from layoutlang.engines import paraxial
from layoutlang.engines.firstorder import FirstOrder, Unavailable


def first(text: str) -> FirstOrder:
    return evaluate(loads("start in air\n" + text).system)


def approx(value, expected, rel=1e-9):
    assert not isinstance(value, Unavailable), value
    assert value == pytest.approx(expected, rel=rel, abs=1e-9)


# --- thin lenses and conjugates ---------------------------------------------------------------


@pytest.mark.parametrize("distance, image, magnification", [
    (100.0, 100.0, -1.0), (75.0, 150.0, -2.0), (150.0, 75.0, -0.5),
    (25.0, -50.0, 2.0),  # inside the focal length: a virtual, upright image
])
def test_thin_lens_conjugates(distance, image, magnification) -> None:
    r = first(f"lens l focal length 50\nobject {distance} before, height 2\n")
    approx(r["focal length"], 50.0)
    approx(r["power"], 0.02)
    approx(r["image distance"], image)
    approx(r["magnification"], magnification)
    approx(r["image height"], 2 * magnification)
    approx(r["longitudinal magnification"], magnification ** 2)
    approx(r["angular magnification"], 1 / magnification)


def test_object_at_infinity_images_at_the_back_focal_point() -> None:
    r = first("lens l focal length 50\nobject at infinity, field angle 5 deg\n")
    approx(r["image distance"], 50.0)
    approx(r["image height"], -50 * math.tan(math.radians(5)))
    assert isinstance(r["magnification"], Unavailable)


def test_object_at_the_front_focal_point_images_at_infinity() -> None:
    r = first("lens l focal length 50\nobject 50 before, height 1\nstop at l, diameter 10\n")
    for name in ("image distance", "image height", "magnification", "image position",
                 "total length", "defocus"):
        assert isinstance(r[name], Unavailable), name
        assert "infinity" in r[name].reason
    assert any("infinity" in note for note in r.notes)
    assert isinstance(r["f-number"], Unavailable)  # the beam leaves collimated


def test_two_thin_lenses_gullstrand_in_air() -> None:
    # 1/f = 1/f1 + 1/f2 - d/(f1 f2)
    r = first("lens a focal length 100\ngap 20\nlens b focal length 50\n")
    power = 1 / 100 + 1 / 50 - 20 / (100 * 50)
    approx(r["power"], power)
    approx(r["focal length"], 1 / power)
    approx(r["back focal distance"], (1 - 20 / 100) / power)
    approx(r["front focal distance"], (1 - 20 / 50) / power)
    # principal points: H at d f/f2 after the first lens, H' at -d f/f1 from the last
    approx(r["front principal point"], 20 / (50 * power))
    approx(r["back principal point"], -20 / (100 * power))
    # in air the nodal points are the principal points
    approx(r["front nodal point"], r["front principal point"])
    approx(r["back nodal point"], r["back principal point"])
    approx(r["axial length"], 20.0)


def test_nodal_points_of_one_surface_lie_at_its_centre() -> None:
    r = evaluate(loads("medium glass index 1.5\nstart in air\nsurface s radius 10 into glass\n"
                       ).system)
    approx(r["front principal point"], 0.0)
    approx(r["back principal point"], 0.0)
    approx(r["front nodal point"], 10.0)
    approx(r["back nodal point"], 10.0)
    approx(r["focal length"], 30.0)  # n'/power, power = 0.5/10
    approx(r["object focal length"], 20.0)
    approx(r["effective focal length"], 20.0)


# --- mirrors ----------------------------------------------------------------------------------


def test_concave_mirror_focal_length_is_half_the_radius() -> None:
    r = first("mirror m radius -200\nobject at infinity\n")
    approx(r["focal length"], 100.0)
    approx(r["back focal distance"], 100.0)  # along the reflected path
    approx(r["image position"], -100.0)  # in front of the mirror along z


def test_convex_mirror_gives_a_virtual_image_behind_it() -> None:
    r = first("mirror m radius 200\nobject 100 before, height 10\n")
    approx(r["focal length"], -100.0)
    approx(r["image distance"], -50.0)  # virtual: upstream of the mirror along the path
    approx(r["image position"], 50.0)  # behind the mirror along z
    approx(r["magnification"], 0.5)


def test_concave_mirror_real_image() -> None:
    # 1/s + 1/s' = 2/|R| with s = 300, |R| = 200: s' = 150, m = -1/2
    r = first("mirror m radius -200\nobject 300 before, height 4\n")
    approx(r["image distance"], 150.0)
    approx(r["magnification"], -0.5)
    approx(r["image height"], -2.0)


def test_gaps_after_a_mirror_are_positive_lengths() -> None:
    # a flat fold 30 mm after a lens, the image 20 mm after the fold, back toward the lens
    r = first("lens l focal length 50\ngap 30\nmirror fold flat\nobject at infinity\n")
    approx(r["back focal distance"], 20.0)
    approx(r["image position"], 30 - 20.0)
    approx(r["focal length"], 50.0)
    approx(r["axial length"], 30.0)


def test_lens_after_a_mirror_keeps_its_power() -> None:
    # light passes the same kind of thin lens before and after a flat mirror: two lenses in
    # contact-like sequence separated by 2 x 10 mm of path
    folded = first("lens a focal length 100\ngap 10\nmirror fold flat\ngap 10\n"
                   "lens b focal length 100\n")
    straight = first("lens a focal length 100\ngap 20\nlens b focal length 100\n")
    for name in ("focal length", "back focal distance", "front focal distance"):
        approx(folded[name], straight[name])


# --- afocal layouts ----------------------------------------------------------------------------


@pytest.mark.parametrize("f2, gap, magnification", [(25, 125, -4.0), (-25, 75, 4.0)])
def test_telescopes_are_afocal(f2: float, gap: float, magnification: float) -> None:
    r = first(f"lens objective focal length 100\ngap {gap}\nlens eyepiece focal length {f2}\n"
              "object at infinity, field angle 1 deg\n")
    assert r.afocal
    approx(r["afocal angular magnification"], magnification)
    approx(r["angular magnification"], magnification)
    approx(r["power"], 0.0)
    for name in ("focal length", "back focal distance", "front principal point",
                 "image distance", "image height"):
        assert isinstance(r[name], Unavailable), name
    assert any("afocal" in note for note in r.notes)


def test_afocal_layout_with_a_finite_object_still_images() -> None:
    # a Keplerian 1:1 relay images with m = -1 at any distance (f2/f1 lateral)
    r = first("lens a focal length 50\ngap 100\nlens b focal length 50\n"
              "object 30 before, height 1\n")
    approx(r["magnification"], -1.0)


# --- pupils, f-number and numerical aperture --------------------------------------------------


def test_stop_at_a_thin_lens() -> None:
    r = first("lens l focal length 50\nstop at l, diameter 10\nobject at infinity\n")
    approx(r["entrance pupil position"], 0.0)
    approx(r["entrance pupil diameter"], 10.0)
    approx(r["exit pupil position"], 0.0)
    approx(r["f-number"], 5.0)
    approx(r["numerical aperture"], 0.1)


def test_stop_in_front_of_a_lens() -> None:
    # the exit pupil is the stop's virtual image: 1/s' = 1/50 - 1/25 → s' = -50, m = 2
    r = first("lens l focal length 50\nstop 25 before l, diameter 10\nobject at infinity\n")
    approx(r["entrance pupil position"], -25.0)
    approx(r["entrance pupil diameter"], 10.0)
    approx(r["exit pupil position"], -50.0)
    approx(r["exit pupil diameter"], 20.0)
    approx(r["f-number"], 5.0)


def test_stop_behind_a_lens() -> None:
    # the entrance pupil is the stop seen through the lens: 50 mm behind it, twice as large
    r = first("lens l focal length 50\nstop 25 after l, diameter 10\nobject at infinity\n")
    approx(r["entrance pupil position"], 50.0)
    approx(r["entrance pupil diameter"], 20.0)
    approx(r["exit pupil position"], 25.0)
    approx(r["exit pupil diameter"], 10.0)
    approx(r["f-number"], 2.5)


def test_stop_inside_a_lens_group() -> None:
    # stop 10 after lens a (f 100): seen from either side through a 100 mm lens at 10 mm,
    # a virtual image at 100/9 mm, magnified 10/9
    r = first("lens a focal length 100\ngap 20\nlens b focal length 100\n"
              "stop 10 after a, diameter 9\nobject at infinity\n")
    approx(r["entrance pupil position"], 100 / 9)
    approx(r["entrance pupil diameter"], 10.0)
    approx(r["exit pupil position"], -100 / 9)
    approx(r["exit pupil diameter"], 10.0)


def test_stop_at_the_back_focal_point_is_telecentric_in_object_space() -> None:
    r = first("lens l focal length 50\nstop 50 after l, diameter 4\nobject 200 before, height 1\n")
    assert "telecentric in object space" in r["entrance pupil position"].reason
    assert isinstance(r["entrance pupil diameter"], Unavailable)
    approx(r["exit pupil position"], 50.0)
    # the marginal ray from the axial object point to the stop edge: the lens images the
    # object to 200/3 mm, so the stop (50 mm after the lens) sits 50/3 mm before that image;
    # image-side slope 2/(50/3), object-side slope = that times |m| = 1/3
    approx(r["numerical aperture"], 2 / (50 / 3))
    approx(r["object numerical aperture"], 2 / (50 / 3) / 3)


def test_stop_at_the_front_focal_point_is_telecentric_in_image_space() -> None:
    r = first("lens l focal length 50\nstop 50 before l, diameter 4\nobject at infinity\n")
    assert "telecentric in image space" in r["exit pupil position"].reason
    assert isinstance(r["exit pupil diameter"], Unavailable)
    approx(r["entrance pupil position"], -50.0)
    approx(r["f-number"], 12.5)


def test_object_space_telecentric_with_object_at_infinity_has_no_pupil_size() -> None:
    r = first("lens l focal length 50\nstop 50 after l, diameter 4\nobject at infinity\n")
    assert isinstance(r["entrance pupil diameter"], Unavailable)
    assert isinstance(r["f-number"], Unavailable)


@pytest.mark.parametrize("size, f_number", [("f-number 4", 4.0), ("diameter 12.5", 4.0)])
def test_stop_sized_by_f_number(size: str, f_number: float) -> None:
    r = first(f"lens l focal length 50\nstop at l, {size}\nobject at infinity\n")
    approx(r["f-number"], f_number)
    approx(r["entrance pupil diameter"], 12.5)
    approx(r["stop diameter"], 12.5)


def test_stop_sized_by_f_number_when_the_image_is_in_glass() -> None:
    # the stated f-number must come back as the working f-number 1/(2 n' u')
    r = evaluate(loads("medium glass index 1.5\nstart in air\nsurface s radius 20 into glass\n"
                       "stop at s, f-number 4\nobject at infinity\n").system)
    approx(r["f-number"], 4.0)
    approx(r["entrance pupil diameter"], 40 / 4)  # EFL = R/(n'-n) = 40


def test_finite_object_numerical_apertures() -> None:
    r = first("lens l focal length 50\nstop at l, numerical aperture 0.05\n"
              "object 100 before, height 1\n")
    approx(r["object numerical aperture"], 0.05)
    approx(r["stop diameter"], 10.0)
    approx(r["numerical aperture"], 0.05)  # m = -1: same cone on both sides
    approx(r["f-number"], 10.0)


def test_no_stop_means_no_pupils() -> None:
    r = first("lens l focal length 50\n")
    for name in ("entrance pupil position", "f-number", "numerical aperture",
                 "lagrange invariant"):
        assert "no stop" in r[name].reason


def test_numerical_aperture_needs_a_finite_object() -> None:
    program = loads("start in air\nlens l focal length 50\nstop at l, numerical aperture 0.1\n"
                    "object at infinity\n")
    r = evaluate(program.system)
    assert "finite distance" in r["f-number"].reason


# --- Lagrange invariant --------------------------------------------------------------------


LAGRANGE_LAYOUT = (
    "medium glass index 1.6\nlens a focal length 80\ngap 12\nsurface b radius 40 into glass\n"
    "gap 6\nsurface c radius -90 into air\ngap 30\nmirror d radius -150\ngap 40\n"
    "lens e focal length -60\nstop 4 after b, diameter 6\n"
)


@pytest.mark.parametrize("setting", ["object 300 before, height 7",
                                     "object at infinity, field angle 3 deg"])
def test_lagrange_invariant_is_the_same_at_every_surface(setting: str) -> None:
    program = loads("start in air\n" + LAGRANGE_LAYOUT + setting + "\n")
    r = evaluate(program.system)
    invariant = r["lagrange invariant"]
    steps = paraxial.steps_of(program.system)
    split = paraxial.split_at_stop(program.system)
    a1, b1, _, _ = paraxial.matrix(split.front)
    obj = program.system.object
    # rebuild both rays at the first vertex: the marginal ray to the stop edge, the chief ray
    # through the stop centre
    if obj.at_infinity:
        y, nu = 3 / abs(a1), 0.0
        nu_c = -math.tan(obj.field_angle)
        y_c = -b1 * nu_c / a1
    else:
        tau = obj.distance
        per_unit = a1 * tau + b1
        nu = 3 / abs(per_unit)
        y = nu * tau
        nu_c = -a1 * obj.height / per_unit
        y_c = obj.height + tau * nu_c
    assert invariant == pytest.approx(nu * y_c - nu_c * y, rel=1e-12)
    for end in range(1, len(steps) + 1):
        y1, nu1 = paraxial.trace(y, nu, steps[:end])
        y2, nu2 = paraxial.trace(y_c, nu_c, steps[:end])
        assert nu1 * y2 - nu2 * y1 == pytest.approx(nu * y_c - nu_c * y, rel=1e-10)


def test_lagrange_invariant_equals_n_u_h_at_object_and_image() -> None:
    r = first("lens l focal length 50\nstop at l, diameter 10\nobject 150 before, height 3\n")
    # object side: n u h with u = 5/150; image side: n' u' h' with h' = -1.5, u' = 5/75
    approx(r["lagrange invariant"], 3 * 5 / 150)
    approx(abs(r["image height"]) * r["numerical aperture"], 3 * 5 / 150)


@pytest.mark.parametrize("secondary, separation, magnification", [
    (-50, 75, 4.0),  # convex secondary (centre further along -z): upright, like a Galilean
    (50, 125, -4.0),  # concave secondary: inverted, like a Keplerian
])
def test_two_mirror_beam_expanders_are_afocal(secondary, separation, magnification) -> None:
    r = first(f"mirror p radius -200\ngap {separation}\nmirror s radius {secondary}\n"
              "object at infinity, field angle 0.1 deg\nstop at p, diameter 40\n")
    assert r.afocal
    approx(r["afocal angular magnification"], magnification)
    # the exit pupil is the primary seen in the secondary; met travelling in -z, a mirror's
    # focal length is +R/2 in our +z convention (concave toward the light: centre upstream)
    f2 = secondary / 2
    approx(r["exit pupil position"], 1 / (1 / f2 - 1 / separation))


def test_the_same_layout_in_other_units_scales_lengths_only() -> None:
    from layoutlang.checks import to_display

    body = ("medium glass index 1.6\nstart in air\nsurface a radius {r1} into glass\ngap {t}\n"
            "surface b radius {r2} into air\nobject {s} before, height {h}\n"
            "stop at a, diameter {d}\n")
    in_mm = evaluate(loads("units mm\n" + body.format(r1=40, t=6, r2=-120, s=300, h=10,
                                                      d=12)).system)
    in_cm = evaluate(loads("units cm\n" + body.format(r1=4, t=0.6, r2=-12, s=30, h=1,
                                                      d=1.2)).system)
    for name in ("focal length", "image distance", "exit pupil position", "image height"):
        approx(in_cm[name] * 10, in_mm[name])
    for name in ("magnification", "f-number", "numerical aperture"):
        approx(in_cm[name], in_mm[name])
    approx(to_display(in_cm["power"], "power", "cm"), to_display(in_mm["power"], "power", "mm"))


def test_image_plane_at_a_fixed_distance() -> None:
    r = first("lens l focal length 50\ngap 10\nlens m focal length -100\nimage 60 after\n")
    bfd = r["back focal distance"]
    approx(r["image plane distance"], 60.0)
    approx(r["defocus"], bfd - 60.0)
    approx(r["total length"], 70.0)
    approx(r["image position"], 10 + bfd)
