"""Exact rays and third-order sums against published results.

Sources (named beside each check):
- M. Born & E. Wolf, 1999, Principles of Optics, 7th ed., §4.2.3: the aplanatic points of a
  refracting sphere (distances r·n'/n and r·n/n' from the centre) image each other perfectly,
  at every aperture.
- R. Kingslake & R. B. Johnson, 2010, Lens Design Fundamentals, 2nd ed., ch. 2: exact
  meridional refraction of a ray parallel to the axis, L' = R (1 + sin I' / sin(I - I')) with
  sin I = h/R and n' sin I' = n sin I (from memory; the triangle centre-point-focus and the
  law of sines give the same).
- W. T. Welford, 1986, Aberrations of Optical Systems, ch. 8 (thin lens, stop at the lens):
  S_I = (y⁴ K³ / 4) [ (n/(n-1))² + (n+2)/(n(n-1)²) (B + 2(n²-1)/(n+2) C)² - n/(n+2) C² ],
  least at B = -2(n²-1) C/(n+2); for an object at infinity (C = -1 in his convention) and
  n = 1.5 that is B = 0.714, the classic 1 : -6 radius ratio (Kingslake & Johnson 2010, ch. 4)
  (formula from memory, checked here against the surface-by-surface sums and the real trace).
- Petzval sum of thin lenses Σ φ_i / n_i and the Petzval radius -n f of one thin lens in air
  (Welford 1986, ch. 8; common practice).
- Spherical mirror: a ray parallel to the axis at height h crosses it R / (2 cos I) from the
  centre, sin I = h / R (common practice; Hecht 2017, Optics, 5th ed., §6.4, from memory).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from layoutlang import loads
from layoutlang.engines import aberrations, realrays, seidel
from layoutlang.engines.firstorder import first_order


def _program(text: str):
    return loads(text)


# --- Born & Wolf: aplanatic points of a sphere -------------------------------------------------


def test_aplanatic_points_of_a_sphere_image_perfectly_at_every_aperture():
    # Born & Wolf 1999, §4.2.3. Glass (n = 1.5) to air, radius 10 mm, centre 10 mm upstream.
    # Object inside the glass at r·n'/n = 6.667 mm from the centre (16.667 mm before the
    # vertex); its image is virtual, r·n/n' = 15 mm from the centre (25 mm before the vertex).
    n, n2, r = 1.5, 1.0, 10.0
    system = _program(f"""
medium glass index {n}
start in glass
object {r + r * n2 / n} before
surface radius {-r} into air
""").system
    geo = realrays.geometry(system)
    z_object = -(r + r * n2 / n)
    z_image = -(r + r * n / n2)
    # meridional and skew rays up to 50° from the axis, in every azimuth
    angles = np.radians(np.linspace(1.0, 50.0, 25))
    azimuths = np.radians(np.linspace(0.0, 330.0, 12))
    a, phi = (g.ravel() for g in np.meshgrid(angles, azimuths))
    k = np.stack([np.sin(a) * np.cos(phi), np.sin(a) * np.sin(phi), np.cos(a)])
    rays = realrays.trace(realrays.Rays.start(0.0, 0.0, z_object, *k), geo, system.indices())
    assert (rays.status == realrays.OK).all()
    # every refracted ray, extended backwards, passes through the image point
    to_point = np.stack([-rays.x, -rays.y, z_image - rays.z])
    miss = np.linalg.norm(np.cross(to_point.T, np.stack([rays.kx, rays.ky, rays.kz]).T), axis=1)
    assert miss.max() < 1e-11
    # and the paraxial image agrees with the same point (the paraxial engine, cross-check)
    assert first_order(system)["image distance"] == pytest.approx(z_image, rel=1e-12)


# --- Kingslake & Johnson: exact refraction of a parallel ray -----------------------------------


@pytest.mark.parametrize("radius, n, n2", [(50.0, 1.0, 1.5), (-40.0, 1.0, 1.8), (30.0, 1.6, 1.0)])
@pytest.mark.parametrize("fraction", [0.05, 0.3, 0.6, 0.9])
def test_parallel_ray_refracted_at_one_surface_crosses_the_axis_where_the_closed_form_says(
        radius, n, n2, fraction):
    # Kingslake & Johnson 2010, ch. 2: L' = R (1 + sin I' / sin(I - I')).
    h = fraction * abs(radius) * min(1.0, n2 / n) * 0.99
    sin_i = h / radius
    i = math.asin(sin_i)
    i2 = math.asin(n * sin_i / n2)
    expected = radius * (1 + math.sin(i2) / math.sin(i - i2))
    system = _program(f"""
