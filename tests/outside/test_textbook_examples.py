"""First-order results against published formulas and worked examples.

Each check names its source beside it. Where the numbers of a worked example are quoted
from memory it says so; the formulas themselves are textbook standard, and the equation and
section numbers given for them are also quoted from memory (editions renumber).
"""

from __future__ import annotations

import math

import pytest

from layoutlang import evaluate, loads


def first(text: str):
    return evaluate(loads(text).system)


# --- one spherical boundary ------------------------------------------------------------------


def test_glass_rod_with_a_convex_end() -> None:
    # Hecht, 2017, Optics, 5th ed., chapter 5 (refraction at a spherical surface), the
    # worked example of a long glass rod (n = 1.5) with a convex end of radius 5 cm and an
    # object 20 cm in front of it in air: n1/so + n2/si = (n2 - n1)/R gives si = 30 cm
    # (numbers from memory; the equation is the book's eq. 5.8).
    r = first("units cm\nmedium glass index 1.5\nobject 20 before, height 1\nstart in air\n"
              "surface rod_end radius 5 into glass\n")
    assert r["image distance"] == pytest.approx(30.0)
    # m = -(n1 si)/(n2 so) for one surface (Hecht, 2017, Optics, 5th ed., eq. 5.27)
    assert r["magnification"] == pytest.approx(-(1.0 * 30) / (1.5 * 20))


@pytest.mark.parametrize("n1, n2, radius, s_object", [
    (1.0, 1.5, 5.0, 20.0), (1.0, 1.333, -12.0, 40.0), (1.52, 1.0, 30.0, 100.0),
    (1.0, 1.7, 8.0, 6.0),  # object inside the front focal distance: a virtual image
])
def test_single_surface_refraction_equation(n1, n2, radius, s_object) -> None:
    # n1/so + n2/si = (n2 - n1)/R, R > 0 with the centre after the vertex
    # (Hecht, 2017, Optics, 5th ed., eq. 5.8; Pedrotti, Pedrotti and Pedrotti, 2007,
    # Introduction to Optics, 3rd ed., chapter 2)
    r = first(f"medium one index {n1}\nmedium two index {n2}\nobject {s_object} before\n"
              f"start in one\nsurface s radius {radius} into two\n")
    expected = n2 / ((n2 - n1) / radius - n1 / s_object)
    assert r["image distance"] == pytest.approx(expected, rel=1e-12)
    # focal lengths of one surface: f' = n2 R/(n2 - n1), f = n1 R/(n2 - n1) (same sources)
    assert r["focal length"] == pytest.approx(n2 * radius / (n2 - n1))
    assert r["object focal length"] == pytest.approx(n1 * radius / (n2 - n1))


# --- thin and thick lenses ----------------------------------------------------------------


@pytest.mark.parametrize("n, r1, r2", [(1.5, 100.0, -100.0), (1.62, 40.0, 200.0),
                                       (1.45, -60.0, -25.0)])
def test_lensmaker_equation_for_a_thin_lens(n, r1, r2) -> None:
    # 1/f = (n - 1)(1/R1 - 1/R2) (Hecht, 2017, Optics, 5th ed., eq. 5.16)
    r = first(f"medium glass index {n}\nstart in air\nsurface a radius {r1} into glass\n"
              f"surface b radius {r2} into air\n")
    assert r["focal length"] == pytest.approx(1 / ((n - 1) * (1 / r1 - 1 / r2)))


@pytest.mark.parametrize("n, r1, r2, d", [
    (1.5, 50.0, -50.0, 10.0), (1.7, 30.0, 80.0, 6.0), (1.52, -40.0, -20.0, 8.0),
    (1.6, 25.0, -25.0, 50.0),  # thick enough to turn the lens negative
])
def test_gullstrand_thick_lens_and_principal_planes(n, r1, r2, d) -> None:
    # thick lens in air (Hecht, 2017, Optics, 5th ed., eqs. 6.2-6.4):
    #   1/f = (n - 1) [1/R1 - 1/R2 + (n - 1) d / (n R1 R2)]
    #   h1 = -f (n - 1) d / (R2 n)    front principal point, from the first vertex
    #   h2 = -f (n - 1) d / (R1 n)    back principal point, from the last vertex
    # the power form P = P1 + P2 - (d/n) P1 P2 is Gullstrand's equation (common practice)
    f = 1 / ((n - 1) * (1 / r1 - 1 / r2 + (n - 1) * d / (n * r1 * r2)))
    p1, p2 = (n - 1) / r1, (1 - n) / r2
    assert 1 / f == pytest.approx(p1 + p2 - d / n * p1 * p2)
    r = first(f"medium glass index {n}\nstart in air\nsurface a radius {r1} into glass\n"
              f"gap {d}\nsurface b radius {r2} into air\n")
    assert r["focal length"] == pytest.approx(f, rel=1e-12)
    assert r["front principal point"] == pytest.approx(-f * (n - 1) * d / (r2 * n), rel=1e-12)
    assert r["back principal point"] == pytest.approx(-f * (n - 1) * d / (r1 * n), rel=1e-12)
    # back focal distance = f + h2, front focal distance = f - h1 (same sources, fig. 6.2)
    assert r["back focal distance"] == pytest.approx(f + r["back principal point"], rel=1e-12)
    assert r["front focal distance"] == pytest.approx(f - r["front principal point"], rel=1e-12)


