"""Surfaces placed in space, checked against published results and common practice.

Sources, each beside its check:
- prism minimum deviation n = sin((A + D)/2) / sin(A/2) and the general deviation
  D = θ1 + asin(n·sin(A − asin(sin θ1 / n))) − A: E. Hecht, *Optics*, 4th ed. (2002), §5.5.1;
- fused silica index: I. H. Malitson, "Interspecimen comparison of the refractive index of
  fused silica", JOSA 55, 1205 (1965) — the Sellmeier coefficients, typed here independently of
  stdlib/materials.lay;
- lateral displacement of a tilted plane-parallel plate t·sinθ·(1 − cosθ/√(n² − sin²θ)):
  W. J. Smith, *Modern Optical Engineering*, 4th ed. (2008), §4.2 (plane parallel plates);
- a thin lens decentred by d deviates a beam by d/f (small angles; prism effect of a decentred
  lens, Prentice's rule, any ophthalmic optics text, e.g. Jalie, *The Principles of Ophthalmic
  Lenses*);
- a fold mirror changes the direction of the axis but no first-order property (common
  practice); an odd number of reflections gives a reversed (mirror) image, an even number a
  right-reading one, rotated at most (common practice, e.g. Smith §4.3 on mirror and prism
  systems).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from layoutlang import loads
from layoutlang.engines import placed, realrays
from layoutlang.engines.firstorder import first_order
from layoutlang.engines.rayquantities import ray_quantities


def _program(text: str):
    return loads(text)


def _axial_exit(system):
    geo = realrays.geometry(system)
    rays = realrays.Rays.start(0.0, 0.0, -1.0, 0.0, 0.0, 1.0)
    realrays.trace(rays, geo, [float(n) for n in system.indices()])
    return rays


# --- prisms (Hecht 2002, §5.5.1) ------------------------------------------------------------

@pytest.mark.parametrize("apex_deg, n", [(60.0, 1.5168), (30.0, 1.62), (45.0, 1.7)])
def test_minimum_deviation_meets_the_published_formula(apex_deg: float, n: float) -> None:
    program = _program(f"""
medium glass index {n}
object at infinity
start in air
prism p in glass, apex {apex_deg} deg, thickness 10
""")
    system = program.system
    deviation = placed.prism_deviation(system, 0, 1)
    a = math.radians(apex_deg)
    assert math.sin((a + deviation) / 2) / math.sin(a / 2) == pytest.approx(n, rel=1e-12)


def _silica(um: float) -> float:  # Malitson 1965
    l2 = um * um
    return math.sqrt(1 + 0.6961663 * l2 / (l2 - 0.0684043 ** 2)
                     + 0.4079426 * l2 / (l2 - 0.1162414 ** 2)
                     + 0.8974794 * l2 / (l2 - 9.896161 ** 2))


def test_prism_dispersion_with_stdlib_fused_silica() -> None:
    program = _program("""
use materials
wavelengths d primary, F, C
object at infinity
start in air
prism p in fused_silica, apex 60 deg, thickness 10
""")
    system = program.system
    a = math.radians(60)
    nd = _silica(0.5875618)
    incidence = math.asin(nd * math.sin(a / 2))  # set at minimum deviation for d
    rays = ray_quantities(system, program.rays)
    for um in (0.5875618, 0.4861327, 0.6562725):
        n = _silica(um)
        published = incidence + math.asin(n * math.sin(a - math.asin(math.sin(incidence) / n))) - a
        ours = rays.value("prism deviation", wavelength=um * 1e-3)
        assert ours == pytest.approx(published, rel=1e-9)  # indices relative to air, as Malitson's
    # blue is deviated more than red (normal dispersion)
    assert rays.value("prism deviation", wavelength=0.4861327e-3) > \
        rays.value("prism deviation", wavelength=0.6562725e-3)


def test_right_angle_prism_turns_by_90_deg_at_every_wavelength() -> None:
    program = _program("""
use materials
wavelengths d primary, F
object at infinity
start in air
prism turner in fused_silica, right angle, size 10
""")
    rays = ray_quantities(program.system, program.rays)
    for wavelength in (None, 0.4861327e-3):
        assert math.degrees(rays.value("prism deviation", wavelength=wavelength)) == \
            pytest.approx(90.0, abs=1e-9)


# --- tilted plate (Smith 2008, §4.2) ---------------------------------------------------------

@pytest.mark.parametrize("theta_deg", [5.0, 20.0, 45.0])
def test_tilted_plate_displaces_the_ray_as_published(theta_deg: float) -> None:
    t, n = 6.0, 1.5168
    program = _program(f"""
medium glass index {n}
object at infinity
start in air
surface a flat into glass
gap {t}
surface b flat into air
tilt a through b by {theta_deg} deg about x
""")
    rays = _axial_exit(program.system)
    theta = math.radians(theta_deg)
    published = t * math.sin(theta) * (1 - math.cos(theta) / math.sqrt(n * n - math.sin(theta) ** 2))
    assert abs(float(rays.y[0])) == pytest.approx(published, rel=1e-12)
    assert float(rays.ky[0]) == pytest.approx(0.0, abs=1e-15)  # a plate does not deviate


# --- decentred thin lens (Prentice's rule) ---------------------------------------------------

@pytest.mark.parametrize("decenter, focal", [(0.5, 100.0), (-2.0, 50.0)])
def test_decentred_thin_lens_deviates_by_decenter_over_focal_length(decenter, focal) -> None:
    program = _program(f"""