medium a index {n}
medium b index {n2}
start in a
object at infinity
surface radius {radius} into b
""").system
    rays = realrays.trace(realrays.Rays.start(0.0, h, -5.0, 0.0, 0.0, 1.0),
                          realrays.geometry(system), system.indices())
    assert rays.status[0] == realrays.OK
    crossing = rays.z[0] - rays.y[0] * rays.kz[0] / rays.ky[0]
    assert crossing == pytest.approx(expected, rel=1e-12, abs=1e-10)


def test_parallel_ray_on_a_concave_mirror_crosses_the_axis_r_over_two_cos_i_from_the_centre():
    # Spherical mirror, common practice: C F = R / (2 cos I).
    system = _program("object at infinity\nstart in air\nmirror radius -100").system
    for h in (1.0, 20.0, 45.0, 70.0):
        rays = realrays.trace(realrays.Rays.start(0.0, h, -10.0, 0.0, 0.0, 1.0),
                              realrays.geometry(system), system.indices())
        assert rays.kz[0] < 0  # travelling back
        crossing = rays.z[0] - rays.y[0] * rays.kz[0] / rays.ky[0]
        cos_i = math.sqrt(1 - (h / 100.0) ** 2)
        assert crossing == pytest.approx(-100.0 + 100.0 / (2 * cos_i), rel=1e-12)


# --- Welford: thin-lens spherical aberration and its best shape --------------------------------


def _thin_lens(n: float, focal: float, shape: float, thickness: float = 1e-7,
               diameter: float = 10.0) -> str:
    """A thin lens in air with shape factor B = (c1 + c2)/(c1 - c2), stop at the lens."""
    power = 1 / focal
    c_difference = power / (n - 1)  # c1 - c2
    c1 = c_difference * (shape + 1) / 2
    c2 = c_difference * (shape - 1) / 2
    second = "surface back flat into air" if c2 == 0 else f"surface back curvature {c2} into air"
    return f"""
medium glass index {n}
object at infinity, field angle 1 deg
start in air
surface front curvature {c1} into glass
gap {thickness}
{second}
stop at front, diameter {diameter}
image at focus
"""


def _welford_thin_lens_si(y: float, power: float, n: float, shape: float, conjugate: float):
    return (y ** 4 * power ** 3 / 4) * (
        (n / (n - 1)) ** 2
        + (n + 2) / (n * (n - 1) ** 2) * (shape + 2 * (n * n - 1) / (n + 2) * conjugate) ** 2
        - n / (n + 2) * conjugate ** 2)


@pytest.mark.parametrize("n", [1.5, 1.7])
@pytest.mark.parametrize("shape", [-1.0, 0.0, 0.714, 1.0, 2.0])
def test_seidel_spherical_sum_of_a_thin_lens_matches_the_closed_form(n, shape):
    # Welford 1986, ch. 8, object at infinity: C = -1 in our sign convention (u' < 0).
    system = _program(_thin_lens(n, 100.0, shape)).system
    sums = seidel.seidel(system)
    expected = _welford_thin_lens_si(5.0, 0.01, n, shape, -1.0)
    assert sums.total("spherical") == pytest.approx(expected, rel=1e-5)


def test_least_spherical_aberration_at_the_published_best_shape():
    # Welford 1986: B = 2(n²-1)/(n+2) = 0.714 for n = 1.5 (radius ratio 1 : -6,
    # Kingslake & Johnson 2010, ch. 4).
    shapes = np.linspace(0.0, 1.5, 301)
    values = [seidel.seidel(_program(_thin_lens(1.5, 100.0, b)).system).total("spherical")
              for b in shapes]
    best = shapes[int(np.argmin(values))]
    assert best == pytest.approx(2 * (1.5 ** 2 - 1) / (1.5 + 2), abs=0.006)
    c1 = 0.01 / 0.5 * (best + 1) / 2
    c2 = 0.01 / 0.5 * (best - 1) / 2
    assert c1 / c2 == pytest.approx(-6.0, rel=0.05)  # R2 / R1 = -6


@pytest.mark.parametrize("shape", [0.714, -1.0, 2.0])
def test_real_trace_spherical_aberration_tends_to_the_third_order_value(shape):
    # Third-order longitudinal spherical aberration -S_I / (2 n' u'²) (Welford 1986, ch. 8):
    # the real value over the third-order one tends to 1 as the aperture goes to zero.
    ratios = []
    for diameter in (8.0, 2.0, 0.5):
        program = _program(_thin_lens(1.5, 100.0, shape, diameter=diameter))
        results = first_order(program.system)
        rays = aberrations.setup(program.system, results)
        real = aberrations.marginal(rays, [1.0])[0].longitudinal
        na = results["numerical aperture"]
        third = -seidel.seidel(program.system, results).total("spherical") / (2 * na * na)
        ratios.append(real / third)
    errors = [abs(r - 1) for r in ratios]
    assert errors[0] > errors[1] > errors[2]
    assert errors[2] < 2e-3


# --- Petzval sum of thin lenses ----------------------------------------------------------------


def test_petzval_sum_of_thin_lenses_is_the_sum_of_power_over_index():
    # Welford 1986, ch. 8 (common practice): P = Σ φ_i / n_i for thin lenses in air.
    program = _program("""