def test_thick_lens_capping_a_water_tank() -> None:
    # Pedrotti, Pedrotti and Pedrotti, 2007, Introduction to Optics, 3rd ed., chapter 18
    # (matrix methods), worked example: a 4 cm thick biconvex lens, n = 1.52, radii 25 cm,
    # air in front and water (n = 1.33) behind. Focal lengths quoted there as about
    # -35.7 cm (object side, their sign) and 47.5 cm (image side); from memory.
    r = first("units cm\nmedium glass index 1.52\nmedium water index 1.33\nstart in air\n"
              "surface a radius 25 into glass\ngap 4\nsurface b radius -25 into water\n")
    assert r["object focal length"] == pytest.approx(35.7, abs=0.05)
    assert r["focal length"] == pytest.approx(47.5, abs=0.05)
    # and the nodal points sit (n' - n)/P downstream of the principal points (Pedrotti, same
    # chapter: the nodal points coincide with the principal points only when n = n')
    shift = (1.33 - 1.0) / r["power"]
    assert r["front nodal point"] - r["front principal point"] == pytest.approx(shift)
    assert r["back nodal point"] - r["back principal point"] == pytest.approx(shift)


@pytest.mark.parametrize("n, diameter", [(1.5168, 5.0), (1.77, 2.0), (1.4585, 1.0), (2.0, 3.0)])
def test_ball_lens_focal_length(n: float, diameter: float) -> None:
    # EFL = n D / (4 (n - 1)), measured from the centre; back focal distance EFL - D/2
    # (common practice; it is the thick-lens equation with R1 = -R2 = D/2 and d = D)
    radius = diameter / 2
    r = first(f"medium ball index {n}\nstart in air\nsurface front radius {radius} into ball\n"
              f"gap {diameter}\nsurface back radius {-radius} into air\n")
    efl = n * diameter / (4 * (n - 1))
    assert r["focal length"] == pytest.approx(efl, rel=1e-12)
    assert r["back focal distance"] == pytest.approx(efl - diameter / 2, rel=1e-12)
    # both principal points at the centre of the ball
    assert r["front principal point"] == pytest.approx(radius)
    assert r["back principal point"] == pytest.approx(-radius)


# --- spherical mirrors --------------------------------------------------------------------


@pytest.mark.parametrize("radius, s_object", [
    (-200.0, 300.0), (-200.0, 150.0), (-200.0, 50.0),  # concave: real, real, virtual
    (150.0, 100.0), (80.0, 500.0),  # convex: always virtual
])
def test_spherical_mirror_equation(radius: float, s_object: float) -> None:
    # 1/so + 1/si = -2/R, f = -R/2, m = -si/so, with R < 0 for a mirror concave toward the
    # incoming light (Hecht, 2017, Optics, 5th ed., section 5.4.3, eqs. 5.49-5.50; from memory)
    r = first(f"start in air\nobject {s_object} before, height 1\nmirror m radius {radius}\n")
    s_image = 1 / (-2 / radius - 1 / s_object)
    assert r["focal length"] == pytest.approx(-radius / 2)
    assert r["image distance"] == pytest.approx(s_image, rel=1e-12)
    assert r["magnification"] == pytest.approx(-s_image / s_object, rel=1e-12)
    # a real image lies in front of the mirror (z < 0), a virtual one behind it
    assert r["image position"] == pytest.approx(-s_image, rel=1e-12)


def test_newtonian_form_of_the_lens_equation() -> None:
    # x x' = f f' for distances measured from the focal points (Hecht, 2017, Optics, 5th ed.,
    # eq. 5.23, Newtonian form)
    r = first("start in air\nlens l focal length 40\nobject 65 before, height 2\n")
    x = 65 - 40
    assert (r["image distance"] - 40) * x == pytest.approx(40 * 40)


def test_image_of_a_distant_object_is_f_tan_theta() -> None:
    # the image height of a distant point at field angle theta is -f tan(theta) for a lens in
    # air (common practice)
    r = first("start in air\nlens l focal length 85\nobject at infinity, field angle 10 deg\n")
    assert r["image height"] == pytest.approx(-85 * math.tan(math.radians(10)))