object at infinity
start in air
lens l focal length {focal}
decenter l by {decenter} along y
""")
    rays = _axial_exit(program.system)
    slope = float(rays.ky[0] / rays.kz[0])
    assert slope == pytest.approx(decenter / focal, rel=1e-12)  # toward the lens's centre
    deviation = placed.beam_deviation(program.system)
    assert deviation == pytest.approx(abs(decenter) / focal, rel=1e-3)  # small-angle result


# --- fold mirrors (common practice) ----------------------------------------------------------

_CAMERA = """
object at infinity, field angle 8 deg
start in air
medium glass index 1.5
surface front radius 10 into glass
gap 2
surface back radius -40 into air
gap 4
{mirror}
gap 3
surface cover flat
stop at front, diameter 4
image at focus
"""


def test_45_deg_fold_keeps_first_order_and_spot_and_turns_the_axis_by_90_deg() -> None:
    straight = _program(_CAMERA.format(mirror="mirror turn flat")).system
    folded = _program(_CAMERA.format(mirror="fold turn at 45 deg about x")).system
    a, b = first_order(straight), first_order(folded)
    for name in ("focal length", "image distance", "back focal distance", "f-number",
                 "exit pupil position"):
        assert a[name] == b[name]  # the paraxial engine never sees the fold
    ra = ray_quantities(straight, _program(_CAMERA.format(mirror="mirror turn flat")).rays, a)
    rb = ray_quantities(folded, _program(_CAMERA.format(mirror="mirror turn flat")).rays, b)
    for field in (0.0, 1.0):
        assert rb.value("rms spot radius", field) == pytest.approx(
            ra.value("rms spot radius", field), rel=1e-9, abs=1e-13)
    assert math.degrees(placed.axis_turn(folded)) == pytest.approx(90.0, abs=1e-12)
    assert math.degrees(placed.axis_turn(straight)) == pytest.approx(180.0, abs=1e-12)


def _mirrors(*folds: str) -> str:
    lines = ["object at infinity", "start in air", "lens l focal length 50", "gap 10"]
    for i, fold in enumerate(folds):
        axis, angle = (fold[1:], -45) if fold.startswith("-") else (fold, 45)
        lines += [f"fold m{i} at {angle} deg about {axis}", "gap 10"]
    lines += ["surface cover flat", "stop at l, diameter 5", "image at focus"]
    return "\n".join(lines) + "\n"


def test_two_mirrors_give_a_right_reading_image_three_a_reversed_one() -> None:
    # after a mirror the light runs toward local -z, so the same tilt turns it the other way:
    # a periscope is +45 deg, then -45 deg (the README's sign convention, in local frames)
    periscope = placed.image_placement(_program(_mirrors("x", "-x")).system)
    assert not periscope.reversed
    u_turn = placed.image_placement(_program(_mirrors("x", "x")).system)
    assert u_turn.travel == pytest.approx((0.0, 0.0, -1.0), abs=1e-12)
    assert periscope.travel == pytest.approx((0.0, 0.0, 1.0), abs=1e-12)  # parallel, shifted
    # a periscope leaves the image as a lens alone makes it: inverted, not rotated
    assert periscope.up == pytest.approx((0.0, -1.0, 0.0), abs=1e-12)
    crossed = placed.image_placement(_program(_mirrors("x", "y")).system)
    assert not crossed.reversed  # two reflections in crossed planes: rotated, not reversed
    three = placed.image_placement(_program(_mirrors("x", "x", "y")).system)
    assert three.reversed
    one = placed.image_placement(_program(_mirrors("x")).system)
    assert one.reversed


# --- zero placement (property: bit for bit) --------------------------------------------------

def test_zero_tilt_and_decenter_change_nothing_bit_for_bit() -> None:
    from hypothesis import given, settings, strategies as st

    @settings(max_examples=25, deadline=None)
    @given(st.floats(5, 80), st.floats(-80, -5), st.floats(0.5, 6), st.floats(1.4, 1.9),
           st.sampled_from(["x", "y", "z"]))
    def check(r1, r2, gap, n, axis):
        base = f"""
medium glass index {n}
object at infinity, field angle 3 deg
start in air
surface a radius {r1} into glass
gap {gap}
surface b radius {r2} into air
gap 5
surface c flat
stop at a, diameter 4
image at focus
"""
        placed_text = base + f"tilt a by 0 deg about {axis}\ndecenter b by 0 along x\n" \
            f"tilt a through c by 0 deg about {axis}, axis follows\n"
        p0, p1 = _program(base), _program(placed_text)
        assert p1.system.is_coaxial
        r0 = ray_quantities(p0.system, p0.rays)
        r1_ = ray_quantities(p1.system, p1.rays)
        for field in (0.0, 1.0):
            assert r0.value("rms spot radius", field) == r1_.value("rms spot radius", field)
        g0, g1 = realrays.geometry(p0.system), realrays.geometry(p1.system)
        start = realrays.Rays.start(np.linspace(-1, 1, 7), 0.3, -1.0, 0.01, -0.02, 1.0)
        a = realrays.trace(start.copy(), g0, [float(v) for v in p0.system.indices()])
        b = realrays.trace(start.copy(), g1, [float(v) for v in p1.system.indices()])
        assert np.array_equal(a.data, b.data, equal_nan=True)
        assert first_order(p0.system)["focal length"] == first_order(p1.system)["focal length"]

    check()