medium crown index 1.52
medium flint index 1.65
object at infinity, field angle 3 deg
start in air
surface a radius 40 into crown
gap 0.000001
surface b radius -60 into air
gap 20
surface c radius -30 into flint
gap 0.000001
surface d radius 80 into air
stop at a, diameter 10
""")
    phi1 = (1.52 - 1) * (1 / 40 - 1 / -60)
    phi2 = (1.65 - 1) * (1 / -30 - 1 / 80)
    sums = seidel.seidel(program.system)
    assert sums.petzval_sum == pytest.approx(phi1 / 1.52 + phi2 / 1.65, rel=1e-6)


def test_petzval_radius_of_one_thin_lens_is_minus_n_f():
    # common practice: a positive thin lens in air curves its Petzval surface towards itself.
    sums = seidel.seidel(_program(_thin_lens(1.6, 80.0, 0.3)).system)
    assert sums.petzval_radius == pytest.approx(-1.6 * 80.0, rel=1e-6)


# --- ball lens: both faces on one sphere ---------------------------------------------------------
# A ray parallel to the axis at height h leaves a sphere with the same distance h from its
# centre (the path inside is symmetric about the centre), deviated by 2 (I - I'), sin I = h/R,
# n sin I' = sin I; so it crosses the axis h / sin(2 (I - I')) beyond the centre (common
# practice: plane geometry of the sphere and Snell's law). The exit face starts on the entry
# face's sphere, the case in which a naive root of the intersection quadratic cancels to 0/0.


@pytest.mark.parametrize("height", [0.03, 0.075, 0.106, 0.15, 0.3])
def test_ball_lens_exact_focus_matches_the_closed_form(height: float) -> None:
    n, radius = 1.746, 1.0
    program = _program(
        f"medium ball index {n}\nobject at infinity\nstart in air\n"
        f"surface entry radius {radius} into ball\ngap {2 * radius}\n"
        f"surface exit radius {-radius} into air\nstop at entry, diameter 0.8\nimage at focus")
    geo = realrays.geometry(program.system)
    rays = realrays.Rays.start(0.0, [height], -1.0, 0.0, 0.0, 1.0)
    realrays.trace(rays, geo, program.system.indices())
    assert rays.status.tolist() == [realrays.OK]
    # where the traced ray crosses the axis, measured from the ball's centre
    y, z, ky, kz = rays.y[0], rays.z[0], rays.ky[0], rays.kz[0]
    crossing = z - y * kz / ky - radius
    incidence = math.asin(height / radius)
    refracted = math.asin(math.sin(incidence) / n)
    assert crossing == pytest.approx(height / math.sin(2 * (incidence - refracted)), rel=1e-10)
