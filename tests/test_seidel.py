"""Tests of the third-order sums: internal consistency of the surface formulas, mirrors, ideal
lenses, stop shift and the chromatic sums.

Source of the formulas: W. T. Welford, 1986, Aberrations of Optical Systems, ch. 8; the checks
against published thin-lens results are in tests/outside/test_rays_published.py.
"""

from __future__ import annotations

import pytest

from layoutlang import loads
from layoutlang.engines import seidel
from layoutlang.engines.firstorder import Unavailable, first_order

DOUBLET = """
medium crown index 1.517
medium flint index 1.62
object at infinity, field angle 4 deg
start in air
surface front radius 61.1 into crown
gap 6
surface joint radius -44.4 into flint
gap 2.5
surface back radius -129.0 into air
stop 5 before front, diameter 20
image at focus
"""


def _sums(text: str):
    return seidel.seidel(loads(text).system)


def test_distortion_in_the_division_free_form_equals_the_textbook_form():
    # Welford 1986: S_V = (Ā/A)(S_III + S_IV) per surface; the engine uses an equivalent form
    # without the division. Rebuild the rays here to compare surface by surface.
    sums = _sums(DOUBLET)
    for s in sums.surfaces:
        # S_II² = S_I S_III and S_II / S_I = Ā / A, so Ā/A is known from the sums themselves
        ratio = s.coma / s.spherical
        assert s.coma * s.coma == pytest.approx(s.spherical * s.astigmatism, rel=1e-9)
        assert s.distortion == pytest.approx(ratio * (s.astigmatism + s.field_curvature),
                                             rel=1e-9, abs=1e-15)


def test_field_curvature_sum_is_lagrange_squared_times_petzval_sum():
    sums = _sums(DOUBLET)
    assert sums.total("field_curvature") == pytest.approx(
        sums.lagrange_invariant ** 2 * sums.petzval_sum, rel=1e-12)


def test_spherical_aberration_does_not_depend_on_the_stop_position_but_coma_does():
    # Welford 1986, stop-shift equations: S_I is unchanged for the same axial beam.
    moved = DOUBLET.replace("stop 5 before front", "stop 2 after front")
    a, b = _sums(DOUBLET), _sums(moved)
    pupil_a = first_order(loads(DOUBLET).system)["entrance pupil diameter"]
    pupil_b = first_order(loads(moved).system)["entrance pupil diameter"]
    assert a.total("spherical") / pupil_a ** 4 == pytest.approx(
        b.total("spherical") / pupil_b ** 4, rel=1e-12)
    assert a.total("coma") != pytest.approx(b.total("coma"), rel=1e-3)
    assert a.petzval_sum == pytest.approx(b.petzval_sum, rel=1e-12)


def test_a_concave_mirror_with_the_stop_at_its_centre_has_only_spherical_and_petzval():
    # stop at the centre of curvature: the chief ray meets the mirror along its normal
    sums = _sums("object at infinity, field angle 2 deg\nstart in air\n"
                 "mirror primary radius -200\nstop 200 before primary, diameter 40")
    assert sums.total("coma") == pytest.approx(0.0, abs=1e-15)
    assert sums.total("astigmatism") == pytest.approx(0.0, abs=1e-15)
    assert sums.total("spherical") > 0
    # Petzval surface of a concave mirror: radius R/2 (common practice)
    assert sums.petzval_radius == pytest.approx(-100.0, rel=1e-12)


def test_an_ideal_lens_contributes_nothing_and_constant_indices_have_no_colour():
    sums = _sums("object at infinity, field angle 2 deg\nstart in air\nlens thin focal length 50\n"
                 "stop at thin, diameter 10")
    assert all(getattr(sums.surfaces[0], name) == 0 for name in
               ("spherical", "coma", "astigmatism", "field_curvature", "distortion"))
    assert isinstance(sums.petzval_radius, Unavailable)
    doublet = _sums(DOUBLET)
    assert doublet.total("axial_colour") == 0 and doublet.total("lateral_colour") == 0


def test_chromatic_sums_follow_the_index_differences():
    # C_I = Σ A y Δ(δn/n): with δn given for each space, a positive crown lens in air has a
    # positive axial colour sum (undercorrected, common practice), and the value scales with δn.
    system = loads("""
medium glass index 1.5
object at infinity
start in air
surface front radius 50 into glass
gap 0.000001
surface back radius -50 into air
stop 0 before front, diameter 10
""").system
    one = seidel.seidel(system, dispersions=[0.0, 0.008, 0.0])
    two = seidel.seidel(system, dispersions=[0.0, 0.016, 0.0])
    assert one.total("axial_colour") > 0
    assert two.total("axial_colour") == pytest.approx(2 * one.total("axial_colour"), rel=1e-12)
    # thin lens in air, stop at the lens: C_I = y² φ / V with V = (n - 1)/δn (Welford 1986)
    phi = 0.5 * (1 / 50 + 1 / 50)
    assert one.total("axial_colour") == pytest.approx(25 * phi * 0.008 / 0.5, rel=1e-5)


def test_without_a_stop_there_are_no_sums():
    result = _sums("start in air\nsurface radius 20")
    assert isinstance(result, Unavailable)


def test_axial_colour_sum_matches_the_paraxial_focus_shift_between_wavelengths():
    # Welford 1986, ch. 8: longitudinal chromatic aberration δl' = -C_I / (n' u'²) to first
    # order in δn; compared here with the paraxial image distances at the two wavelengths.
    program = loads("""
wavelengths d primary, F, C
medium crown glass code 517642
object at infinity
start in air
surface front radius 60 into crown
gap 0.0001
surface back radius -60 into air
stop at front, diameter 10
image at focus
""")
    system = program.system
    sums = seidel.seidel(system)
    na = first_order(system)["numerical aperture"]
    third = -sums.total("axial_colour") / na ** 2
    short, long = (first_order(system.at_wavelength(w))["image distance"]
                   for w in (486.1327e-6, 656.2725e-6))
    assert third == pytest.approx(short - long, rel=0.02)
    assert third < 0  # a positive singlet brings blue to a focus first


def test_a_thin_lens_after_a_mirror_converges_in_the_seidel_trace_too() -> None:
    # A concave mirror of radius 200 acts on the axial bundle as a thin lens of focal length
    # 100 (mirror equation, common practice); a window after a thin lens sees the same ray
    # whether the path is folded by the mirror or not, so its third-order sums agree.
    from layoutlang import loads
    from layoutlang.engines.seidel import seidel

    tail = ("gap 50\nlens l focal length 50\ngap 10\nsurface w flat into glass\n"
            "gap 5\nsurface v flat into air\nimage at focus\n")
    head = "medium glass index 1.5\nobject at infinity, field angle 1 deg\nstart in air\n"
    folded = seidel(loads(head + "mirror m radius -200\nstop at m, diameter 20\n" + tail).system)
    straight = seidel(loads(head + "lens m focal length 100\nstop at m, diameter 20\n"
                            + tail).system)
    window = [s for s in folded.surfaces if s.name == "w"][0]
    same = [s for s in straight.surfaces if s.name == "w"][0]
    assert window.spherical == pytest.approx(same.spherical, rel=1e-9)
    assert window.spherical != 0
