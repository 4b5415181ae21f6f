"""Derived closed forms against published equations and a general-purpose reference library.

Each test derives an equation from a symbolic script and compares it, as an exact rational
function, with the published one: the single refracting boundary, the thick lens (lensmaker's
equation as computed by sympy.physics.optics), the thin lens and the spherical mirror.
"""

from __future__ import annotations

import sympy as sp

from layoutlang import loads
from layoutlang.symbolic.derive import IMAGE_SYMBOL, derive


def _part(text: str):
    return loads(text).symbolic


def _same(a, b) -> bool:
    return sp.cancel(sp.together(a - b)) == 0


ONE_BOUNDARY = """\
symbols n1 n2 R a positive
medium outside index n1
medium inside index n2
object a before
start in outside
surface radius R into inside
"""


def test_single_boundary_conjugate_equation() -> None:
    # Refraction at one spherical boundary, n1/s_o + n2/s_i = (n2 - n1)/R, object distance
    # positive before the vertex, image distance positive after it, R positive when the centre
    # of curvature lies after the vertex (Hecht, 2017, Optics, 5th ed., eq. 5.8, from memory).
    part = _part(ONE_BOUNDARY)
    n1, n2, R, a = part.symbols
    image = IMAGE_SYMBOL()
    equation = derive(part, "conjugate equation").equation
    assert _same(equation.lhs, n1 / a + n2 / image)
    assert _same(equation.rhs, (n2 - n1) / R)
    # and the image distance solves it
    s_image = derive(part, "image distance").expr
    assert _same(n1 / a + n2 / s_image, (n2 - n1) / R)
    # the printed form reads like the published one
    from layoutlang.symbolic.render import _plain

    assert _plain(equation, as_built=True) == "n1/a + n2/s' = (n2 - n1)/R"


def test_single_boundary_focal_lengths() -> None:
    # Focal lengths of one boundary: f_o = n1 R/(n2 - n1), f_i = n2 R/(n2 - n1)
    # (Hecht, 2017, Optics, 5th ed., eqs. 5.5 and 5.6, from memory).
    part = _part(ONE_BOUNDARY)
    n1, n2, R, a = part.symbols
    assert _same(derive(part, "focal length").expr, n2 * R / (n2 - n1))
    assert _same(derive(part, "front focal distance").expr, n1 * R / (n2 - n1))
    assert _same(derive(part, "magnification").expr,
                 -(n1 * derive(part, "image distance").expr) / (n2 * a))


THICK = """\
symbols R1 R2 real
symbols n d positive
medium glass index n
object at infinity
start in air
surface front radius R1 into glass
gap d
surface back radius R2 into air
"""


def test_thick_lens_against_sympy_lens_makers_formula() -> None:
    # Lensmaker's equation for a thick lens in air, as computed by the reference library
    # sympy.physics.optics.lens_makers_formula(n_lens, n_surr, r1, r2, d) (sympy 1.14).
    from sympy.physics.optics import lens_makers_formula

    part = _part(THICK)
    R1, R2, n, d = part.symbols
    reference = lens_makers_formula(n, 1, R1, R2, d)
    assert _same(derive(part, "focal length").expr, reference)
    assert _same(derive(part, "effective focal length").expr, reference)
    assert _same(derive(part, "power").expr, 1 / reference)


def test_thick_lens_back_focal_distance_and_principal_points() -> None:
    # Thick lens in air: back focal distance f (1 - (n - 1) d/(n R1)); principal planes
    # h1 = -f (n - 1) d/(n R2) and h2 = -f (n - 1) d/(n R1) from the vertices (Hecht, 2017,
    # Optics, 5th ed., eqs. 6.3-6.5, from memory; signs as in our convention).
    from sympy.physics.optics import lens_makers_formula

    part = _part(THICK)
    R1, R2, n, d = part.symbols
    f = lens_makers_formula(n, 1, R1, R2, d)
    assert _same(derive(part, "back focal distance").expr, f * (1 - (n - 1) * d / (n * R1)))
    assert _same(derive(part, "front principal point").expr, -f * (n - 1) * d / (n * R2))
    assert _same(derive(part, "back principal point").expr, -f * (n - 1) * d / (n * R1))


def test_thin_lens_equation() -> None:
    # Gaussian lens formula 1/s_o + 1/s_i = 1/f, real object before, real image after
    # (Hecht, 2017, Optics, 5th ed., eq. 5.17, from memory).
    part = _part("symbols f a positive\nobject a before\nstart in air\nlens focal length f\n")
    f, a = part.symbols
    equation = derive(part, "conjugate equation").equation
    assert _same(equation.lhs, 1 / a + 1 / IMAGE_SYMBOL())
    assert _same(equation.rhs, 1 / f)
    assert _same(derive(part, "image distance").expr, a * f / (a - f))
    assert _same(derive(part, "magnification").expr, -derive(part, "image distance").expr / a)


def test_spherical_mirror_equation() -> None:
    # Spherical mirror 1/s_o + 1/s_i = -2/R with R negative for a concave mirror facing the
    # light, image distance positive in front of the mirror (Hecht, 2017, Optics, 5th ed.,
    # eq. 5.49, from memory); our distances run along the reflected light, which gives the
    # same signs.
    part = _part("symbols R real\nsymbols a positive\nobject a before\nstart in air\n"
                 "mirror radius R\n")
    R, a = part.symbols
    equation = derive(part, "conjugate equation").equation
    assert _same(equation.lhs, 1 / a + 1 / IMAGE_SYMBOL())
    assert _same(equation.rhs, -2 / R)
    assert _same(derive(part, "focal length").expr, -R / 2)


def test_two_thin_lenses_in_contact_and_apart() -> None:
    # Two thin lenses a distance d apart: 1/f = 1/f1 + 1/f2 - d/(f1 f2) (Hecht, 2017, Optics,
    # 5th ed., eq. 6.8, from memory).
    part = _part("symbols f1 f2 d positive\nobject at infinity\nstart in air\n"
                 "lens focal length f1\ngap d\nlens focal length f2\n")
    f1, f2, d = part.symbols
    assert _same(derive(part, "power").expr, 1 / f1 + 1 / f2 - d / (f1 * f2))


def test_lensmaker_equation_form() -> None:
    # 1/f = (n - 1)(1/R1 - 1/R2 + (n - 1) d/(n R1 R2)) (Hecht, 2017, Optics, 5th ed.,
    # section 6.2, from memory)
    part = _part(THICK)
    R1, R2, n, d = part.symbols
    equation = derive(part, "lensmaker equation").equation
    assert _same(equation.rhs, (n - 1) * (1 / R1 - 1 / R2 + (n - 1) * d / (n * R1 * R2)))
    # and it is printed in that published order, term by term
    from layoutlang.symbolic import render

    text = render.text(render.carry_out(loads(THICK + "derive lensmaker equation\n")))
    assert "1/f = (n - 1)*(1/R1 - 1/R2 + (n - 1)*d/(R1*R2*n))" in text
